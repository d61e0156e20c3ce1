//! Unit tests of `agreement/mod.rs`.

use super::*;

#[test]
fn kappa_closed_forms() {
    // Perfect agreement: 1. Complete reversal on a 2-point scale: −1.
    assert_eq!(weighted_kappa(&[(1, 1), (2, 2), (3, 3)], 1, 3, false), 1.0);
    assert!((weighted_kappa(&[(1, 2), (2, 1)], 1, 2, false) + 1.0).abs() < 1e-12);
    // For two categories weighted kappa equals Cohen's unweighted kappa: observed
    // agreement 0.7, chance 0.5 → 0.4.
    let p: Vec<(i32, i32)> = [(1, 1); 35]
        .into_iter()
        .chain([(2, 2); 35])
        .chain([(1, 2); 15])
        .chain([(2, 1); 15])
        .collect();
    assert!((weighted_kappa(&p, 1, 2, true) - 0.4).abs() < 1e-12);
}

#[test]
fn tem_and_icc_closed_forms() {
    // Differences 1, 1, 2: TEM = √(6 / 6) = 1.
    assert!((tem(&[(10.0, 11.0), (20.0, 21.0), (30.0, 32.0)]) - 1.0).abs() < 1e-12);
    // Identical scores: ICC 1.
    assert!((icc_2_1(&[(1.0, 1.0), (2.0, 2.0), (5.0, 5.0)]) - 1.0).abs() < 1e-12);
}
