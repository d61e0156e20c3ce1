//! What one analysis found, as one value: the input, the model, the evidence, the results
//! under the prior set, the joint draws, the analyses by sex, the recalibration and the notes
//! a reader must see. The report writers render it; the pipeline
//! ([`crate::pipeline`]) makes it.

use crate::assemblage::draws::Draws;
use crate::assemblage::recalibration::Recalibration;
use crate::assemblage::PriorSetResults;
use crate::data::Assemblage;
use crate::model::{IndividualEvidence, Model};
use crate::summary::{AgeBySex, PrevalenceBySex};
use serde::Serialize;

/// `default (SHA-256 …): dna` for each model whose blocks `model` includes.
pub fn model_includes(model: &Model) -> Vec<String> {
    model
        .included
        .iter()
        .map(|f| {
            format!(
                "{} (SHA-256 {}): {}",
                f.model,
                f.sha256,
                f.blocks.join(", ")
            )
        })
        .collect()
}

/// Facts about the run written into `run.json`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RunInfo {
    /// Program name.
    pub program: &'static str,
    /// Program version.
    pub version: &'static str,
    /// The command line (or the page's equivalent), as given by the front door.
    pub command: Vec<String>,
    /// Input file.
    pub input: String,
    /// Input SHA-256.
    pub input_sha256: String,
    /// Model name.
    pub model: String,
    /// Model file or `embedded default`.
    pub model_file: String,
    /// Model SHA-256.
    pub model_sha256: String,
    /// Models whose blocks the model includes: `name (SHA-256 …): blocks`.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub model_includes: Vec<String>,
    /// Seed of every random stream.
    pub seed: u64,
    /// Side policy used reading the input.
    pub side_policy: String,
}

/// The analyses by sex that were run.
#[derive(Debug, Clone, PartialEq)]
pub struct BySex {
    /// Age at death by sex, when the input has ages.
    pub age: Option<AgeBySex>,
    /// Life tables by sex, when the input has ages.
    pub life_tables: Option<crate::summary::LifeTables>,
    /// Gompertz mortality by sex, when the input has ages.
    pub hazards: Option<crate::summary::HazardsBySex>,
    /// The sex ratio of the assemblage and of each group against the reference (none under a
    /// fixed prior).
    pub sex_ratio: Vec<crate::summary::SexRatioTest>,
    /// Prevalence by sex of each condition column named.
    pub prevalence: Vec<PrevalenceBySex>,
    /// Each numeric column named (a measurement, a score, a grade) by sex.
    pub numeric: Vec<crate::summary::NumericBySex>,
    /// Age interval of each individual.
    pub ages: Vec<Option<(f64, f64)>>,
    /// The age classes of the tables of age by sex and of categories by age.
    pub age_classes: crate::summary::AgeClasses,
    /// Who the tables by sex leave out (counted beside them, never sexed in them).
    pub left_out: LeftOut,
    /// Sentences on the chains of the prevalences (convergence), empty when all is well.
    pub notes: Vec<String>,
}

/// Individuals that the tables by sex leave out: no usable evidence of sex, or a subadult
/// (an age below the model's minimum age; sexed by DNA or not). They are counted, not sexed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct LeftOut {
    /// Without usable evidence of sex.
    pub no_evidence: usize,
    /// Subadults with evidence (DNA): sexed in the individual table, not in the tables by sex.
    pub subadult: usize,
}

impl LeftOut {
    /// "3 individuals without evidence of sex and 2 subadults", or `None` when nobody is
    /// left out.
    pub fn sentence(&self) -> Option<String> {
        let plural =
            |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
        let parts: Vec<String> = [
            (self.no_evidence > 0).then(|| {
                plural(
                    self.no_evidence,
                    "individual without evidence of sex",
                    "individuals without evidence of sex",
                )
            }),
            (self.subadult > 0).then(|| {
                plural(
                    self.subadult,
                    "subadult sexed by DNA",
                    "subadults sexed by DNA",
                )
            }),
        ]
        .into_iter()
        .flatten()
        .collect();
        (!parts.is_empty()).then(|| parts.join(" and "))
    }
}

/// Everything one analysis found.
#[derive(Debug, Clone)]
pub struct AnalysisResult {
    /// Provenance of the run.
    pub run: RunInfo,
    /// The model used (minimum age applied).
    pub model: Model,
    /// The input as read.
    pub assemblage: Assemblage,
    /// Every individual's evidence, in file order.
    pub evidence: Vec<IndividualEvidence>,
    /// The results under the chosen prior and every prior of the sensitivity set.
    pub results: PriorSetResults,
    /// Joint posterior draws of every individual's sex and the proportions.
    pub draws: Draws,
    /// Whether the draws are written out (`--draws N`).
    pub write_draws: bool,
    /// The analyses by sex.
    pub by_sex: BySex,
    /// The recalibration of the measurements, when asked for.
    pub recalibration: Option<Recalibration>,
    /// What a reader must know about the input before trusting the results (reader warnings,
    /// recorded evidence the model leaves out, scored individuals below the minimum age).
    pub input_notes: Vec<String>,
    /// What a reader must know about the recalibration (no block to recalibrate, chains that
    /// did not converge, measurements the reference does not fit).
    pub recalibration_notes: Vec<String>,
    /// Blocks flagged for a person to look at, as `ID (block): note`, in file order.
    pub flagged: Vec<String>,
    /// How far P(female) moves over other within-sex correlations, when asked for.
    pub correlation_check: Option<crate::likelihood::correlation_check::CorrelationCheck>,
}
