//! Models built from what papers publish (`tessera fit --from-summary SUMMARY.yaml`): per-sex
//! tables of grade counts (or shares with n), per-sex means and SDs of measurements, and, where
//! the paper gives one, a within-sex correlation matrix.
//!
//! ```yaml
//! name: femur-published
//! description: One paragraph.
//! source:                                  # required: where every number comes from
//!   citation: "Author A, Author B (2019). Title. Journal 11:740-744."
//!   sample: "Who was measured, where, and how their sex was documented."
//!   females: 181
//!   males: 219
//!   note: "Values read in the paper's Table 2."   # optional: seen, or from memory
//! blocks:
//!   - id: femur
//!     dispersion: per-sex                  # or shared: one pooled within-sex SD
//!     traits:
//!       - id: femur_head_diameter          # a measurement: n, mean and SD per sex
//!         female: {n: 181, mean: 42.01, sd: 2.42}
//!         male: {n: 219, mean: 47.58, sd: 2.82}
//!       - id: glabella                     # an ordinal trait: counts per grade, lowest first,
//!         female: {counts: [12, 30, 41, 9, 3]}
//!         male: {shares: [0.02, 0.10, 0.33, 0.35, 0.20], n: 96}   # or shares with n
//!     correlation: [[1, 0.4], [0.4, 1]]    # within sex, as published; or
//!     # assumed_correlation: 0.3           # one value for every pair: a stated assumption
//! ```
//!
//! # Method
//! - Ordinal traits: the cumulative probit of [`super::ordinal`] fitted by maximum likelihood
//!   to the grouped counts, Σ n_{s,k} ln[Φ(τₖ − μₛ) − Φ(τₖ₋₁ − μₛ)] (McCullagh 1980): the same
//!   estimator, and the same estimates, as a fit to the individual scores the table counts.
//!   Shares are turned into counts as share × n after the shares are rescaled to sum to 1.
//! - Measurements: the published mean, and the published SD taken as the sample SD (divisor
//!   n − 1, common practice in osteometric tables) converted to the maximum-likelihood SD
//!   s·√((n − 1)/n) that `tessera fit` estimates from raw data; `shared` pools the sums of
//!   squares over the sexes. Standard errors s/√n for means and s/√(2n) for SDs.
//! - Correlations: as published (within sex, on the latent scale), one value for every pair
//!   (`assumed_correlation`), or, when neither is given, none (traits independent given sex),
//!   which the model's provenance and the fit's warnings say.

use super::{Dispersion, Estimate, FitError, FitProblem, FittedModel};
use crate::catalogue::{Catalogue, RawTrait, TraitKind};
use crate::fit::ordinal::{fit_grouped_probit, OrdinalFitError, OrdinalScore};
use crate::model::include::RawInclude;
use crate::model::spec::{PerSex, RawBlock, RawLatentBlock, RawLatentTrait, RawModel};
use nalgebra::DMatrix;
use serde::Deserialize;

/// Shares may miss 1 by this much per grade (each share rounded to two decimals is off by at
/// most 0.005; a choice of ours for "within rounding").
pub const SHARE_ROUNDING: f64 = 0.005;

/// A published-summary document.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SummarySpec {
    /// Name of the model to write.
    pub name: String,
    /// One paragraph on what the model is for.
    #[serde(default)]
    pub description: String,
    /// The publication and its sample (required; checked with every other problem).
    #[serde(default)]
    pub source: Option<SummarySource>,
    /// Years below which morphological blocks are not used (default 18).
    #[serde(default)]
    pub minimum_age: Option<f64>,
    /// Definitions of traits not in the catalogue.
    #[serde(default)]
    pub traits: Vec<RawTrait>,
    /// Blocks the written model takes from another model (as in a fitting specification).
    #[serde(default)]
    pub include: Option<Vec<RawInclude>>,
    /// The blocks and their published values.
    pub blocks: Vec<SummaryBlock>,
}

/// Where the numbers come from.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SummarySource {
    /// The publication, as it should be cited.
    #[serde(default)]
    pub citation: Option<String>,
    /// The reference sample (population, period, how sex was documented).
    #[serde(default)]
    pub sample: Option<String>,
    /// Females in the sample.
    #[serde(default)]
    pub females: Option<f64>,
    /// Males in the sample.
    #[serde(default)]
    pub males: Option<f64>,
    /// Anything a reader must know: which values were seen, which are from memory.
    #[serde(default)]
    pub note: String,
}

/// One block of published values.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SummaryBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// Metric SDs per sex or pooled.
    #[serde(default)]
    pub dispersion: Dispersion,
    /// The traits in matrix order.
    pub traits: Vec<SummaryTrait>,
    /// Published within-sex correlation matrix, shared by the sexes.
    #[serde(default)]
    pub correlation: Option<Vec<Vec<f64>>>,
    /// Published female correlation matrix (with `correlation_male`).
    #[serde(default)]
    pub correlation_female: Option<Vec<Vec<f64>>>,
    /// Published male correlation matrix (with `correlation_female`).
    #[serde(default)]
    pub correlation_male: Option<Vec<Vec<f64>>>,
    /// One assumed within-sex correlation for every pair (exchangeable).
    #[serde(default)]
    pub assumed_correlation: Option<f64>,
}

/// One trait's published values by sex.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SummaryTrait {
    /// Catalogue trait id.
    pub id: String,
    /// The female sample's values.
    #[serde(default)]
    pub female: Option<SexSummary>,
    /// The male sample's values.
    #[serde(default)]
    pub male: Option<SexSummary>,
}

/// One sex's published values of one trait: `counts`, or `shares` with `n`, for an ordinal
/// trait; `n`, `mean` and `sd` for a measurement.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SexSummary {
    /// Individuals per grade, lowest grade first.
    #[serde(default)]
    pub counts: Option<Vec<f64>>,
    /// Share of individuals per grade, lowest grade first (with `n`).
    #[serde(default)]
    pub shares: Option<Vec<f64>>,
    /// Sample size.
    #[serde(default)]
    pub n: Option<f64>,
    /// Mean of a measurement.
    #[serde(default)]
    pub mean: Option<f64>,
    /// Sample SD of a measurement (divisor n − 1).
    #[serde(default)]
    pub sd: Option<f64>,
}

impl SummarySpec {
    /// Parse a summary document.
    ///
    /// # Errors
    /// The YAML error as text.
    pub fn from_yaml(text: &str) -> Result<SummarySpec, String> {
        crate::limits::check_yaml(text)?;
        serde_yaml::from_str(text).map_err(|e| format!("not a valid published-summary file: {e}"))
    }

    /// The `include:` the written model gets (as [`super::FitSpec::includes`]).
    pub fn includes(&self) -> Vec<RawInclude> {
        match &self.include {
            Some(v) => v.clone(),
            None if self.blocks.iter().any(|b| b.id == "dna") => Vec::new(),
            None => vec![RawInclude {
                model: "default".into(),
                blocks: vec!["dna".into()],
            }],
        }
    }
}

/// The summary file, for the model's record.
#[derive(Debug, Clone, PartialEq)]
pub struct SummaryFile {
    /// File as named.
    pub file: String,
    /// SHA-256 of its bytes.
    pub sha256: String,
    /// The command that built the model.
    pub command: String,
}

/// One sample size: a whole number of at least `least`.
fn whole(x: Option<f64>, least: f64) -> Option<f64> {
    x.filter(|v| v.is_finite() && v.fract() == 0.0 && *v >= least)
}

/// Build a model from published summary statistics: every block, every trait; every problem
/// of the document is listed at once, with the field that holds it, and nothing is built
/// while any remains.
///
/// # Errors
/// [`FitError`] naming every problem (`place` is the field, as `blocks[femur].traits[glabella].male.sd`).
pub fn build_from_summary(
    spec: &SummarySpec,
    catalogue: &Catalogue,
    file: &SummaryFile,
) -> Result<FittedModel, FitError> {
    let mut problems: Vec<FitProblem> = Vec::new();
    let mut fail = |place: String, message: String| problems.push(FitProblem { place, message });
    let source = spec.source.clone().unwrap_or_default();
    if spec.source.is_none() {
        fail(
            "source".into(),
            "missing: give the publication (`citation`), its sample (`sample`) and the numbers of `females` and `males`".into(),
        );
    } else {
        for (field, v) in [("citation", &source.citation), ("sample", &source.sample)] {
            if v.as_deref().is_none_or(|t| t.trim().is_empty()) {
                fail(
                    format!("source.{field}"),
                    "missing: required so that every number can be traced".into(),
                );
            }
        }
        for (field, v) in [("females", source.females), ("males", source.males)] {
            if whole(v, 1.0).is_none() {
                fail(
                    format!("source.{field}"),
                    match v {
                        None => "missing: the sample's number of this sex".into(),
                        Some(x) => format!("a whole number of at least 1, found {x}"),
                    },
                );
            }
        }
    }
    if spec.blocks.is_empty() {
        fail("blocks".into(), "name at least one block".into());
    }
    if let Some(age) = spec.minimum_age {
        if !(age.is_finite() && (0.0..=100.0).contains(&age)) {
            fail(
                "minimum_age".into(),
                format!("years from 0 to 100, found {age}"),
            );
        }
    }
    let mut estimates = Vec::new();
    let mut warnings = Vec::new();
    let mut blocks = Vec::new();
    let mut seen: Vec<&str> = Vec::new();
    for (i, b) in spec.blocks.iter().enumerate() {
        if let Err(m) = crate::catalogue::valid_id(&b.id) {
            fail(format!("blocks[{}].id", i + 1), format!("`{}`: {m}", b.id));
        }
        if spec.blocks[..i].iter().any(|o| o.id == b.id) {
            fail(
                format!("blocks[{}]", b.id),
                "block ids must be unique".into(),
            );
        }
        for t in &b.traits {
            if seen.contains(&t.id.as_str()) {
                fail(
                    format!("blocks[{}].traits[{}]", b.id, t.id),
                    "listed twice; a trait may serve one block only".into(),
                );
            }
            seen.push(&t.id);
        }
        let mut log = BlockLog {
            estimates: &mut estimates,
            warnings: &mut warnings,
            problems: Vec::new(),
        };
        if let Some(block) = build_block(b, catalogue, &mut log) {
            blocks.push(RawBlock::Latent(block));
        }
        for p in log.problems {
            fail(p.place, p.message);
        }
    }
    if !problems.is_empty() {
        return Err(FitError {
            file: file.file.clone(),
            problems,
        });
    }
    let citation = source.citation.unwrap_or_default();
    let sample = source.sample.unwrap_or_default();
    let females = source.females.unwrap_or(0.0) as usize;
    let males = source.males.unwrap_or(0.0) as usize;
    let minimum_age = spec.minimum_age.unwrap_or(super::DEFAULT_MINIMUM_AGE);
    let include = spec.includes();
    let correlations: Vec<String> = spec
        .blocks
        .iter()
        .filter(|b| b.traits.len() > 1)
        .map(|b| format!("block `{}`: {}", b.id, correlation_origin(b)))
        .collect();
    let provenance = format!(
        "BUILT by tessera {} from PUBLISHED SUMMARY STATISTICS in {} (SHA-256 {}).\n\
         Source: {citation}\n\
         Sample: {sample}; {females} females and {males} males.{}\n\
         Command: {}\n\
         Method: ordinal traits by a cumulative probit fitted by maximum likelihood to the \
         published grade counts by sex (McCullagh 1980); measurements from the published \
         per-sex means and SDs (SDs read as sample SDs, divisor n - 1, and converted to \
         maximum-likelihood SDs). Standard errors are in the table of estimates written \
         beside this file.\n\
         Correlations: {}{}{}\n",
        env!("CARGO_PKG_VERSION"),
        file.file,
        file.sha256,
        if source.note.trim().is_empty() {
            String::new()
        } else {
            format!("\nNote: {}", source.note.trim())
        },
        file.command,
        if correlations.is_empty() {
            "none needed (one trait per block).".to_string()
        } else {
            correlations.join("; ")
        },
        if include.is_empty() {
            String::new()
        } else {
            format!(
                "\nNot from this source: the blocks named under `include` ({}) are taken as they \
                 are from the models named there; their provenance follows.",
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
            format!("\nWarnings at building:\n- {}", warnings.join("\n- "))
        }
    );
    Ok(FittedModel {
        model: RawModel {
            name: spec.name.clone(),
            description: spec.description.clone(),
            provenance,
            minimum_age: Some(minimum_age),
            traits: spec.traits.clone(),
            blocks,
            include,
            fitted_to: None,
            built_from: Some(crate::model::spec::SummaryOrigin {
                citation,
                sample,
                females,
                males,
                file: std::path::Path::new(&file.file)
                    .file_name()
                    .map(|n| n.to_string_lossy().into_owned())
                    .unwrap_or_else(|| file.file.clone()),
                sha256: file.sha256.clone(),
            }),
        },
        estimates,
        warnings,
        n_female: females,
        n_male: males,
    })
}

/// How a block's correlations were set, in words for the provenance.
fn correlation_origin(b: &SummaryBlock) -> String {
    match (&b.correlation, &b.correlation_female, b.assumed_correlation) {
        (Some(_), _, _) => "within-sex matrix as published".into(),
        (None, Some(_), _) => "female and male matrices as published".into(),
        (None, None, Some(r)) => format!(
            "not published; ASSUMED {r} for every pair (run analyse over other values with \
             --correlation-check to see how much the results depend on it)"
        ),
        (None, None, None) => "not published; ASSUMED 0 (traits independent given sex; run \
             analyse with --correlation-check to see how much the results depend on it)"
            .into(),
    }
}

/// What building a block records besides the block.
struct BlockLog<'a> {
    estimates: &'a mut Vec<Estimate>,
    warnings: &'a mut Vec<String>,
    problems: Vec<FitProblem>,
}

impl BlockLog<'_> {
    fn fail(&mut self, place: String, message: String) {
        self.problems.push(FitProblem { place, message });
    }
}

/// One block: every trait's margin, then the correlation matrices.
fn build_block(
    b: &SummaryBlock,
    catalogue: &Catalogue,
    log: &mut BlockLog,
) -> Option<RawLatentBlock> {
    let start = log.problems.len();
    if b.traits.is_empty() {
        log.fail(
            format!("blocks[{}].traits", b.id),
            "list at least one trait".into(),
        );
    }
    let mut written = Vec::new();
    for t in &b.traits {
        let place = format!("blocks[{}].traits[{}]", b.id, t.id);
        let Some(def) = catalogue.get(&t.id) else {
            log.fail(
                place,
                "neither in the catalogue nor defined under `traits:`".into(),
            );
            continue;
        };
        let (Some(female), Some(male)) = (&t.female, &t.male) else {
            for (sex, v) in [("female", &t.female), ("male", &t.male)] {
                if v.is_none() {
                    log.fail(
                        format!("{place}.{sex}"),
                        "missing: both sexes' values are needed".into(),
                    );
                }
            }
            continue;
        };
        let raw = match &def.kind {
            TraitKind::Ordinal { lowest, .. } => {
                let k = def.kind.n_grades().unwrap_or(2);
                ordinal_trait(b, t, [female, male], *lowest, k, &place, log)
            }
            TraitKind::Metric { unit, .. } => metric_trait(b, t, [female, male], unit, &place, log),
            TraitKind::Count => {
                log.fail(
                    place,
                    "a read count has no published-summary form here; DNA blocks are included from another model".into(),
                );
                None
            }
        };
        written.extend(raw);
    }
    let p = b.traits.len();
    let matrices = block_correlation(b, p, log);
    if log.problems.len() > start || written.len() != p {
        return None;
    }
    let (correlation, correlation_female, correlation_male) = matrices;
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
        age: None,
    })
}

type Matrices = (
    Option<Vec<Vec<f64>>>,
    Option<Vec<Vec<f64>>>,
    Option<Vec<Vec<f64>>>,
);

/// The block's correlation as the model writes it, each given matrix checked (size,
/// symmetry, unit diagonal, entries in [−1, 1], positive definite).
fn block_correlation(b: &SummaryBlock, p: usize, log: &mut BlockLog) -> Matrices {
    let place = |field: &str| format!("blocks[{}].{field}", b.id);
    let given = [
        b.correlation.is_some(),
        b.correlation_female.is_some() || b.correlation_male.is_some(),
        b.assumed_correlation.is_some(),
    ];
    if given.iter().filter(|g| **g).count() > 1 {
        log.fail(
            place("correlation"),
            "give one of `correlation`, `correlation_female` with `correlation_male`, or `assumed_correlation`".into(),
        );
        return (None, None, None);
    }
    if b.correlation_female.is_some() != b.correlation_male.is_some() {
        log.fail(
            place("correlation_female"),
            "`correlation_female` and `correlation_male` go together".into(),
        );
        return (None, None, None);
    }
    let mut check = |field: &str, m: &Vec<Vec<f64>>| -> Option<Vec<Vec<f64>>> {
        match check_matrix(m, p) {
            Ok(()) => Some(m.clone()),
            Err(message) => {
                log.fail(place(field), message);
                None
            }
        }
    };
    if let Some(m) = &b.correlation {
        return (check("correlation", m), None, None);
    }
    if let (Some(f), Some(m)) = (&b.correlation_female, &b.correlation_male) {
        return (
            None,
            check("correlation_female", f),
            check("correlation_male", m),
        );
    }
    let r = b.assumed_correlation.unwrap_or(0.0);
    // An exchangeable matrix is positive definite exactly when −1/(p − 1) < r < 1.
    let lowest = if p > 1 { -1.0 / (p as f64 - 1.0) } else { -1.0 };
    if !(r.is_finite() && r > lowest && r < 1.0) {
        log.fail(
            place("assumed_correlation"),
            format!(
                "with {p} traits one correlation for every pair must lie above {lowest:.4} and below 1, found {r}"
            ),
        );
        return (None, None, None);
    }
    if p < 2 {
        return (None, None, None);
    }
    if b.assumed_correlation.is_none() {
        log.warnings.push(format!(
            "block `{}`: no correlation was given, so its {p} traits are taken as independent given sex (an assumption; `assumed_correlation` states another)",
            b.id
        ));
    }
    let rows = (0..p)
        .map(|i| (0..p).map(|j| if i == j { 1.0 } else { r }).collect())
        .collect();
    (Some(rows), None, None)
}

/// A published correlation matrix: p × p, symmetric, unit diagonal, entries in [−1, 1] and
/// positive definite (smallest eigenvalue above 0).
pub fn check_matrix(m: &[Vec<f64>], p: usize) -> Result<(), String> {
    if m.len() != p || m.iter().any(|r| r.len() != p) {
        return Err(format!(
            "must be {p}×{p}: one row and one column per trait, in the order of `traits`"
        ));
    }
    let mut wrong = Vec::new();
    for (i, row) in m.iter().enumerate() {
        if (row[i] - 1.0).abs() > 1e-12 {
            wrong.push(format!(
                "row {} has {} on the diagonal (must be 1)",
                i + 1,
                row[i]
            ));
        }
        for (j, &x) in row.iter().enumerate() {
            if !x.is_finite() || x.abs() > 1.0 {
                wrong.push(format!(
                    "row {}, column {}: {x} is not in [−1, 1]",
                    i + 1,
                    j + 1
                ));
            } else if j > i && (x - m[j][i]).abs() > 1e-9 {
                wrong.push(format!(
                    "rows {} and {} differ (not symmetric)",
                    i + 1,
                    j + 1
                ));
            }
        }
    }
    if !wrong.is_empty() {
        return Err(wrong.join("; "));
    }
    let r = DMatrix::from_fn(p, p, |i, j| m[i][j]);
    let smallest = r
        .symmetric_eigenvalues()
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    if smallest <= 1e-10 {
        return Err(format!(
            "not positive definite (smallest eigenvalue {smallest:.4}): no population has these correlations; check the values against the publication"
        ));
    }
    Ok(())
}

/// One sex's grade counts: `counts`, or `shares` × `n`, checked.
fn grade_counts(v: &SexSummary, k: usize, place: &str, log: &mut BlockLog) -> Option<Vec<f64>> {
    if v.mean.is_some() || v.sd.is_some() {
        log.fail(
            place.to_string(),
            "an ordinal trait takes `counts`, or `shares` with `n`; `mean` and `sd` are for measurements".into(),
        );
        return None;
    }
    let (list, field) = match (&v.counts, &v.shares) {
        (Some(c), None) => (c, "counts"),
        (None, Some(s)) => (s, "shares"),
        (Some(_), Some(_)) => {
            log.fail(
                place.to_string(),
                "give `counts` or `shares`, not both".into(),
            );
            return None;
        }
        (None, None) => {
            log.fail(
                place.to_string(),
                format!(
                    "missing: `counts` ({k} numbers, lowest grade first), or `shares` with `n`"
                ),
            );
            return None;
        }
    };
    let start = log.problems.len();
    if list.len() != k {
        log.fail(
            format!("{place}.{field}"),
            format!("{} numbers given; the scale has {k} grades", list.len()),
        );
    }
    for (g, x) in list.iter().enumerate() {
        if !(x.is_finite() && *x >= 0.0) {
            log.fail(
                format!("{place}.{field}[{}]", g + 1),
                format!("{x}: must be 0 or more"),
            );
        }
    }
    if log.problems.len() > start {
        return None;
    }
    match field {
        "counts" => {
            if v.n
                .is_some_and(|n| (n - list.iter().sum::<f64>()).abs() > 0.5)
            {
                log.fail(
                    format!("{place}.n"),
                    format!(
                        "{} does not equal the sum of the counts, {}",
                        v.n.unwrap_or(0.0),
                        list.iter().sum::<f64>()
                    ),
                );
                return None;
            }
            if list.iter().sum::<f64>() < 1.0 {
                log.fail(format!("{place}.counts"), "every count is 0".into());
                return None;
            }
            Some(list.clone())
        }
        _ => {
            let Some(n) = whole(v.n, 1.0) else {
                log.fail(
                    format!("{place}.n"),
                    match v.n {
                        None => "missing: shares need the sample size".into(),
                        Some(x) => format!("a whole number of at least 1, found {x}"),
                    },
                );
                return None;
            };
            let total: f64 = list.iter().sum();
            if (total - 1.0).abs() > SHARE_ROUNDING * k as f64 {
                log.fail(
                    format!("{place}.shares"),
                    format!(
                        "sum to {total}, not 1 within rounding (±{}); give shares as fractions of 1",
                        SHARE_ROUNDING * k as f64
                    ),
                );
                return None;
            }
            Some(list.iter().map(|s| s / total * n).collect())
        }
    }
}

/// An ordinal trait from its published grade counts by sex.
fn ordinal_trait(
    b: &SummaryBlock,
    t: &SummaryTrait,
    by_sex: [&SexSummary; 2],
    lowest: i32,
    k: usize,
    place: &str,
    log: &mut BlockLog,
) -> Option<RawLatentTrait> {
    let female = grade_counts(by_sex[0], k, &format!("{place}.female"), log);
    let male = grade_counts(by_sex[1], k, &format!("{place}.male"), log);
    let (female, male) = (female?, male?);
    let mut groups = Vec::with_capacity(2 * k);
    for (is_male, counts) in [(false, &female), (true, &male)] {
        for (g, n) in counts.iter().enumerate() {
            groups.push((
                OrdinalScore {
                    male: is_male,
                    low: g,
                    high: g,
                },
                *n,
            ));
        }
    }
    let n_total: f64 = female.iter().chain(&male).sum();
    match fit_grouped_probit(&groups, k) {
        Err(e) => {
            log.fail(
                place.to_string(),
                match e {
                    OrdinalFitError::GradeNeverSeen(g) => format!(
                        "grade {} has no individuals of either sex, so its threshold cannot be estimated; merge it with its neighbour in the trait's definition",
                        g as i32 + lowest
                    ),
                    other => other.to_string(),
                },
            );
            None
        }
        Ok(f) => {
            let scale = "latent, female mean 0, within-sex SD 1";
            for (j, (th, se)) in f.thresholds.iter().zip(&f.threshold_se).enumerate() {
                log.estimates.push(Estimate {
                    block: b.id.clone(),
                    trait_id: t.id.clone(),
                    parameter: format!("threshold {}|{}", j as i32 + lowest, j as i32 + lowest + 1),
                    scale: scale.into(),
                    estimate: *th,
                    se: *se,
                    n: n_total.round() as usize,
                });
            }
            log.estimates.push(Estimate {
                block: b.id.clone(),
                trait_id: t.id.clone(),
                parameter: "male - female latent mean".into(),
                scale: scale.into(),
                estimate: f.shift,
                se: f.shift_se,
                n: n_total.round() as usize,
            });
            let half = 0.5 * f.shift;
            Some(RawLatentTrait {
                id: t.id.clone(),
                thresholds: Some(
                    f.thresholds
                        .iter()
                        .map(|x| super::round(x - half))
                        .collect(),
                ),
                mean: PerSex {
                    female: super::round(-half),
                    male: super::round(half),
                },
                sd: None,
                observer_error_sd: None,
                age_slope: None,
            })
        }
    }
}

/// A measurement from its published n, mean and SD by sex.
fn metric_trait(
    b: &SummaryBlock,
    t: &SummaryTrait,
    by_sex: [&SexSummary; 2],
    unit: &str,
    place: &str,
    log: &mut BlockLog,
) -> Option<RawLatentTrait> {
    let start = log.problems.len();
    let mut n = [0.0; 2];
    let mut mean = [0.0; 2];
    let mut sd = [0.0; 2];
    for (s, (v, word)) in by_sex.iter().zip(["female", "male"]).enumerate() {
        let at = format!("{place}.{word}");
        if v.counts.is_some() || v.shares.is_some() {
            log.fail(
                at.clone(),
                "a measurement takes `n`, `mean` and `sd`; `counts` and `shares` are for ordinal traits".into(),
            );
            continue;
        }
        match whole(v.n, 2.0) {
            Some(x) => n[s] = x,
            None => log.fail(
                format!("{at}.n"),
                match v.n {
                    None => "missing: the sample size is needed for the SD and the standard errors"
                        .into(),
                    Some(x) => format!("a whole number of at least 2, found {x}"),
                },
            ),
        }
        match v.mean {
            Some(x) if x.is_finite() => mean[s] = x,
            Some(x) => log.fail(format!("{at}.mean"), format!("{x} is not a number")),
            None => log.fail(format!("{at}.mean"), "missing".into()),
        }
        match v.sd {
            Some(x) if x.is_finite() && x > 0.0 => sd[s] = x,
            Some(x) => log.fail(format!("{at}.sd"), format!("{x}: an SD must be above 0")),
            None => log.fail(format!("{at}.sd"), "missing".into()),
        }
    }
    if log.problems.len() > start {
        return None;
    }
    // Sample SD (divisor n − 1) to sums of squares, then to the ML SD (divisor n).
    let ss = [sd[0] * sd[0] * (n[0] - 1.0), sd[1] * sd[1] * (n[1] - 1.0)];
    let ml = match b.dispersion {
        Dispersion::PerSex => [(ss[0] / n[0]).sqrt(), (ss[1] / n[1]).sqrt()],
        Dispersion::Shared => {
            let pooled = ((ss[0] + ss[1]) / (n[0] + n[1])).sqrt();
            [pooled, pooled]
        }
    };
    for (s, word) in [(0, "female"), (1, "male")] {
        log.estimates.push(Estimate {
            block: b.id.clone(),
            trait_id: t.id.clone(),
            parameter: format!("mean {word}"),
            scale: unit.to_string(),
            estimate: mean[s],
            se: ml[s] / n[s].sqrt(),
            n: n[s] as usize,
        });
    }
    match b.dispersion {
        Dispersion::PerSex => {
            for (s, word) in [(0, "female"), (1, "male")] {
                log.estimates.push(Estimate {
                    block: b.id.clone(),
                    trait_id: t.id.clone(),
                    parameter: format!("sd {word}"),
                    scale: unit.to_string(),
                    estimate: ml[s],
                    se: ml[s] / (2.0 * n[s]).sqrt(),
                    n: n[s] as usize,
                });
            }
        }
        Dispersion::Shared => log.estimates.push(Estimate {
            block: b.id.clone(),
            trait_id: t.id.clone(),
            parameter: "sd within sex (pooled)".into(),
            scale: unit.to_string(),
            estimate: ml[0],
            se: ml[0] / (2.0 * (n[0] + n[1])).sqrt(),
            n: (n[0] + n[1]) as usize,
        }),
    }
    Some(RawLatentTrait {
        id: t.id.clone(),
        thresholds: None,
        mean: PerSex {
            female: super::round(mean[0]),
            male: super::round(mean[1]),
        },
        sd: Some(PerSex {
            female: super::round(ml[0]),
            male: super::round(ml[1]),
        }),
        observer_error_sd: None,
        age_slope: None,
    })
}

#[cfg(test)]
#[path = "tests/summary.rs"]
mod tests;
