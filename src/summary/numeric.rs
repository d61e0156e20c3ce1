//! A numeric or ordinal outcome by sex (stature, an activity-marker score, a lesion grade),
//! from the joint posterior of everyone's sex and the outcome's distribution in each sex, as
//! the prevalence of a condition is (`prevalence`): the outcome enters the conditional of
//! each sex, so the difference between the sexes is not diluted toward none, which drawing
//! sexes from the skeleton alone and comparing after would do.
//!
//! # Model
//! yᵢ | sᵢ ~ Normal(μ_s, σ_s²), with (μ_s, σ_s²) Normal–inverse-gamma: σ_s² ~ Inv-Gamma(α₀, β₀),
//! μ_s | σ_s² ~ Normal(μ₀, σ_s²/κ₀), weakly informative and centred on the pooled values:
//! μ₀ the mean of every recorded value, κ₀ = 0.01 (a hundredth of an observation), α₀ = ½ and
//! β₀ = ½ × the pooled variance (one observation's worth of spread) — a stated choice of ours.
//! The sexes and π are drawn as for a condition (step 1, 3 and 4 of `prevalence`'s sweep);
//! step 2 is the conjugate update (Gelman et al. 2013, §3.3, from memory):
//! κₙ = κ₀ + n, μₙ = (κ₀μ₀ + nȳ)/κₙ, αₙ = α₀ + n/2,
//! βₙ = β₀ + ½ Σ(yᵢ − ȳ)² + κ₀n(ȳ − μ₀)²/(2κₙ); σ² ~ Inv-Gamma(αₙ, βₙ), μ ~ Normal(μₙ, σ²/κₙ).
//!
//! An ordinal grade is treated as a number (its mean by sex); the medians by sex are the
//! medians of the recorded values among the individuals drawn female (male), over the sweeps.

use super::prevalence::{run_chain, summary, Chain, ChainLength, OutcomeModel, SexEvidence};
use crate::numeric::mcmc::{ess, split_rhat, MAX_RHAT, MIN_ESS};
use rand::distr::Distribution;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use serde::Serialize;
use statrs::distribution::{Gamma, Normal};

/// A numeric outcome by sex.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct NumericBySex {
    /// The outcome column.
    pub column: String,
    /// Individuals in the tables by sex with a value recorded.
    pub n_recorded: usize,
    /// Individuals with a value recorded but left out: no evidence of sex, or a subadult.
    pub n_left_out: usize,
    /// Females among the recorded, posterior mean.
    pub n_female: f64,
    /// Males among the recorded, posterior mean.
    pub n_male: f64,
    /// Mean among females (μ_F): posterior mean and 95% interval.
    pub mean_female: (f64, f64, f64),
    /// Mean among males (μ_M).
    pub mean_male: (f64, f64, f64),
    /// μ_F − μ_M: posterior mean and 95% interval.
    pub difference: (f64, f64, f64),
    /// P(μ_F > μ_M).
    pub p_female_higher: f64,
    /// SD among females (σ_F): posterior mean and 95% interval.
    pub sd_female: (f64, f64, f64),
    /// SD among males.
    pub sd_male: (f64, f64, f64),
    /// Median of the recorded values among those drawn female: mean over sweeps and 95%.
    pub median_female: (f64, f64, f64),
    /// The same among those drawn male.
    pub median_male: (f64, f64, f64),
    /// Largest split-R̂ of μ_F, μ_M and their difference.
    pub rhat: f64,
    /// Smallest effective sample size of the three.
    pub ess: f64,
    /// Draws kept.
    pub draws: usize,
}

impl NumericBySex {
    /// A sentence when the chains did not converge or are too short, `None` otherwise.
    pub fn convergence_note(&self) -> Option<String> {
        (!(self.rhat <= MAX_RHAT && self.ess >= MIN_ESS)).then(|| {
            format!(
                "{} by sex: R-hat {:.3}, effective sample size {:.0} (wanted R-hat ≤ {MAX_RHAT} and at least {MIN_ESS:.0}); treat the interval as rough",
                self.column, self.rhat, self.ess
            )
        })
    }
}

/// The prior (μ₀, κ₀, α₀, β₀) and the current (μ_F, σ_F, μ_M, σ_M, median_F, median_M).
#[derive(Debug, Clone, Copy)]
struct NormalPair {
    prior: (f64, f64, f64, f64),
    mu: [f64; 2],
    sd: [f64; 2],
    median: [f64; 2],
}

impl NormalPair {
    /// The weakly informative prior centred on the pooled values (see the module's docs).
    fn centred_on(values: &[f64]) -> NormalPair {
        let n = values.len().max(1) as f64;
        let mean = values.iter().sum::<f64>() / n;
        let var = values.iter().map(|y| (y - mean).powi(2)).sum::<f64>() / n;
        let var = if var > 0.0 { var } else { 1.0 };
        NormalPair {
            prior: (mean, 0.01, 0.5, 0.5 * var),
            mu: [mean; 2],
            sd: [var.sqrt(); 2],
            median: [mean; 2],
        }
    }

    fn draw(&self, rng: &mut ChaCha8Rng, values: &[f64]) -> (f64, f64) {
        let (mu0, k0, a0, b0) = self.prior;
        let n = values.len() as f64;
        let ybar = if n > 0.0 {
            values.iter().sum::<f64>() / n
        } else {
            mu0
        };
        let ss: f64 = values.iter().map(|y| (y - ybar).powi(2)).sum();
        let kn = k0 + n;
        let mun = (k0 * mu0 + n * ybar) / kn;
        let an = a0 + n / 2.0;
        let bn = b0 + ss / 2.0 + k0 * n * (ybar - mu0).powi(2) / (2.0 * kn);
        let precision = Gamma::new(an, bn).map_or(an / bn, |g| g.sample(rng));
        let var = 1.0 / precision.max(f64::MIN_POSITIVE);
        let mu = Normal::new(mun, (var / kn).sqrt()).map_or(mun, |d| d.sample(rng));
        (mu, var.sqrt())
    }
}

/// Median of a sample (NaN when empty).
fn median(values: &[f64]) -> f64 {
    if values.is_empty() {
        return f64::NAN;
    }
    let mut v = values.to_vec();
    v.sort_by(f64::total_cmp);
    let h = v.len() / 2;
    if v.len() % 2 == 1 {
        v[h]
    } else {
        (v[h - 1] + v[h]) / 2.0
    }
}

impl OutcomeModel for NormalPair {
    type Value = f64;
    fn start(&self, c: usize) -> Self {
        // Dispersed: the two means apart by one pooled SD, one way or the other.
        let shift = if c % 2 == 0 { 0.5 } else { -0.5 } * self.sd[0];
        NormalPair {
            mu: [self.mu[0] + shift, self.mu[1] - shift],
            ..*self
        }
    }
    fn ln_ratio(&self, y: f64) -> f64 {
        let z = |k: usize| (y - self.mu[k]) / self.sd[k];
        -0.5 * (z(0).powi(2) - z(1).powi(2)) - (self.sd[0].ln() - self.sd[1].ln())
    }
    fn update(&mut self, rng: &mut ChaCha8Rng, female: &[f64], male: &[f64]) {
        for (k, v) in [female, male].into_iter().enumerate() {
            let (mu, sd) = self.draw(rng, v);
            self.mu[k] = mu;
            self.sd[k] = sd;
            self.median[k] = median(v);
        }
    }
    fn kept(&self) -> Vec<f64> {
        vec![
            self.mu[0],
            self.mu[1],
            self.sd[0],
            self.sd[1],
            self.median[0],
            self.median[1],
        ]
    }
}

/// A numeric outcome by sex from the joint posterior (see the module's docs). `values[i]` is
/// individual i's value (`None` where not recorded).
pub fn numeric_by_sex(
    ev: &SexEvidence,
    column: &str,
    values: &[Option<f64>],
    len: &ChainLength,
) -> NumericBySex {
    let in_table = |i: usize| ev.in_tables[i] && values[i].is_some();
    let recorded: Vec<f64> = (0..values.len())
        .filter(|&i| in_table(i))
        .filter_map(|i| values[i])
        .collect();
    let model = NormalPair::centred_on(&recorded);
    let chains: Vec<Chain> = (0..len.chains.max(1))
        .into_par_iter()
        .map(|c| run_chain(ev, &model, values, len, c))
        .collect();
    let per_chain =
        |k: usize| -> Vec<Vec<f64>> { chains.iter().map(|c| c.kept[k].clone()).collect() };
    let (mf, mm) = (per_chain(0), per_chain(1));
    let diff: Vec<Vec<f64>> = mf
        .iter()
        .zip(&mm)
        .map(|(a, b)| a.iter().zip(b).map(|(x, y)| x - y).collect())
        .collect();
    let rhat = [&mf, &mm, &diff]
        .iter()
        .map(|c| split_rhat(c))
        .fold(f64::NEG_INFINITY, f64::max);
    let ess_min = [&mf, &mm, &diff]
        .iter()
        .map(|c| ess(c))
        .fold(f64::INFINITY, f64::min);
    // Every chain's draws of quantity k, pooled (without copying each chain first).
    let all = |k: usize| -> Vec<f64> {
        chains
            .iter()
            .flat_map(|c| c.kept[k].iter().copied())
            .collect()
    };
    let d = diff.concat();
    let finite = |v: Vec<f64>| v.into_iter().filter(|x| x.is_finite()).collect::<Vec<_>>();
    let n_f: f64 = chains.iter().flat_map(|c| &c.n_f).sum::<f64>() / d.len().max(1) as f64;
    NumericBySex {
        column: column.to_string(),
        n_recorded: recorded.len(),
        n_left_out: (0..values.len())
            .filter(|&i| !ev.in_tables[i] && values[i].is_some())
            .count(),
        n_female: n_f,
        n_male: recorded.len() as f64 - n_f,
        mean_female: summary(&all(0), false),
        mean_male: summary(&all(1), false),
        difference: summary(&d, false),
        p_female_higher: d.iter().filter(|&&x| x > 0.0).count() as f64 / d.len().max(1) as f64,
        sd_female: summary(&all(2), false),
        sd_male: summary(&all(3), false),
        median_female: summary(&finite(all(4)), false),
        median_male: summary(&finite(all(5)), false),
        rhat,
        ess: ess_min,
        draws: d.len(),
    }
}

#[cfg(test)]
#[path = "tests/numeric.rs"]
mod tests;
