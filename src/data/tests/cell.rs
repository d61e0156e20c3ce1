//! Unit tests of `data/cell.rs`.

use super::*;

fn g(low: i32, high: i32) -> Observation {
    Observation::Grade { low, high }
}

#[test]
fn grades_and_ranges() {
    assert_eq!(parse_grade("3", 1, 5, None), Ok(g(3, 3)));
    assert_eq!(parse_grade(" 3.0 ", 1, 5, None), Ok(g(3, 3)));
    assert_eq!(parse_grade("3-4", 1, 5, None), Ok(g(3, 4)));
    assert_eq!(parse_grade("3/4", 1, 5, None), Ok(g(3, 4)));
    assert_eq!(parse_grade("3 – 4", 1, 5, None), Ok(g(3, 4)));
    assert_eq!(parse_grade("4-3", 1, 5, None), Ok(g(3, 4)));
    assert_eq!(parse_grade("0", 0, 4, None), Ok(g(0, 0)));
    assert!(g(3, 4).is_range() && !g(3, 3).is_range());
}

#[test]
fn bad_grades_say_what_was_expected() {
    let (k, e) = parse_grade("7", 1, 5, None).unwrap_err();
    assert_eq!(k, ProblemKind::GradeOutOfRange);
    assert!(e.contains("from 1 to 5"));
    assert_eq!(
        parse_grade("0", 1, 5, None).unwrap_err().0,
        ProblemKind::GradeOutOfRange
    );
    assert_eq!(
        parse_grade("3.5", 1, 5, None).unwrap_err().0,
        ProblemKind::UnreadableValue
    );
    assert_eq!(
        parse_grade("x", 1, 5, None).unwrap_err().0,
        ProblemKind::UnreadableValue
    );
    assert_eq!(
        parse_grade("3-9", 1, 5, None).unwrap_err().0,
        ProblemKind::GradeOutOfRange
    );
    assert_eq!(
        parse_grade("-1", 1, 5, None).unwrap_err().0,
        ProblemKind::GradeOutOfRange
    );
}

#[test]
fn scale_maps_translate_other_scales() {
    let m: ScaleMap = [("-2", 1), ("-1", 2), ("0", 3), ("+1", 4), ("+2", 5)]
        .into_iter()
        .map(|(k, v)| (k.to_string(), v))
        .collect();
    assert_eq!(parse_grade("-2", 1, 5, Some(&m)), Ok(g(1, 1)));
    assert_eq!(parse_grade("+2", 1, 5, Some(&m)), Ok(g(5, 5)));
    assert_eq!(parse_grade("-1/0", 1, 5, Some(&m)), Ok(g(2, 3)));
    let (k, e) = parse_grade("3", 1, 5, Some(&m)).unwrap_err();
    assert_eq!(k, ProblemKind::UnreadableValue);
    assert!(e.contains("mapped"));
    let bad: ScaleMap = [("a".to_string(), 9)].into_iter().collect();
    assert_eq!(
        parse_grade("a", 1, 5, Some(&bad)).unwrap_err().0,
        ProblemKind::GradeOutOfRange
    );
}

#[test]
fn measurements_with_units_and_decimal_commas() {
    let m = |c: &str, dc: bool| parse_measurement(c, "mm", 30.0, 60.0, dc);
    assert_eq!(
        m("45.5", false),
        Ok((Observation::Measurement { value: 45.5 }, false))
    );
    assert_eq!(
        m("45,5", true),
        Ok((Observation::Measurement { value: 45.5 }, true))
    );
    let (k, e) = m("45,5", false).unwrap_err();
    assert_eq!(k, ProblemKind::UnreadableValue);
    assert!(e.contains("decimal point"));
    let (k, e) = m("4.5", false).unwrap_err();
    assert_eq!(k, ProblemKind::ImplausibleMeasurement);
    assert!(e.contains("centimetres"), "{e}");
    let (_, e) = m("455", false).unwrap_err();
    assert!(e.contains("ten times too large"), "{e}");
    assert_eq!(
        m("-3", false).unwrap_err().0,
        ProblemKind::ImplausibleMeasurement
    );
    assert_eq!(m("inf", false).unwrap_err().0, ProblemKind::UnreadableValue);
    assert_eq!(m("NaN", false).unwrap_err().0, ProblemKind::UnreadableValue);
    assert_eq!(
        m("45mm", false).unwrap_err().0,
        ProblemKind::UnreadableValue
    );
}

#[test]
fn counts() {
    assert_eq!(parse_count("1200"), Ok(Observation::Count { value: 1200 }));
    assert_eq!(parse_count("12.0"), Ok(Observation::Count { value: 12 }));
    assert!(parse_count("1,200").is_err());
    assert!(parse_count("-3").is_err());
    assert!(parse_count("2.5").is_err());
    assert!(parse_count("99999999999999999999999").is_err());
    // Counts no sequencer produces are refused with the limit named (10^17 reads of X and none
    // of Y once came out as strong evidence for male).
    let e = parse_count("100000000000000000").unwrap_err();
    assert_eq!(e.0, ProblemKind::LimitExceeded);
    assert!(e.1.contains("10^12"), "{}", e.1);
    assert_eq!(
        parse_count("1000000000000"),
        Ok(Observation::Count {
            value: 1_000_000_000_000
        })
    );
}
