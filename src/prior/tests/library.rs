//! Unit tests of `prior/library.rs`.

use super::*;
use crate::prior::PriorShape;

#[test]
fn shipped_priors_load_and_the_default_set_has_fifteen() {
    let s = shipped_priors().unwrap();
    assert_eq!(s[0].name, "flat");
    assert_eq!(s[0].shape, PriorShape::Beta { a: 1.0, b: 1.0 });
    let birth = s.iter().find(|p| p.name == "birth-ratio").unwrap();
    // About 105 males per 100 females: π = 100/205 = 0.4878.
    assert!((birth.mean() - 100.0 / 205.0).abs() < 1e-3);
    assert_eq!(parse_prior_set("shipped,sweep").unwrap().len(), 15);
    assert_eq!(parse_prior_set("flat, fixed:0.25, flat").unwrap().len(), 2);
    assert!(parse_prior_set("nonsense").is_err());
    assert!(parse_prior_set("fixed:2").is_err());
    assert!(parse_prior_set("").is_err());
}
