//! An independent sampler for the group hierarchy, used to check the nested-grid
//! computation: Gibbs sampling with data augmentation of the sexes.
//!
//! # Algorithm
//! State (s, π₁…π_G, μ, κ). (1) sᵢ | πg ~ Bernoulli(πg LRᵢ / (πg LRᵢ + 1 − πg));
//! (2) πg | s, μ, κ ~ Beta(μκ + F_g, (1 − μ)κ + M_g) (conjugacy); (3) (μ, κ) | π by a
//! random-walk Metropolis step on (logit μ, ln κ) with the continuous priors — μ from the
//! chosen Beta prior, ln κ uniform on [ln 1, ln 1000] — so that no grid is shared with the
//! computation under test.

use super::hierarchy::{KAPPA_MAX, KAPPA_MIN};
use super::posterior::p_female_given;
use rand::distr::Distribution;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use statrs::distribution::Beta;
use statrs::function::beta::ln_beta;

/// Posterior means from the sampler.
#[derive(Debug, Clone, PartialEq)]
pub struct GibbsMeans {
    /// Mean of πg per group.
    pub pi: Vec<f64>,
    /// Mean of μ.
    pub mu: f64,
    /// Metropolis acceptance rate of the (μ, κ) step.
    pub acceptance: f64,
}

fn ln_beta_pdf(x: f64, a: f64, b: f64) -> f64 {
    (a - 1.0) * x.ln() + (b - 1.0) * (1.0 - x).ln() - ln_beta(a, b)
}

/// Run the sampler: `membership[i]` is individual i's group (0..groups), `ln_lrs[i]` its
/// ln LR (0 without evidence), the prior on μ is Beta(a, b).
///
/// Seven arguments on purpose: this is the independent second implementation that the
/// grid posterior is checked against, so it takes plain numbers and slices only (no type of
/// the code it checks).
pub fn gibbs_means(
    ln_lrs: &[f64],
    membership: &[usize],
    groups: usize,
    (a, b): (f64, f64),
    iterations: usize,
    burn_in: usize,
    seed: u64,
) -> GibbsMeans {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut pi = vec![0.5; groups];
    let (mut mu, mut kappa) = (0.5, 20.0);
    let mut sums = vec![0.0; groups];
    let mut mu_sum = 0.0;
    let mut accepted = 0usize;
    let ln_target = |mu: f64, kappa: f64, pi: &[f64]| {
        if !(mu > 0.0 && mu < 1.0 && (KAPPA_MIN..=KAPPA_MAX).contains(&kappa)) {
            return f64::NEG_INFINITY;
        }
        // Prior of μ in logit space (Jacobian μ(1 − μ)); ln κ uniform.
        let prior = ln_beta_pdf(mu, a, b) + mu.ln() + (1.0 - mu).ln();
        prior
            + pi.iter()
                .map(|&p| ln_beta_pdf(p, mu * kappa, (1.0 - mu) * kappa))
                .sum::<f64>()
    };
    for it in 0..iterations {
        let mut f = vec![0usize; groups];
        let mut n = vec![0usize; groups];
        for (&l, &g) in ln_lrs.iter().zip(membership) {
            n[g] += 1;
            if rng.random::<f64>() < p_female_given(pi[g], l) {
                f[g] += 1;
            }
        }
        for g in 0..groups {
            let beta = Beta::new(
                mu * kappa + f[g] as f64,
                (1.0 - mu) * kappa + (n[g] - f[g]) as f64,
            );
            if let Ok(d) = beta {
                pi[g] = d.sample(&mut rng).clamp(1e-12, 1.0 - 1e-12);
            }
        }
        for _ in 0..5 {
            let z1: f64 = rng.random::<f64>() - 0.5;
            let z2: f64 = rng.random::<f64>() - 0.5;
            let lm = (mu / (1.0 - mu)).ln() + 0.8 * z1;
            let new_mu = 1.0 / (1.0 + (-lm).exp());
            let new_kappa = (kappa.ln() + 1.6 * z2).exp();
            let ratio = ln_target(new_mu, new_kappa, &pi) - ln_target(mu, kappa, &pi);
            if rng.random::<f64>().ln() < ratio {
                mu = new_mu;
                kappa = new_kappa;
                accepted += 1;
            }
        }
        if it >= burn_in {
            for g in 0..groups {
                sums[g] += pi[g];
            }
            mu_sum += mu;
        }
    }
    let kept = (iterations - burn_in) as f64;
    GibbsMeans {
        pi: sums.iter().map(|s| s / kept).collect(),
        mu: mu_sum / kept,
        acceptance: accepted as f64 / (5 * iterations) as f64,
    }
}
