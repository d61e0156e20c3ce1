//! Age at death and known sex as recorded in an input table.

use super::cell::parse_decimal;
use serde::Serialize;

/// The usual age (years) from which adult sexing methods are applied. Pelvic and cranial
/// features that differ by sex develop during adolescence; the 18-year cut-off is a convention
/// (Rogers 2009, Am J Phys Anthropol 140:143–148).
pub const ADULT_AGE_YEARS: f64 = 18.0;

/// Oldest age accepted as plausible.
pub const MAX_AGE_YEARS: f64 = 120.0;

/// An age-at-death estimate as recorded.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "type", rename_all = "snake_case")]
pub enum AgeAtDeath {
    /// Years: a point (`low == high`), a range, or open-ended (`high` absent, as in `50+`).
    Years {
        /// Lower bound in years.
        low: f64,
        /// Upper bound in years; `None` for an open-ended class.
        high: Option<f64>,
    },
    /// Recorded only as adult.
    Adult,
    /// Recorded only as subadult.
    Subadult,
}

/// Whether an individual is old enough for adult methods at a given minimum age.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Maturity {
    /// At or above the minimum age.
    Adult,
    /// Below the minimum age.
    Subadult,
    /// The recorded range straddles the minimum age, or no age is recorded.
    Unknown,
}

impl AgeAtDeath {
    /// Classify against a minimum age in years.
    pub fn maturity(&self, minimum_age: f64) -> Maturity {
        match *self {
            AgeAtDeath::Adult => Maturity::Adult,
            AgeAtDeath::Subadult => Maturity::Subadult,
            AgeAtDeath::Years { low, high } => {
                if low >= minimum_age {
                    Maturity::Adult
                } else if high.is_some_and(|h| h < minimum_age) {
                    Maturity::Subadult
                } else {
                    Maturity::Unknown
                }
            }
        }
    }
}

/// Read an age cell: `34`, `34.5`, `25-35` (also `25–35`, `25 to 35`), `50+`, `adult`,
/// `subadult`. Years must lie in 0..=120 and a range must run low to high.
pub(crate) fn parse_age(cell: &str, decimal_comma: bool) -> Result<AgeAtDeath, String> {
    let expected = || {
        format!(
            "years (e.g. 34), a range (25-35), an open class (50+), or the words adult / subadult; years from 0 to {MAX_AGE_YEARS}"
        )
    };
    let s = cell.trim();
    let lower = s.to_ascii_lowercase();
    match lower.as_str() {
        "adult" => return Ok(AgeAtDeath::Adult),
        "subadult" | "sub-adult" | "non-adult" | "nonadult" => return Ok(AgeAtDeath::Subadult),
        _ => {}
    }
    let years = |t: &str| -> Result<f64, String> {
        let (v, _) = parse_decimal(t, decimal_comma).ok_or_else(expected)?;
        if (0.0..=MAX_AGE_YEARS).contains(&v) {
            Ok(v)
        } else {
            Err(expected())
        }
    };
    if let Some(open) = lower.strip_suffix('+') {
        return Ok(AgeAtDeath::Years {
            low: years(open)?,
            high: None,
        });
    }
    let split = lower
        .split_once(" to ")
        .or_else(|| lower.split_once('–'))
        .or_else(|| lower.split_once('-'));
    match split {
        Some((a, b)) => {
            let (low, high) = (years(a)?, years(b)?);
            if low > high {
                return Err(format!("{} (a range runs low to high)", expected()));
            }
            Ok(AgeAtDeath::Years {
                low,
                high: Some(high),
            })
        }
        None => {
            let v = years(&lower)?;
            Ok(AgeAtDeath::Years {
                low: v,
                high: Some(v),
            })
        }
    }
}

/// Biological sex (of a reference individual, or as estimated).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub enum Sex {
    /// Female.
    #[serde(rename = "F")]
    Female,
    /// Male.
    #[serde(rename = "M")]
    Male,
}

/// Read a known-sex cell: `F`, `M`, `female`, `male` (any case).
pub(crate) fn parse_known_sex(cell: &str) -> Option<Sex> {
    match cell.trim().to_ascii_lowercase().as_str() {
        "f" | "female" => Some(Sex::Female),
        "m" | "male" => Some(Sex::Male),
        _ => None,
    }
}

#[cfg(test)]
#[path = "tests/age.rs"]
mod tests;
