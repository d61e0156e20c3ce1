//! Options shared by every command that reads an input table.

use crate::catalogue::Catalogue;
use crate::data::settings::parse_scale_maps;
use crate::data::{read_assemblage, Assemblage};
use crate::data::{ReadSettings, SidePolicy, SideTolerance};
use crate::Error;
use clap::ValueEnum;
use std::path::PathBuf;

/// Side policy words on the command line.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum SideArg {
    /// Left where recorded, else right (common practice).
    LeftFirst,
    /// Right where recorded, else left.
    RightFirst,
    /// Both: mean of two measurements, range spanning two grades.
    Both,
}

/// How to read the input table.
#[derive(Debug, Clone, clap::Args)]
pub struct InputArgs {
    /// Extra word meaning "not recordable" (repeatable), besides empty, NA, N/A, -, . and ?.
    #[arg(long = "missing", value_name = "WORD")]
    pub missing: Vec<String>,
    /// Which side of a bilateral trait to use when both are recorded.
    #[arg(long = "sides", value_enum, default_value = "left-first")]
    pub sides: SideArg,
    /// Grades by which the two sides may differ before a warning (default 1).
    #[arg(long, value_name = "GRADES", default_value_t = 1)]
    pub side_grade_tolerance: i32,
    /// Relative difference of two measurements before a warning (default 0.05).
    #[arg(long, value_name = "FRACTION", default_value_t = 0.05)]
    pub side_measure_tolerance: f64,
    /// YAML file mapping scores recorded on another scale onto the model's grades.
    #[arg(long, value_name = "FILE")]
    pub scale_map: Option<PathBuf>,
    /// Worksheet to read from a workbook (default: the first).
    #[arg(long, value_name = "NAME")]
    pub sheet: Option<String>,
    /// Column holding the groups (burial zone, phase, site) instead of `group`.
    #[arg(long, value_name = "COLUMN")]
    pub group_by: Option<String>,
}

impl InputArgs {
    /// Turn the options into validated read settings.
    ///
    /// # Errors
    /// [`Error::Settings`] for a bad tolerance or scale map, [`Error::Io`] when the map
    /// cannot be read.
    pub fn settings(&self, catalogue: &Catalogue) -> Result<ReadSettings, Error> {
        for word in &self.missing {
            if let Some(hits) = values_meaning(word, catalogue) {
                return Err(Error::Settings {
                    file: "--missing".into(),
                    message: format!(
                        "`{word}` is a value that {hits} can take: as a not-recorded word it would silently drop every such score or measurement; choose a word or code that no trait uses (e.g. `nr`, `x`, or a number outside every scale such as 9 for 1–5 grades)"
                    ),
                });
            }
        }
        if self.side_grade_tolerance < 0
            || !(self.side_measure_tolerance.is_finite() && self.side_measure_tolerance >= 0.0)
        {
            return Err(Error::Settings {
                file: "command line".into(),
                message: "side tolerances must be 0 or more".into(),
            });
        }
        let scale_maps = match &self.scale_map {
            None => Default::default(),
            Some(p) => {
                let text = crate::limits::read_settings_text(p).map_err(|e| e.into_error(p))?;
                parse_scale_maps(&text, catalogue).map_err(|message| Error::Settings {
                    file: p.display().to_string(),
                    message,
                })?
            }
        };
        Ok(ReadSettings {
            missing_words: self.missing.clone(),
            side_policy: match self.sides {
                SideArg::LeftFirst => SidePolicy::LeftFirst,
                SideArg::RightFirst => SidePolicy::RightFirst,
                SideArg::Both => SidePolicy::Both,
            },
            side_tolerance: SideTolerance {
                grades: self.side_grade_tolerance,
                relative: self.side_measure_tolerance,
            },
            scale_maps,
            sheet: self.sheet.clone(),
            group_column: self.group_by.clone(),
        })
    }
}

/// Read a table; on problems, print every one of them and return `None` (the caller exits
/// with code 3).
pub(crate) fn read_or_report(
    path: &std::path::Path,
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Option<Assemblage> {
    match read_assemblage(path, catalogue, settings) {
        Ok(a) => Some(a),
        Err(e) => {
            eprint!("{}", super::check::render_problems(&e));
            None
        }
    }
}

/// The traits (at most three named) of which `word`, read as a number, is a valid value: a
/// grade of an ordinal trait or a measurement within a metric trait's plausible range.
fn values_meaning(word: &str, catalogue: &Catalogue) -> Option<String> {
    use crate::catalogue::TraitKind;
    let x: f64 = word.trim().replace(',', ".").parse().ok()?;
    if !x.is_finite() {
        return None;
    }
    let hits: Vec<String> = catalogue
        .traits()
        .iter()
        .filter(|d| match &d.kind {
            TraitKind::Ordinal { lowest, highest } => {
                x.fract() == 0.0 && x >= f64::from(*lowest) && x <= f64::from(*highest)
            }
            TraitKind::Metric { low, high, .. } => x >= *low && x <= *high,
            TraitKind::Count => false,
        })
        .map(|d| format!("`{}`", d.id))
        .collect();
    match hits.len() {
        0 => None,
        1..=3 => Some(hits.join(", ")),
        n => Some(format!(
            "{} and {} more traits",
            hits[..3].join(", "),
            n - 3
        )),
    }
}
