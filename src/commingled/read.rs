//! Reading an element table: the input contract of individuals (`id`, trait columns, scale
//! maps, missing codes) with one row per element and these columns besides:
//!
//! | column | content |
//! |---|---|
//! | `element` | the element type, in the lab's words (`cranium`, `os coxae`, `femur`…), required |
//! | `side` | `left` / `l` / `sin`, `right` / `r` / `dx`; blank, `unpaired` or `axial` for unpaired elements |
//! | `context` | where it was found (carried through) |
//! | `individual` | a label shared by elements the excavation associates with one person |
//! | `association` | the probability (0–1) that the element belongs with the others of its `individual`; blank: 1 |
//!
//! Bilateral trait columns are written without a side suffix: the element's `side` says it.

use crate::catalogue::Catalogue;
use crate::data::cell::parse_decimal;
use crate::data::columns::normalise;
use crate::data::{read_assemblage, Assemblage, InputError, Problem, ProblemKind, ReadSettings};
use serde::Serialize;
use std::path::Path;

/// The side of an element.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum ElementSide {
    /// Left.
    Left,
    /// Right.
    Right,
    /// An unpaired element (cranium, mandible, sacrum) or a side not recorded.
    Unpaired,
}

impl ElementSide {
    /// The word written in outputs.
    pub fn as_str(self) -> &'static str {
        match self {
            ElementSide::Left => "left",
            ElementSide::Right => "right",
            ElementSide::Unpaired => "unpaired",
        }
    }

    fn parse(cell: &str) -> Option<ElementSide> {
        match normalise(cell).as_str() {
            "left" | "l" | "sin" | "sinister" => Some(ElementSide::Left),
            "right" | "r" | "dx" | "dexter" => Some(ElementSide::Right),
            "" | "unpaired" | "axial" | "midline" | "none" | "-" => Some(ElementSide::Unpaired),
            _ => None,
        }
    }
}

/// What a row says about the element itself, beside its traits.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ElementRecord {
    /// The element type, lower case with single spaces (`os coxae`).
    pub element: String,
    /// Its side.
    pub side: ElementSide,
    /// Where it was found (empty if not given).
    pub context: String,
    /// The individual the excavation associates it with, if any.
    pub individual: Option<String>,
    /// Probability that it belongs to that individual (1 without an association).
    pub association: f64,
}

/// An element table: the rows read as individuals (one per element, for the model's
/// evaluation) and each row's element record, aligned.
#[derive(Debug, Clone, PartialEq)]
pub struct ElementTable {
    /// The rows, each evaluated as if it were an individual with only these traits.
    pub rows: Assemblage,
    /// One record per row.
    pub elements: Vec<ElementRecord>,
}

/// Read an element table.
///
/// # Errors
/// [`InputError`] with every problem: those of the input contract, a missing `element`
/// column, an empty element type, an unreadable side, an association outside 0–1 or given
/// without an `individual`.
pub fn read_elements(
    path: &Path,
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<ElementTable, InputError> {
    let rows = read_assemblage(path, catalogue, settings)?;
    let file = rows.file.clone();
    let column = |name: &str| {
        rows.carried_columns
            .iter()
            .position(|c| normalise(c) == name)
    };
    let Some(element_col) = column("element") else {
        return Err(InputError {
            file: file.clone(),
            problems: vec![Problem {
                file,
                row: None,
                column: None,
                value: None,
                kind: ProblemKind::MissingElementColumn,
                expected: "an `element` column naming each row's element type (cranium, mandible, os coxae, femur…): an element table has one row per element".into(),
            }],
            warnings: Vec::new(),
        });
    };
    let (side_col, context_col, individual_col, association_col) = (
        column("side"),
        column("context"),
        column("individual"),
        column("association"),
    );
    let mut problems = Vec::new();
    let mut elements = Vec::with_capacity(rows.individuals.len());
    for ind in &rows.individuals {
        let cell = |c: Option<usize>| c.map_or("", |c| ind.carried[c].trim());
        let mut bad = |col: Option<usize>, value: &str, expected: &str| {
            problems.push(Problem {
                file: file.clone(),
                row: Some(ind.row),
                column: col.map(|c| rows.carried_columns[c].clone()),
                value: Some(value.to_string()),
                kind: ProblemKind::BadElementRecord,
                expected: expected.to_string(),
            })
        };
        let element = cell(Some(element_col))
            .to_lowercase()
            .split_whitespace()
            .collect::<Vec<_>>()
            .join(" ");
        if element.is_empty() {
            bad(
                Some(element_col),
                "",
                "the element type (cranium, mandible, os coxae, femur…)",
            );
        }
        let side = ElementSide::parse(cell(side_col)).unwrap_or_else(|| {
            bad(
                side_col,
                cell(side_col),
                "left (l, sin), right (r, dx), or blank / unpaired / axial",
            );
            ElementSide::Unpaired
        });
        let individual = Some(cell(individual_col).to_string()).filter(|s| !s.is_empty());
        let association = match (cell(association_col), &individual) {
            ("", _) => 1.0,
            (text, None) => {
                bad(
                    association_col,
                    text,
                    "an association probability goes with an `individual` label naming whom the element is associated with",
                );
                1.0
            }
            (text, Some(_)) => match parse_decimal(text, rows.decimal_comma) {
                Some((p, _)) if (0.0..=1.0).contains(&p) => p,
                _ => {
                    bad(
                        association_col,
                        text,
                        "a probability from 0 to 1 that the element belongs with its individual",
                    );
                    1.0
                }
            },
        };
        elements.push(ElementRecord {
            element,
            side,
            context: cell(context_col).to_string(),
            individual,
            association,
        });
    }
    if !problems.is_empty() {
        return Err(InputError {
            file,
            problems,
            warnings: rows.warnings.clone(),
        });
    }
    Ok(ElementTable { rows, elements })
}
