//! Unit tests of `data/settings.rs`.

use super::*;
use crate::catalogue::Catalogue;

#[test]
fn default_and_declared_missing_codes() {
    let mut s = ReadSettings::default();
    for c in ["", "  ", "NA", "na", "N/A", "-", ".", "?"] {
        assert!(s.is_missing(c), "{c:?}");
    }
    assert!(!s.is_missing("nr"));
    s.missing_words.push("NR".into());
    assert!(s.is_missing("nr"));
    assert!(!s.is_missing("3"));
}

#[test]
fn numeric_keys_are_read_as_written() {
    let cat = Catalogue::standard().unwrap();
    let m = parse_scale_maps("glabella: {-2: 1, -1: 2, 0: 3, 1: 4, 2: 5}\n", &cat).unwrap();
    assert_eq!(m["glabella"]["-2"], 1);
    assert_eq!(m["glabella"]["2"], 5);
    assert!(parse_scale_maps("glabella: {a: 9}", &cat)
        .unwrap_err()
        .contains("outside"));
    assert!(parse_scale_maps("femur_head_diameter: {a: 1}", &cat).is_err());
    assert!(parse_scale_maps("nose: {a: 1}", &cat).is_err());
    assert!(parse_scale_maps("[1, 2]", &cat).is_err());
}

#[test]
fn one_recorded_value_written_two_ways_cannot_map_to_two_grades() {
    let cat = Catalogue::standard().unwrap();
    let e = parse_scale_maps("glabella: {1: 2, 1.0: 3}\n", &cat).unwrap_err();
    assert!(e.contains("same recorded value"), "{e}");
    // The same grade twice is harmless.
    parse_scale_maps("glabella: {1: 2, \"+1\": 2}\n", &cat).unwrap();
}
