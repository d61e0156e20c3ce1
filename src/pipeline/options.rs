//! The options of an analysis as plain data (the schema both doors fill in: the command line
//! converts its arguments into them, the web page its form), and their validation, which
//! reports every problem at once before any work is done.

use crate::assemblage::recalibration::RecalibrationSettings;
use crate::assemblage::Thresholds;
use crate::catalogue::{Catalogue, TraitKind};
use crate::data::settings::parse_scale_maps;
use crate::data::{ReadSettings, SidePolicy, SideTolerance};
use crate::error::{OptionProblem, OptionProblems};
use crate::model::Model;
use crate::prior::{parse_prior_set, Prior};
use crate::Error;
use serde::{Deserialize, Serialize};
use std::path::PathBuf;

/// How to read an input table.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct ReadOptions {
    /// Extra words meaning "not recordable", besides empty, NA, N/A, -, . and ?.
    pub missing: Vec<String>,
    /// Which side of a bilateral trait to use when both are recorded.
    pub sides: SidePolicy,
    /// Grades by which the two sides may differ before a warning.
    pub side_grade_tolerance: i32,
    /// Relative difference of two measurements before a warning.
    pub side_measure_tolerance: f64,
    /// YAML file mapping scores recorded on another scale onto the model's grades.
    pub scale_map: Option<PathBuf>,
    /// Worksheet of a workbook (default: the first).
    pub sheet: Option<String>,
    /// Column holding the groups (default `group`).
    pub group_by: Option<String>,
    /// A column profile file (`--columns`): the sheet's own column names and not-recorded
    /// words.
    pub columns: Option<PathBuf>,
    /// Column names given directly (the page's mapping), over the profile's: sheet column →
    /// tessera's name.
    pub renames: std::collections::BTreeMap<String, String>,
    /// Not-recorded words given with `renames` (the page's mapping).
    pub not_recorded: Vec<String>,
    /// A scale map given as text (the page: a file the user chose), with its file name for
    /// messages; used instead of `scale_map`.
    pub scale_map_text: Option<(String, String)>,
    /// YAML file of the laboratory's own age words and the ages they stand for.
    pub age_map: Option<PathBuf>,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            missing: Vec::new(),
            sides: SidePolicy::LeftFirst,
            side_grade_tolerance: 1,
            side_measure_tolerance: 0.05,
            scale_map: None,
            sheet: None,
            group_by: None,
            columns: None,
            renames: Default::default(),
            not_recorded: Vec::new(),
            scale_map_text: None,
            age_map: None,
        }
    }
}

impl ReadOptions {
    /// The validated read settings; option problems are added to `problems` (the settings
    /// returned are then not to be used).
    ///
    /// # Errors
    /// [`Error::Settings`] or [`Error::Io`] when the scale map file cannot be used.
    pub fn settings_into(
        &self,
        catalogue: &Catalogue,
        problems: &mut Vec<OptionProblem>,
    ) -> Result<ReadSettings, Error> {
        // The column profile: from its file, then the names given directly over it.
        let mut profile = match &self.columns {
            None => crate::data::ColumnProfile::default(),
            Some(p) => {
                let text = crate::limits::read_settings_text(p).map_err(|e| e.into_error(p))?;
                crate::data::ColumnProfile::from_yaml(&text, catalogue).map_err(|message| {
                    Error::Settings {
                        file: p.display().to_string(),
                        message,
                    }
                })?
            }
        };
        profile.columns.extend(self.renames.clone());
        profile
            .not_recorded
            .extend(self.not_recorded.iter().cloned());
        for message in profile.problems(catalogue) {
            problems.push(OptionProblem::new("columns", message));
        }
        let mut missing = self.missing.clone();
        missing.extend(profile.not_recorded.iter().cloned());
        for word in &missing {
            if let Some(hits) = values_meaning(word, catalogue) {
                problems.push(OptionProblem::new("missing", format!(
                    "`{word}` is a value that {hits} can take: as a not-recorded word it would silently drop every such score or measurement; choose a word or code that no trait uses (e.g. `nr`, `x`, or a number outside every scale such as 9 for 1–5 grades)"
                )));
            }
        }
        if self.side_grade_tolerance < 0 {
            problems.push(OptionProblem::new(
                "side-grade-tolerance",
                format!(
                    "grades of difference, 0 or more (found {})",
                    self.side_grade_tolerance
                ),
            ));
        }
        if !(self.side_measure_tolerance.is_finite() && self.side_measure_tolerance >= 0.0) {
            problems.push(OptionProblem::new(
                "side-measure-tolerance",
                format!(
                    "a relative difference, 0 or more (found {})",
                    self.side_measure_tolerance
                ),
            ));
        }
        // The scale map's name and text: given as text (the page), or read from its file.
        let scale_map = match (&self.scale_map_text, &self.scale_map) {
            (Some((name, text)), _) => {
                if text.len() as u64 > crate::limits::MAX_SETTINGS_BYTES {
                    return Err(Error::Settings {
                        file: name.clone(),
                        message: "larger than any scale map tessera reads".into(),
                    });
                }
                Some((name.clone(), text.clone()))
            }
            (None, Some(p)) => Some((
                p.display().to_string(),
                crate::limits::read_settings_text(p).map_err(|e| e.into_error(p))?,
            )),
            (None, None) => None,
        };
        let scale_maps = match scale_map {
            None => Default::default(),
            Some((file, text)) => parse_scale_maps(&text, catalogue)
                .map_err(|message| Error::Settings { file, message })?,
        };
        let age_map = match &self.age_map {
            None => Default::default(),
            Some(p) => {
                let text = crate::limits::read_settings_text(p).map_err(|e| e.into_error(p))?;
                crate::data::parse_age_map(&text).map_err(|message| Error::Settings {
                    file: p.display().to_string(),
                    message,
                })?
            }
        };
        Ok(ReadSettings {
            age_map,
            missing_words: missing,
            side_policy: self.sides,
            side_tolerance: SideTolerance {
                grades: self.side_grade_tolerance,
                relative: self.side_measure_tolerance,
            },
            scale_maps,
            sheet: self.sheet.clone(),
            group_column: self.group_by.clone(),
            renames: profile.renames(),
        })
    }

    /// The validated read settings.
    ///
    /// # Errors
    /// [`Error::Options`] listing every option problem; [`Error::Settings`] or [`Error::Io`]
    /// for the scale map file.
    pub fn settings(&self, catalogue: &Catalogue) -> Result<ReadSettings, Error> {
        let mut problems = Vec::new();
        let s = self.settings_into(catalogue, &mut problems)?;
        if problems.is_empty() {
            Ok(s)
        } else {
            Err(Error::Options(OptionProblems(problems)))
        }
    }
}

/// The traits (at most three named) of which `word`, read as a number, is a valid value: a
/// grade of an ordinal trait or a measurement within a metric trait's plausible range.
fn values_meaning(word: &str, catalogue: &Catalogue) -> Option<String> {
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

/// Where the model comes from.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum ModelChoice {
    /// The model embedded in the program.
    #[default]
    Embedded,
    /// A model file.
    File(PathBuf),
}

/// Every option of an analysis. `Default` gives the command line's defaults.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct AnalysisOptions {
    /// The model.
    pub model: ModelChoice,
    /// The prior on the proportion female: a shipped name, `fixed:VALUE`, or a prior file.
    pub prior: String,
    /// The sensitivity set, comma-separated (names, `fixed:VALUE`, files, `shipped`, `sweep`).
    pub priors: String,
    /// Cut-offs on P(female): male, probable male, probable female, female.
    pub thresholds: String,
    /// Joint posterior draws to write; without it 1000 are made and not written.
    pub draws: Option<usize>,
    /// 0/1 condition columns to compare between the sexes.
    pub by_sex: Vec<String>,
    /// Let the assemblage correct the reference means of the measurements.
    pub recalibrate: bool,
    /// Prior SD of a recalibrated mean's shift, in reference within-sex SDs.
    pub shift: f64,
    /// Iterations per chain of the recalibration.
    pub iterations: usize,
    /// Minimum age (years) from which skeletal evidence is used (default: the model's).
    pub minimum_age: Option<f64>,
    /// Age classes of the life tables by sex (`18-25,25-35,35-50,50+`).
    pub life_table_classes: String,
    /// Age classes of the tables of age by sex and of categories by age
    /// (`0-18,18-25,25-35,35-50,50+`).
    pub age_classes: String,
    /// The sex ratio (males per 100 females) the population's is compared with.
    pub reference_ratio: f64,
    /// The age range (`18-35`) over which the mortality of the sexes is compared.
    pub hazard_ages: String,
    /// Within-sex correlations to try in the latent blocks (`0,0.25,0.5,0.75`); empty: no
    /// correlation check.
    pub correlation_check: String,
    /// Seed of every random stream.
    pub seed: u64,
    /// How to read the table.
    pub read: ReadOptions,
}

impl Default for AnalysisOptions {
    fn default() -> Self {
        AnalysisOptions {
            model: ModelChoice::Embedded,
            prior: "flat".into(),
            priors: "shipped,sweep".into(),
            thresholds: "0.05,0.2,0.8,0.95".into(),
            draws: None,
            by_sex: Vec::new(),
            recalibrate: false,
            shift: 1.0,
            iterations: 2000,
            minimum_age: None,
            life_table_classes: crate::summary::DEFAULT_LIFE_TABLE_CLASSES.into(),
            age_classes: crate::summary::DEFAULT_AGE_CLASSES.into(),
            reference_ratio: crate::summary::DEFAULT_REFERENCE_RATIO,
            hazard_ages: crate::summary::hazard::DEFAULT_HAZARD_AGES.into(),
            correlation_check: String::new(),
            seed: 1,
            read: ReadOptions::default(),
        }
    }
}

/// Joint posterior draws made for the intervals when none are asked for.
pub const DEFAULT_DRAWS: usize = 1000;

/// Largest number of individual-draws (draws × individuals) of one run.
pub const MAX_INDIVIDUAL_DRAWS: usize = 200_000_000;

/// Options that have been checked: everything an analysis needs before it reads a table.
#[derive(Debug, Clone)]
pub struct ValidatedOptions {
    /// The model, with the minimum age applied.
    pub model: Model,
    /// Where the model came from, as recorded (`embedded default` or the path).
    pub model_file: String,
    /// The chosen prior.
    pub prior: Prior,
    /// The sensitivity set.
    pub set: Vec<Prior>,
    /// The cut-offs.
    pub thresholds: Thresholds,
    /// How to read the table.
    pub read: ReadSettings,
    /// Recalibration settings, when asked for.
    pub recalibration: Option<RecalibrationSettings>,
    /// Age classes of the life tables.
    pub life_table_classes: crate::summary::AgeClasses,
    /// Age classes of the tables of age by sex and of categories by age.
    pub age_classes: crate::summary::AgeClasses,
    /// The age range of the comparison of mortality.
    pub hazard_ages: (f64, f64),
    /// The within-sex correlations to try (empty: no correlation check).
    pub correlation_check: Vec<f64>,
    /// The options as given.
    pub options: AnalysisOptions,
}

impl AnalysisOptions {
    /// Check every option, loading the model they name; every problem is reported at once.
    ///
    /// # Errors
    /// [`Error::Model`] when the model file is invalid; [`Error::Options`] listing every
    /// option problem; [`Error::Settings`] or [`Error::Io`] for a settings file.
    pub fn validate(&self) -> Result<ValidatedOptions, Error> {
        let (model, model_file) = match &self.model {
            ModelChoice::Embedded => (super::load_model(None)?, "embedded default".to_string()),
            ModelChoice::File(p) => (super::load_model(Some(p))?, p.display().to_string()),
        };
        self.validate_with(model, model_file)
    }

    /// As [`validate`](Self::validate), with the model already loaded (an upload).
    ///
    /// # Errors
    /// As [`validate`](Self::validate).
    pub fn validate_with(
        &self,
        model: Model,
        model_file: String,
    ) -> Result<ValidatedOptions, Error> {
        let mut problems = Vec::new();
        // The model is cloned only when an age is to be tried on it.
        let model = match self.minimum_age {
            None => model,
            Some(y) => match super::with_minimum_age(model.clone(), Some(y)) {
                Ok(m) => m,
                Err(Error::Options(mut p)) => {
                    problems.append(&mut p.0);
                    model
                }
                Err(e) => return Err(e),
            },
        };
        let prior = match parse_prior_set(&self.prior) {
            Ok(mut v) if v.len() == 1 => v.pop(),
            Ok(_) => {
                problems.push(OptionProblem::new(
                    "prior",
                    "name exactly one prior (use --priors for the sensitivity set)",
                ));
                None
            }
            Err(e) => {
                problems.push(OptionProblem::new(
                    "prior",
                    format!("{}: {}", e.file, e.message),
                ));
                None
            }
        };
        let set = parse_prior_set(&self.priors).unwrap_or_else(|e| {
            problems.push(OptionProblem::new(
                "priors",
                format!("{}: {}", e.file, e.message),
            ));
            Vec::new()
        });
        let thresholds = Thresholds::parse(&self.thresholds).unwrap_or_else(|message| {
            problems.push(OptionProblem::new("thresholds", message));
            Thresholds::default()
        });
        if self.draws == Some(0) {
            problems.push(OptionProblem::new(
                "draws",
                "give from 1 up to 200 million individual-draws in all (found 0 draws)".to_string(),
            ));
        }
        let life_table_classes = crate::summary::AgeClasses::parse(&self.life_table_classes)
            .unwrap_or_else(|message| {
                problems.push(OptionProblem::new("life-table-classes", message));
                crate::summary::AgeClasses::default()
            });
        let age_classes = crate::summary::AgeClasses::parse(&self.age_classes)
            .and_then(|c| match c.0.first() {
                Some(first) if first.from > 0.0 => Err(format!(
                    "the first class `{}` starts above 0: these tables count every individual, subadults too, so the first class starts at 0 (0-18)",
                    first.label
                )),
                _ => Ok(c),
            })
            .unwrap_or_else(|message| {
                problems.push(OptionProblem::new("age-classes", message));
                crate::summary::AgeClasses::default()
            });
        let hazard_ages = crate::summary::hazard::parse_age_range(&self.hazard_ages)
            .unwrap_or_else(|message| {
                problems.push(OptionProblem::new("hazard-ages", message));
                (0.0, 1.0) // never used: the options are refused
            });
        let correlation_check = if self.correlation_check.trim().is_empty() {
            Vec::new()
        } else {
            crate::likelihood::correlation_check::parse_values(&self.correlation_check)
                .unwrap_or_else(|message| {
                    problems.push(OptionProblem::new("correlation-check", message));
                    Vec::new()
                })
        };
        if !(self.reference_ratio.is_finite() && self.reference_ratio > 0.0) {
            problems.push(OptionProblem::new(
                "reference-ratio",
                format!(
                    "a sex ratio in males per 100 females, above 0 (105 is the usual ratio at birth); found {}",
                    self.reference_ratio
                ),
            ));
        }
        let recalibration = self.recalibrate.then(|| RecalibrationSettings {
            shift: self.shift,
            iterations: self.iterations,
            burn_in: self.iterations / 4,
            seed: self.seed,
            ..RecalibrationSettings::default()
        });
        if self.recalibrate {
            if !(self.shift > 0.0 && self.shift <= 10.0) {
                problems.push(OptionProblem::new("shift", format!(
                    "the shift is a prior SD of the recalibrated means in reference SDs, above 0 and at most 10 (found {})",
                    self.shift
                )));
            }
            if self.iterations < 100 {
                problems.push(OptionProblem::new(
                    "iterations",
                    format!(
                        "at least 100 iterations are needed (found {})",
                        self.iterations
                    ),
                ));
            }
        }
        let read = self.read.settings_into(&model.catalogue, &mut problems)?;
        match prior {
            Some(prior) if problems.is_empty() => Ok(ValidatedOptions {
                model,
                model_file,
                prior,
                set,
                thresholds,
                read,
                recalibration,
                life_table_classes,
                age_classes,
                hazard_ages,
                correlation_check,
                options: self.clone(),
            }),
            _ => Err(Error::Options(OptionProblems(problems))),
        }
    }
}
