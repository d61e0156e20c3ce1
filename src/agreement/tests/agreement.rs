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

#[test]
fn observer_error_recovers_the_simulated_noise() {
    use rand::{RngExt, SeedableRng};
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(12);
    let normal = statrs::distribution::Normal::standard();
    let grade = |v: f64| 1 + [-1.2, -0.4, 0.4, 1.2].iter().filter(|&&t| v > t).count() as i32;
    for sigma in [0.3f64, 0.5, 0.8] {
        let pairs: Vec<(i32, i32)> = (0..4000)
            .map(|_| {
                let x: f64 = rng.sample(normal);
                let ea: f64 = rng.sample(normal);
                let eb: f64 = rng.sample(normal);
                (grade(x + sigma * ea), grade(x + sigma * eb))
            })
            .collect();
        let (r, share) = observer_error(&pairs, 1, 5).unwrap();
        // r = 1 / (1 + σ²); the share of the scored SD that is noise is σ / √(1 + σ²).
        let (r0, s0) = (
            1.0 / (1.0 + sigma * sigma),
            sigma / (1.0 + sigma * sigma).sqrt(),
        );
        assert!((r - r0).abs() < 0.03, "σ {sigma}: r {r} vs {r0}");
        assert!(
            (share - s0).abs() < 0.04,
            "σ {sigma}: share {share} vs {s0}"
        );
    }
    // Too few pairs: no estimate.
    assert_eq!(observer_error(&[(1, 1); 9], 1, 5), None);
}
