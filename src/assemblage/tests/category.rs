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

#[test]
fn a_note_says_why_category_and_lr_words_differ_in_strength() {
    let t = Thresholds::default();
    // LR 36 for male (log10 −1.556): P(female) = 1/37 = 0.027 at equal odds, a firm "male",
    // while 36 to 1 is moderate support on the ENFSI scale (closed form).
    let n = category_note(&t, Category::Male, -(36f64.log10()), "flat").unwrap();
    assert!(
        n.contains("means P(female) ≤ 0.05 under the flat prior")
            && n.contains("36 to 1, is moderate support for male"),
        "{n}"
    );
    // LR 500 and a firm call: moderately strong support, no note.
    assert_eq!(
        category_note(&t, Category::Female, 500f64.log10(), "flat"),
        None
    );
    // The prior moved it: LR 10 for female alone gives P = 10/11 = 0.909, probable female;
    // a category of female must come from the prior, and the note names the prior.
    let n = category_note(&t, Category::Female, 1.0, "mostly-female").unwrap();
    assert!(
        n.starts_with("female under the mostly-female prior")
            && n.contains("gives probable female"),
        "{n}"
    );
    // Probable female with weak support (LR 5: P = 0.833): same strength, no note.
    assert_eq!(
        category_note(&t, Category::ProbableFemale, 5f64.log10(), "flat"),
        None
    );
    assert_eq!(category_note(&t, Category::NotEstimable, 0.0, "flat"), None);
    assert_eq!(support_rank(0.1), 0);
    assert_eq!(support_rank(-1.5), 2);
    assert_eq!(support_rank(6.5), 6);
}
