//! Options shared by every command that reads an input table.

use crate::catalogue::Catalogue;
use crate::data::{ReadSettings, SidePolicy};
use crate::pipeline::ReadOptions;
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
    /// Grades by which the two sides may differ before a warning.
    #[arg(long, value_name = "GRADES", default_value_t = 1)]
    pub side_grade_tolerance: i32,
    /// Relative difference of two measurements before a warning.
    #[arg(long, value_name = "FRACTION", default_value_t = 0.05)]
    pub side_measure_tolerance: f64,
    /// YAML file mapping scores recorded on another scale onto the model's grades.
    #[arg(long, value_name = "FILE")]
    pub scale_map: Option<PathBuf>,
    /// YAML file of the laboratory's own age words and the ages they stand for
    /// (`adultus: 20-40`, `senilis: 60+`).
    #[arg(long, value_name = "FILE")]
    pub age_map: Option<PathBuf>,
    /// Worksheet to read from a workbook (default: the first).
    #[arg(long, value_name = "NAME")]
    pub sheet: Option<String>,
    /// Column profile: the sheet's own column names and not-recorded words (YAML, as the
    /// web page saves it).
    #[arg(long, value_name = "PROFILE.yaml")]
    pub columns: Option<PathBuf>,
}

/// Which column holds the groups: only on the commands whose results are by group (`check`
/// and `analyse`); elsewhere groups mean nothing and the option is not offered.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct GroupArgs {
    /// Column holding the groups (burial zone, phase, site) instead of `group`.
    #[arg(long, value_name = "COLUMN")]
    pub group_by: Option<String>,
}

impl InputArgs {
    /// The settings files these options name (scale map, column profile): inputs of the run,
    /// never to be overwritten by its outputs.
    pub fn settings_files(&self) -> Vec<&std::path::Path> {
        self.scale_map
            .iter()
            .chain(self.columns.iter())
            .chain(self.age_map.iter())
            .map(PathBuf::as_path)
            .collect()
    }

    /// The options as plain data, with the groups read from `groups`' column.
    pub fn read_options(&self, groups: &GroupArgs) -> ReadOptions {
        ReadOptions {
            missing: self.missing.clone(),
            sides: match self.sides {
                SideArg::LeftFirst => SidePolicy::LeftFirst,
                SideArg::RightFirst => SidePolicy::RightFirst,
                SideArg::Both => SidePolicy::Both,
            },
            side_grade_tolerance: self.side_grade_tolerance,
            side_measure_tolerance: self.side_measure_tolerance,
            scale_map: self.scale_map.clone(),
            sheet: self.sheet.clone(),
            group_by: groups.group_by.clone(),
            columns: self.columns.clone(),
            age_map: self.age_map.clone(),
            ..ReadOptions::default()
        }
    }

    /// Turn the options into validated read settings.
    ///
    /// # Errors
    /// [`Error::Options`] listing every bad option; [`Error::Settings`] or [`Error::Io`] for
    /// the scale map.
    pub fn settings(&self, catalogue: &Catalogue) -> Result<ReadSettings, Error> {
        self.read_options(&GroupArgs::default()).settings(catalogue)
    }

    /// [`InputArgs::settings`] with groups read from `groups`' column.
    ///
    /// # Errors
    /// As [`InputArgs::settings`].
    pub fn settings_grouped(
        &self,
        catalogue: &Catalogue,
        groups: &GroupArgs,
    ) -> Result<ReadSettings, Error> {
        self.read_options(groups).settings(catalogue)
    }
}
