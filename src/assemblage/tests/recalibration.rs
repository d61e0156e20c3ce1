//! Unit tests of `assemblage/recalibration.rs`.

use super::*;

#[test]
fn rhat_and_ess_on_known_chains() {
    // Independent draws: R-hat ≈ 1 and ESS ≈ the number of draws.
    let mut rng = ChaCha8Rng::seed_from_u64(1);
    let std = Normal::standard();
    let chains: Vec<Vec<f64>> = (0..4)
        .map(|_| (0..1000).map(|_| std.sample(&mut rng)).collect())
        .collect();
    let r = split_rhat(&chains);
    assert!((r - 1.0).abs() < 0.01, "{r}");
    let e = ess(&chains);
    assert!(e > 3000.0 && e < 5000.0, "{e}");
    // Chains stuck at different values: R-hat far above 1.
    let stuck: Vec<Vec<f64>> = (0..4)
        .map(|c| {
            (0..1000)
                .map(|t| c as f64 + 0.01 * (t % 7) as f64)
                .collect()
        })
        .collect();
    assert!(split_rhat(&stuck) > 2.0);
}
