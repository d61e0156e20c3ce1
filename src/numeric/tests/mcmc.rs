//! Unit tests of `numeric/mcmc.rs`.

use super::*;
use rand::distr::Distribution;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use statrs::distribution::Normal;

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

/// An AR(1) chain x_t = φ x_{t−1} + e_t has integrated autocorrelation time
/// τ = (1 + φ)/(1 − φ), so ESS = N (1 − φ)/(1 + φ) (closed form; Geyer 1992).
#[test]
fn ess_of_an_autoregressive_chain_matches_its_closed_form() {
    let mut rng = ChaCha8Rng::seed_from_u64(7);
    let std = Normal::standard();
    let phi: f64 = 0.8;
    let sd = (1.0 - phi * phi).sqrt();
    let chains: Vec<Vec<f64>> = (0..4)
        .map(|_| {
            let mut x = std.sample(&mut rng);
            (0..20_000)
                .map(|_| {
                    x = phi * x + sd * std.sample(&mut rng);
                    x
                })
                .collect()
        })
        .collect();
    let expected = 80_000.0 * (1.0 - phi) / (1.0 + phi);
    let e = ess(&chains);
    // The estimate of τ from 80 000 draws is good to a few per cent at φ = 0.8.
    assert!((e / expected - 1.0).abs() < 0.1, "{e} vs {expected}");
}
