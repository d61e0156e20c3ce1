//! Fitting latent-trait blocks to a documented reference collection (`tessera fit`).
//!
//! # Method
//! Two-step maximum likelihood, each parameter from every individual who has the traits it
//! concerns (missing cells cost only the estimates they belong to; nothing is dropped
//! listwise):
//! 1. margins: for each ordinal trait a cumulative probit on a male indicator
//!    ([`ordinal`]: thresholds, male − female latent shift, within-sex SD 1); for each
//!    measurement the per-sex mean and the maximum-likelihood SD (divisor n), or one pooled
//!    within-sex SD when the block's dispersion is `shared`;
//! 2. correlations given the margins ([`correlation`]): polychoric, polyserial or Pearson,
//!    pooled over the sexes or per sex;
//! 3. the correlation matrix made positive definite where the pairwise estimates are not
//!    ([`repair`]).
//!
//! The written model centres each ordinal latent scale between the sexes (female −δ/2, male
//! +δ/2, thresholds moved by −δ/2), the convention of the shipped models; the table of
//! estimates reports the identified parameters (thresholds measured from the female latent
//! mean, and δ) with their standard errors.

pub mod correlation;
pub mod ordinal;
pub mod repair;
pub mod spec;
pub mod summary;

pub use spec::{BlockSpec, CorrelationSharing, Dispersion, FitSpec};

use crate::catalogue::{Catalogue, TraitKind};
use crate::data::{AgeAtDeath, Individual, Maturity, Observation, Sex};
use crate::model::spec::{
    PerSex, RawAgeEffect, RawBlock, RawLatentBlock, RawLatentTrait, RawModel,
};
use correlation::{Margin, PairCase, Value};
use nalgebra::DMatrix;
use ordinal::{fit_cumulative_probit, fit_probit_regression, OrdinalScore, ProbitCase};
use serde::Serialize;

/// Default minimum age of the individuals used (years), as for the shipped models.
pub const DEFAULT_MINIMUM_AGE: f64 = 18.0;

/// Fewer pairs than this and a correlation is set to 0 with a warning (a choice of ours).
pub const MIN_PAIRS: usize = 5;

/// Fewer pairs than this and a correlation is kept with a warning that it is imprecise (a
/// choice of ours: the SE of a correlation near 0 is then above about 0.18).
pub const FEW_PAIRS: usize = 30;

/// Widest recorded age interval (years) whose midpoint a block with an age slope takes as
/// the individual's age; wider intervals, open classes and unknown ages leave the individual
/// out of that block (a choice of ours: a 10-year class puts the midpoint within 5 years).
pub const WIDEST_AGE_INTERVAL: f64 = 10.0;

/// One problem that stops a fit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitProblem {
    /// Where: block and trait.
    pub place: String,
    /// What is wrong and what would fix it.
    pub message: String,
}

/// A fit that cannot be made, with every problem found.
#[derive(Debug, Clone, PartialEq, Serialize, thiserror::Error)]
#[error("{file}: no model can be made from it ({} problem{})", problems.len(), if problems.len() == 1 { "" } else { "s" })]
pub struct FitError {
    /// The reference file.
    pub file: String,
    /// Every problem.
    pub problems: Vec<FitProblem>,
}

/// One estimated parameter, for the table of estimates.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Estimate {
    /// Block id.
    pub block: String,
    /// Trait id (the first of a pair for correlations).
    pub trait_id: String,
    /// What the number is.
    pub parameter: String,
    /// The scale it is on.
    pub scale: String,
    /// Maximum-likelihood estimate.
    pub estimate: f64,
    /// Standard error (NaN where not available).
    pub se: f64,
    /// Individuals whose records entered it.
    pub n: usize,
}

/// Where the reference sample came from, for the model's provenance.
#[derive(Debug, Clone, PartialEq)]
pub struct ReferenceInfo {
    /// File as named.
    pub file: String,
    /// SHA-256 of its bytes.
    pub sha256: String,
    /// The command that fitted it.
    pub command: String,
}

/// A fitted model, its estimates and the warnings a person should read.
#[derive(Debug, Clone)]
pub struct FittedModel {
    /// The model, ready to be written as YAML.
    pub model: RawModel,
    /// Every estimate with its standard error.
    pub estimates: Vec<Estimate>,
    /// Things to look at before using the model.
    pub warnings: Vec<String>,
    /// Females used.
    pub n_female: usize,
    /// Males used.
    pub n_male: usize,
}

impl FittedModel {
    /// The model as YAML text.
    ///
    /// # Errors
    /// A serialisation message (not expected for finite estimates).
    pub fn to_yaml(&self) -> Result<String, String> {
        serde_yaml::to_string(&self.model).map_err(|e| e.to_string())
    }

    /// The table of estimates as CSV: block, trait, parameter, scale, estimate, se, lower_95,
    /// upper_95, n.
    ///
    /// # Errors
    /// [`RenderError`](crate::report::RenderError) when a row cannot be written.
    pub fn estimates_csv(&self) -> Result<Vec<u8>, crate::report::RenderError> {
        let mut rows = vec![crate::report::header(&[
            "block",
            "trait",
            "parameter",
            "scale",
            "estimate",
            "se",
            "lower_95",
            "upper_95",
            "n",
        ])];
        let f = |x: f64| {
            if x.is_finite() {
                format!("{x:.6}")
            } else {
                String::new()
            }
        };
        for e in &self.estimates {
            rows.push(vec![
                e.block.clone(),
                e.trait_id.clone(),
                e.parameter.clone(),
                e.scale.clone(),
                f(e.estimate),
                f(e.se),
                f(e.estimate - 1.96 * e.se),
                f(e.estimate + 1.96 * e.se),
                e.n.to_string(),
            ]);
        }
        crate::report::csv_bytes(rows)
    }
}

/// Check a specification against the catalogue (spec traits already added): every block id
/// valid and unique, every trait known, ordinal or metric, and in one block only.
///
/// # Errors
/// Every problem found, one line each.
pub fn check_spec(spec: &FitSpec, catalogue: &Catalogue) -> Result<(), Vec<String>> {
    let mut problems = Vec::new();
    if spec.blocks.is_empty() {
        problems.push("`blocks`: name at least one block to fit".to_string());
    }
    let mut seen_traits: Vec<&str> = Vec::new();
    for (i, b) in spec.blocks.iter().enumerate() {
        if let Err(m) = crate::catalogue::valid_id(&b.id) {
            problems.push(format!("block {}: id `{}`: {m}", i + 1, b.id));
        }
        if spec.blocks[..i].iter().any(|o| o.id == b.id) {
            problems.push(format!("block `{}`: block ids must be unique", b.id));
        }
        if b.traits.is_empty() {
            problems.push(format!("block `{}`: list at least one trait", b.id));
        }
        match (b.age_slope, b.age_centre) {
            (false, Some(_)) => problems.push(format!(
                "block `{}`: `age_centre` goes with `age_slope: true`",
                b.id
            )),
            (true, Some(c)) if !(c.is_finite() && (0.0..=100.0).contains(&c)) => {
                problems.push(format!(
                    "block `{}`: `age_centre`: years from 0 to 100, found {c}",
                    b.id
                ))
            }
            _ => {}
        }
        for t in &b.traits {
            match catalogue.get(t) {
                None => problems.push(format!(
                    "block `{}`: trait `{t}` is neither in the catalogue nor defined under `traits:`",
                    b.id
                )),
                Some(def) if matches!(def.kind, TraitKind::Count) => problems.push(format!(
                    "block `{}`: trait `{t}` is a count; latent blocks take ordinal and metric traits",
                    b.id
                )),
                Some(_) => {}
            }
            if seen_traits.contains(&t.as_str()) {
                problems.push(format!(
                    "block `{}`: trait `{t}` is listed twice; a trait may serve one block only",
                    b.id
                ));
            }
            seen_traits.push(t);
        }
    }
    if let Some(age) = spec.minimum_age {
        if !(age.is_finite() && (0.0..=100.0).contains(&age)) {
            problems.push(format!("`minimum_age`: years from 0 to 100, found {age}"));
        }
    }
    if problems.is_empty() {
        Ok(())
    } else {
        Err(problems)
    }
}

/// Fit every block of `spec` to the reference individuals (each with its documented sex).
///
/// Individuals below the minimum age are left out (a warning says how many).
///
/// # Errors
/// [`FitError`] listing every block and trait that cannot be estimated.
pub fn fit(
    spec: &FitSpec,
    catalogue: &Catalogue,
    reference: &[(&Individual, Sex)],
    info: &ReferenceInfo,
) -> Result<FittedModel, FitError> {
    let minimum_age = spec.minimum_age.unwrap_or(DEFAULT_MINIMUM_AGE);
    let mut warnings = Vec::new();
    let used: Vec<(&Individual, Sex)> = reference
        .iter()
        .filter(|(ind, _)| {
            !matches!(
                ind.age.as_ref().map(|a| a.maturity(minimum_age)),
                Some(Maturity::Subadult)
            )
        })
        .copied()
        .collect();
    if used.len() < reference.len() {
        warnings.push(format!(
            "{} individuals younger than {minimum_age} years were left out of the fit",
            reference.len() - used.len()
        ));
    }
    let n_female = used.iter().filter(|(_, s)| *s == Sex::Female).count();
    let n_male = used.len() - n_female;
    let mut log = FitLog {
        warnings,
        ..FitLog::default()
    };
    let mut blocks = Vec::new();
    for b in &spec.blocks {
        if let Some(block) = fit_block(b, catalogue, &used, &mut log) {
            blocks.push(RawBlock::Latent(block));
        }
    }
    let FitLog {
        estimates,
        warnings,
        problems,
    } = log;
    if !problems.is_empty() {
        return Err(FitError {
            file: info.file.clone(),
            problems,
        });
    }
    // Every definition is kept, in order, so that the model's catalogue has the same trait
    // order as the catalogue the reference was read with.
    let traits = spec.traits.clone();
    let include = spec.includes();
    let provenance = format!(
        "FITTED by tessera {} to the reference file {} (SHA-256 {}), {} females and {} males \
         of documented sex aged {minimum_age} years or more (or of unknown age).\n\
         Command: {}\n\
         Method: two-step maximum likelihood with pairwise-available cases: cumulative probit \
         margins for ordinal traits (McCullagh 1980), per-sex means and ML SDs for \
         measurements, then polychoric (Olsson 1979), polyserial (Olsson, Drasgow & Dorans \
         1982) or Pearson correlations given the margins, repaired to positive definite by \
         eigenvalue clipping where needed. Standard errors are in the table of estimates \
         written beside this file.{}{}{}\n",
        env!("CARGO_PKG_VERSION"),
        info.file,
        info.sha256,
        n_female,
        n_male,
        info.command,
        age_sentence(spec),
        if include.is_empty() {
            String::new()
        } else {
            format!(
                "\nNot fitted: the blocks named under `include` ({}) are taken as they are from \
                 the models named there; their provenance follows.",
                include
                    .iter()
                    .map(|i| format!("{} from {}", i.blocks.join(", "), i.model))
                    .collect::<Vec<_>>()
                    .join("; ")
            )
        },
        if warnings.is_empty() {
            String::new()
        } else {
            format!("\nWarnings at fitting:\n- {}", warnings.join("\n- "))
        }
    );
    Ok(FittedModel {
        model: RawModel {
            name: spec.name.clone(),
            description: spec.description.clone(),
            provenance,
            minimum_age: Some(minimum_age),
            traits,
            blocks,
            include,
            fitted_to: Some(crate::model::spec::FitOrigin {
                file: std::path::Path::new(&info.file)
                    .file_name()
                    .map(|n| n.to_string_lossy().into_owned())
                    .unwrap_or_else(|| info.file.clone()),
                sha256: info.sha256.clone(),
                females: n_female,
                males: n_male,
            }),
            built_from: None,
        },
        estimates,
        warnings,
        n_female,
        n_male,
    })
}

/// The sentence of the provenance on the blocks fitted with age slopes (empty if none).
fn age_sentence(spec: &FitSpec) -> String {
    let aged: Vec<&str> = spec
        .blocks
        .iter()
        .filter(|b| b.age_slope)
        .map(|b| b.id.as_str())
        .collect();
    if aged.is_empty() {
        return String::new();
    }
    format!(
        "\nAge: in {} {} each mean changes with age at death, a slope per sex (the \
         cumulative probit with covariates male, female × (age − centre) and male × (age − \
         centre); least squares per sex for measurements), from the individuals whose age is \
         recorded to within {WIDEST_AGE_INTERVAL} years (the interval's midpoint); the \
         correlations are estimated with each individual's means at its age.",
        if aged.len() == 1 { "block" } else { "blocks" },
        aged.join(", ")
    )
}

/// The ages of the individuals of a block fitted with age slopes.
#[derive(Debug, Clone)]
struct AgeFrame {
    /// Years at which the written means hold.
    centre: f64,
    /// Youngest age used.
    lowest: f64,
    /// Oldest age used.
    highest: f64,
    /// Each individual's age, aligned with the block's individuals.
    ages: Vec<f64>,
}

impl AgeFrame {
    /// age − centre of individual `i`.
    fn offset(&self, i: usize) -> f64 {
        self.ages[i] - self.centre
    }
}

/// The age a fit with age slopes takes: a point, or the midpoint of a closed interval no
/// wider than [`WIDEST_AGE_INTERVAL`].
fn age_point(age: Option<&AgeAtDeath>) -> Option<f64> {
    match age? {
        AgeAtDeath::Years {
            low,
            high: Some(high),
        } if high - low <= WIDEST_AGE_INTERVAL => Some(0.5 * (low + high)),
        _ => None,
    }
}

/// The individuals of an age-sloped block (those with an age) and their ages; `None` with a
/// problem logged when too few remain or their ages do not vary.
fn age_frame<'a>(
    b: &BlockSpec,
    used: &[(&'a Individual, Sex)],
    log: &mut FitLog,
) -> Option<(Vec<(&'a Individual, Sex)>, AgeFrame)> {
    let mut kept = Vec::new();
    let mut ages = Vec::new();
    for &(ind, sex) in used {
        if let Some(a) = age_point(ind.age.as_ref()) {
            kept.push((ind, sex));
            ages.push(a);
        }
    }
    if kept.len() < used.len() {
        log.warnings.push(format!(
            "block `{}`: {} individuals without an age at death recorded to within \
             {WIDEST_AGE_INTERVAL} years were left out of this block (its age slopes need each \
             one's age)",
            b.id,
            used.len() - kept.len()
        ));
    }
    let lowest = ages.iter().copied().fold(f64::INFINITY, f64::min);
    let highest = ages.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if ages.is_empty() || !(highest - lowest >= 1.0) {
        log.problems.push(FitProblem {
            place: format!("block `{}`", b.id),
            message: format!(
                "an age slope needs ages at death spanning at least a year; {} individuals have \
                 an age recorded to within {WIDEST_AGE_INTERVAL} years",
                ages.len()
            ),
        });
        return None;
    }
    let centre = b
        .age_centre
        .unwrap_or_else(|| (ages.iter().sum::<f64>() / ages.len() as f64).round());
    if !(lowest..=highest).contains(&centre) {
        log.problems.push(FitProblem {
            place: format!("block `{}`", b.id),
            message: format!(
                "`age_centre` {centre} lies outside the ages of the individuals used \
                 ({lowest} to {highest})"
            ),
        });
        return None;
    }
    Some((
        kept,
        AgeFrame {
            centre,
            lowest,
            highest,
            ages,
        },
    ))
}

/// One trait's values among the individuals used (index into `used`, sex index, value).
type TraitValues = Vec<(usize, usize, Value)>;

/// What fitting the blocks finds besides the blocks themselves: the table of estimates, the
/// warnings and the problems (every one of them, over every block).
#[derive(Debug, Default)]
struct FitLog {
    estimates: Vec<Estimate>,
    warnings: Vec<String>,
    problems: Vec<FitProblem>,
}

/// A latent block fitted in two steps: each trait's margin, then the correlations given the
/// margins. `None` when a trait of the block cannot be fitted (the problems are in `log`).
fn fit_block(
    b: &BlockSpec,
    catalogue: &Catalogue,
    used: &[(&Individual, Sex)],
    log: &mut FitLog,
) -> Option<RawLatentBlock> {
    let start = log.problems.len();
    let (block_used, frame) = if b.age_slope {
        let (kept, frame) = age_frame(b, used, log)?;
        (kept, Some(frame))
    } else {
        (used.to_vec(), None)
    };
    let mut margins: Vec<Margin> = Vec::new();
    let mut values: Vec<TraitValues> = Vec::new();
    let mut written: Vec<RawLatentTrait> = Vec::new();
    for t in &b.traits {
        if let Some((vals, margin, raw)) =
            fit_margin(b, t, catalogue, &block_used, frame.as_ref(), log)
        {
            values.push(vals);
            margins.push(margin);
            written.push(raw);
        }
    }
    if log.problems.len() > start {
        return None;
    }
    let p = b.traits.len();
    let slopes: Vec<[f64; 2]> = written
        .iter()
        .map(|t| t.age_slope.map_or([0.0; 2], |s| [s.female, s.male]))
        .collect();
    let matrices = correlations(b, &values, &margins, (frame.as_ref(), &slopes), log);
    let rows = |m: &DMatrix<f64>| -> Vec<Vec<f64>> {
        (0..p)
            .map(|i| (0..p).map(|j| round(m[(i, j)])).collect())
            .collect()
    };
    let (correlation, correlation_female, correlation_male) = match matrices.as_slice() {
        [shared] => (Some(rows(shared)), None, None),
        [f, m] => (None, Some(rows(f)), Some(rows(m))),
        _ => (None, None, None),
    };
    Some(RawLatentBlock {
        id: b.id.clone(),
        label: if b.label.is_empty() {
            b.id.clone()
        } else {
            b.label.clone()
        },
        traits: written,
        correlation,
        correlation_female,
        correlation_male,
        age: frame.map(|f| RawAgeEffect {
            centre: f.centre,
            lowest: f.lowest,
            highest: f.highest,
        }),
    })
}

/// One trait's values among the individuals used, on the model's grade scale from 0.
fn trait_values(used: &[(&Individual, Sex)], index: usize, lowest: i32) -> TraitValues {
    used.iter()
        .enumerate()
        .filter_map(|(i, (ind, sex))| {
            let s = usize::from(*sex == Sex::Male);
            match ind.observations.get(index).copied().flatten()? {
                Observation::Grade { low, high } => Some((
                    i,
                    s,
                    Value::Grade((low - lowest) as usize, (high - lowest) as usize),
                )),
                Observation::Measurement { value } => Some((i, s, Value::Measure(value))),
                Observation::Count { .. } => None,
            }
        })
        .collect()
}

/// One trait's margin: its values, the fitted margin and the trait as written in the model.
fn fit_margin(
    b: &BlockSpec,
    t: &str,
    catalogue: &Catalogue,
    used: &[(&Individual, Sex)],
    age: Option<&AgeFrame>,
    log: &mut FitLog,
) -> Option<(TraitValues, Margin, RawLatentTrait)> {
    let place = format!("block `{}`, trait `{t}`", b.id);
    let (Some(index), Some(def)) = (catalogue.position(t), catalogue.get(t)) else {
        log.problems.push(FitProblem {
            place,
            message: "not a trait of the catalogue".into(),
        });
        return None;
    };
    let lowest = match def.kind {
        TraitKind::Ordinal { lowest, .. } => lowest,
        _ => 0,
    };
    let vals = trait_values(used, index, lowest);
    let n_sex = [
        vals.iter().filter(|v| v.1 == 0).count(),
        vals.iter().filter(|v| v.1 == 1).count(),
    ];
    if n_sex[0] < 2 || n_sex[1] < 2 {
        log.problems.push(FitProblem {
            place,
            message: format!(
                "recorded for {} females and {} males; at least 2 of each are needed",
                n_sex[0], n_sex[1]
            ),
        });
        return None;
    }
    let (margin, raw) = match &def.kind {
        TraitKind::Ordinal { .. } => {
            let k = def.kind.n_grades().unwrap_or(2);
            ordinal_margin(b, t, &place, (lowest, k), &vals, age, log)?
        }
        TraitKind::Metric { unit, .. } => {
            metric_margin(b, t, &place, (unit, n_sex), &vals, age, log)?
        }
        TraitKind::Count => {
            log.problems.push(FitProblem {
                place,
                message: "a count cannot enter a latent block".into(),
            });
            return None;
        }
    };
    Some((vals, margin, raw))
}

/// An ordinal trait's margin: a cumulative probit (McCullagh 1980) with a shift between the
/// sexes; the female latent mean is 0 and the within-sex SD 1, and the model stores the
/// thresholds centred between the sexes. Seven arguments: the block and trait name the
/// estimates, the place names the problems, `(lowest, k)` give the grade scale, and `age`
/// the ages when the block has age slopes (covariates male, female × (age − c), male × (age −
/// c): the female latent mean is 0 at the centre age c).
fn ordinal_margin(
    b: &BlockSpec,
    t: &str,
    place: &str,
    (lowest, k): (i32, usize),
    vals: &TraitValues,
    age: Option<&AgeFrame>,
    log: &mut FitLog,
) -> Option<(Margin, RawLatentTrait)> {
    let n = vals.len();
    let scores: Vec<OrdinalScore> = vals
        .iter()
        .filter_map(|&(_, s, v)| match v {
            Value::Grade(low, high) => Some(OrdinalScore {
                male: s == 1,
                low,
                high,
            }),
            Value::Measure(_) => None,
        })
        .collect();
    for g in 0..k {
        for (s, word) in [(0, "female"), (1, "male")] {
            let seen = scores
                .iter()
                .any(|x| usize::from(x.male) == s && x.low == g && x.high == g);
            if !seen {
                log.warnings.push(format!(
                    "{place}: grade {} is never recorded for a {word}",
                    g as i32 + lowest
                ));
            }
        }
    }
    let fitted = match age {
        None => fit_cumulative_probit(&scores, k).map(|f| (f, None)),
        Some(frame) => fit_probit_regression(&age_cases(vals, frame), k).map(|f| {
            let slopes = [
                (f.coefficients[1], f.coefficient_se[1]),
                (f.coefficients[2], f.coefficient_se[2]),
            ];
            (f.sex_fit(), Some(slopes))
        }),
    };
    match fitted {
        Err(e) => {
            let message = match e {
                ordinal::OrdinalFitError::GradeNeverSeen(g) => format!(
                    "grade {} is never recorded, so its threshold cannot be estimated; \
                     map the scores onto fewer grades (--scale-map) or record more individuals",
                    g as i32 + lowest
                ),
                other => other.to_string(),
            };
            log.problems.push(FitProblem {
                place: place.into(),
                message,
            });
            None
        }
        Ok((f, slopes)) => {
            let centred =
                age.map(|a| format!("latent, female mean 0 at age {}, within-sex SD 1", a.centre));
            let scale = centred
                .as_deref()
                .unwrap_or("latent, female mean 0, within-sex SD 1");
            for (j, (th, se)) in f.thresholds.iter().zip(&f.threshold_se).enumerate() {
                log.estimates.push(Estimate {
                    block: b.id.clone(),
                    trait_id: t.to_string(),
                    parameter: format!("threshold {}|{}", j as i32 + lowest, j as i32 + lowest + 1),
                    scale: scale.into(),
                    estimate: *th,
                    se: *se,
                    n,
                });
            }
            log.estimates.push(Estimate {
                block: b.id.clone(),
                trait_id: t.to_string(),
                parameter: "male - female latent mean".into(),
                scale: scale.into(),
                estimate: f.shift,
                se: f.shift_se,
                n,
            });
            if let Some(sl) = slopes {
                push_slopes(log, b, t, "latent SD", sl, [n, n]);
            }
            let half = 0.5 * f.shift;
            let raw = RawLatentTrait {
                id: t.to_string(),
                thresholds: Some(f.thresholds.iter().map(|x| round(x - half)).collect()),
                mean: PerSex {
                    female: round(-half),
                    male: round(half),
                },
                sd: None,
                observer_error_sd: None,
                age_slope: slopes.map(|[f, m]| PerSex {
                    female: round(f.0),
                    male: round(m.0),
                }),
            };
            let margin = Margin::Ordinal {
                thresholds: f.thresholds,
                mean: [0.0, f.shift],
            };
            Some((margin, raw))
        }
    }
}

/// A measurement's margin: per-sex means and maximum-likelihood SDs (per sex or pooled, as
/// the block says), with their standard errors. Seven arguments, as [`ordinal_margin`]: the
/// names of the estimates and problems, the unit with the per-sex counts already made, and the
/// ages when the block has age slopes
/// (then per sex y = α + β (age − c) + ε by least squares: α the mean at the centre age c, β
/// the slope, the SD from the residuals; the standard errors of α and β are the usual ones,
/// σ √(1/n + d̄²/S_dd) and σ/√S_dd with d = age − c).
fn metric_margin(
    b: &BlockSpec,
    t: &str,
    place: &str,
    (unit, n_sex): (&str, [usize; 2]),
    vals: &TraitValues,
    age: Option<&AgeFrame>,
    log: &mut FitLog,
) -> Option<(Margin, RawLatentTrait)> {
    let n = vals.len();
    let mut sum = [0.0; 2];
    let mut sum_d = [0.0; 2];
    let offset = |i: usize| age.map_or(0.0, |a| a.offset(i));
    for &(i, s, v) in vals {
        if let Value::Measure(x) = v {
            sum[s] += x;
            sum_d[s] += offset(i);
        }
    }
    let mut mean = [sum[0] / n_sex[0] as f64, sum[1] / n_sex[1] as f64];
    let mut slope = [0.0; 2];
    let mut slope_se_factor = [f64::NAN; 2];
    let mut mean_se_factor = [
        1.0 / (n_sex[0] as f64).sqrt(),
        1.0 / (n_sex[1] as f64).sqrt(),
    ];
    if age.is_some() {
        let d_bar = [sum_d[0] / n_sex[0] as f64, sum_d[1] / n_sex[1] as f64];
        let (mut s_dd, mut s_dy) = ([0.0; 2], [0.0; 2]);
        for &(i, s, v) in vals {
            if let Value::Measure(x) = v {
                let d = offset(i) - d_bar[s];
                s_dd[s] += d * d;
                s_dy[s] += d * (x - mean[s]);
            }
        }
        if !(s_dd[0] > 0.0 && s_dd[1] > 0.0) {
            log.problems.push(FitProblem {
                place: place.into(),
                message: "the ages of one sex's individuals with this measurement are all the \
                          same, so its age slope cannot be estimated"
                    .into(),
            });
            return None;
        }
        for s in 0..2 {
            slope[s] = s_dy[s] / s_dd[s];
            // The mean at the centre age: ȳ − β d̄.
            mean[s] -= slope[s] * d_bar[s];
            slope_se_factor[s] = 1.0 / s_dd[s].sqrt();
            mean_se_factor[s] = (1.0 / n_sex[s] as f64 + d_bar[s] * d_bar[s] / s_dd[s]).sqrt();
        }
    }
    let mut ss = [0.0; 2];
    for &(i, s, v) in vals {
        if let Value::Measure(x) = v {
            ss[s] += (x - mean[s] - slope[s] * offset(i)).powi(2);
        }
    }
    let sd = match b.dispersion {
        Dispersion::PerSex => [
            (ss[0] / n_sex[0] as f64).sqrt(),
            (ss[1] / n_sex[1] as f64).sqrt(),
        ],
        Dispersion::Shared => {
            let pooled = ((ss[0] + ss[1]) / n as f64).sqrt();
            [pooled, pooled]
        }
    };
    if !(sd[0] > 0.0 && sd[1] > 0.0) {
        log.problems.push(FitProblem {
            place: place.into(),
            message: "every recorded value of one sex is the same; an SD of 0 cannot be used"
                .into(),
        });
        return None;
    }
    for (s, word) in [(0, "female"), (1, "male")] {
        log.estimates.push(Estimate {
            block: b.id.clone(),
            trait_id: t.to_string(),
            parameter: match age {
                None => format!("mean {word}"),
                Some(a) => format!("mean {word} at age {}", a.centre),
            },
            scale: unit.to_string(),
            estimate: mean[s],
            se: sd[s] * mean_se_factor[s],
            n: n_sex[s],
        });
    }
    if age.is_some() {
        let sl = [
            (slope[0], sd[0] * slope_se_factor[0]),
            (slope[1], sd[1] * slope_se_factor[1]),
        ];
        push_slopes(log, b, t, unit, sl, n_sex);
    }
    match b.dispersion {
        Dispersion::PerSex => {
            for (s, word) in [(0, "female"), (1, "male")] {
                log.estimates.push(Estimate {
                    block: b.id.clone(),
                    trait_id: t.to_string(),
                    parameter: format!("sd {word}"),
                    scale: unit.to_string(),
                    estimate: sd[s],
                    se: sd[s] / (2.0 * n_sex[s] as f64).sqrt(),
                    n: n_sex[s],
                });
            }
        }
        Dispersion::Shared => log.estimates.push(Estimate {
            block: b.id.clone(),
            trait_id: t.to_string(),
            parameter: "sd within sex (pooled)".into(),
            scale: unit.to_string(),
            estimate: sd[0],
            se: sd[0] / (2.0 * n as f64).sqrt(),
            n,
        }),
    }
    let raw = RawLatentTrait {
        id: t.to_string(),
        thresholds: None,
        mean: PerSex {
            female: round(mean[0]),
            male: round(mean[1]),
        },
        sd: Some(PerSex {
            female: round(sd[0]),
            male: round(sd[1]),
        }),
        observer_error_sd: None,
        age_slope: age.map(|_| PerSex {
            female: round(slope[0]),
            male: round(slope[1]),
        }),
    };
    Some((Margin::Metric { mean, sd }, raw))
}

/// The age slopes of one trait in the table of estimates, per year in `unit`.
fn push_slopes(
    log: &mut FitLog,
    b: &BlockSpec,
    t: &str,
    unit: &str,
    slopes: [(f64, f64); 2],
    n: [usize; 2],
) {
    for (s, word) in [(0, "female"), (1, "male")] {
        log.estimates.push(Estimate {
            block: b.id.clone(),
            trait_id: t.to_string(),
            parameter: format!("age slope {word}"),
            scale: format!("{unit} per year"),
            estimate: slopes[s].0,
            se: slopes[s].1,
            n: n[s],
        });
    }
}

/// The probit cases of an ordinal trait in a block with age slopes: covariates male,
/// female × (age − c), male × (age − c).
fn age_cases(vals: &TraitValues, frame: &AgeFrame) -> Vec<ProbitCase> {
    vals.iter()
        .filter_map(|&(i, s, v)| match v {
            Value::Grade(low, high) => {
                let d = frame.offset(i);
                let male = s as f64;
                Some(ProbitCase {
                    low,
                    high,
                    covariates: vec![male, (1.0 - male) * d, male * d],
                    weight: 1.0,
                })
            }
            Value::Measure(_) => None,
        })
        .collect()
}

/// The block's correlation matrices given the margins (polychoric, polyserial or Pearson by
/// pair; Olsson 1979, Olsson, Drasgow & Dorans 1982), shared or per sex as the block says,
/// repaired to positive definite by eigenvalue clipping where needed.
fn correlations(
    b: &BlockSpec,
    values: &[TraitValues],
    margins: &[Margin],
    (age, slopes): (Option<&AgeFrame>, &[[f64; 2]]),
    log: &mut FitLog,
) -> Vec<DMatrix<f64>> {
    let p = b.traits.len();
    let sexes: &[&[usize]] = match b.correlation {
        CorrelationSharing::None => &[],
        CorrelationSharing::Shared => &[&[0, 1]],
        CorrelationSharing::PerSex => &[&[0], &[1]],
    };
    let mut matrices: Vec<DMatrix<f64>> = Vec::new();
    for (which, sex_set) in sexes.iter().enumerate() {
        let label = match (b.correlation, which) {
            (CorrelationSharing::PerSex, 0) => "correlation female with ",
            (CorrelationSharing::PerSex, _) => "correlation male with ",
            _ => "correlation with ",
        };
        let mut r = DMatrix::identity(p, p);
        for j in 0..p {
            for k in j + 1..p {
                let shift = |trait_j: usize, i: usize, s: usize| {
                    age.map_or(0.0, |a| slopes[trait_j][s] * a.offset(i))
                };
                let cases = pair_cases((&values[j], &values[k]), sex_set, |i, s| {
                    [shift(j, i, s), shift(k, i, s)]
                });
                let place = format!(
                    "block `{}`: {}{} and {}",
                    b.id,
                    label.trim_end_matches(" with "),
                    b.traits[j],
                    b.traits[k]
                );
                let e = if cases.len() < MIN_PAIRS {
                    log.warnings.push(format!(
                        "{place}: only {} individuals have both; the correlation is set to 0",
                        cases.len()
                    ));
                    correlation::CorrelationEstimate {
                        rho: 0.0,
                        se: f64::NAN,
                        n: cases.len(),
                        method: "none (too few pairs)",
                    }
                } else {
                    if cases.len() < FEW_PAIRS {
                        log.warnings.push(format!(
                            "{place}: only {} individuals have both; the correlation is imprecise",
                            cases.len()
                        ));
                    }
                    correlation::estimate(&margins[j], &margins[k], &cases)
                };
                r[(j, k)] = e.rho;
                r[(k, j)] = e.rho;
                log.estimates.push(Estimate {
                    block: b.id.clone(),
                    trait_id: b.traits[j].clone(),
                    parameter: format!("{label}{} ({})", b.traits[k], e.method),
                    scale: "correlation within sex".into(),
                    estimate: e.rho,
                    se: e.se,
                    n: e.n,
                });
            }
        }
        let (fixed, smallest) = repair::make_positive_definite(&r, repair::EIGENVALUE_FLOOR);
        if let Some(s) = smallest {
            log.warnings.push(format!(
                "block `{}`: the pairwise correlations did not form a positive-definite matrix \
                 (smallest eigenvalue {s:.4}); it was repaired by eigenvalue clipping",
                b.id
            ));
        }
        matrices.push(fixed);
    }
    matrices
}

/// Cases with both traits recorded, among the given sexes, each with its means' shifts
/// (`shift(individual, sex)`: the age effects of the two traits).
fn pair_cases(
    (first, second): (&TraitValues, &TraitValues),
    sexes: &[usize],
    shift: impl Fn(usize, usize) -> [f64; 2],
) -> Vec<PairCase> {
    let mut out = Vec::new();
    let mut k = 0;
    for &(i, s, v) in first {
        while k < second.len() && second[k].0 < i {
            k += 1;
        }
        if k < second.len() && second[k].0 == i && sexes.contains(&s) {
            out.push(PairCase {
                sex: s,
                first: v,
                second: second[k].2,
                shift: shift(i, s),
            });
        }
    }
    out
}

/// Round to 10 significant decimals so the written model reads cleanly and is stable.
fn round(x: f64) -> f64 {
    (x * 1e10).round() / 1e10
}

#[cfg(test)]
#[path = "tests/fit.rs"]
mod tests;
