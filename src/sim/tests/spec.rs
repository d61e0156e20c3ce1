//! Unit tests of `sim/spec.rs`.

use super::*;

#[test]
fn specs_parse_and_reject() {
    let g = parse_groups("north:40:0.5, chapel:15:0.2").unwrap();
    assert_eq!(
        g[1],
        GroupSpec {
            name: "chapel".into(),
            n: 15,
            pi: 0.2
        }
    );
    assert!(parse_groups("north:40").is_err());
    assert!(parse_groups("a:1:1.5").is_err());
    assert!(parse_groups("a:1:0.5,a:2:0.5").is_err());
    let m = MissingSpec::parse("cranium=0.3,trait=0.1,range=0.2,subadult=0.05,dna=1").unwrap();
    assert_eq!(m.region[&Region::Cranium], 0.3);
    assert_eq!(
        (m.trait_rate, m.range_rate, m.subadult_rate, m.dna_rate),
        (0.1, 0.2, 0.05, 1.0)
    );
    assert!(MissingSpec::parse("skull=0.3").is_err());
    assert!(MissingSpec::parse("cranium=3").is_err());
    assert!(MissingSpec::parse("dna").is_err());
    assert!(MissingSpec::fragmentary().region.len() == 4);
    // `none` loses nothing; no spec at all is the fragmentary default of simulate and plan.
    assert_eq!(MissingSpec::parse("none").unwrap(), MissingSpec::default());
    assert_eq!(
        MissingSpec::given_or_fragmentary(None).unwrap(),
        MissingSpec::fragmentary()
    );
    assert_eq!(
        MissingSpec::given_or_fragmentary(Some("none")).unwrap(),
        MissingSpec::default()
    );
}
