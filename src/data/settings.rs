//! How an input table is read: missing codes, side policy, score-scale maps, sheet.

use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The missing-value codes every reader accepts (compared without regard to case).
pub const DEFAULT_MISSING_CODES: &[&str] = &["", "na", "n/a", "-", ".", "?"];

/// Which side of a bilateral trait to use.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum SidePolicy {
    /// The left side where it was recorded, else the right (common practice).
    #[default]
    LeftFirst,
    /// The right side where it was recorded, else the left.
    RightFirst,
    /// Both sides: the mean of two measurements, or the range spanning two grades.
    Both,
}

impl SidePolicy {
    /// The policy a word names (`left-first`, `right-first`, `both`), as [`SidePolicy::as_str`]
    /// writes it.
    pub fn from_word(word: &str) -> Option<SidePolicy> {
        [
            SidePolicy::LeftFirst,
            SidePolicy::RightFirst,
            SidePolicy::Both,
        ]
        .into_iter()
        .find(|p| p.as_str() == word)
    }

    /// The word used on the command line and in outputs.
    pub fn as_str(self) -> &'static str {
        match self {
            SidePolicy::LeftFirst => "left-first",
            SidePolicy::RightFirst => "right-first",
            SidePolicy::Both => "both",
        }
    }
}

/// How far the two sides may differ before a warning names them.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct SideTolerance {
    /// Largest difference in grades that passes silently (default 1: common practice, the
    /// neighbouring-grade disagreement observers expect).
    pub grades: i32,
    /// Largest relative difference of two measurements, |l − r| / mean (default 0.05: a
    /// choice of ours, well above usual bilateral asymmetry of long-bone dimensions).
    pub relative: f64,
}

impl Default for SideTolerance {
    fn default() -> Self {
        SideTolerance {
            grades: 1,
            relative: 0.05,
        }
    }
}

/// A user's own score scale mapped onto a trait's grades, e.g. `-2 → 1 … +2 → 5`.
///
/// Keys are the values as written in the file (compared after trimming, ignoring case);
/// values are grades of the trait's scale.
pub type ScaleMap = BTreeMap<String, i32>;

/// Settings for reading an input table.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
pub struct ReadSettings {
    /// Extra words meaning "not recordable" (added to [`DEFAULT_MISSING_CODES`]).
    pub missing_words: Vec<String>,
    /// Which side of a bilateral trait to use.
    pub side_policy: SidePolicy,
    /// When two recorded sides count as disagreeing.
    pub side_tolerance: SideTolerance,
    /// Score-scale maps by trait id; the key `"*"` applies to every ordinal trait without its
    /// own map.
    pub scale_maps: BTreeMap<String, ScaleMap>,
    /// Worksheet to read from a workbook (default: the first).
    pub sheet: Option<String>,
    /// Column holding the groups (burial zone, phase, site); default `group`.
    pub group_column: Option<String>,
    /// Columns of the sheet read under another name (a column profile): normalised sheet
    /// name → tessera's name.
    #[serde(default)]
    pub renames: Vec<(String, String)>,
    /// A laboratory's own age words and the ages they stand for (lower-case keys).
    #[serde(default)]
    pub age_map: BTreeMap<String, super::AgeAtDeath>,
}

impl ReadSettings {
    /// Whether a trimmed cell is a missing code.
    pub fn is_missing(&self, cell: &str) -> bool {
        let c = cell.trim();
        DEFAULT_MISSING_CODES
            .iter()
            .any(|m| m.eq_ignore_ascii_case(c))
            || self
                .missing_words
                .iter()
                .any(|m| m.trim().eq_ignore_ascii_case(c))
    }

    /// The scale map for a trait, if any.
    pub fn scale_map(&self, trait_id: &str) -> Option<&ScaleMap> {
        self.scale_maps
            .get(trait_id)
            .or_else(|| self.scale_maps.get("*"))
    }
}

/// Read a score-scale map document.
///
/// The document maps a trait id (or `"*"` for every ordinal trait without its own map) to
/// pairs *recorded value: grade*, for example
///
/// ```yaml
/// glabella: {"-2": 1, "-1": 2, "0": 3, "+1": 4, "+2": 5}
/// ```
///
/// # Errors
/// A message naming the first entry that is not an ordinal trait of the catalogue, or a
/// grade outside the trait's scale.
pub fn parse_scale_maps(
    text: &str,
    catalogue: &crate::catalogue::Catalogue,
) -> Result<BTreeMap<String, ScaleMap>, String> {
    use crate::catalogue::TraitKind;
    crate::limits::check_yaml(text)?;
    let value: serde_yaml::Value = serde_yaml::from_str(text).map_err(|e| e.to_string())?;
    let top = value
        .as_mapping()
        .ok_or("expected a mapping from trait ids to {recorded value: grade}")?;
    let key_text = |k: &serde_yaml::Value| -> Option<String> {
        match k {
            serde_yaml::Value::String(s) => Some(s.clone()),
            serde_yaml::Value::Number(n) => Some(n.to_string()),
            _ => None,
        }
    };
    let mut out = BTreeMap::new();
    for (k, v) in top {
        let id = key_text(k).ok_or("trait ids are text")?;
        let scale = if id == "*" {
            None
        } else {
            match catalogue.get(&id).map(|d| &d.kind) {
                Some(TraitKind::Ordinal { lowest, highest }) => Some((*lowest, *highest)),
                Some(_) => return Err(format!("`{id}` is not an ordinal trait")),
                None => return Err(format!("`{id}` is not a trait of the catalogue")),
            }
        };
        let pairs = v
            .as_mapping()
            .ok_or_else(|| format!("`{id}`: expected {{recorded value: grade}} pairs"))?;
        let mut map = ScaleMap::new();
        for (rk, rv) in pairs {
            let recorded = key_text(rk)
                .ok_or_else(|| format!("`{id}`: recorded values are text or numbers"))?;
            let grade = rv
                .as_i64()
                .and_then(|g| i32::try_from(g).ok())
                .ok_or_else(|| format!("`{id}`: `{recorded}` must map to a whole grade"))?;
            if let Some((lo, hi)) = scale {
                if grade < lo || grade > hi {
                    return Err(format!(
                        "`{id}`: `{recorded}` maps to grade {grade}, outside the trait's scale {lo}-{hi}"
                    ));
                }
            }
            // `1` and `1.0` (or `+1`) are one recorded value written two ways: they must not
            // map to different grades.
            if let Ok(x) = recorded.trim().parse::<f64>() {
                if let Some((other, g)) = map
                    .iter()
                    .find(|(k, g)| **g != grade && k.trim().parse::<f64>() == Ok(x))
                {
                    return Err(format!(
                        "`{id}`: `{other}` and `{recorded}` are the same recorded value but map to grades {g} and {grade}"
                    ));
                }
            }
            map.insert(recorded, grade);
        }
        out.insert(id, map);
    }
    Ok(out)
}

#[cfg(test)]
#[path = "tests/settings.rs"]
mod tests;
