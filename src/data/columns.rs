//! Giving every header column its role: id, group, age, known sex, a trait (and side), or a
//! column carried through unchanged.

use super::problem::{Problem, ProblemKind, Warning, WarningKind};
use crate::catalogue::Catalogue;
use std::collections::HashMap;

/// Which side a trait column records.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Side {
    /// No side (midline trait, or side not recorded).
    Unsided,
    /// `<id>_l`.
    Left,
    /// `<id>_r`.
    Right,
}

/// What a column holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnRole {
    /// The individual's identifier.
    Id,
    /// Burial zone, phase or site.
    Group,
    /// Age at death.
    Age,
    /// Sex of a documented reference individual.
    KnownSex,
    /// A catalogue trait (index in catalogue order) on a side.
    Trait {
        /// Position in the catalogue.
        index: usize,
        /// Side recorded.
        side: Side,
    },
    /// Not used as evidence; carried to every output unchanged.
    Carried,
}

/// Header matching ignores case and surrounding spaces.
pub fn normalise(name: &str) -> String {
    name.trim()
        .trim_start_matches('\u{FEFF}')
        .trim()
        .to_lowercase()
}

/// Assign roles to the header's columns, reporting header problems and likely misspellings.
///
/// With `group_column`, that column holds the groups (and a column named `group`, if any, is
/// carried through instead). `renames` (a column profile: normalised sheet name → tessera's
/// name) gives a column the role of another name; messages still name the sheet's column.
pub fn assign_roles(
    file: &str,
    header: &[String],
    catalogue: &Catalogue,
    group_column: Option<&str>,
    renames: &[(String, String)],
) -> (Vec<ColumnRole>, Vec<Problem>, Vec<Warning>) {
    let group_column = group_column.map(normalise);
    let mut roles = Vec::with_capacity(header.len());
    let mut problems = Vec::new();
    let mut warnings = Vec::new();
    let mut seen: HashMap<String, usize> = HashMap::new();
    let problem = |column: &str, kind, expected: String| Problem {
        file: file.to_string(),
        row: Some(1),
        column: Some(column.to_string()),
        value: None,
        kind,
        expected,
    };
    for (i, raw) in header.iter().enumerate() {
        let name = normalise(raw);
        let name = renames
            .iter()
            .find(|(from, _)| *from == name)
            .map_or(name, |(_, to)| to.clone());
        if let Some(&first) = seen.get(&name) {
            if !name.is_empty() {
                problems.push(problem(
                    raw,
                    ProblemKind::DuplicateColumn,
                    format!(
                        "each column name once; `{}` is also column {} (names are compared ignoring case and surrounding spaces)",
                        header[first].trim(),
                        first + 1
                    ),
                ));
            }
        }
        seen.entry(name.clone()).or_insert(i);
        let natural = match name.as_str() {
            "id" => ColumnRole::Id,
            "group" if group_column.is_none() => ColumnRole::Group,
            "group" => ColumnRole::Carried,
            "age" => ColumnRole::Age,
            "known_sex" => ColumnRole::KnownSex,
            _ => trait_role(&name, catalogue).unwrap_or(ColumnRole::Carried),
        };
        let role = if Some(name.as_str()) == group_column.as_deref() && !name.is_empty() {
            group_role(natural).unwrap_or_else(|what| {
                problems.push(problem(
                    raw,
                    ProblemKind::MissingGroupColumn,
                    format!(
                        "a column of burial zones, phases or sites to group by; `{}` is {what}",
                        raw.trim()
                    ),
                ));
                natural
            })
        } else {
            natural
        };
        if role == ColumnRole::Carried && !name.is_empty() {
            if let Some(suggestion) = near_miss(&name, catalogue) {
                warnings.push(Warning {
                    file: file.to_string(),
                    row: Some(1),
                    column: Some(raw.trim().to_string()),
                    kind: WarningKind::PossibleMisspelling,
                    message: format!(
                        "not a trait id, so it is carried through unused; did you mean `{suggestion}`?"
                    ),
                });
            }
        }
        roles.push(role);
    }
    missing_columns(file, header, &roles, group_column.as_deref(), &mut problems);
    // A trait may come unsided or sided, not both.
    for (index, def) in catalogue.traits().iter().enumerate() {
        let has = |side| roles.contains(&ColumnRole::Trait { index, side });
        if has(Side::Unsided) && (has(Side::Left) || has(Side::Right)) {
            problems.push(problem(
                &def.id,
                ProblemKind::AmbiguousSideColumns,
                format!(
                    "either `{0}` or `{0}_l` / `{0}_r`, not both: say which side the unsided value is",
                    def.id
                ),
            ));
        }
    }
    (roles, problems, warnings)
}

/// The role of the column named by `--group-by`, from the role its name would have had: a
/// carried column becomes the groups; any other column cannot be one (the error says what it
/// is).
fn group_role(natural: ColumnRole) -> Result<ColumnRole, &'static str> {
    match natural {
        ColumnRole::Carried | ColumnRole::Group => Ok(ColumnRole::Group),
        // Grouping by evidence would be circular (the trait would leave the evidence and
        // become the grouping); by age, id or known sex, meaningless.
        ColumnRole::Id => Err("the id column"),
        ColumnRole::Age => Err("the age column (age at death is read from it)"),
        ColumnRole::KnownSex => Err("the known-sex column"),
        ColumnRole::Trait { .. } => {
            Err("a trait column (evidence of sex cannot also be the grouping)")
        }
    }
}

/// The columns a header must have: `id`, and the column named by `--group-by` when one is
/// (unless that column was already refused as a grouping).
fn missing_columns(
    file: &str,
    header: &[String],
    roles: &[ColumnRole],
    group_column: Option<&str>,
    problems: &mut Vec<Problem>,
) {
    if !roles.contains(&ColumnRole::Id) {
        let first = header.first().map(|h| h.trim()).unwrap_or("");
        let hint = if header.len() == 1 && (first.contains('|') || first.contains(' ')) {
            " (the header has a single column: is the file separated by something other than comma, semicolon or tab?)"
        } else {
            ""
        };
        problems.push(Problem {
            file: file.to_string(),
            row: Some(1),
            column: None,
            value: Some(header.join(" | ")),
            kind: ProblemKind::MissingIdColumn,
            expected: format!("a column named `id` in the header row{hint}"),
        });
    }
    if let Some(g) = group_column {
        let refused = problems
            .iter()
            .any(|p| p.kind == ProblemKind::MissingGroupColumn);
        if !roles.contains(&ColumnRole::Group) && !refused {
            problems.push(Problem {
                file: file.to_string(),
                row: Some(1),
                column: None,
                value: Some(g.to_string()),
                kind: ProblemKind::MissingGroupColumn,
                expected: format!(
                    "a column named `{g}` to group by; the header has: {}",
                    header
                        .iter()
                        .map(|h| h.trim())
                        .collect::<Vec<_>>()
                        .join(", ")
                ),
            });
        }
    }
}

fn trait_role(name: &str, catalogue: &Catalogue) -> Option<ColumnRole> {
    if let Some(index) = catalogue.position(name) {
        return Some(ColumnRole::Trait {
            index,
            side: Side::Unsided,
        });
    }
    for (suffix, side) in [("_l", Side::Left), ("_r", Side::Right)] {
        if let Some(base) = name.strip_suffix(suffix) {
            if let Some(index) = catalogue.position(base) {
                if catalogue.traits()[index].bilateral {
                    return Some(ColumnRole::Trait { index, side });
                }
            }
        }
    }
    None
}

/// Every name a column may be given: `id`, `group`, `age`, `known_sex`, each trait id, and
/// `<id>_l` / `<id>_r` for bilateral traits.
pub fn column_names(catalogue: &Catalogue) -> Vec<String> {
    let mut v: Vec<String> = ["id", "group", "age", "known_sex"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    for t in catalogue.traits() {
        v.push(t.id.clone());
        if t.bilateral {
            v.push(format!("{}_l", t.id));
            v.push(format!("{}_r", t.id));
        }
    }
    v
}

/// A column name with spaces, hyphens and dots read as underscores (`mastoid L` →
/// `mastoid_l` once normalised): how a lab's spelling is compared with tessera's names.
pub fn squash(name: &str) -> String {
    name.chars()
        .map(|c| if matches!(c, ' ' | '-' | '.') { '_' } else { c })
        .collect()
}

/// A known column name this one is probably a misspelling of: the same after replacing
/// spaces, hyphens and dots by underscores, or within Damerau–Levenshtein distance 2
/// (1 for names of five characters or fewer).
fn near_miss(name: &str, catalogue: &Catalogue) -> Option<String> {
    let squashed = squash(name);
    let candidates = column_names(catalogue);
    if let Some(c) = candidates.iter().find(|c| **c == squashed) {
        return Some(c.clone());
    }
    if name.chars().count() < 4 {
        return None;
    }
    let limit = if name.chars().count() <= 5 { 1 } else { 2 };
    candidates
        .iter()
        .map(|c| (strsim::damerau_levenshtein(&squashed, c), c))
        .filter(|(d, _)| *d <= limit)
        .min_by_key(|(d, _)| *d)
        .map(|(_, c)| c.clone())
}

#[cfg(test)]
#[path = "tests/columns.rs"]
mod tests;
