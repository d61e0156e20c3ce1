//! Unit tests of `data/problem.rs`.

use super::*;

#[test]
fn display_names_file_row_column_value_and_expectation() {
    let p = Problem {
        file: "a.csv".into(),
        row: Some(7),
        column: Some("glabella".into()),
        value: Some("7".into()),
        kind: ProblemKind::GradeOutOfRange,
        expected: "a grade from 1 to 5".into(),
    };
    assert_eq!(
        p.to_string(),
        "a.csv, row 7, column `glabella`: found `7`: a grade from 1 to 5"
    );
}

#[test]
fn printable_escapes_and_shortens() {
    assert_eq!(printable("a\tb"), "a\\tb");
    assert_eq!(printable(&"x".repeat(100)).chars().count(), 61);
}

#[test]
fn warnings_beyond_the_shown_number_are_counted_by_kind() {
    let w = |row, kind| Warning {
        file: "a.csv".into(),
        row: Some(row),
        column: None,
        kind,
        message: "m".into(),
    };
    let mut all: Vec<Warning> = (2..30).map(|r| w(r, WarningKind::NoEvidence)).collect();
    all.insert(5, w(7, WarningKind::SidesDisagree));
    let lines = shown_warnings(&all, 3);
    // 3 of each kind shown in their order, then one count per kind cut short.
    assert_eq!(lines.len(), 3 + 1 + 1);
    assert!(lines[..4].iter().any(|l| l.starts_with("a.csv, row 7")));
    assert_eq!(
        lines[4],
        "a.csv: 25 more warnings of a row with no trait recorded on rows 5 to 29 are not shown (28 in all; `tessera check a.csv --format json` lists every one)"
    );
    assert_eq!(shown_warnings(&all, 100).len(), all.len());
}
