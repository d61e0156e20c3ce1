//! Unit tests of `catalogue/mod.rs`.

use super::*;

#[test]
fn standard_catalogue_loads_with_the_required_ids() {
    let cat = Catalogue::standard().unwrap();
    for id in [
        "glabella",
        "mastoid",
        "supraorbital_margin",
        "mental_eminence",
        "nuchal_crest",
        "ventral_arc",
        "subpubic_concavity",
        "ischiopubic_ramus",
        "sciatic_notch",
        "preauricular_sulcus",
        "femur_head_diameter",
        "femur_midshaft_circumference",
        "humerus_head_diameter",
        "canine_bl_diameter",
        "dna_x_reads",
        "dna_y_reads",
    ] {
        assert!(cat.get(id).is_some(), "missing {id}");
    }
    assert_eq!(cat.get("glabella").unwrap().kind.n_grades(), Some(5));
    assert_eq!(
        cat.get("preauricular_sulcus").unwrap().kind.n_grades(),
        Some(5)
    );
    assert_eq!(
        cat.get("femur_head_diameter").unwrap().region,
        Region::Postcranial
    );
}

#[test]
fn rejects_bad_entries() {
    let bad_scale = "traits:\n  - {id: a, name: a, region: cranium, bilateral: false, kind: ordinal, grades: [3, 3], definition: d, source: s}\n";
    assert!(matches!(
        Catalogue::from_yaml(bad_scale),
        Err(CatalogueError::InvalidTrait { .. })
    ));
    let bad_range = "traits:\n  - {id: a, name: a, region: cranium, bilateral: false, kind: metric, unit: mm, plausible: [5, 1], definition: d, source: s}\n";
    assert!(Catalogue::from_yaml(bad_range).is_err());
    let sided = "traits:\n  - {id: a_l, name: a, region: cranium, bilateral: false, kind: count, definition: d, source: s}\n";
    assert!(Catalogue::from_yaml(sided).is_err());
    let dup = "traits:\n  - {id: a, name: a, region: cranium, bilateral: false, kind: count, definition: d, source: s}\n  - {id: a, name: a, region: cranium, bilateral: false, kind: count, definition: d, source: s}\n";
    assert_eq!(
        Catalogue::from_yaml(dup),
        Err(CatalogueError::DuplicateTrait("a".into()))
    );
    let region = "traits:\n  - {id: a, name: a, region: foot, bilateral: false, kind: count, definition: d, source: s}\n";
    assert!(Catalogue::from_yaml(region).is_err());
    assert!(Catalogue::from_yaml("traits: 3").is_err());
}
