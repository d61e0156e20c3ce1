//! The catalogue document as written (serde schema), before validation.

use super::{parse_region, valid_id, CatalogueError, TraitDef, TraitKind};
use serde::{Deserialize, Serialize};

/// A catalogue document: `traits:` followed by a list of [`RawTrait`].
#[derive(Debug, Clone, Default, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawCatalogue {
    /// The trait entries.
    pub traits: Vec<RawTrait>,
}

/// One trait entry as written in YAML.
///
/// | field | meaning | required for |
/// |---|---|---|
/// | `id` | column name | all |
/// | `name` | the trait's name in the trade | all |
/// | `region` | `cranium`, `pelvis`, `postcranial`, `dental` or `dna` | all |
/// | `bilateral` | scored per side (`<id>_l`, `<id>_r`) | all (default false) |
/// | `kind` | `ordinal`, `metric` or `count` | all |
/// | `grades` | `[lowest, highest]` integer grades | ordinal |
/// | `unit` | unit of measurement | metric |
/// | `plausible` | `[low, high]` plausible range | metric |
/// | `definition` | one line | all |
/// | `source` | published standard | all |
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawTrait {
    /// Column name.
    pub id: String,
    /// Name in the trade.
    pub name: String,
    /// Body region word.
    pub region: String,
    /// Scored per side.
    #[serde(default)]
    pub bilateral: bool,
    /// `ordinal`, `metric` or `count`.
    pub kind: String,
    /// Ordinal scale `[lowest, highest]`.
    #[serde(default)]
    pub grades: Option<[i32; 2]>,
    /// Unit of a metric trait.
    #[serde(default)]
    pub unit: Option<String>,
    /// Plausible range of a metric trait.
    #[serde(default)]
    pub plausible: Option<[f64; 2]>,
    /// One-line definition.
    pub definition: String,
    /// Published scoring or measuring standard.
    pub source: String,
}

impl RawTrait {
    pub(crate) fn validate(self) -> Result<TraitDef, CatalogueError> {
        let fail = |reason: String| CatalogueError::InvalidTrait {
            id: self.id.clone(),
            reason,
        };
        valid_id(&self.id).map_err(fail)?;
        let region = parse_region(&self.region).ok_or_else(|| {
            fail(format!(
                "region `{}` is not one of cranium, pelvis, postcranial, dental, dna",
                self.region
            ))
        })?;
        if self.name.trim().is_empty() || self.definition.trim().is_empty() {
            return Err(fail("name and definition must not be empty".into()));
        }
        if self.source.trim().is_empty() {
            return Err(fail("source must name the published standard".into()));
        }
        let kind = match self.kind.as_str() {
            "ordinal" => {
                let [lowest, highest] = self.grades.ok_or_else(|| {
                    fail("an ordinal trait needs `grades: [lowest, highest]`".into())
                })?;
                if highest <= lowest || highest - lowest > 98 {
                    return Err(fail(format!(
                        "grades [{lowest}, {highest}]: need lowest < highest and at most 99 grades"
                    )));
                }
                TraitKind::Ordinal { lowest, highest }
            }
            "metric" => {
                let unit = self
                    .unit
                    .clone()
                    .filter(|u| !u.trim().is_empty())
                    .ok_or_else(|| fail("a metric trait needs `unit`".into()))?;
                let [low, high] = self
                    .plausible
                    .ok_or_else(|| fail("a metric trait needs `plausible: [low, high]`".into()))?;
                if !(low.is_finite() && high.is_finite() && low > 0.0 && high > low) {
                    return Err(fail(format!(
                        "plausible [{low}, {high}]: need finite 0 < low < high"
                    )));
                }
                TraitKind::Metric { unit, low, high }
            }
            "count" => TraitKind::Count,
            other => {
                return Err(fail(format!(
                    "kind `{other}` is not one of ordinal, metric, count"
                )))
            }
        };
        Ok(TraitDef {
            id: self.id,
            name: self.name,
            region,
            bilateral: self.bilateral,
            kind,
            definition: self.definition,
            source: self.source,
        })
    }
}
