//! Unit tests of `summary/by_sex.rs`.

use super::*;

/// With every sex certain (P(F) 0 or 1) the analyses equal the plain counts.
#[test]
fn certain_sexes_give_plain_counts() {
    let sexes = vec![true, true, false, false, false];
    let draws = vec![sexes.clone(); 50];
    let present = [Some(true), Some(false), Some(true), Some(true), None];
    let p = prevalence_by_sex("c", &present, &draws);
    assert_eq!(p.female.0, 0.5);
    assert!((p.male.0 - 1.0).abs() < 1e-15);
    // No between-draw variance: Rubin's interval is the binomial one.
    let se = (0.5f64 * 0.5 / 2.0).sqrt();
    assert!((p.female.1 - (0.5 - 1.96 * se).max(0.0)).abs() < 1e-12);
    assert!((p.female.2 - (0.5 + 1.96 * se).min(1.0)).abs() < 1e-12);
    assert_eq!((p.n_female, p.n_male), (2.0, 2.0));
    let ages = [
        Some((30.0, 30.0)),
        Some((40.0, 40.0)),
        Some((20.0, 20.0)),
        Some((60.0, 60.0)),
        None,
    ];
    let a = age_by_sex(&ages, &draws, 1);
    assert_eq!(a.mean_female.0, 35.0);
    assert_eq!(a.mean_male.0, 40.0);
    assert_eq!(a.p_females_die_younger, 1.0);
    assert_eq!(a.classes[2].female.0, 1.0); // 25-35: the female aged 30
}

#[test]
fn rubin_closed_form() {
    // Estimates 1, 2, 3 with within-variance 1: T = 1 + (4/3)·1 = 7/3.
    let (q, lo, _) = rubin(&[1.0, 2.0, 3.0], &[1.0, 1.0, 1.0]);
    assert_eq!(q, 2.0);
    assert!((lo - (2.0 - 1.96 * (7.0f64 / 3.0).sqrt())).abs() < 1e-12);
}

#[test]
fn categories_by_age_class() {
    let rows = category_by_age(
        &[Some((20.0, 30.0)), None, Some((50.0, 80.0))],
        &[Category::Female, Category::Male, Category::NotEstimable],
    );
    assert_eq!(rows[2].1[0], 1);
    assert_eq!(rows[5].1[4], 1);
    assert_eq!(rows[4].1[5], 1);
}
