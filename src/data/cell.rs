//! Reading one cell as a grade, a grade range, a measurement or a read count.

use super::problem::ProblemKind;
use super::settings::ScaleMap;
use serde::Serialize;

/// What was recorded for one trait of one individual.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "type", rename_all = "snake_case")]
pub enum Observation {
    /// An ordinal score: exactly grade `low` when `low == high`, otherwise "between grade
    /// `low` and grade `high`" (the latent value lies between the lower edge of `low` and the
    /// upper edge of `high`).
    Grade {
        /// Lowest grade the score allows.
        low: i32,
        /// Highest grade the score allows.
        high: i32,
    },
    /// A measurement in the trait's unit.
    Measurement {
        /// The value.
        value: f64,
    },
    /// A non-negative count.
    Count {
        /// The count.
        value: u64,
    },
}

impl Observation {
    /// Whether this is a grade range rather than one exact grade.
    pub fn is_range(&self) -> bool {
        matches!(self, Observation::Grade { low, high } if low != high)
    }
}

/// A cell that could not be read: the problem's kind and what was expected.
pub(crate) type CellError = (ProblemKind, String);

/// Read an ordinal score on the scale `lowest..=highest`.
///
/// Accepts a whole grade (`3`, also `3.0` as spreadsheets write it) or a range `3-4`, `3/4`,
/// `3–4` meaning "between these grades" (written either way round). With a scale map the
/// cell (or each side of a `/` range) is looked up in the map first.
pub(crate) fn parse_grade(
    cell: &str,
    lowest: i32,
    highest: i32,
    map: Option<&ScaleMap>,
) -> Result<Observation, CellError> {
    let cell = cell.trim();
    let scale = || format!("a grade from {lowest} to {highest}, or a range such as 2-3");
    let one = |s: &str| -> Result<i32, CellError> {
        let g = match map {
            Some(m) => lookup(m, s).ok_or_else(|| {
                let keys: Vec<&str> = m.keys().map(String::as_str).collect();
                (
                    ProblemKind::UnreadableValue,
                    format!("one of the mapped scores {}", keys.join(", ")),
                )
            })?,
            None => whole_number(s).ok_or_else(|| (ProblemKind::UnreadableValue, scale()))?,
        };
        if g < lowest || g > highest {
            return Err((ProblemKind::GradeOutOfRange, scale()));
        }
        Ok(g)
    };
    if let Some(m) = map {
        if lookup(m, cell).is_none() {
            if let Some((a, b)) = cell.split_once('/') {
                let (x, y) = (one(a)?, one(b)?);
                return Ok(Observation::Grade {
                    low: x.min(y),
                    high: x.max(y),
                });
            }
        }
        let g = one(cell)?;
        Ok(Observation::Grade { low: g, high: g })
    } else {
        let split = cell
            .split_once('/')
            .or_else(|| cell.split_once('–'))
            .or_else(|| {
                cell.get(1..)
                    .and_then(|rest| rest.split_once('-'))
                    .map(|(a, b)| (&cell[..a.len() + 1], b))
            });
        match split {
            Some((a, b)) => {
                let (x, y) = (one(a)?, one(b)?);
                Ok(Observation::Grade {
                    low: x.min(y),
                    high: x.max(y),
                })
            }
            None => {
                let g = one(cell)?;
                Ok(Observation::Grade { low: g, high: g })
            }
        }
    }
}

/// Look a recorded score up in a scale map: the same text (ignoring case), or the same
/// number (`+1` and `1` are one score).
fn lookup(map: &ScaleMap, s: &str) -> Option<i32> {
    let s = s.trim();
    let number = |t: &str| t.trim().parse::<f64>().ok().filter(|v| v.is_finite());
    map.iter()
        .find(|(k, _)| k.trim().eq_ignore_ascii_case(s))
        .or_else(|| {
            let v = number(s)?;
            map.iter().find(|(k, _)| number(k) == Some(v))
        })
        .map(|(_, v)| *v)
}

/// A whole number written as digits, optionally with a `.0` fraction (spreadsheet style).
fn whole_number(s: &str) -> Option<i32> {
    let s = s.trim();
    if s.is_empty() || s.len() > 12 {
        return None;
    }
    if let Ok(v) = s.parse::<i32>() {
        return Some(v);
    }
    let (int, frac) = s.split_once('.')?;
    if !frac.is_empty() && frac.bytes().all(|b| b == b'0') {
        int.parse::<i32>().ok()
    } else {
        None
    }
}

/// Read a decimal number; a decimal comma is read as a point when `decimal_comma` allows it.
/// Returns the value and whether a comma was converted.
pub(crate) fn parse_decimal(cell: &str, decimal_comma: bool) -> Option<(f64, bool)> {
    let s = cell.trim();
    if s.is_empty() || s.len() > 40 {
        return None;
    }
    let (text, converted) = if decimal_comma && s.contains(',') && !s.contains('.') {
        if s.matches(',').count() != 1 {
            return None;
        }
        (s.replace(',', "."), true)
    } else {
        (s.to_string(), false)
    };
    if !text
        .bytes()
        .all(|b| b.is_ascii_digit() || matches!(b, b'.' | b'-' | b'+' | b'e' | b'E'))
    {
        return None;
    }
    let v: f64 = text.parse().ok()?;
    v.is_finite().then_some((v, converted))
}

/// Read a measurement and check it against the plausible range `low..=high`.
pub(crate) fn parse_measurement(
    cell: &str,
    unit: &str,
    low: f64,
    high: f64,
    decimal_comma: bool,
) -> Result<(Observation, bool), CellError> {
    let plain = format!("a positive number in {unit}, plausibly between {low} and {high}");
    let Some((v, converted)) = parse_decimal(cell, decimal_comma) else {
        let hint = if !decimal_comma && cell.contains(',') {
            " (decimal commas are read only in semicolon- or tab-separated files and spreadsheets; write a decimal point)"
        } else {
            ""
        };
        return Err((ProblemKind::UnreadableValue, format!("{plain}{hint}")));
    };
    if v <= 0.0 {
        return Err((ProblemKind::ImplausibleMeasurement, plain));
    }
    if v < low || v > high {
        let hint = if v * 10.0 >= low && v * 10.0 <= high {
            format!(" (this looks like centimetres: give {unit}, {})", v * 10.0)
        } else if v / 10.0 >= low && v / 10.0 <= high {
            " (this looks ten times too large: a misplaced decimal point?)".to_string()
        } else {
            String::new()
        };
        return Err((
            ProblemKind::ImplausibleMeasurement,
            format!("{plain}{hint}"),
        ));
    }
    Ok((Observation::Measurement { value: v }, converted))
}

/// Read a non-negative whole count (read counts).
pub(crate) fn parse_count(cell: &str) -> Result<Observation, CellError> {
    let s = cell.trim();
    let expected = || {
        (
            ProblemKind::UnreadableValue,
            "a whole number of reads, 0 or more, digits only".to_string(),
        )
    };
    let digits = match s.split_once('.') {
        Some((int, frac)) if frac.bytes().all(|b| b == b'0') => int,
        Some(_) => return Err(expected()),
        None => s,
    };
    if digits.is_empty() || !digits.bytes().all(|b| b.is_ascii_digit()) {
        return Err(expected());
    }
    let max = crate::limits::MAX_READS;
    match digits.parse::<u64>() {
        Ok(value) if value <= max => Ok(Observation::Count { value }),
        // Longer than any u64, or more reads than any sequencing run gives one library.
        _ if digits.len() > 12 || digits.parse::<u64>().is_ok() => Err((
            ProblemKind::LimitExceeded,
            format!("a read count of at most {max} (10^12): no sequencing run produces more reads for one individual; is this a coverage or a byte count?"),
        )),
        _ => Err(expected()),
    }
}

#[cfg(test)]
#[path = "tests/cell.rs"]
mod tests;
