//! One individual, its own report (`tessera case`): the evidence of one skeleton weighed
//! without any population prior, for a forensic case file or a single burial.
//!
//! The numbers are the evidence ledger's (the same model evaluation, [`crate::likelihood`]):
//! the likelihood ratio female:male per body region and in all, each in words on the verbal
//! scale of the ENFSI guideline (ENFSI 2015, cut-points from memory). Beside each region, the
//! traits that entered it, with the side and the score as recorded, and each trait's
//! likelihood ratio **alone** (the region's ratio is not the product of these: traits are
//! correlated within sex, and the region's ratio is computed jointly). The traits the model
//! knows that were not recorded are listed. P(female) is given only under prior
//! probabilities that the user names: for one individual and a prior π with mean E[π],
//! P(female | evidence) = LR E[π] / (LR E[π] + 1 − E[π]), which depends on the prior; the
//! likelihood ratio does not.

use crate::assemblage::{lr_support, Thresholds};
use crate::data::{Assemblage, Individual, Observation, SideUsed};
use crate::model::{BlockStatus, Context, Model};
use crate::prior::{Prior, PriorShape};
use serde::Serialize;
use std::f64::consts::LN_10;

/// Who wrote and checked the report, and the case it belongs to (all optional; printed as
/// blanks to fill in by hand when absent).
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct CaseDetails {
    /// The case or accession number.
    pub case_number: Option<String>,
    /// The analyst.
    pub analyst: Option<String>,
    /// The reviewer.
    pub reviewer: Option<String>,
}

/// One trait as recorded and what it says alone.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraitLine {
    /// Catalogue id.
    pub id: String,
    /// Readable name.
    pub name: String,
    /// Side used: `left`, `right`, `both (combined)` or empty for an unsided trait.
    pub side: String,
    /// The score or measurement as read (a range of grades as `3-4`).
    pub recorded: String,
    /// log10 LR(F:M) of this trait alone (its region's model with no other trait recorded);
    /// `None` where the trait cannot be weighed alone (a measurement used only inside an
    /// equation together with others).
    pub log10_lr_alone: Option<f64>,
}

/// One body region (block) of the model.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RegionLine {
    /// Block id (cranium, pelvis, …).
    pub block: String,
    /// `used`, or why not.
    pub status: String,
    /// log10 LR(F:M) of the region (0 when not used).
    pub log10_lr: f64,
    /// Estimated numerical error of the region's ln LR.
    pub ln_lr_error: f64,
    /// The verbal scale's words for the region's LR (empty when not used).
    pub support: String,
    /// Equation used, reason not used, age note.
    pub note: String,
    /// Traits that entered.
    pub traits: Vec<TraitLine>,
    /// Traits of the region that the model knows and were not recorded (ids).
    pub not_recorded: Vec<String>,
    /// The same traits by their names in the catalogue.
    pub not_recorded_names: Vec<String>,
}

/// P(female) under one prior, only when asked.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnderPrior {
    /// The prior's name.
    pub prior: String,
    /// Its mean, the prior probability of female for one individual.
    pub prior_female: f64,
    /// P(female | evidence).
    pub p_female: f64,
    /// The category at the analysis thresholds (depends on the prior).
    pub category: String,
}

/// The report of one individual.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CaseReport {
    /// The individual's id.
    pub id: String,
    /// Its row in the input.
    pub row: usize,
    /// The input file and its SHA-256.
    pub file: String,
    /// SHA-256 of the input.
    pub file_sha256: String,
    /// Recorded age at death.
    pub age: Option<String>,
    /// Model name, SHA-256 and provenance.
    pub model: String,
    /// Model SHA-256.
    pub model_sha256: String,
    /// The model's provenance text.
    pub model_provenance: String,
    /// The documented collection the model was fitted to, when it was fitted.
    pub fitted_to: Option<String>,
    /// The model's minimum age for skeletal evidence.
    pub minimum_age: f64,
    /// Every region of the model.
    pub regions: Vec<RegionLine>,
    /// Whether any evidence was usable.
    pub estimable: bool,
    /// log10 LR(F:M) over all regions.
    pub log10_lr: f64,
    /// Estimated numerical error of the total ln LR.
    pub ln_lr_error: f64,
    /// The verbal scale's words for the total.
    pub support: String,
    /// P(female) under each prior asked for (empty when none was).
    pub under_priors: Vec<UnderPrior>,
    /// Case number, analyst, reviewer.
    pub details: CaseDetails,
    /// What a reader must weigh (illustrative model, atypical DNA, below the minimum age…).
    pub warnings: Vec<String>,
}

/// Why a case report cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CaseError {
    /// The id is not in the table.
    #[error("`{id}` is not an id of {file} (ids such as {examples})")]
    UnknownId {
        /// The id asked for.
        id: String,
        /// The table.
        file: String,
        /// A few ids that are there.
        examples: String,
    },
}

/// Side words for a trait line.
fn side_word(s: Option<SideUsed>) -> &'static str {
    match s {
        Some(SideUsed::Left) => "left",
        Some(SideUsed::Right) => "right",
        Some(SideUsed::Both) => "both (combined)",
        Some(SideUsed::Unsided) | None => "",
    }
}

fn recorded_text(o: &Observation) -> String {
    match *o {
        Observation::Grade { low, high } if low == high => low.to_string(),
        Observation::Grade { low, high } => format!("{low}-{high}"),
        Observation::Measurement { value } => format!("{value}"),
        Observation::Count { value } => format!("{value} reads"),
    }
}

/// The report of individual `id` of `a` under `model`, with P(female) under each of
/// `priors` (none: the likelihood ratio alone).
///
/// # Errors
/// [`CaseError::UnknownId`] when `id` is not in the table.
pub fn case_report(
    model: &Model,
    a: &Assemblage,
    id: &str,
    priors: &[Prior],
    thresholds: &Thresholds,
    details: CaseDetails,
    seed: u64,
) -> Result<CaseReport, CaseError> {
    let ind = a
        .individuals
        .iter()
        .find(|i| i.id == id)
        .ok_or_else(|| CaseError::UnknownId {
            id: id.into(),
            file: a.file.clone(),
            examples: a
                .individuals
                .iter()
                .take(3)
                .map(|i| format!("`{}`", i.id))
                .collect::<Vec<_>>()
                .join(", "),
        })?;
    let ctx = Context::new(seed);
    let ev = model.evaluate(ind, &ctx);
    let cat = &model.catalogue;
    let mut regions = Vec::new();
    let mut warnings = Vec::new();
    for (bi, (b, e)) in model.blocks.iter().zip(&ev.blocks).enumerate() {
        let used = e.status == BlockStatus::Used;
        let known = b.trait_ids();
        let traits = e
            .traits_used
            .iter()
            .filter_map(|t| cat.position(t).map(|k| (t, k)))
            .map(|(t, k)| TraitLine {
                id: t.clone(),
                name: cat.traits()[k].name.clone(),
                side: side_word(ind.observations.side(k)).into(),
                recorded: ind.observations[k]
                    .as_ref()
                    .map(recorded_text)
                    .unwrap_or_default(),
                log10_lr_alone: alone(model, ind, bi, k, &ctx),
            })
            .collect();
        let not_recorded: Vec<String> = known
            .iter()
            .filter(|t| {
                cat.position(t)
                    .is_some_and(|k| ind.observations[k].is_none())
            })
            .cloned()
            .collect();
        let not_recorded_names = not_recorded
            .iter()
            .map(|t| cat.get(t).map_or_else(|| t.clone(), |d| d.name.clone()))
            .collect();
        if matches!(
            e.status,
            BlockStatus::Atypical | BlockStatus::NumericalFailure
        ) {
            warnings.push(format!("{}: {}", b.id(), e.note));
        }
        if let (crate::model::Block::Latent(l), true) = (b, used) {
            if let Some(age) = &l.age {
                let (lo, hi) = age.interval(ind.age.as_ref());
                let span = if hi - lo < 1e-9 {
                    format!("taken at {lo} years")
                } else {
                    format!("averaged over ages {lo} to {hi} years")
                };
                warnings.push(format!(
                    "{}: the model's means for these traits change with age at death; this likelihood ratio was {span} (age recorded as {}; the model's reference covered {} to {} years), and another age estimate would change it",
                    b.id(),
                    ind.age.map_or_else(|| "not recorded".to_string(), crate::report::analysis::age_text),
                    age.lowest,
                    age.highest
                ));
            }
        }
        regions.push(RegionLine {
            block: b.id().to_string(),
            status: e.status.as_str().to_string(),
            log10_lr: e.ln_lr / LN_10,
            ln_lr_error: e.error,
            support: if used {
                lr_support(e.ln_lr / LN_10)
            } else {
                String::new()
            },
            note: e.note.to_string(),
            traits,
            not_recorded,
            not_recorded_names,
        });
    }
    if let Some(b) = &model.built_from {
        warnings.push(format!(
            "the model `{}` was built from the summary statistics published for a reference sample ({}), not from its individual records: its within-sex correlations are taken from the publication or assumed (see the model's provenance), and the sample's population must suit this case",
            model.name,
            crate::report::publication::short_citation(&b.citation)
        ));
    } else if model.fitted_to.is_none() {
        warnings.push(format!(
            "the model `{}` was not fitted to a documented reference collection: its likelihood ratios illustrate the method and are not evidence for casework",
            model.name
        ));
    }
    let under_priors = if ev.estimable {
        priors
            .iter()
            .map(|p| {
                let m = match p.shape {
                    PriorShape::Fixed { pi } => pi,
                    PriorShape::Beta { a, b } => a / (a + b),
                };
                let pf = crate::assemblage::posterior::p_female_given(m, ev.ln_lr);
                UnderPrior {
                    prior: p.name.clone(),
                    prior_female: m,
                    p_female: pf,
                    category: thresholds.categorise(pf).label().to_string(),
                }
            })
            .collect()
    } else {
        Vec::new()
    };
    Ok(CaseReport {
        id: ind.id.clone(),
        row: ind.row,
        file: a.file.clone(),
        file_sha256: a.sha256.clone(),
        age: ind.age.map(crate::report::analysis::age_text),
        model: model.name.clone(),
        model_sha256: model.sha256.clone(),
        model_provenance: model.provenance.clone(),
        fitted_to: model
            .fitted_to
            .as_ref()
            .map(|f| {
                format!(
                    "fitted to the documented collection {} (SHA-256 {}; {} females, {} males)",
                    f.file, f.sha256, f.females, f.males
                )
            })
            .or_else(|| {
                model.built_from.as_ref().map(|b| {
                    format!(
                        "built from the summary statistics published for a reference sample: {} ({}; {} females, {} males)",
                        b.citation.trim(),
                        b.sample.trim(),
                        b.females,
                        b.males
                    )
                })
            }),
        minimum_age: model.minimum_age,
        regions,
        estimable: ev.estimable,
        log10_lr: ev.ln_lr / LN_10,
        ln_lr_error: ev.error,
        support: if ev.estimable {
            lr_support(ev.ln_lr / LN_10)
        } else {
            String::new()
        },
        under_priors,
        details,
        warnings,
    })
}

/// log10 LR of trait `k` alone in block `b` (its index in the model): the individual with
/// every other trait removed, evaluated by the same model (so the same integration and seed).
fn alone(model: &Model, ind: &Individual, b: usize, k: usize, ctx: &Context) -> Option<f64> {
    let mut one = ind.clone();
    let mut only = vec![None; ind.observations.len()];
    if let Some(slot) = only.get_mut(k) {
        *slot = ind.observations[k];
    }
    one.observations = only.into();
    let e = model.evaluate(&one, ctx);
    (e.blocks[b].status == BlockStatus::Used).then(|| e.blocks[b].ln_lr / LN_10)
}

#[cfg(test)]
mod tests;
