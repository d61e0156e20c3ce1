//! Age at death and known sex as recorded in an input table.

use super::cell::parse_decimal;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// The usual age (years) from which adult sexing methods are applied. Pelvic and cranial
/// features that differ by sex develop during adolescence; the 18-year cut-off is a convention
/// (Rogers 2009, Am J Phys Anthropol 140:143–148).
pub const ADULT_AGE_YEARS: f64 = 18.0;

/// Oldest age accepted as plausible.
pub const MAX_AGE_YEARS: f64 = 120.0;

/// An age-at-death estimate as recorded.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
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

/// The adult age classes of the trade, as Buikstra & Ubelaker (1994) define them: young adult
/// 20–35, middle adult 35–50, old adult 50 and over (their upper bounds 34.9 and 49.9 read as
/// the next class's start).
pub const TRADE_ADULT_CLASSES: [(&str, f64, Option<f64>); 3] = [
    ("young adult", 20.0, Some(35.0)),
    ("middle adult", 35.0, Some(50.0)),
    ("old adult", 50.0, None),
];

/// Read an age cell: `34`, `34.5`, `25-35` (also `25–35`, `25 to 35`), `50+`, `40±5` (also
/// `40 +/- 5`), `adult` (also `adult, age unknown`), `subadult`, and the trade's classes
/// `young adult`, `middle adult`, `old adult` ([`TRADE_ADULT_CLASSES`]). Years must lie in
/// 0..=120 and a range must run low to high; a `±` range is cut at 0 and 120.
pub(crate) fn parse_age(cell: &str, decimal_comma: bool) -> Result<AgeAtDeath, String> {
    let expected = || {
        format!(
            "years (e.g. 34), a range (25-35 or 40±5), an open class (50+), the words adult / subadult, or young / middle / old adult; years from 0 to {MAX_AGE_YEARS}"
        )
    };
    let s = cell.trim();
    let lower = s.to_lowercase();
    let words: String = lower
        .split(|c: char| c.is_whitespace() || c == ',' || c == '(' || c == ')')
        .filter(|w| !w.is_empty())
        .collect::<Vec<_>>()
        .join(" ");
    match words.as_str() {
        "adult" | "adult age unknown" | "adult age not known" | "adult of unknown age" => {
            return Ok(AgeAtDeath::Adult)
        }
        "subadult" | "sub-adult" | "non-adult" | "nonadult" => return Ok(AgeAtDeath::Subadult),
        w => {
            if let Some((_, low, high)) = TRADE_ADULT_CLASSES.iter().find(|(name, _, _)| *name == w)
            {
                return Ok(AgeAtDeath::Years {
                    low: *low,
                    high: *high,
                });
            }
        }
    }
    let years = |t: &str| -> Result<f64, String> {
        let (v, _) = parse_decimal(t, decimal_comma).ok_or_else(expected)?;
        if (0.0..=MAX_AGE_YEARS).contains(&v) {
            Ok(v)
        } else {
            Err(expected())
        }
    };
    for sign in ["±", "+/-", "+-"] {
        if let Some((centre, half)) = lower.split_once(sign) {
            let (c, h) = (years(centre)?, years(half)?);
            return Ok(AgeAtDeath::Years {
                low: (c - h).max(0.0),
                high: Some((c + h).min(MAX_AGE_YEARS)),
            });
        }
    }
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

/// A laboratory's own age words (`--age-map FILE.yaml`): each word, as it is written in the
/// age column, with the age it stands for, in any form an age cell takes:
///
/// ```yaml
/// adultus: 20-40
/// maturus: 40-60
/// senilis: 60+
/// "adult?": adult
/// ```
///
/// Words are matched without regard to case or surrounding spaces, before the built-in forms.
///
/// # Errors
/// Every entry that is not text mapped to an age, in one message.
pub fn parse_age_map(text: &str) -> Result<BTreeMap<String, AgeAtDeath>, String> {
    crate::limits::check_yaml(text)?;
    let value: serde_yaml::Value = serde_yaml::from_str(text).map_err(|e| e.to_string())?;
    let top = value
        .as_mapping()
        .ok_or("expected a mapping from the age words of the table to ages (adultus: 20-40)")?;
    let text_of = |v: &serde_yaml::Value| match v {
        serde_yaml::Value::String(s) => Some(s.clone()),
        serde_yaml::Value::Number(n) => Some(n.to_string()),
        _ => None,
    };
    let mut out = BTreeMap::new();
    let mut problems = Vec::new();
    for (k, v) in top {
        let Some(word) = text_of(k) else {
            problems.push("every word is text".to_string());
            continue;
        };
        let key = word.trim().to_lowercase();
        match text_of(v).map(|t| parse_age(&t, false)) {
            Some(Ok(age)) => {
                out.insert(key, age);
            }
            Some(Err(e)) => problems.push(format!("`{word}`: {e}")),
            None => problems.push(format!(
                "`{word}`: give the age it stands for, as 20-40 or 60+"
            )),
        }
    }
    if problems.is_empty() {
        Ok(out)
    } else {
        Err(problems.join("; "))
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

impl Sex {
    /// The letter written in tables: `F` or `M` (as the `known_sex` column reads it).
    pub fn letter(self) -> &'static str {
        match self {
            Sex::Female => "F",
            Sex::Male => "M",
        }
    }
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
