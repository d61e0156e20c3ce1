//! Simulated assemblages: individuals drawn from a model with known sex, fragmented as a
//! [`MissingSpec`] says, written in the input contract.

use super::spec::{GroupSpec, MissingSpec};
use super::{draw_observations_at, draw_sex};
use crate::catalogue::TraitKind;
use crate::data::{AgeAtDeath, Individual, Observation, Sex};
use crate::model::{Block, Model};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// A simulated assemblage: the individuals (as the reader would give them) and the truth.
#[derive(Debug, Clone, PartialEq)]
pub struct Simulated {
    /// Individuals, in order.
    pub individuals: Vec<Individual>,
    /// The true sex of each.
    pub true_sex: Vec<Sex>,
    /// Catalogue positions of the traits the model can simulate (the table's trait columns).
    pub trait_columns: Vec<usize>,
}

/// Errors of the simulator.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SimError {
    /// The model has no latent or DNA block.
    #[error("the model has no latent or DNA block to draw from (equations carry no per-sex distribution)")]
    NothingToSimulate,
}

/// A simulated observation as a table cell: a grade, a range `3-4`, a measurement to the
/// step it was recorded at (0.01 below 20 units, else 0.1), a count; empty where none.
pub(crate) fn observation_cell(o: Option<Observation>, kind: &TraitKind) -> String {
    match o {
        None => String::new(),
        Some(Observation::Grade { low, high }) if low == high => low.to_string(),
        Some(Observation::Grade { low, high }) => format!("{low}-{high}"),
        Some(Observation::Measurement { value }) => match kind {
            TraitKind::Metric { high, .. } if *high < 20.0 => format!("{value:.2}"),
            _ => format!("{value:.1}"),
        },
        Some(Observation::Count { value }) => value.to_string(),
    }
}

/// Round a measurement as it would be recorded: 0.01 for small dimensions (teeth), 0.1 mm
/// otherwise (common practice).
fn recorded(value: f64, high: f64) -> f64 {
    let step = if high < 20.0 { 100.0 } else { 10.0 };
    (value * step).round() / step
}

/// Draw an assemblage. Each group's individuals have sex drawn with its π; the evidence of
/// adults is drawn from the model; preservation follows `missing`.
///
/// # Errors
/// [`SimError::NothingToSimulate`] for a model without latent or DNA blocks.
pub fn simulate(
    model: &Model,
    groups: &[GroupSpec],
    missing: &MissingSpec,
    seed: u64,
) -> Result<Simulated, SimError> {
    let mut trait_columns: Vec<usize> = Vec::new();
    for b in &model.blocks {
        match b {
            Block::Latent(l) => trait_columns.extend(l.traits.iter().map(|t| t.catalogue_index)),
            // The X count serves both DNA blocks: one column.
            Block::Dna(d) => {
                for i in [d.x_index, d.y_index] {
                    if !trait_columns.contains(&i) {
                        trait_columns.push(i);
                    }
                }
            }
            Block::DnaX(d) => {
                for i in [d.x_index, d.autosome_index] {
                    if !trait_columns.contains(&i) {
                        trait_columns.push(i);
                    }
                }
            }
            Block::Equations(_) => {}
        }
    }
    if trait_columns.is_empty() {
        return Err(SimError::NothingToSimulate);
    }
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut out = Simulated {
        individuals: Vec::new(),
        true_sex: Vec::new(),
        trait_columns,
    };
    let named_groups = groups.len() > 1 || groups.iter().any(|g| !g.name.is_empty());
    let ages = age_range(model);
    let mut k = 0;
    for g in groups {
        for _ in 0..g.n {
            k += 1;
            let sex = draw_sex(g.pi, &mut rng);
            let reads = 200 + (rng.random::<f64>() * 4800.0) as u64;
            // A model whose traits change with age: a true adult age, uniform over the ages
            // its reference covered, drawn first (models without leave the stream as it was).
            let true_age = ages.map(|(lo, hi)| (lo + rng.random::<f64>() * (hi - lo)).round());
            let mut obs = draw_observations_at(model, sex, reads, true_age, &mut rng);
            within_plausible_range(model, (sex, true_age), &mut obs, &mut rng);
            let subadult = preserve(&model.catalogue, missing, &mut obs, &mut rng);
            let age = match true_age {
                Some(t) if !subadult => AgeAtDeath::Years {
                    low: t,
                    high: Some(t),
                },
                _ => draw_age(subadult, &mut rng),
            };
            out.individuals.push(Individual {
                id: format!("S-{k:05}"),
                row: k + 1,
                group: named_groups.then(|| g.name.clone()),
                age: Some(age),
                known_sex: None,
                observations: obs.into(),
                carried: Vec::new(),
            });
            out.true_sex.push(sex);
        }
    }
    Ok(out)
}

/// The ages covered by the model's blocks with an age effect (youngest lowest, oldest
/// highest); `None` when no block has one.
fn age_range(model: &Model) -> Option<(f64, f64)> {
    model
        .blocks
        .iter()
        .filter_map(|b| match b {
            Block::Latent(l) => l.age.as_ref().map(|a| (a.lowest, a.highest)),
            _ => None,
        })
        .reduce(|a, b| (a.0.min(b.0), a.1.max(b.1)))
}

/// Measurements redrawn (at most 100 times) until within the trait's plausible range, then
/// clamped to it and rounded as recorded.
pub(crate) fn within_plausible_range(
    model: &Model,
    (sex, age): (Sex, Option<f64>),
    obs: &mut [Option<Observation>],
    rng: &mut ChaCha8Rng,
) {
    let cat = &model.catalogue;
    for (t, o) in obs.iter_mut().enumerate() {
        if let (Some(Observation::Measurement { value }), TraitKind::Metric { low, high, .. }) =
            (*o, &cat.traits()[t].kind)
        {
            let mut v = value;
            let mut tries = 0;
            while !(v >= *low && v <= *high) && tries < 100 {
                v = match draw_observations_at(model, sex, 0, age, rng)[t] {
                    Some(Observation::Measurement { value }) => value,
                    _ => v,
                };
                tries += 1;
            }
            *o = Some(Observation::Measurement {
                value: recorded(v.clamp(*low, *high), *high),
            });
        }
    }
}

/// Preservation as `missing` says: whether the individual is a subadult (no skeletal
/// evidence), whether DNA was recovered, which regions are lost, which traits are missing
/// or recorded as a range of two grades. Returns whether the individual is a subadult.
pub(crate) fn preserve(
    cat: &crate::catalogue::Catalogue,
    missing: &MissingSpec,
    obs: &mut [Option<Observation>],
    rng: &mut ChaCha8Rng,
) -> bool {
    let subadult = rng.random::<f64>() < missing.subadult_rate;
    let has_dna = rng.random::<f64>() < missing.dna_rate;
    let lost: Vec<_> = missing
        .region
        .iter()
        .filter_map(|(r, &rate)| (rng.random::<f64>() < rate).then_some(*r))
        .collect();
    for (t, o) in obs.iter_mut().enumerate() {
        let def = &cat.traits()[t];
        if o.is_none() {
            continue;
        }
        let keep = if def.region.is_morphological() {
            !subadult && !lost.contains(&def.region) && rng.random::<f64>() >= missing.trait_rate
        } else {
            has_dna
        };
        if !keep {
            *o = None;
            continue;
        }
        if let (Some(Observation::Grade { low, .. }), TraitKind::Ordinal { lowest, highest }) =
            (*o, &def.kind)
        {
            if rng.random::<f64>() < missing.range_rate {
                let up = rng.random::<f64>() < 0.5;
                let (a, b) = if (up && low < *highest) || low == *lowest {
                    (low, low + 1)
                } else {
                    (low - 1, low)
                };
                *o = Some(Observation::Grade { low: a, high: b });
            }
        }
    }
    subadult
}

/// An age at death: a 3-year interval from 4 to 16 for a subadult, else one of four adult
/// classes (18-25, 25-35, 35-50, 50+) with equal probability.
fn draw_age(subadult: bool, rng: &mut ChaCha8Rng) -> AgeAtDeath {
    if subadult {
        let lo = 4.0 + (rng.random::<f64>() * 10.0).floor();
        AgeAtDeath::Years {
            low: lo,
            high: Some(lo + 3.0),
        }
    } else {
        let classes = [
            (18.0, Some(25.0)),
            (25.0, Some(35.0)),
            (35.0, Some(50.0)),
            (50.0, None),
        ];
        let (low, high) = classes[(rng.random::<f64>() * 4.0) as usize % 4];
        AgeAtDeath::Years { low, high }
    }
}

impl Simulated {
    /// The assemblage as CSV in the input contract: `id`, `group` (when named), `age`, one
    /// column per simulated trait, and `true_sex` (a carried column, never evidence).
    ///
    /// # Errors
    /// [`RenderError`](crate::report::RenderError) when a row cannot be written.
    pub fn to_csv(&self, model: &Model) -> Result<Vec<u8>, crate::report::RenderError> {
        self.to_csv_with_sex_column(model, "true_sex")
    }

    /// As [`Simulated::to_csv`], with the sex in a column of the given name: `known_sex` makes
    /// a simulated reference collection of documented sex (for `tessera fit` and `validate`).
    ///
    /// # Errors
    /// As [`Simulated::to_csv`].
    pub fn to_csv_with_sex_column(
        &self,
        model: &Model,
        sex_column: &str,
    ) -> Result<Vec<u8>, crate::report::RenderError> {
        let cat = &model.catalogue;
        let grouped = self.individuals.iter().any(|i| i.group.is_some());
        let mut w = crate::report::CsvText::default();
        let mut head = vec!["id".to_string()];
        if grouped {
            head.push("group".into());
        }
        head.push("age".into());
        head.extend(
            self.trait_columns
                .iter()
                .map(|&t| cat.traits()[t].id.clone()),
        );
        head.push(sex_column.into());
        w.row(&head);
        for (ind, sex) in self.individuals.iter().zip(&self.true_sex) {
            let mut r = vec![ind.id.clone()];
            if grouped {
                r.push(ind.group.clone().unwrap_or_default());
            }
            r.push(
                ind.age
                    .map(crate::report::analysis::age_text)
                    .unwrap_or_default(),
            );
            for &t in &self.trait_columns {
                r.push(observation_cell(ind.observations[t], &cat.traits()[t].kind));
            }
            r.push(sex.letter().into());
            w.row(&r);
        }
        w.finish()
    }
}

#[cfg(test)]
#[path = "tests/assemblage.rs"]
mod tests;
