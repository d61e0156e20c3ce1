//! The model file as written: serde structs that are the schema of `models/*.yaml`.
//!
//! | field | meaning |
//! |---|---|
//! | `name` | short name of the model |
//! | `description` | one paragraph: what the model is for |
//! | `provenance` | required: sources of every parameter; what is from memory; what is illustrative |
//! | `minimum_age` | years below which morphological blocks are not used (default 18) |
//! | `traits` | optional extra trait definitions, same form as `models/traits.yaml` |
//! | `blocks` | the evidence blocks, independent given sex |
//! | `fitted_to` | written by `tessera fit`: the reference file, its SHA-256, females and males |
//! | `built_from` | written by `tessera fit --from-summary`: the publication, its sample, females and males, the summary file and its SHA-256 |
//!
//! A block has `id`, `label`, `type` (`latent`, `equations` or `dna`) and the fields of its type:
//!
//! **latent** — `traits:` a list of `{id, thresholds, mean: {female, male}}` for ordinal traits
//! (thresholds: one fewer than the grades, strictly increasing, on the latent scale whose
//! within-sex SD is 1) and `{id, mean: {female, male}, sd: {female, male}}` for metric traits;
//! `correlation:` the within-sex correlation matrix in the order of `traits` (default identity),
//! or `correlation_female:` and `correlation_male:` for one per sex. Any trait may carry
//! `observer_error_sd:` (latent scale for ordinal traits, the unit for measurements): the
//! recording error the likelihood integrates.
//!
//! **equations** — `equations:` a list, in order of preference, of `{name, inputs, coefficients,
//! intercept, predicts: male | female, training: equal | {female: n, male: n}, source}`: the
//! equation is logit P(`predicts`) = intercept + Σ coefficients × inputs, fitted on a sample with
//! the stated numbers of each sex.
//!
//! **dna** — `x_reads`, `y_reads` (trait ids, default `dna_x_reads` / `dna_y_reads`),
//! `female: {alpha, beta}` and `male: {alpha, beta}` (Beta distribution of the fraction of Y
//! reads among X and Y reads), `atypical_z` (default 4), `contamination` (default 0.01: the
//! probability that a sample's reads are someone else's, which bounds the block's LR).

use crate::catalogue::RawTrait;
use serde::{Deserialize, Serialize};

/// A model document.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawModel {
    /// Short name.
    pub name: String,
    /// What the model is for.
    #[serde(default)]
    pub description: String,
    /// Sources, what is from memory, what is illustrative.
    pub provenance: String,
    /// Years below which morphological blocks are not used.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub minimum_age: Option<f64>,
    /// Extra trait definitions.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub traits: Vec<RawTrait>,
    /// Evidence blocks.
    pub blocks: Vec<RawBlock>,
    /// Blocks taken from another model (see [`super::include`]).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub include: Vec<super::include::RawInclude>,
    /// Where a fitted model's parameters come from (written by `tessera fit`; absent in a
    /// model written by hand from published values).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub fitted_to: Option<FitOrigin>,
    /// The published summary statistics a model was built from (written by `tessera fit
    /// --from-summary`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub built_from: Option<SummaryOrigin>,
}

/// The published source a model's parameters were built from.
#[derive(Debug, Clone, PartialEq, Eq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct SummaryOrigin {
    /// The publication, as it should be cited.
    pub citation: String,
    /// The reference sample it describes (population, period, how sex was documented).
    pub sample: String,
    /// Females in the published sample.
    pub females: usize,
    /// Males in the published sample.
    pub males: usize,
    /// The summary file's name (without its folder).
    pub file: String,
    /// SHA-256 of the summary file.
    pub sha256: String,
}

/// The documented reference collection a model was fitted to.
#[derive(Debug, Clone, PartialEq, Eq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct FitOrigin {
    /// The reference file's name (without its folder).
    pub file: String,
    /// SHA-256 of the reference file.
    pub sha256: String,
    /// Females of documented sex used.
    pub females: usize,
    /// Males of documented sex used.
    pub males: usize,
}

/// One block as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(tag = "type", rename_all = "lowercase")]
pub enum RawBlock {
    /// Latent-trait block (multivariate cumulative probit with measurements).
    Latent(RawLatentBlock),
    /// Published logistic equations.
    Equations(RawEquationBlock),
    /// Ancient-DNA read counts: the Y fraction.
    Dna(RawDnaBlock),
    /// Ancient-DNA read counts: X against the autosomes (type `dna_x`).
    #[serde(rename = "dna_x")]
    DnaX(RawDnaXBlock),
}

impl RawBlock {
    /// The block's id, whatever its type.
    pub fn id(&self) -> &str {
        match self {
            RawBlock::Latent(x) => &x.id,
            RawBlock::Equations(x) => &x.id,
            RawBlock::Dna(x) => &x.id,
            RawBlock::DnaX(x) => &x.id,
        }
    }
}

/// A pair of per-sex values.
#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct PerSex {
    /// Value for females.
    pub female: f64,
    /// Value for males.
    pub male: f64,
}

/// Latent-trait block as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawLatentBlock {
    /// Block id (a column suffix in outputs).
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// The traits, in the order of the correlation matrix.
    pub traits: Vec<RawLatentTrait>,
    /// Shared within-sex correlation matrix.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub correlation: Option<Vec<Vec<f64>>>,
    /// Female within-sex correlation (with `correlation_male`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub correlation_female: Option<Vec<Vec<f64>>>,
    /// Male within-sex correlation (with `correlation_female`).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub correlation_male: Option<Vec<Vec<f64>>>,
    /// Age as a covariate of the latent means: the age at which the written means hold and
    /// the ages the reference sample covered (see [`crate::model::latent`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub age: Option<RawAgeEffect>,
}

/// The ages of a block whose traits change with age.
#[derive(Debug, Clone, Copy, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawAgeEffect {
    /// Years at which the traits' `mean` holds; each trait's `age_slope` moves it from there.
    pub centre: f64,
    /// Youngest age of the reference sample (years): younger ages take the mean at this age.
    pub lowest: f64,
    /// Oldest age of the reference sample (years): older ages, and the open end of a class
    /// such as `50+`, take the mean at this age; the slope is never extrapolated.
    pub highest: f64,
}

/// One trait of a latent block as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawLatentTrait {
    /// Catalogue trait id.
    pub id: String,
    /// Ordinal thresholds (latent scale), one fewer than the grades.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub thresholds: Option<Vec<f64>>,
    /// Mean per sex (latent scale for ordinal traits, unit of measurement for metric).
    pub mean: PerSex,
    /// SD per sex (metric traits only).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub sd: Option<PerSex>,
    /// The SD of the observer's scoring or measuring error, independent of everything else:
    /// on the latent scale (within-sex SD 1) for an ordinal trait, in the unit of measurement
    /// for a measurement. The likelihood then uses the trait as recorded, x + e (see
    /// [`crate::model::latent`]).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub observer_error_sd: Option<f64>,
    /// Change of the mean per year of age at death, per sex, in the mean's own scale (latent
    /// SD units for an ordinal trait, the unit of measurement for a measurement). Only in a
    /// block with `age`; absent there, 0.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub age_slope: Option<PerSex>,
}

/// Equation block as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawEquationBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// Equations in order of preference.
    pub equations: Vec<RawEquation>,
}

/// The sex composition of an equation's training sample.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(untagged)]
pub enum RawTraining {
    /// `equal`: balanced classes (prior odds 1).
    Word(String),
    /// `{female: n, male: n}`.
    Counts {
        /// Females in the training sample.
        female: f64,
        /// Males in the training sample.
        male: f64,
    },
}

/// One published logistic equation as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawEquation {
    /// Name (author, year, variant).
    pub name: String,
    /// Input trait ids.
    pub inputs: Vec<String>,
    /// One coefficient per input.
    pub coefficients: Vec<f64>,
    /// Intercept.
    pub intercept: f64,
    /// `male` when the equation is logit P(male), `female` when logit P(female).
    pub predicts: String,
    /// Sex composition of the training sample.
    pub training: RawTraining,
    /// Published source, and whether the coefficients are from memory.
    pub source: String,
}

/// DNA block as written.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawDnaBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// Trait id of the X read count.
    #[serde(default = "default_x")]
    pub x_reads: String,
    /// Trait id of the Y read count.
    #[serde(default = "default_y")]
    pub y_reads: String,
    /// Beta(α, β) of the Y fraction for XX individuals.
    pub female: RawBeta,
    /// Beta(α, β) of the Y fraction for XY individuals.
    pub male: RawBeta,
    /// |z| beyond which the Y count fits a sex badly (default 4: a choice of ours, not a
    /// published cut-off).
    #[serde(default)]
    pub atypical_z: Option<f64>,
    /// Probability that a sample's reads are not the individual's own (contamination,
    /// mix-up); default 0.01, a stated assumption. It bounds the block's LR at (2 − ε)/ε.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub contamination: Option<f64>,
}

fn default_x() -> String {
    "dna_x_reads".into()
}
fn default_y() -> String {
    "dna_y_reads".into()
}

/// Beta parameters.
#[derive(Debug, Clone, Copy, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawBeta {
    /// α > 0.
    pub alpha: f64,
    /// β > 0.
    pub beta: f64,
}

/// Whether an X:autosome block counts beside a Y-fraction block of the same library.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum BesideYRatio {
    /// Where the Y fraction is used, the X:autosome ratio is not counted again (the two
    /// ratios share the X reads and the library's contamination): it is used only for
    /// individuals without a usable Y fraction.
    #[default]
    NotCounted,
    /// Both are counted, as if independent given sex: an assumption the methods text states.
    CountedAsIndependent,
}

/// X:autosome block as written (`type: dna_x`): reads on X among reads on X and the
/// autosomes (the Rx of Mittnik et al. 2016).
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawDnaXBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// Trait id of the X read count.
    #[serde(default = "default_x")]
    pub x_reads: String,
    /// Trait id of the autosomal read count.
    #[serde(default = "default_autosome")]
    pub autosome_reads: String,
    /// Expected share of X reads among X and autosomal reads for an XX individual (the X
    /// chromosome's share of the mappable length of X and the autosomes).
    pub x_share: f64,
    /// Beta concentration κ of a sample's X share around its expectation (larger: less
    /// spread between samples).
    pub concentration: f64,
    /// |z| beyond which the X count fits a sex badly (default 4).
    #[serde(default)]
    pub atypical_z: Option<f64>,
    /// Probability that a sample's reads are not the individual's own (default 0.01).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub contamination: Option<f64>,
    /// Beside a Y-fraction block: `not-counted` (default) or `counted-as-independent`.
    #[serde(default)]
    pub beside_y_ratio: BesideYRatio,
}

fn default_autosome() -> String {
    "dna_autosome_reads".into()
}
