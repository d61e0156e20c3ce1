//! Priors on π, the proportion female in the population behind an assemblage: Beta(a, b) or
//! a fixed value, each with provenance; the shipped library; sets for sensitivity analysis.

pub mod library;

pub use library::{parse_prior_set, shipped_priors, PriorSetError};

use serde::{Deserialize, Serialize};

/// A prior file as written.
///
/// | field | meaning |
/// |---|---|
/// | `name` | short plain name |
/// | `description` | when to use it |
/// | `provenance` | required: where the numbers come from |
/// | `beta` | `{a, b}`: π ~ Beta(a, b), a, b > 0 |
/// | `fixed` | a value in (0, 1): π fixed (for comparison and sensitivity) |
///
/// Exactly one of `beta` and `fixed` is given.
#[derive(Debug, Clone, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawPrior {
    /// Short name.
    pub name: String,
    /// When to use it.
    #[serde(default)]
    pub description: String,
    /// Sources.
    pub provenance: String,
    /// Beta parameters.
    #[serde(default)]
    pub beta: Option<BetaParams>,
    /// A fixed value of π.
    #[serde(default)]
    pub fixed: Option<f64>,
}

/// Beta(a, b) parameters.
#[derive(Debug, Clone, Copy, PartialEq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct BetaParams {
    /// a > 0 (pseudo-count of females).
    pub a: f64,
    /// b > 0 (pseudo-count of males).
    pub b: f64,
}

/// The shape of a prior on π.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
#[serde(tag = "type", rename_all = "snake_case")]
pub enum PriorShape {
    /// π ~ Beta(a, b).
    Beta {
        /// a.
        a: f64,
        /// b.
        b: f64,
    },
    /// π fixed at a value.
    Fixed {
        /// The value.
        pi: f64,
    },
}

/// A validated prior.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Prior {
    /// Short name (used as the `prior` column of outputs).
    pub name: String,
    /// When to use it.
    pub description: String,
    /// Sources.
    pub provenance: String,
    /// Beta or fixed.
    pub shape: PriorShape,
    /// SHA-256 of the prior's text (of its canonical form for built-in fixed values).
    pub sha256: String,
}

/// A prior that cannot be used.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("prior {file}: {message}")]
pub struct PriorError {
    /// The file or name.
    pub file: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl Prior {
    /// Parse and validate a prior document.
    ///
    /// # Errors
    /// [`PriorError`] naming what is wrong.
    pub fn from_yaml(file: &str, text: &str) -> Result<Prior, PriorError> {
        let fail = |message: String| PriorError {
            file: file.to_string(),
            message,
        };
        crate::limits::check_yaml(text).map_err(fail)?;
        let raw: RawPrior = serde_yaml::from_str(text)
            .map_err(|e| fail(format!("not a valid prior document: {e}")))?;
        if raw.name.trim().is_empty() {
            return Err(fail("`name` must not be empty".into()));
        }
        if raw.provenance.trim().len() < 10 {
            return Err(fail(
                "`provenance` must say where the numbers come from".into(),
            ));
        }
        let shape = match (raw.beta, raw.fixed) {
            (Some(BetaParams { a, b }), None) => {
                if !(a > 0.0 && b > 0.0 && a.is_finite() && b.is_finite()) {
                    return Err(fail(format!(
                        "beta: a and b must be positive and finite, found a = {a}, b = {b}"
                    )));
                }
                if !(Self::BETA_RANGE.contains(&a) && Self::BETA_RANGE.contains(&b)) {
                    return Err(fail(format!(
                        "beta: a and b from {} to {} (a + b above a million is a prior SD under 0.0005, which the grid of π cannot resolve: use `fixed: {:.4}` instead; below 0.001 the prior puts its mass at 0 and 1 beyond what the grid can hold), found a = {a}, b = {b}",
                        Self::BETA_RANGE.start(),
                        Self::BETA_RANGE.end(),
                        a / (a + b)
                    )));
                }
                PriorShape::Beta { a, b }
            }
            (None, Some(pi)) => {
                if !(pi > 0.0 && pi < 1.0) {
                    return Err(fail(format!(
                        "fixed: a value strictly between 0 and 1, found {pi}"
                    )));
                }
                PriorShape::Fixed { pi }
            }
            _ => {
                return Err(fail(
                    "give exactly one of `beta: {a, b}` and `fixed: value`".into(),
                ))
            }
        };
        Ok(Prior {
            name: raw.name,
            description: raw.description,
            provenance: raw.provenance,
            shape,
            sha256: crate::data::sha256_hex(text.as_bytes()),
        })
    }

    /// The Beta parameters accepted: wide enough for every prior of the literature (Jeffreys'
    /// 0.5, flat 1, a birth ratio from thousands of births), narrow enough that the posterior
    /// grid of π resolves the prior (a choice of ours).
    pub const BETA_RANGE: std::ops::RangeInclusive<f64> = 1e-3..=1e6;

    /// A fixed-π prior made on the command line (`fixed:0.3`) or by the sweep.
    pub fn fixed(pi: f64) -> Result<Prior, PriorError> {
        let name = format!("fixed-{pi}");
        let text = format!(
            "name: {name}\ndescription: pi fixed at {pi}, for sensitivity and comparison\nprovenance: a fixed value chosen for the sensitivity analysis, not an estimate\nfixed: {pi}\n"
        );
        Prior::from_yaml(&name, &text)
    }

    /// Load a prior file.
    ///
    /// # Errors
    /// [`PriorError`] when unreadable or invalid.
    pub fn from_path(path: &std::path::Path) -> Result<Prior, PriorError> {
        let text = crate::limits::read_settings_text(path).map_err(|e| PriorError {
            file: path.display().to_string(),
            message: e.to_string(),
        })?;
        Prior::from_yaml(&path.display().to_string(), &text)
    }

    /// The value of π a fixed prior fixes; `None` for a Beta prior.
    pub fn fixed_value(&self) -> Option<f64> {
        match self.shape {
            PriorShape::Fixed { pi } => Some(pi),
            PriorShape::Beta { .. } => None,
        }
    }

    /// Whether the prior fixes π (a point mass) rather than spreading it.
    pub fn is_fixed(&self) -> bool {
        self.fixed_value().is_some()
    }

    /// The prior mean of π.
    pub fn mean(&self) -> f64 {
        match self.shape {
            PriorShape::Beta { a, b } => a / (a + b),
            PriorShape::Fixed { pi } => pi,
        }
    }

    /// The same prior with the sexes exchanged (π → 1 − π).
    pub fn mirrored(&self) -> Prior {
        let shape = match self.shape {
            PriorShape::Beta { a, b } => PriorShape::Beta { a: b, b: a },
            PriorShape::Fixed { pi } => PriorShape::Fixed { pi: 1.0 - pi },
        };
        Prior {
            shape,
            name: format!("{}-mirrored", self.name),
            ..self.clone()
        }
    }
}

#[cfg(test)]
#[path = "tests/prior.rs"]
mod tests;
