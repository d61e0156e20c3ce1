//! The fitting specification (`--traits SPEC`): which blocks to fit, with which traits, and how
//! their dispersion and correlation are shared between the sexes.
//!
//! ```yaml
//! name: lab-reference-2026          # name of the model written
//! description: One paragraph.       # optional
//! traits: []                        # optional: definitions of traits not in the catalogue,
//!                                   # in the catalogue's form (id, name, region, kind, …)
//! include:                         # optional: blocks taken from another model (default:
//!   - {model: default, blocks: [dna]}  # the shipped DNA block; `include: []` for none)
//! blocks:
//!   - id: cranium
//!     label: Cranial traits          # optional
//!     traits: [glabella, mastoid, nuchal_crest]
//!     dispersion: per-sex            # metric SDs: per-sex (default) or shared
//!     correlation: shared            # shared (default), per-sex, or none (independent)
//!     age_slope: false               # true: means change with age, a slope per sex
//!     age_centre: 40                 # with age_slope: years at which the means hold
//! ```
//!
//! A trait's kind (ordinal with its grades, metric with its unit) comes from its catalogue
//! entry or from its definition under `traits:`.

use crate::catalogue::RawTrait;
use serde::{Deserialize, Serialize};

/// How metric SDs are shared between the sexes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Dispersion {
    /// One SD per sex.
    #[default]
    PerSex,
    /// One pooled within-sex SD for both sexes.
    Shared,
}

/// How the within-sex correlation matrix is shared between the sexes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Deserialize, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CorrelationSharing {
    /// One pooled within-sex correlation matrix.
    #[default]
    Shared,
    /// One correlation matrix per sex.
    PerSex,
    /// Traits independent given sex (identity).
    None,
}

/// One block to fit.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct BlockSpec {
    /// Block id.
    pub id: String,
    /// Readable label.
    #[serde(default)]
    pub label: String,
    /// Trait ids in matrix order.
    pub traits: Vec<String>,
    /// Metric SDs per sex or shared.
    #[serde(default)]
    pub dispersion: Dispersion,
    /// Correlation shared, per sex, or none.
    #[serde(default)]
    pub correlation: CorrelationSharing,
    /// Let each trait's mean change with age at death, with a slope per sex (only individuals
    /// whose age is known to within [`crate::fit::WIDEST_AGE_INTERVAL`] years enter the block).
    #[serde(default)]
    pub age_slope: bool,
    /// The age (years) at which the written means hold (with `age_slope`); default the mean
    /// age of the block's individuals, to the year.
    #[serde(default)]
    pub age_centre: Option<f64>,
}

/// A fitting specification.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct FitSpec {
    /// Name of the model to write.
    pub name: String,
    /// One paragraph on what the model is for.
    #[serde(default)]
    pub description: String,
    /// Years below which individuals are left out of the fit (and morphological blocks unused
    /// in the model). Default 18.
    #[serde(default)]
    pub minimum_age: Option<f64>,
    /// Definitions of traits not in the catalogue.
    #[serde(default)]
    pub traits: Vec<RawTrait>,
    /// Blocks to fit.
    pub blocks: Vec<BlockSpec>,
    /// Blocks the written model takes from another model. Absent: the shipped DNA block
    /// (read counts are not fitted from a reference, and a fitted model without them would
    /// leave DNA unused); `[]` for none.
    #[serde(default)]
    pub include: Option<Vec<crate::model::include::RawInclude>>,
}

impl FitSpec {
    /// The `include:` the written model gets: as written, or by default the shipped DNA
    /// block unless a fitted block is already called `dna`.
    pub fn includes(&self) -> Vec<crate::model::include::RawInclude> {
        match &self.include {
            Some(v) => v.clone(),
            None if self.blocks.iter().any(|b| b.id == "dna") => Vec::new(),
            None => vec![crate::model::include::RawInclude {
                model: "default".into(),
                blocks: vec!["dna".into()],
            }],
        }
    }
}

impl FitSpec {
    /// Parse a specification document.
    ///
    /// # Errors
    /// The YAML error as text.
    pub fn from_yaml(text: &str) -> Result<FitSpec, String> {
        crate::limits::check_yaml(text)?;
        serde_yaml::from_str(text).map_err(|e| format!("not a valid fitting specification: {e}"))
    }
}
