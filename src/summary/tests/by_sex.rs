//! Unit tests of `summary/by_sex.rs`.

use super::*;

/// With every sex certain (P(F) 0 or 1) age by sex equals the plain means and counts.
#[test]
fn certain_sexes_give_plain_counts() {
    let sexes = vec![true, true, false, false, false];
    let draws = vec![sexes.clone(); 50];
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
fn categories_by_age_class() {
    let rows = category_by_age(
        &[Some((20.0, 30.0)), None, Some((50.0, 80.0))],
        &[Category::Female, Category::Male, Category::NotEstimable],
    );
    assert_eq!(rows[2].1[0], 1);
    assert_eq!(rows[5].1[4], 1);
    assert_eq!(rows[4].1[5], 1);
}
