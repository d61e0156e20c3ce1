//! Simulated assemblages with known truth: for checks of calibration, for demo data, and
//! for planning how much an excavation's analysis can tell.

pub mod assemblage;
pub mod calibration;
pub mod elements;
pub mod plan;
pub mod spec;

pub(crate) use assemblage::preserve;
pub use assemblage::{simulate, SimError, Simulated};
pub use spec::{parse_groups, GroupSpec, MissingSpec};

use crate::data::{Individual, Observation, Sex};
use crate::model::latent::LatentKind;
use crate::model::{Block, Model};
use rand::RngExt;
use rand_chacha::ChaCha8Rng;
use statrs::distribution::{Beta, Binomial, Normal};

/// Draw every trait of every latent and DNA block for one individual of the given sex.
/// Equation blocks cannot be simulated (they carry no per-sex distribution) and are skipped.
///
/// `reads` is the number of X + Y reads drawn for the DNA block.
pub fn draw_observations(
    model: &Model,
    sex: Sex,
    reads: u64,
    rng: &mut ChaCha8Rng,
) -> Vec<Option<Observation>> {
    draw_observations_at(model, sex, reads, None, rng)
}

/// As [`draw_observations`], for an individual who died at `age` (years): blocks with an age
/// effect draw from their means at that age (at their centre age where `age` is `None`).
pub fn draw_observations_at(
    model: &Model,
    sex: Sex,
    reads: u64,
    age: Option<f64>,
    rng: &mut ChaCha8Rng,
) -> Vec<Option<Observation>> {
    use rand::distr::Distribution;
    let s = match sex {
        Sex::Female => 0,
        Sex::Male => 1,
    };
    let mut obs = vec![None; model.catalogue.len()];
    let std = Normal::standard();
    let mut dna_source: Option<usize> = None;
    for b in &model.blocks {
        match b {
            Block::Latent(lb) => {
                let p = lb.traits.len();
                let Some(chol) = lb.cov[s].clone().cholesky() else {
                    continue;
                };
                let z = nalgebra::DVector::from_fn(p, |_, _| std.sample(rng));
                let x = match (age, &lb.age) {
                    (Some(t), Some(_)) => lb.mean_at(s, t) + chol.l() * z,
                    _ => &lb.mean[s] + chol.l() * z,
                };
                for (j, t) in lb.traits.iter().enumerate() {
                    obs[t.catalogue_index] = Some(match &t.kind {
                        LatentKind::Metric => Observation::Measurement { value: x[j] },
                        LatentKind::Ordinal { thresholds, lowest } => {
                            let g = lowest
                                + thresholds.iter().filter(|&&tau| x[j] > tau).count() as i32;
                            Observation::Grade { low: g, high: g }
                        }
                    });
                }
            }
            Block::Dna(db) => {
                // With probability ε the reads are someone else's, of either sex (the
                // model's contamination component); one library, one source for every DNA
                // block.
                let source = *dna_source.get_or_insert_with(|| {
                    if rng.random::<f64>() < db.contamination {
                        usize::from(rng.random::<f64>() < 0.5)
                    } else {
                        s
                    }
                });
                let (a, bb) = db.beta[source];
                let (Ok(beta), n) = (Beta::new(a, bb), reads) else {
                    continue;
                };
                let frac: f64 = beta.sample(rng);
                if let Some(Observation::Count { value: x }) = obs[db.x_index] {
                    // X reads drawn already (by an X:autosome block): the Y reads that go
                    // with them at this sample's Y fraction.
                    let y = (x as f64 * frac / (1.0 - frac)).round() as u64;
                    obs[db.y_index] = Some(Observation::Count { value: y });
                    continue;
                }
                let k = Binomial::new(frac, n)
                    .map(|d| Distribution::<u64>::sample(&d, rng))
                    .unwrap_or(0);
                obs[db.x_index] = Some(Observation::Count { value: n - k });
                obs[db.y_index] = Some(Observation::Count { value: k });
            }
            Block::DnaX(db) => {
                let source = *dna_source.get_or_insert_with(|| {
                    if rng.random::<f64>() < db.contamination {
                        usize::from(rng.random::<f64>() < 0.5)
                    } else {
                        s
                    }
                });
                let (a, bb) = db.beta[source];
                let Ok(beta) = Beta::new(a, bb) else {
                    continue;
                };
                let share: f64 = beta.sample(rng);
                match obs[db.x_index] {
                    // X reads drawn already (by a Y-fraction block): the autosomal reads that
                    // go with them at this sample's X share.
                    Some(Observation::Count { value: x }) => {
                        let m = (x as f64 * (1.0 - share) / share).round() as u64;
                        obs[db.autosome_index] = Some(Observation::Count { value: m });
                    }
                    _ => {
                        // About `reads` reads on X, as for the Y fraction.
                        let n = (reads as f64 / db.beta[s].0 * (db.beta[s].0 + db.beta[s].1))
                            .round() as u64;
                        let k = Binomial::new(share, n)
                            .map(|d| Distribution::<u64>::sample(&d, rng))
                            .unwrap_or(0);
                        obs[db.x_index] = Some(Observation::Count { value: k });
                        obs[db.autosome_index] = Some(Observation::Count { value: n - k });
                    }
                }
            }
            Block::Equations(_) => {}
        }
    }
    obs
}

/// A synthetic adult individual (no age recorded is treated as adult) with the given
/// observations.
pub fn individual(id: String, observations: Vec<Option<Observation>>) -> Individual {
    Individual {
        id,
        row: 0,
        group: None,
        age: None,
        known_sex: None,
        observations: observations.into(),
        carried: Vec::new(),
    }
}

/// Draw a sex with P(female) = pi.
pub fn draw_sex(pi: f64, rng: &mut ChaCha8Rng) -> Sex {
    if rng.random::<f64>() < pi {
        Sex::Female
    } else {
        Sex::Male
    }
}

/// Simulate one population (`group`: its size and proportion female), evaluate every individual
/// (through a shared cache) and compute the posterior of π under `prior`.
///
/// Seven arguments: the model, the population, its preservation and seed, and the three
/// things shared by every replicate run in parallel (context, evidence cache, prior).
pub(crate) fn simulate_and_evaluate(
    model: &crate::model::Model,
    group: GroupSpec,
    missing: &MissingSpec,
    seed: u64,
    ctx: &crate::model::Context,
    cache: &crate::model::EvidenceCache,
    prior: &crate::prior::Prior,
) -> Result<
    (
        Simulated,
        Vec<crate::model::IndividualEvidence>,
        crate::assemblage::PiPosterior,
    ),
    SimError,
> {
    let sim = simulate(model, &[group], missing, seed)?;
    let ev: Vec<_> = sim
        .individuals
        .iter()
        .map(|i| model.evaluate_cached(i, ctx, cache))
        .collect();
    let l: Vec<f64> = ev.iter().filter(|e| e.estimable).map(|e| e.ln_lr).collect();
    let post = crate::assemblage::PiPosterior::compute(&l, prior);
    Ok((sim, ev, post))
}
