//! Unit tests of `assemblage/category.rs`.

use super::*;

#[test]
fn categories_at_the_boundaries() {
    let t = Thresholds::default();
    assert_eq!(t.categorise(0.95), Category::Female);
    assert_eq!(t.categorise(0.949), Category::ProbableFemale);
    assert_eq!(t.categorise(0.80), Category::ProbableFemale);
    assert_eq!(t.categorise(0.5), Category::Indeterminate);
    assert_eq!(t.categorise(0.20), Category::ProbableMale);
    assert_eq!(t.categorise(0.05), Category::Male);
    assert!(Thresholds::parse("0.05,0.2,0.8,0.95").is_ok());
    assert!(Thresholds::parse("0.2,0.05,0.8,0.95").is_err());
    assert!(Thresholds::parse("0.05,0.2").is_err());
}

#[test]
fn verbal_scale() {
    assert_eq!(lr_support(0.1), "no support for either sex");
    assert_eq!(lr_support(0.5), "weak support for female");
    assert_eq!(lr_support(-1.5), "moderate support for male");
    assert_eq!(lr_support(2.5), "moderately strong support for female");
    assert_eq!(lr_support(-3.2), "strong support for male");
    assert_eq!(lr_support(5.0), "very strong support for female");
    assert_eq!(lr_support(-7.0), "extremely strong support for male");
}
