//! Cross-validation of a model on a documented reference collection (`tessera validate`).
//!
//! Each individual of documented sex is classified by a model that did not see it: with a
//! fitting specification the model is refitted without the individual's fold (k-fold,
//! stratified by sex, folds drawn with a seeded shuffle; or leave-one-out), with a fixed model
//! file every individual is classified by that model as it stands (an external check, not a
//! cross-validation: say so when reporting).
//!
//! P(female) = 1 / (1 + exp(−(ln LR + logit p₀))) with p₀ the prior probability of female
//! (default ½, as in the validation studies of the trade). Scores:
//! accuracy at P = ½; per sex, and the sex bias (female accuracy − male accuracy); the share
//! left indeterminate between the probable-male and probable-female thresholds and the
//! accuracy of the others; the Brier score, mean (P(F) − [female])² (Brier 1950, reference details from memory: Mon Weather
//! Rev 78:1–3); log loss, −mean ln P(documented sex); a reliability table in ten bins of P(F).

use crate::assemblage::category::{Category, Thresholds};
use crate::catalogue::Catalogue;
use crate::data::{Individual, Sex};
use crate::fit::{fit, FitError, FitSpec, ReferenceInfo};
use crate::model::{BlockStatus, Context, EvidenceCache, Model, ModelError};
use crate::numeric::proportion::{wilson_interval, Z95};
use crate::sim::MissingSpec;
use rand::seq::SliceRandom;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use serde::Serialize;

/// How the reference is split.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum Folds {
    /// k folds, stratified by sex.
    K(usize),
    /// One fold per individual.
    LeaveOneOut,
}

impl Folds {
    /// How many folds, and so models, for `n` individuals.
    pub fn count(self, n: usize) -> usize {
        match self {
            Folds::K(k) => k,
            Folds::LeaveOneOut => n,
        }
    }
}

/// Settings of a validation.
#[derive(Debug, Clone, PartialEq)]
pub struct ValidationSettings {
    /// The split (ignored for a fixed model).
    pub folds: Folds,
    /// Seed of the fold assignment and of the randomised integration.
    pub seed: u64,
    /// Prior probability of female.
    pub prior_female: f64,
    /// Category thresholds on P(F).
    pub thresholds: Thresholds,
    /// A preservation mask applied to every classified individual before it is classified
    /// (the models are fitted on the complete training part): casework skeletons are rarely
    /// complete, so error rates on complete ones flatter a method. `None`: as recorded.
    pub missing: Option<MissingSpec>,
}

impl Default for ValidationSettings {
    fn default() -> Self {
        ValidationSettings {
            folds: Folds::K(10),
            seed: 1,
            prior_female: 0.5,
            thresholds: Thresholds::default(),
            missing: None,
        }
    }
}

/// Adult age classes of the scores by age (Buikstra & Ubelaker 1994: young adult 20–34,
/// middle adult 35–49, old adult 50+, from memory), with those below 20 and those without a
/// usable age beside them. An individual's age is the midpoint of its recorded interval (the
/// lower bound of an open class such as `50+`).
pub const AGE_CLASSES: [&str; 5] = [
    "under 20",
    "20-34",
    "35-49",
    "50 or more",
    "age not recorded",
];

/// The age class (index into [`AGE_CLASSES`]) of a recorded age.
pub fn age_class(age: Option<&crate::data::AgeAtDeath>) -> usize {
    use crate::data::AgeAtDeath;
    let years = match age {
        Some(AgeAtDeath::Years { low, high }) => Some(match high {
            Some(h) => (low + h) / 2.0,
            None => *low,
        }),
        Some(AgeAtDeath::Subadult) => Some(0.0),
        Some(AgeAtDeath::Adult) | None => None,
    };
    match years {
        Some(y) if y < 20.0 => 0,
        Some(y) if y < 35.0 => 1,
        Some(y) if y < 50.0 => 2,
        Some(_) => 3,
        None => 4,
    }
}

/// The individual as the mask leaves it: a copy with traits removed (and grades widened to
/// ranges) as `missing` says, drawn from a stream seeded by the validation seed and the
/// individual's position alone, so the same seed gives the same mask with any number of
/// threads.
fn masked(
    ind: &Individual,
    catalogue: &Catalogue,
    missing: &MissingSpec,
    seed: u64,
    i: usize,
) -> Individual {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x6d61_736b_u64.wrapping_mul(i as u64 + 1));
    let mut copy = ind.clone();
    let mut dense = copy.observations.to_dense();
    crate::sim::preserve(catalogue, missing, &mut dense, &mut rng);
    // The traits kept keep their sides.
    copy.observations = crate::data::Observations::from_recorded(
        dense.len(),
        dense
            .into_iter()
            .enumerate()
            .map(|(k, o)| (k, ind.observations.side(k), o)),
    );
    copy
}

/// What is being validated.
#[derive(Debug, Clone, Copy)]
pub enum Subject<'a> {
    /// A model file as it stands.
    Fixed(&'a Model),
    /// A fitting specification, refitted without each fold.
    Refit(&'a FitSpec, &'a Catalogue),
}

/// One individual's held-out classification.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Prediction {
    /// Identifier.
    pub id: String,
    /// Documented sex.
    pub sex: Sex,
    /// Fold (0 for a fixed model).
    pub fold: usize,
    /// ln LR(F:M) over all blocks.
    pub ln_lr: f64,
    /// P(female) at the prior.
    pub p_female: f64,
    /// Traits that entered.
    pub n_traits: usize,
    /// Age class, an index into [`AGE_CLASSES`].
    pub age_class: usize,
    /// ln LR of each block, `None` where the block was not used.
    pub block_ln_lr: Vec<Option<f64>>,
}

/// Scores of a set of predictions.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Scores {
    /// Individuals scored.
    pub n: usize,
    /// Documented females / males among them.
    pub n_female: usize,
    /// Documented males.
    pub n_male: usize,
    /// Share correct at P(F) = ½ (ties count as wrong).
    pub accuracy: f64,
    /// Wilson 95% interval of the accuracy (Wilson 1927): lower end.
    pub accuracy_lo: f64,
    /// Upper end.
    pub accuracy_hi: f64,
    /// Share of females correct.
    pub accuracy_female: f64,
    /// Share of males correct.
    pub accuracy_male: f64,
    /// Female accuracy − male accuracy.
    pub sex_bias: f64,
    /// Share between the probable-male and probable-female thresholds.
    pub share_indeterminate: f64,
    /// Share correct among those not indeterminate.
    pub accuracy_determinate: f64,
    /// Brier score.
    pub brier: f64,
    /// Log loss (natural log).
    pub log_loss: f64,
}

/// The calls of one category and how many of them were right: "of the probable-female
/// calls, x% were female".
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CategoryCalls {
    /// The category.
    pub category: Category,
    /// Individuals called so.
    pub n: usize,
    /// Documented females among them.
    pub n_female: usize,
    /// Share of documented females (NaN when no individual was called so).
    pub share_female: f64,
    /// Wilson 95% interval of that share (Wilson 1927).
    pub share_female_lo: f64,
    /// Upper end.
    pub share_female_hi: f64,
}

/// The calls per category of `v` (P(female), documented sex) under the cut-offs `t`.
pub fn calls_by_category(v: &[(f64, Sex)], t: &Thresholds) -> Vec<CategoryCalls> {
    Category::ALL
        .iter()
        .filter(|c| **c != Category::NotEstimable)
        .map(|&category| {
            let called: Vec<&(f64, Sex)> =
                v.iter().filter(|x| t.categorise(x.0) == category).collect();
            let n = called.len();
            let n_female = called.iter().filter(|x| x.1 == Sex::Female).count();
            let (lo, hi) = wilson_interval(n_female, n, Z95).unwrap_or((f64::NAN, f64::NAN));
            CategoryCalls {
                category,
                n,
                n_female,
                share_female: if n == 0 {
                    f64::NAN
                } else {
                    n_female as f64 / n as f64
                },
                share_female_lo: lo,
                share_female_hi: hi,
            }
        })
        .collect()
}

/// A warning when a fixed model is checked on the very collection it was fitted to (same
/// SHA-256): the error rates are then resubstitution rates, optimistic for new individuals.
pub fn resubstitution(subject: &Subject, info: &ReferenceInfo) -> Option<String> {
    let Subject::Fixed(m) = subject else {
        return None;
    };
    let origin = m.fitted_to.as_ref()?;
    (origin.sha256 == info.sha256).then(|| format!(
        "the model was fitted to this very file (`{}`, same SHA-256): these are resubstitution error rates, optimistic for individuals the model has not seen; validate with --traits SPEC (cross-validation) for honest rates",
        origin.file
    ))
}

/// One bin of the reliability table.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ReliabilityBin {
    /// Lower edge of P(F).
    pub low: f64,
    /// Upper edge.
    pub high: f64,
    /// Individuals in the bin.
    pub n: usize,
    /// Mean predicted P(F).
    pub mean_p_female: f64,
    /// Share of documented females.
    pub share_female: f64,
}

/// A validation.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Validation {
    /// `k-fold cross-validation (k = 10)`, `leave-one-out cross-validation` or `fixed model`.
    pub design: String,
    /// Block ids in model order.
    pub blocks: Vec<String>,
    /// Predictions, in reference order, of individuals with usable evidence.
    pub predictions: Vec<Prediction>,
    /// Individuals without any usable evidence (not scored).
    pub no_evidence: Vec<String>,
    /// Scores over all predictions.
    pub overall: Scores,
    /// Scores per block, each block's evidence alone, among individuals it was used for.
    pub by_block: Vec<(String, Scores)>,
    /// Scores by how many traits entered: 1, 2, 3–4, 5–8, 9 or more.
    pub by_traits: Vec<(String, Scores)>,
    /// Scores by age class ([`AGE_CLASSES`]; classes without individuals left out).
    pub by_age: Vec<(String, Scores)>,
    /// Reliability table in ten bins.
    pub reliability: Vec<ReliabilityBin>,
    /// The calls of each category and the share of documented females among them.
    pub by_category: Vec<CategoryCalls>,
    /// What a reader must know before trusting the error rates (a fixed model checked on its
    /// own reference collection).
    pub warnings: Vec<String>,
    /// The settings used.
    #[serde(skip)]
    pub settings: ValidationSettings,
}

/// Why a validation cannot be made.
#[derive(Debug, thiserror::Error)]
pub enum ValidationError {
    /// The model could not be fitted in one fold.
    #[error("fold {fold} of {folds}: {source}")]
    Fit {
        /// 1-based fold.
        fold: usize,
        /// Number of folds.
        folds: usize,
        /// The fitting problems.
        source: FitError,
    },
    /// A refitted model did not load (not expected).
    #[error("fold {fold}: the refitted model is invalid: {source}")]
    Model {
        /// 1-based fold.
        fold: usize,
        /// The model problems.
        source: ModelError,
    },
    /// Bad settings or too small a reference.
    #[error("{0}")]
    Settings(String),
}

/// Assign folds: stratified by sex, each sex shuffled with the seed and dealt round-robin.
pub fn assign_folds(sexes: &[Sex], folds: Folds, seed: u64) -> Vec<usize> {
    let n = sexes.len();
    match folds {
        Folds::LeaveOneOut => (0..n).collect(),
        Folds::K(k) => {
            let mut out = vec![0; n];
            let mut rng = ChaCha8Rng::seed_from_u64(seed);
            let mut next = 0;
            for s in [Sex::Female, Sex::Male] {
                let mut idx: Vec<usize> = (0..n).filter(|&i| sexes[i] == s).collect();
                idx.shuffle(&mut rng);
                for i in idx {
                    out[i] = next % k;
                    next += 1;
                }
            }
            out
        }
    }
}

/// Validate `subject` on the reference individuals (each with documented sex).
///
/// # Errors
/// [`ValidationError`] for bad settings, or a fold whose training part cannot be fitted.
pub fn validate(
    subject: Subject,
    reference: &[(&Individual, Sex)],
    info: &ReferenceInfo,
    settings: &ValidationSettings,
) -> Result<Validation, ValidationError> {
    validate_with_progress(subject, reference, info, settings, &crate::progress::Silent)
}

/// As [`validate`], announcing its stages to `progress`: one model fitted per fold (with a
/// fitting specification), then one individual classified per step.
///
/// # Errors
/// As [`validate`].
pub fn validate_with_progress(
    subject: Subject,
    reference: &[(&Individual, Sex)],
    info: &ReferenceInfo,
    settings: &ValidationSettings,
    progress: &dyn crate::progress::Progress,
) -> Result<Validation, ValidationError> {
    let p0 = settings.prior_female;
    if !(p0 > 0.0 && p0 < 1.0) {
        return Err(ValidationError::Settings(format!(
            "the prior probability of female must lie strictly between 0 and 1, found {p0}"
        )));
    }
    if let Folds::K(k) = settings.folds {
        if k < 2 || k > reference.len() {
            return Err(ValidationError::Settings(format!(
                "{k} folds for {} individuals: need 2 to {}",
                reference.len(),
                reference.len()
            )));
        }
    }
    let ctx = Context::new(settings.seed);
    let (design, models, fold_of): (String, Vec<Model>, Vec<usize>) = match subject {
        Subject::Fixed(m) => (
            "fixed model (not cross-validated)".into(),
            vec![m.clone()],
            vec![0; reference.len()],
        ),
        Subject::Refit(spec, catalogue) => {
            let folds = settings.folds.count(reference.len());
            progress.stage("fitting a model per fold", folds as u64);
            let fitted = fold_models(spec, catalogue, reference, info, settings, progress);
            progress.finish();
            fitted?
        }
    };
    progress.stage("classifying held-out individuals", reference.len() as u64);
    let blocks: Vec<String> = models[0]
        .blocks
        .iter()
        .map(|b| b.id().to_string())
        .collect();
    let caches: Vec<EvidenceCache> = models.iter().map(|_| EvidenceCache::default()).collect();
    let evaluated: Vec<(usize, crate::model::IndividualEvidence)> = reference
        .par_iter()
        .enumerate()
        .map(|(i, (ind, _))| {
            let f = fold_of[i];
            progress.advance(1);
            let e = match &settings.missing {
                Some(m) => {
                    let copy = masked(ind, &models[f].catalogue, m, settings.seed, i);
                    models[f].evaluate(&copy, &ctx)
                }
                None => models[f].evaluate_cached(ind, &ctx, &caches[f]),
            };
            (i, e)
        })
        .collect();
    progress.finish();
    let logit0 = (p0 / (1.0 - p0)).ln();
    let mut predictions = Vec::new();
    let mut no_evidence = Vec::new();
    for (i, e) in evaluated {
        let (ind, sex) = reference[i];
        if !e.estimable {
            no_evidence.push(ind.id.clone());
            continue;
        }
        predictions.push(Prediction {
            id: ind.id.clone(),
            sex,
            age_class: age_class(ind.age.as_ref()),
            fold: fold_of[i] + usize::from(matches!(subject, Subject::Refit(..))),
            ln_lr: e.ln_lr,
            p_female: logistic(e.ln_lr + logit0),
            n_traits: e.n_traits,
            block_ln_lr: e
                .blocks
                .iter()
                .map(|b| (b.status == BlockStatus::Used).then_some(b.ln_lr))
                .collect(),
        });
    }
    let pairs =
        |v: &[&Prediction]| -> Vec<(f64, Sex)> { v.iter().map(|p| (p.p_female, p.sex)).collect() };
    let all: Vec<&Prediction> = predictions.iter().collect();
    let overall = scores(&pairs(&all), &settings.thresholds);
    let by_block = blocks
        .iter()
        .enumerate()
        .map(|(b, id)| {
            let v: Vec<(f64, Sex)> = predictions
                .iter()
                .filter_map(|p| p.block_ln_lr[b].map(|l| (logistic(l + logit0), p.sex)))
                .collect();
            (id.clone(), scores(&v, &settings.thresholds))
        })
        .collect();
    let classes: [(&str, usize, usize); 5] = [
        ("1", 1, 1),
        ("2", 2, 2),
        ("3-4", 3, 4),
        ("5-8", 5, 8),
        ("9 or more", 9, usize::MAX),
    ];
    let by_traits = classes
        .iter()
        .map(|&(label, lo, hi)| {
            let v: Vec<&Prediction> = predictions
                .iter()
                .filter(|p| p.n_traits >= lo && p.n_traits <= hi)
                .collect();
            (label.to_string(), scores(&pairs(&v), &settings.thresholds))
        })
        .collect();
    let by_age = AGE_CLASSES
        .iter()
        .enumerate()
        .filter_map(|(c, label)| {
            let v: Vec<&Prediction> = predictions.iter().filter(|p| p.age_class == c).collect();
            (!v.is_empty()).then(|| (label.to_string(), scores(&pairs(&v), &settings.thresholds)))
        })
        .collect();
    let design = match &settings.missing {
        Some(m) => format!(
            "{design}; every classified individual masked as `{}` (seed {})",
            m.describe(),
            settings.seed
        ),
        None => design,
    };
    Ok(Validation {
        design,
        by_age,
        blocks,
        reliability: reliability(&pairs(&all)),
        by_category: calls_by_category(&pairs(&all), &settings.thresholds),
        warnings: resubstitution(&subject, info).into_iter().collect(),
        predictions,
        no_evidence,
        overall,
        by_block,
        by_traits,
        settings: settings.clone(),
    })
}

/// The models of a cross-validation: one fitted to each fold's training part (folds
/// stratified by sex), with the design in words and each individual's fold.
///
/// # Errors
/// [`ValidationError`] for a fold whose training part cannot be fitted.
fn fold_models(
    spec: &FitSpec,
    catalogue: &Catalogue,
    reference: &[(&Individual, Sex)],
    info: &ReferenceInfo,
    settings: &ValidationSettings,
    progress: &dyn crate::progress::Progress,
) -> Result<(String, Vec<Model>, Vec<usize>), ValidationError> {
    let sexes: Vec<Sex> = reference.iter().map(|r| r.1).collect();
    let fold_of = assign_folds(&sexes, settings.folds, settings.seed);
    let k = settings.folds.count(reference.len());
    let models: Vec<Result<Model, ValidationError>> = (0..k)
        .into_par_iter()
        .map(|f| {
            let train: Vec<(&Individual, Sex)> = reference
                .iter()
                .zip(&fold_of)
                .filter(|(_, &g)| g != f)
                .map(|(r, _)| *r)
                .collect();
            let fitted =
                fit(spec, catalogue, &train, info).map_err(|source| ValidationError::Fit {
                    fold: f + 1,
                    folds: k,
                    source,
                })?;
            let yaml = fitted
                .to_yaml()
                .map_err(|m| ValidationError::Settings(m.to_string()))?;
            let model = Model::from_yaml("refitted model", &yaml).map_err(|source| {
                ValidationError::Model {
                    fold: f + 1,
                    source,
                }
            });
            progress.advance(1);
            model
        })
        .collect();
    let models = models.into_iter().collect::<Result<Vec<_>, _>>()?;
    let design = match settings.folds {
        Folds::K(k) => format!("{k}-fold cross-validation, stratified by sex"),
        Folds::LeaveOneOut => "leave-one-out cross-validation".into(),
    };
    Ok((design, models, fold_of))
}

fn logistic(x: f64) -> f64 {
    if x >= 0.0 {
        1.0 / (1.0 + (-x).exp())
    } else {
        let e = x.exp();
        e / (1.0 + e)
    }
}

/// Scores of (P(F), documented sex) pairs. Empty input gives NaN shares and n = 0.
pub fn scores(v: &[(f64, Sex)], t: &Thresholds) -> Scores {
    let n = v.len();
    let females = v.iter().filter(|x| x.1 == Sex::Female).count();
    let share = |num: usize, den: usize| {
        if den == 0 {
            f64::NAN
        } else {
            num as f64 / den as f64
        }
    };
    let correct = |p: f64, s: Sex| (s == Sex::Female && p > 0.5) || (s == Sex::Male && p < 0.5);
    let right_f = v
        .iter()
        .filter(|x| x.1 == Sex::Female && correct(x.0, x.1))
        .count();
    let right_m = v
        .iter()
        .filter(|x| x.1 == Sex::Male && correct(x.0, x.1))
        .count();
    let determinate: Vec<&(f64, Sex)> = v
        .iter()
        .filter(|x| x.0 >= t.probable_female || x.0 <= t.probable_male)
        .collect();
    let right_det = determinate.iter().filter(|x| correct(x.0, x.1)).count();
    let brier = v
        .iter()
        .map(|&(p, s)| (p - f64::from(u8::from(s == Sex::Female))).powi(2))
        .sum::<f64>()
        / n.max(1) as f64;
    let log_loss = -v
        .iter()
        .map(|&(p, s)| {
            let q = if s == Sex::Female { p } else { 1.0 - p };
            q.max(1e-15).ln()
        })
        .sum::<f64>()
        / n.max(1) as f64;
    let accuracy_female = share(right_f, females);
    let accuracy_male = share(right_m, n - females);
    let (accuracy_lo, accuracy_hi) =
        wilson_interval(right_f + right_m, n, Z95).unwrap_or((f64::NAN, f64::NAN));
    Scores {
        n,
        n_female: females,
        n_male: n - females,
        accuracy: share(right_f + right_m, n),
        accuracy_lo,
        accuracy_hi,
        accuracy_female,
        accuracy_male,
        sex_bias: accuracy_female - accuracy_male,
        share_indeterminate: share(n - determinate.len(), n),
        accuracy_determinate: share(right_det, determinate.len()),
        brier: if n == 0 { f64::NAN } else { brier },
        log_loss: if n == 0 { f64::NAN } else { log_loss },
    }
}

/// Ten equal bins of P(F) (the last closed at 1).
pub fn reliability(v: &[(f64, Sex)]) -> Vec<ReliabilityBin> {
    (0..10)
        .map(|b| {
            let low = b as f64 / 10.0;
            let high = (b + 1) as f64 / 10.0;
            let inside: Vec<&(f64, Sex)> = v
                .iter()
                .filter(|x| x.0 >= low && (x.0 < high || (b == 9 && x.0 <= high)))
                .collect();
            let n = inside.len();
            let mean = inside.iter().map(|x| x.0).sum::<f64>() / n.max(1) as f64;
            let fem = inside.iter().filter(|x| x.1 == Sex::Female).count();
            ReliabilityBin {
                low,
                high,
                n,
                mean_p_female: if n == 0 { f64::NAN } else { mean },
                share_female: if n == 0 {
                    f64::NAN
                } else {
                    fem as f64 / n as f64
                },
            }
        })
        .collect()
}

#[cfg(test)]
#[path = "tests/validate.rs"]
mod tests;
