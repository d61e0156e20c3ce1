//! Unit tests of `data/columns.rs`.

use super::*;

fn assign_roles_(
    f: &str,
    h: &[String],
    c: &Catalogue,
) -> (Vec<ColumnRole>, Vec<Problem>, Vec<Warning>) {
    assign_roles(f, h, c, None, &[])
}

#[test]
fn group_by_another_column() {
    let cat = Catalogue::standard().unwrap();
    let (roles, p, _) = assign_roles(
        "f",
        &header(&["id", "group", "Phase"]),
        &cat,
        Some("phase"),
        &[],
    );
    assert!(p.is_empty());
    assert_eq!(roles[1], ColumnRole::Carried);
    assert_eq!(roles[2], ColumnRole::Group);
    let (_, p, _) = assign_roles("f", &header(&["id", "zone"]), &cat, Some("phase"), &[]);
    assert_eq!(p[0].kind, ProblemKind::MissingGroupColumn);
}

fn header(cols: &[&str]) -> Vec<String> {
    cols.iter().map(|s| s.to_string()).collect()
}

#[test]
fn roles_sides_and_carried_columns() {
    let cat = Catalogue::standard().unwrap();
    let (roles, problems, warnings) = assign_roles_(
        "f",
        &header(&[
            " ID ",
            "Glabella",
            "mastoid_l",
            "MASTOID_R",
            "grave_goods",
            "Group",
        ]),
        &cat,
    );
    assert!(problems.is_empty() && warnings.is_empty());
    let m = cat.position("mastoid").unwrap();
    assert_eq!(roles[0], ColumnRole::Id);
    assert_eq!(
        roles[2],
        ColumnRole::Trait {
            index: m,
            side: Side::Left
        }
    );
    assert_eq!(
        roles[3],
        ColumnRole::Trait {
            index: m,
            side: Side::Right
        }
    );
    assert_eq!(roles[4], ColumnRole::Carried);
    assert_eq!(roles[5], ColumnRole::Group);
}

#[test]
fn midline_traits_have_no_sides() {
    let cat = Catalogue::standard().unwrap();
    let (roles, _, w) = assign_roles_("f", &header(&["id", "glabella_l"]), &cat);
    assert_eq!(roles[1], ColumnRole::Carried);
    assert_eq!(w.len(), 1, "glabella_l is close to glabella");
}

#[test]
fn header_problems() {
    let cat = Catalogue::standard().unwrap();
    let (_, p, _) = assign_roles_("f", &header(&["name", "glabella"]), &cat);
    assert_eq!(p[0].kind, ProblemKind::MissingIdColumn);
    let (_, p, _) = assign_roles_("f", &header(&["id", "Glabella", "glabella "]), &cat);
    assert_eq!(p[0].kind, ProblemKind::DuplicateColumn);
    let (_, p, _) = assign_roles_("f", &header(&["id", "mastoid", "mastoid_r"]), &cat);
    assert_eq!(p[0].kind, ProblemKind::AmbiguousSideColumns);
    let (_, p, _) = assign_roles_("f", &header(&["id|glabella|mastoid"]), &cat);
    assert!(p[0].expected.contains("single column"));
}

#[test]
fn misspellings_are_flagged() {
    let cat = Catalogue::standard().unwrap();
    let (_, _, w) = assign_roles_(
        "f",
        &header(&["id", "glabela", "femur head diameter_l", "mastiod", "notes"]),
        &cat,
    );
    let cols: Vec<_> = w.iter().map(|w| w.column.clone().unwrap()).collect();
    assert_eq!(cols, vec!["glabela", "femur head diameter_l", "mastiod"]);
    assert!(w[1].message.contains("femur_head_diameter_l"));
}
