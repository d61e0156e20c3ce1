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
