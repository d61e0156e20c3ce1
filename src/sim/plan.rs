//! Planning an analysis: many simulated excavations of a given size, preservation and sex
//! ratio, and what the analysis would be able to say.

use super::spec::MissingSpec;
use super::SimError;
use crate::assemblage::{Category, Thresholds};
use crate::data::Sex;
use crate::model::{Context, EvidenceCache, Model};
use crate::prior::Prior;
use serde::Serialize;

/// What the analysis of an excavation of one size would give, over many simulations.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PlanRow {
    /// Individuals excavated.
    pub n: usize,
    /// Simulated excavations.
    pub replicates: usize,
    /// Mean width of the 95% interval of π.
    pub mean_interval_width: f64,
    /// Share of excavations whose 95% interval for π excludes 0.5 (the ratio told apart
    /// from 1:1).
    pub p_differs_from_even: f64,
    /// Expected share of individuals per category, in [`Category::ALL`] order.
    pub category_shares: [f64; 6],
    /// Share of individuals called female or male (not probable) whose call is wrong.
    pub error_rate_of_firm_calls: f64,
}

/// What to plan for.
#[derive(Debug, Clone, PartialEq)]
pub struct PlanSettings {
    /// Excavation sizes (individuals).
    pub sizes: Vec<usize>,
    /// Proportion female to assume.
    pub pi: f64,
    /// Expected preservation.
    pub missing: MissingSpec,
    /// Prior of the analysis.
    pub prior: Prior,
    /// Category thresholds.
    pub thresholds: Thresholds,
    /// Simulated excavations per size.
    pub replicates: usize,
    /// Seed.
    pub seed: u64,
}

/// One simulated excavation: interval width, whether it excludes 0.5, category counts,
/// firm calls and wrong firm calls.
type Excavation = (f64, bool, [usize; 6], usize, usize);

/// Run `replicates` simulated excavations of each size, with sex ratio `pi`, analysed under
/// `prior`. Each excavation is seeded from `seed`, its size and its number.
///
/// # Errors
/// [`SimError`] when the model cannot be simulated.
pub fn plan(model: &Model, settings: &PlanSettings) -> Result<Vec<PlanRow>, SimError> {
    plan_with_progress(model, settings, &crate::progress::Silent)
}

/// As [`plan`], advancing `progress` by one per simulated excavation.
///
/// # Errors
/// As [`plan`].
pub fn plan_with_progress(
    model: &Model,
    settings: &PlanSettings,
    progress: &dyn crate::progress::Progress,
) -> Result<Vec<PlanRow>, SimError> {
    let PlanSettings {
        sizes,
        pi,
        missing,
        prior,
        thresholds,
        replicates,
        seed,
    } = settings;
    let (pi, replicates, seed) = (*pi, *replicates, *seed);
    use rayon::prelude::*;
    // One cache for every simulated excavation: ordinal patterns repeat across them.
    let cache = EvidenceCache::default();
    let mut rows = Vec::new();
    for &n in sizes.iter() {
        let results: Vec<Result<Excavation, SimError>> = (0..replicates)
            .into_par_iter()
            .map(|r| {
                progress.advance(1);
                let s = seed
                    .wrapping_mul(1_000_003)
                    .wrapping_add((n as u64) << 20)
                    .wrapping_add(r as u64);
                let (sim, ev, post) = super::simulate_and_evaluate(
                    model,
                    super::GroupSpec::single(n, pi),
                    missing,
                    s,
                    &Context::new(seed),
                    &cache,
                    prior,
                )?;
                let summ = post.summary();
                let mut counts = [0usize; 6];
                let (mut firm, mut wrong) = (0, 0);
                for (e, sex) in ev.iter().zip(&sim.true_sex) {
                    let c = if e.estimable {
                        thresholds.categorise(post.p_female(e.ln_lr))
                    } else {
                        Category::NotEstimable
                    };
                    counts[Category::ALL.iter().position(|x| *x == c).unwrap_or(5)] += 1;
                    match (c, sex) {
                        (Category::Female, s) => {
                            firm += 1;
                            wrong += usize::from(*s == Sex::Male);
                        }
                        (Category::Male, s) => {
                            firm += 1;
                            wrong += usize::from(*s == Sex::Female);
                        }
                        _ => {}
                    }
                }
                Ok((
                    summ.hi - summ.lo,
                    summ.hi < 0.5 || summ.lo > 0.5,
                    counts,
                    firm,
                    wrong,
                ))
            })
            .collect();
        let results: Vec<_> = results.into_iter().collect::<Result<_, _>>()?;
        let reps = results.len().max(1) as f64;
        let total: usize = results.iter().map(|r| r.2.iter().sum::<usize>()).sum();
        let mut shares = [0.0; 6];
        for r in &results {
            for (k, c) in r.2.iter().enumerate() {
                shares[k] += *c as f64 / total.max(1) as f64;
            }
        }
        let firm: usize = results.iter().map(|r| r.3).sum();
        let wrong: usize = results.iter().map(|r| r.4).sum();
        rows.push(PlanRow {
            n,
            replicates,
            mean_interval_width: results.iter().map(|r| r.0).sum::<f64>() / reps,
            p_differs_from_even: results.iter().filter(|r| r.1).count() as f64 / reps,
            category_shares: shares,
            error_rate_of_firm_calls: if firm > 0 {
                wrong as f64 / firm as f64
            } else {
                0.0
            },
        });
    }
    Ok(rows)
}

#[cfg(test)]
#[path = "tests/plan.rs"]
mod tests;
