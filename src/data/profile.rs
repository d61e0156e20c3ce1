//! Column profiles: how to read one laboratory's own sheets without editing them. A profile
//! names, for each of the sheet's columns that tessera would not recognise, what it holds (a
//! trait id, a sided trait `<id>_l` / `<id>_r`, or `id`, `group`, `age`, `known_sex`), and the
//! words the lab writes for "not recordable". The web page writes one; every command that
//! reads a table takes it with `--columns PROFILE.yaml`.
//!
//! ```yaml
//! # tessera column profile
//! columns:
//!   Individual: id
//!   Glab: glabella
//!   Mast L: mastoid_l
//! not_recorded: [unobs, n/r]
//! ```

use super::columns::{column_names, normalise, squash};
use crate::catalogue::Catalogue;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// A column profile (see the module's documentation for the file).
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct ColumnProfile {
    /// The sheet's column name → what it holds, in tessera's names.
    pub columns: BTreeMap<String, String>,
    /// Words meaning "not recordable", besides empty, NA, N/A, -, . and ?.
    pub not_recorded: Vec<String>,
}

/// The names a column most likely means, closest first (at most three), by edit distance
/// between the squashed column name and each name (Jaro–Winkler similarity, strsim). The
/// cut-off of 0.75 and the 0.95 given to a prefix of three letters or more are choices of
/// ours, set on the demo's names (`Glab`, `Mastoid L`).
pub fn suggestions(column: &str, catalogue: &Catalogue) -> Vec<String> {
    let squashed = squash(&normalise(column));
    let mut scored: Vec<(f64, String)> = column_names(catalogue)
        .into_iter()
        .map(|n| {
            // A prefix ("glab" of glabella) counts as close as a near spelling.
            let prefix = n.starts_with(&squashed) && squashed.len() >= 3;
            let s = strsim::jaro_winkler(&squashed, &n).max(if prefix { 0.95 } else { 0.0 });
            (s, n)
        })
        .filter(|(s, _)| *s >= 0.75)
        .collect();
    scored.sort_by(|a, b| b.0.total_cmp(&a.0).then_with(|| a.1.cmp(&b.1)));
    scored.into_iter().take(3).map(|(_, n)| n).collect()
}

impl ColumnProfile {
    /// Every problem of the profile against a catalogue: empty column names, names given
    /// twice (ignoring case and surrounding spaces), targets that are not column names
    /// tessera knows.
    pub fn problems(&self, catalogue: &Catalogue) -> Vec<String> {
        let names = column_names(catalogue);
        let mut out = Vec::new();
        let mut seen: BTreeMap<String, &str> = BTreeMap::new();
        for (column, target) in &self.columns {
            let key = normalise(column);
            if key.is_empty() {
                out.push("a column name is empty".to_string());
            } else if let Some(first) = seen.insert(key, column) {
                out.push(format!(
                    "`{column}` and `{first}` are the same column (names ignore case and surrounding spaces)"
                ));
            }
            let t = normalise(target);
            if !names.contains(&t) {
                let near = suggestions(&t, catalogue);
                out.push(format!(
                    "`{column}`: `{target}` is not a column tessera knows{}",
                    if near.is_empty() {
                        " (id, group, age, known_sex, a trait id, or <id>_l / <id>_r)".to_string()
                    } else {
                        format!(" (closest: {})", near.join(", "))
                    }
                ));
            }
        }
        for w in &self.not_recorded {
            if w.trim().is_empty() {
                out.push("a not-recorded word is empty".to_string());
            }
        }
        out
    }

    /// Read a profile file's text, bounded like every settings file; every problem at once.
    ///
    /// # Errors
    /// The problems, one per line.
    pub fn from_yaml(text: &str, catalogue: &Catalogue) -> Result<ColumnProfile, String> {
        crate::limits::check_yaml(text)?;
        let p: ColumnProfile = serde_yaml::from_str(text).map_err(|e| {
            format!("{e} (expected `columns:` (sheet column: tessera name) and `not_recorded:` (a list of words))")
        })?;
        let problems = p.problems(catalogue);
        if problems.is_empty() {
            Ok(p)
        } else {
            Err(problems.join("; "))
        }
    }

    /// The profile as a file, with a line saying what it is.
    pub fn to_yaml(&self) -> String {
        let body = serde_yaml::to_string(self).unwrap_or_default();
        format!(
            "# tessera column profile: how to read this lab's sheets (tessera check|analyse … --columns THIS.yaml)\n{body}"
        )
    }

    /// The renames as the reader applies them: normalised sheet name → tessera name.
    pub fn renames(&self) -> Vec<(String, String)> {
        self.columns
            .iter()
            .map(|(c, t)| (normalise(c), normalise(t)))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn cat() -> Catalogue {
        Catalogue::standard().unwrap()
    }

    #[test]
    fn a_profile_round_trips_and_bad_ones_list_every_problem() {
        let text = "columns:\n  Glab: glabella\n  Mast L: mastoid_l\n  Individual: id\nnot_recorded: [unobs]\n";
        let p = ColumnProfile::from_yaml(text, &cat()).unwrap();
        assert_eq!(p.columns["Glab"], "glabella");
        assert_eq!(ColumnProfile::from_yaml(&p.to_yaml(), &cat()).unwrap(), p);
        assert!(p.renames().contains(&("mast l".into(), "mastoid_l".into())));
        let bad = "columns:\n  Glab: glabela\n  glab: glabella\n  X: glabella_l\n";
        let e = ColumnProfile::from_yaml(bad, &cat()).unwrap_err();
        assert!(
            e.contains("`glabela` is not a column tessera knows (closest: glabella"),
            "{e}"
        );
        assert!(e.contains("are the same column"), "{e}");
        // glabella is a midline trait: no sides.
        assert!(e.contains("`glabella_l` is not a column"), "{e}");
        assert!(ColumnProfile::from_yaml("colums: {}\n", &cat()).is_err());
    }

    #[test]
    fn suggestions_put_the_closest_name_first() {
        assert_eq!(suggestions("Glab", &cat())[0], "glabella");
        assert_eq!(suggestions("mastoid L", &cat())[0], "mastoid_l");
        assert!(suggestions("grave goods", &cat()).is_empty());
    }
}
