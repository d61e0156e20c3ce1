//! Calibration of P(female) by simulation with known truth: the reliability table, the
//! expected calibration error, and accuracy per region and per sex (so sex bias shows).

use super::spec::MissingSpec;
use super::SimError;
use crate::data::Sex;
use crate::model::{BlockStatus, Context, EvidenceCache, Model};
use crate::prior::Prior;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// One bin of the reliability table.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ReliabilityBin {
    /// Lower edge of P(F).
    pub lo: f64,
    /// Upper edge.
    pub hi: f64,
    /// Individuals in the bin.
    pub n: usize,
    /// Mean predicted P(F).
    pub mean_p: f64,
    /// Observed share female.
    pub observed: f64,
}

/// Accuracy of one block alone (sign of its ln LR), by true sex.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct BlockAccuracy {
    /// Block id.
    pub block: String,
    /// Females with the block used.
    pub n_female: usize,
    /// Share of them with ln LR > 0.
    pub accuracy_female: f64,
    /// Males with the block used.
    pub n_male: usize,
    /// Share of them with ln LR < 0.
    pub accuracy_male: f64,
}

/// The calibration report.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Calibration {
    /// Simulated individuals with usable evidence.
    pub n: usize,
    /// Ten equal-width bins of P(F).
    pub bins: Vec<ReliabilityBin>,
    /// Expected calibration error: Σ (n_b / N) |mean P(F) − observed share|.
    pub ece: f64,
    /// Per block and sex.
    pub blocks: Vec<BlockAccuracy>,
}

/// One simulated assemblage: (P(F), is female) per individual, and per block the counts
/// (females, correct, males, correct).
type AssemblageRun = (Vec<(f64, bool)>, Vec<[usize; 4]>);

/// Simulate `assemblages` assemblages of `n` individuals, each with π drawn from `prior`
/// (so that the Bayesian posterior is calibrated by construction when the code is right),
/// analyse each under that prior, and compare P(F) with the truth.
///
/// # Errors
/// [`SimError`] when the model cannot be simulated.
pub fn calibrate(
    model: &Model,
    missing: &MissingSpec,
    prior: &Prior,
    assemblages: usize,
    n: usize,
    seed: u64,
) -> Result<Calibration, SimError> {
    use rayon::prelude::*;
    // One cache for every simulated excavation: ordinal patterns repeat across them.
    let cache = EvidenceCache::default();
    use statrs::distribution::Beta;
    let runs: Vec<Result<AssemblageRun, SimError>> = (0..assemblages)
        .into_par_iter()
        .map(|r| {
            let s = seed.wrapping_mul(7_919).wrapping_add(r as u64);
            let mut rng = ChaCha8Rng::seed_from_u64(s);
            let pi = match prior.shape {
                crate::prior::PriorShape::Fixed { pi } => pi,
                crate::prior::PriorShape::Beta { a, b } => {
                    use rand::distr::Distribution;
                    Beta::new(a, b)
                        .map(|d| d.sample(&mut rng))
                        .unwrap_or_else(|_| rng.random())
                }
            };
            let (sim, ev, post) = super::simulate_and_evaluate(
                model,
                super::GroupSpec::single(n, pi),
                missing,
                s,
                &Context::new(seed),
                &cache,
                prior,
            )?;
            let mut pairs = Vec::new();
            let mut acc = vec![[0usize; 4]; model.blocks.len()];
            for (e, sex) in ev.iter().zip(&sim.true_sex) {
                if e.estimable {
                    pairs.push((post.p_female(e.ln_lr), *sex == Sex::Female));
                }
                for (k, b) in e.blocks.iter().enumerate() {
                    if b.status == BlockStatus::Used {
                        match sex {
                            Sex::Female => {
                                acc[k][0] += 1;
                                acc[k][1] += usize::from(b.ln_lr > 0.0);
                            }
                            Sex::Male => {
                                acc[k][2] += 1;
                                acc[k][3] += usize::from(b.ln_lr < 0.0);
                            }
                        }
                    }
                }
            }
            Ok((pairs, acc))
        })
        .collect();
    let mut pairs = Vec::new();
    let mut acc = vec![[0usize; 4]; model.blocks.len()];
    for r in runs {
        let (p, a) = r?;
        pairs.extend(p);
        for (x, y) in acc.iter_mut().zip(a) {
            for i in 0..4 {
                x[i] += y[i];
            }
        }
    }
    let total = pairs.len();
    let mut bins = Vec::new();
    let mut ece = 0.0;
    for b in 0..10 {
        let (lo, hi) = (b as f64 / 10.0, (b + 1) as f64 / 10.0);
        let inside: Vec<&(f64, bool)> = pairs
            .iter()
            .filter(|(p, _)| ((p * 10.0).floor().max(0.0) as usize).min(9) == b)
            .collect();
        let k = inside.len();
        let mean_p = if k > 0 {
            inside.iter().map(|x| x.0).sum::<f64>() / k as f64
        } else {
            f64::NAN
        };
        let observed = if k > 0 {
            inside.iter().filter(|x| x.1).count() as f64 / k as f64
        } else {
            f64::NAN
        };
        if k > 0 {
            ece += k as f64 / total as f64 * (mean_p - observed).abs();
        }
        bins.push(ReliabilityBin {
            lo,
            hi,
            n: k,
            mean_p,
            observed,
        });
    }
    let blocks = model
        .blocks
        .iter()
        .zip(&acc)
        .map(|(b, a)| BlockAccuracy {
            block: b.id().to_string(),
            n_female: a[0],
            accuracy_female: a[1] as f64 / a[0].max(1) as f64,
            n_male: a[2],
            accuracy_male: a[3] as f64 / a[2].max(1) as f64,
        })
        .collect();
    Ok(Calibration {
        n: total,
        bins,
        ece,
        blocks,
    })
}

impl Calibration {
    /// The reliability table and per-block accuracy as readable text.
    pub fn to_text(&self) -> String {
        use std::fmt::Write as _;
        let mut s = String::new();
        let _ = writeln!(
            s,
            "P(female) bin   individuals   mean P(female)   observed share female"
        );
        for b in &self.bins {
            let _ = writeln!(
                s,
                "{:.1}-{:.1}         {:>8}        {:>8.3}          {:>8.3}",
                b.lo, b.hi, b.n, b.mean_p, b.observed
            );
        }
        let _ = writeln!(
            s,
            "expected calibration error {:.4} over {} individuals",
            self.ece, self.n
        );
        let _ = writeln!(
            s,
            "block          females  correct   males  correct   (sign of the block's LR alone)"
        );
        for b in &self.blocks {
            let _ = writeln!(
                s,
                "{:<14} {:>7}  {:>6.3}  {:>7}  {:>6.3}",
                b.block, b.n_female, b.accuracy_female, b.n_male, b.accuracy_male
            );
        }
        s
    }
}

#[cfg(test)]
#[path = "tests/calibration.rs"]
mod tests;
