//! The shipped priors (`priors/*.yaml`, embedded) and the parsing of a sensitivity set.

use super::{Prior, PriorError};

/// The shipped prior files, embedded at build time, in reporting order. The first is the
/// default prior.
pub const SHIPPED: &[(&str, &str)] = &[
    ("flat", include_str!("../../priors/flat.yaml")),
    ("birth-ratio", include_str!("../../priors/birth-ratio.yaml")),
    ("even-fixed", include_str!("../../priors/even-fixed.yaml")),
    (
        "mostly-female",
        include_str!("../../priors/mostly-female.yaml"),
    ),
    ("mostly-male", include_str!("../../priors/mostly-male.yaml")),
    ("military", include_str!("../../priors/military.yaml")),
];

/// The values of π swept by default in the sensitivity analysis: 0.1, 0.2, …, 0.9.
pub const SWEEP: [f64; 9] = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9];

/// A sensitivity set that cannot be read.
pub type PriorSetError = PriorError;

/// Every shipped prior, validated.
///
/// # Errors
/// Never for the shipped files (a unit test loads them); typed for safety.
pub fn shipped_priors() -> Result<Vec<Prior>, PriorError> {
    SHIPPED
        .iter()
        .map(|(name, text)| Prior::from_yaml(&format!("priors/{name}.yaml"), text))
        .collect()
}

/// One prior named on the command line: a shipped name, `fixed:VALUE`, or a file path.
///
/// # Errors
/// [`PriorError`] for an unknown name, a bad value or an invalid file.
pub fn parse_prior(word: &str) -> Result<Prior, PriorError> {
    let word = word.trim();
    if let Some((_, text)) = SHIPPED.iter().find(|(n, _)| *n == word) {
        return Prior::from_yaml(&format!("priors/{word}.yaml"), text);
    }
    if let Some(v) = word.strip_prefix("fixed:") {
        let pi: f64 = v.trim().parse().map_err(|_| PriorError {
            file: word.to_string(),
            message: "fixed:VALUE needs a number strictly between 0 and 1".into(),
        })?;
        return Prior::fixed(pi);
    }
    let path = std::path::Path::new(word);
    if path.exists() {
        return Prior::from_path(path);
    }
    Err(PriorError {
        file: word.to_string(),
        message: format!(
            "not a shipped prior ({}), not fixed:VALUE, and no such file",
            SHIPPED
                .iter()
                .map(|(n, _)| *n)
                .collect::<Vec<_>>()
                .join(", ")
        ),
    })
}

/// A sensitivity set: comma-separated items, each a prior as in [`parse_prior`], or
/// `shipped` (every shipped prior) or `sweep` (fixed π = 0.1 … 0.9). Duplicates by name are
/// dropped, order kept.
///
/// # Errors
/// [`PriorError`] for the first item that cannot be read.
pub fn parse_prior_set(spec: &str) -> Result<Vec<Prior>, PriorError> {
    let mut out: Vec<Prior> = Vec::new();
    for item in spec.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let priors = match item {
            "shipped" => shipped_priors()?,
            "sweep" => SWEEP
                .iter()
                .map(|&p| Prior::fixed(p))
                .collect::<Result<_, _>>()?,
            w => vec![parse_prior(w)?],
        };
        for p in priors {
            if !out.iter().any(|q| q.name == p.name) {
                out.push(p);
            }
        }
    }
    if out.is_empty() {
        return Err(PriorError {
            file: spec.to_string(),
            message: "the set names no prior".into(),
        });
    }
    Ok(out)
}

#[cfg(test)]
#[path = "tests/library.rs"]
mod tests;
