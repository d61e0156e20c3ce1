//! Unit tests of `data/reader.rs`.

use super::*;

fn read(text: &str) -> Result<Assemblage, InputError> {
    read_assemblage_text(
        "t.csv",
        text.as_bytes(),
        &Catalogue::standard().unwrap(),
        &ReadSettings::default(),
    )
}

fn obs(a: &Assemblage, i: usize, id: &str) -> Option<Observation> {
    a.individuals[i].observations[a.catalogue.position(id).unwrap()]
}

#[test]
fn a_good_file_reads_with_carried_columns() {
    let a = read("id,group,age,glabella,mastoid_l,mastoid_r,femur_head_diameter_r,grave\nB1,north,25-35,3,2,3,44.5,bowl\nB2,,adult,NA,,4-5,,\n").unwrap();
    assert_eq!(a.individuals.len(), 2);
    assert_eq!(a.carried_columns, vec!["grave"]);
    assert_eq!(a.individuals[0].carried, vec!["bowl"]);
    assert_eq!(
        obs(&a, 0, "mastoid"),
        Some(Observation::Grade { low: 2, high: 2 })
    );
    assert_eq!(
        a.individuals[0]
            .observations
            .side(a.catalogue.position("mastoid").unwrap()),
        Some(SideUsed::Left)
    );
    assert_eq!(
        obs(&a, 1, "mastoid"),
        Some(Observation::Grade { low: 4, high: 5 })
    );
    assert_eq!(obs(&a, 1, "glabella"), None);
    assert_eq!(a.individuals[1].group, None);
    assert_eq!(a.individuals[0].n_observed(), 3);
    assert_eq!(a.sha256.len(), 64);
}

#[test]
fn all_problems_at_once_in_row_order() {
    let e = read("id,glabella,femur_head_diameter,age\nA,7,45,30\nA,3,4.5,x\n,2,,\n").unwrap_err();
    let got: Vec<_> = e
        .problems
        .iter()
        .map(|p| (p.row, p.column.as_deref().unwrap_or(""), p.kind))
        .collect();
    assert_eq!(
        got,
        vec![
            (Some(2), "glabella", ProblemKind::GradeOutOfRange),
            (Some(3), "age", ProblemKind::BadAge),
            (
                Some(3),
                "femur_head_diameter",
                ProblemKind::ImplausibleMeasurement
            ),
            (Some(3), "id", ProblemKind::DuplicateId),
            (Some(4), "id", ProblemKind::MissingId),
        ]
    );
}

#[test]
fn side_policies_and_disagreement() {
    let text = "id,mastoid_l,mastoid_r,femur_head_diameter_l,femur_head_diameter_r\nA,1,4,44,48\n";
    let a = read(text).unwrap();
    assert_eq!(
        obs(&a, 0, "mastoid"),
        Some(Observation::Grade { low: 1, high: 1 })
    );
    assert_eq!(
        a.warnings
            .iter()
            .filter(|w| w.kind == WarningKind::SidesDisagree)
            .count(),
        2
    );
    let s = ReadSettings {
        side_policy: SidePolicy::Both,
        ..ReadSettings::default()
    };
    let b =
        read_assemblage_text("t", text.as_bytes(), &Catalogue::standard().unwrap(), &s).unwrap();
    assert_eq!(
        obs(&b, 0, "mastoid"),
        Some(Observation::Grade { low: 1, high: 4 })
    );
    assert_eq!(
        obs(&b, 0, "femur_head_diameter"),
        Some(Observation::Measurement { value: 46.0 })
    );
    let s = ReadSettings {
        side_policy: SidePolicy::RightFirst,
        ..ReadSettings::default()
    };
    let c =
        read_assemblage_text("t", text.as_bytes(), &Catalogue::standard().unwrap(), &s).unwrap();
    assert_eq!(
        obs(&c, 0, "mastoid"),
        Some(Observation::Grade { low: 4, high: 4 })
    );
}

#[test]
fn dna_reads_come_in_pairs_and_rows_without_evidence_warn() {
    let e = read("id,dna_x_reads,dna_y_reads\nA,100,\n").unwrap_err();
    assert_eq!(e.problems[0].kind, ProblemKind::UnpairedReads);
    assert_eq!(e.problems[0].column.as_deref(), Some("dna_y_reads"));
    let a = read("id,dna_x_reads,dna_y_reads,glabella\nA,100,0,\nB,,,\n").unwrap();
    assert_eq!(a.warnings.len(), 1);
    assert_eq!(a.warnings[0].kind, WarningKind::NoEvidence);
}

#[test]
fn an_x_count_may_pair_with_the_autosomes_instead_of_y() {
    // X with the autosomes only (a laboratory reporting Rx): accepted.
    let a = read("id,dna_x_reads,dna_y_reads,dna_autosome_reads\nA,100,,2000\nB,100,3,\n").unwrap();
    assert_eq!(a.individuals.len(), 2);
    // The autosomes (or Y) without X: refused, naming the missing X column, every row.
    let e = read("id,dna_x_reads,dna_y_reads,dna_autosome_reads\nA,,,2000\nB,,4,\nC,100,,\n")
        .unwrap_err();
    let columns: Vec<_> = e
        .problems
        .iter()
        .map(|p| p.column.clone().unwrap())
        .collect();
    assert_eq!(columns, ["dna_x_reads", "dna_x_reads", "dna_y_reads"]);
    assert!(e.problems[0].expected.contains("dna_autosome_reads"));
    assert!(e.problems[2].expected.contains("autosomal"));
}

#[test]
fn missing_words_and_decimal_commas() {
    let s = ReadSettings {
        missing_words: vec!["nr".into()],
        ..ReadSettings::default()
    };
    let a = read_assemblage_text(
        "t",
        b"id;glabella;femur_head_diameter\nA;NR;44,5\n",
        &Catalogue::standard().unwrap(),
        &s,
    )
    .unwrap();
    assert_eq!(obs(&a, 0, "glabella"), None);
    assert_eq!(
        obs(&a, 0, "femur_head_diameter"),
        Some(Observation::Measurement { value: 44.5 })
    );
    assert!(a
        .warnings
        .iter()
        .any(|w| w.kind == WarningKind::DecimalComma));
}

#[test]
fn header_only_is_empty() {
    assert_eq!(
        read("id,glabella\n").unwrap_err().problems[0].kind,
        ProblemKind::Empty
    );
}

#[test]
fn a_second_side_left_out_by_the_side_policy_is_said_once_per_trait() {
    let text = "id,mastoid_l,mastoid_r,glabella\nA,2,3,4\nB,2,,4\nC,4,4,3\n";
    let a = read(text).unwrap();
    let w: Vec<&Warning> = a
        .warnings
        .iter()
        .filter(|w| w.kind == WarningKind::SecondSideUnused)
        .collect();
    assert_eq!(w.len(), 1, "{:?}", a.warnings);
    assert!(
        w[0].message.starts_with(
            "both sides recorded for 2 individuals: under left-first only the left is used"
        ),
        "{}",
        w[0].message
    );
    let both = ReadSettings {
        side_policy: SidePolicy::Both,
        ..ReadSettings::default()
    };
    let b =
        read_assemblage_text("t", text.as_bytes(), &Catalogue::standard().unwrap(), &both).unwrap();
    assert!(!b
        .warnings
        .iter()
        .any(|w| w.kind == WarningKind::SecondSideUnused));
}
