//! One analysis, from options to files, as library calls: the command line and the web page
//! are two thin doors onto it.
//!
//! 1. [`AnalysisOptions`] (plain data with the command line's defaults) →
//!    [`AnalysisOptions::validate`], which reports every option problem at once before any
//!    work → [`ValidatedOptions`].
//! 2. [`ValidatedOptions::read_path`] or [`ValidatedOptions::read_bytes`] (an upload) → an
//!    [`Assemblage`], or [`Error::Input`] with every problem of the table inside.
//! 3. [`ValidatedOptions::analyse`] → one [`AnalysisResult`]. Whatever depends on the table
//!    (the by-sex columns, the number of draws, the group names) is checked before the
//!    evidence is weighed.
//! 4. [`render`] → an [`OutputSet`](crate::output::OutputSet) (or [`render_each`], each file
//!    to a sink as soon as it is made), which
//!    [`crate::output::write_folder`] puts on disk in one transaction, or the web page serves.

pub mod options;
pub mod render;

pub use options::{
    AnalysisOptions, ModelChoice, ReadOptions, ValidatedOptions, DEFAULT_DRAWS,
    MAX_INDIVIDUAL_DRAWS,
};
pub use render::{render, render_each};

use crate::assemblage::analyse as posteriors;
use crate::assemblage::draws::Draws;
use crate::assemblage::recalibration::recalibrate;
use crate::assemblage::PriorSetResults;
use crate::catalogue::Catalogue;
use crate::data::{read_assemblage, read_assemblage_bytes, Assemblage, InputError, ReadSettings};
use crate::error::{OptionProblem, OptionProblems};
use crate::likelihood::evaluate_with_progress;
use crate::model::{Context, IndividualEvidence, Model};
use crate::prior::PriorShape;
use crate::progress::Progress;
use crate::results::{AnalysisResult, BySex, LeftOut, RunInfo};
use crate::summary::by_sex::{age_interval, OutcomeColumn, OutcomeValues};
use crate::summary::{
    age_and_life_tables, numeric_by_sex, outcome_column, prevalence_by_sex, ChainLength,
    PrevalenceBySex, SexEvidence, SexRatioPrior,
};
use crate::Error;
use std::path::Path;

/// The group of rows that have none, when other rows have one.
pub const NO_GROUP: &str = "(none)";

/// The model named by a path, or the embedded default.
///
/// # Errors
/// [`Error::Model`] listing every problem of the file.
pub fn load_model(path: Option<&Path>) -> Result<Model, Error> {
    Ok(match path {
        Some(p) => Model::from_path(p)?,
        None => Model::default_model()?,
    })
}

/// The model with a minimum age (years) from which skeletal evidence is used, if one is given.
///
/// # Errors
/// [`Error::Options`] when the age is not a number of years from 0 to 100.
pub fn with_minimum_age(model: Model, years: Option<f64>) -> Result<Model, Error> {
    match years {
        None => Ok(model),
        Some(y) => model
            .with_minimum_age(y)
            .map_err(|message| Error::Options(OptionProblems::one("minimum-age", message))),
    }
}

/// Read a table from a path.
///
/// # Errors
/// [`Error::Input`] with every problem of the table.
pub fn read_path(
    path: &Path,
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, Error> {
    Ok(read_assemblage(path, catalogue, settings)?)
}

/// Read a table from bytes (an upload); `name` is the file name as given, whose extension
/// says whether it is a workbook.
///
/// # Errors
/// [`Error::Input`] with every problem of the table.
pub fn read_bytes(
    name: &str,
    bytes: &[u8],
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, Error> {
    Ok(read_assemblage_bytes(name, bytes, catalogue, settings)?)
}

/// Everything about an input a reader must know before trusting results from it: the
/// reader's warnings, recorded evidence the model leaves out, and how many scored individuals
/// are below the minimum age (their morphology is not used).
pub fn input_notes(model: &Model, a: &Assemblage) -> Vec<String> {
    let mut notes = crate::data::problem::shown_warnings(
        &a.warnings,
        crate::data::problem::WARNINGS_SHOWN_PER_KIND,
    );
    notes.extend(model.unused_evidence(a));
    let n = model.scored_below_minimum_age(a);
    if n > 0 {
        notes.push(format!(
            "{n} individual{} with skeletal scores or measurements recorded {} below the minimum age ({} years): their skeletal evidence is not used, only DNA (morphology is used unless the age is certainly below the minimum; a range reaching it is used; --minimum-age changes the age)",
            if n == 1 { "" } else { "s" },
            if n == 1 { "is" } else { "are" },
            model.minimum_age
        ));
    }
    notes
}

/// Every row's group label, when some row has a group: rows without one go to [`NO_GROUP`].
///
/// # Errors
/// [`Error::Settings`] when a group is itself named [`NO_GROUP`] (the two would merge).
pub fn group_labels(a: &Assemblage) -> Result<Option<Vec<String>>, Error> {
    if a.individuals
        .iter()
        .any(|i| i.group.as_deref() == Some(NO_GROUP))
    {
        return Err(Error::Settings {
            file: a.file.clone(),
            message: format!("a group is named `{NO_GROUP}`, the label given to rows without a group: rename that group so the two stay apart"),
        });
    }
    Ok(a.individuals.iter().any(|i| i.group.is_some()).then(|| {
        a.individuals
            .iter()
            .map(|i| i.group.clone().unwrap_or_else(|| NO_GROUP.into()))
            .collect()
    }))
}

/// What the options give once checked against a table.
struct TableChecked {
    /// The condition columns to compare between the sexes.
    columns: Vec<OutcomeColumn>,
    /// Every row's group, when some row has one.
    groups: Option<Vec<String>>,
    /// Joint draws to make.
    n_draws: usize,
}

/// The joint draws made for the count intervals when none are asked for:
/// [`DEFAULT_DRAWS`], or fewer for a table so large that those would pass
/// [`MAX_INDIVIDUAL_DRAWS`] (200 for a million individuals), never fewer than one.
pub fn internal_draws(n_individuals: usize) -> usize {
    DEFAULT_DRAWS
        .min(MAX_INDIVIDUAL_DRAWS / n_individuals.max(1))
        .max(1)
}

impl ValidatedOptions {
    /// Read a table from a path with these options.
    ///
    /// # Errors
    /// [`Error::Input`] with every problem of the table.
    pub fn read_path(&self, path: &Path) -> Result<Assemblage, Error> {
        read_path(path, &self.model.catalogue, &self.read)
    }

    /// Read a table from bytes (an upload) with these options.
    ///
    /// # Errors
    /// [`Error::Input`] with every problem of the table.
    pub fn read_bytes(&self, name: &str, bytes: &[u8]) -> Result<Assemblage, Error> {
        read_bytes(name, bytes, &self.model.catalogue, &self.read)
    }

    /// What [`input_notes`] says about this table under these options' model.
    pub fn input_notes(&self, a: &Assemblage) -> Vec<String> {
        input_notes(&self.model, a)
    }

    /// The options that depend on the table, checked before any work: the by-sex columns
    /// (every missing one named, every unreadable cell listed), the number of draws and the
    /// group names.
    fn check_against(&self, a: &Assemblage) -> Result<TableChecked, Error> {
        let o = &self.options;
        let mut problems = Vec::new();
        // Draws asked for must fit the bound; the draws made only for the count intervals
        // adapt to the size of the table instead of refusing it.
        let n_draws = o
            .draws
            .unwrap_or_else(|| internal_draws(a.individuals.len()));
        if n_draws.saturating_mul(a.individuals.len()) > MAX_INDIVIDUAL_DRAWS {
            problems.push(OptionProblem::new(
                "draws",
                format!(
                    "{n_draws} draws of {} individuals: give from 1 up to 200 million individual-draws in all",
                    a.individuals.len()
                ),
            ));
        }
        let mut columns = Vec::new();
        let mut cells: Option<InputError> = None;
        for col in &o.by_sex {
            match outcome_column(a, col) {
                Ok(Some(v)) => columns.push(v),
                Ok(None) => problems.push(OptionProblem::new("by-sex", format!(
                    "`{col}` is not a column of the input that the model leaves unused (trait columns are evidence and cannot be outcomes); columns available: {}",
                    a.carried_columns.join(", ")
                ))),
                Err(e) => match &mut cells {
                    None => cells = Some(e),
                    Some(all) => all.problems.extend(e.problems),
                },
            }
        }
        if !problems.is_empty() {
            return Err(Error::Options(OptionProblems(problems)));
        }
        if let Some(mut e) = cells {
            e.problems.sort_by_key(|p| p.row);
            return Err(Error::Input(e));
        }
        Ok(TableChecked {
            columns,
            groups: group_labels(a)?,
            n_draws,
        })
    }

    /// The analyses by sex: age at death over the joint draws and the prevalence of each
    /// condition from the joint posterior of sex and prevalence, both on the individuals with
    /// evidence of sex who are not subadults (the others are counted beside).
    fn by_sex(
        &self,
        a: &Assemblage,
        evidence: &[IndividualEvidence],
        results: &PriorSetResults,
        columns: &[OutcomeColumn],
        ages: Vec<Option<(f64, f64)>>,
        draws: &Draws,
    ) -> BySex {
        let model = &self.model;
        let estimable: Vec<bool> = evidence.iter().map(|e| e.estimable).collect();
        let subadult: Vec<bool> = a.individuals.iter().map(|i| model.is_subadult(i)).collect();
        let in_tables: Vec<bool> = estimable
            .iter()
            .zip(&subadult)
            .map(|(&e, &s)| e && !s)
            .collect();
        let left_out = LeftOut {
            no_evidence: estimable.iter().filter(|&&e| !e).count(),
            subadult: estimable
                .iter()
                .zip(&subadult)
                .filter(|(&e, &s)| e && s)
                .count(),
        };
        let hier = results.fitted.hierarchy.as_ref();
        let membership =
            hier.map_or_else(|| vec![0; a.individuals.len()], |h| h.membership.clone());
        let prior = match (hier, &self.prior.shape) {
            (Some(h), _) => SexRatioPrior::Groups(&h.hyper, h.groups.len()),
            (None, PriorShape::Beta { a, b }) => SexRatioPrior::Beta(*a, *b),
            (None, PriorShape::Fixed { pi }) => SexRatioPrior::Fixed(*pi),
        };
        let ev = SexEvidence {
            ln_lrs: &results.fitted.ln_lrs,
            estimable: &estimable,
            membership: &membership,
            in_tables: &in_tables,
            prior,
        };
        let seed = self.options.seed;
        // Each column's chains seeded by its place among the by-sex columns.
        let len = |k: usize| ChainLength::default_with_seed(seed.wrapping_add(k as u64));
        let prevalence: Vec<PrevalenceBySex> = columns
            .iter()
            .enumerate()
            .filter_map(|(k, (c, v))| match v {
                OutcomeValues::Condition(v) => Some(prevalence_by_sex(&ev, c, v, &len(k))),
                OutcomeValues::Numeric(_) => None,
            })
            .collect();
        let numeric: Vec<crate::summary::NumericBySex> = columns
            .iter()
            .enumerate()
            .filter_map(|(k, (c, v))| match v {
                OutcomeValues::Numeric(v) => Some(numeric_by_sex(&ev, c, v, &len(k))),
                OutcomeValues::Condition(_) => None,
            })
            .collect();
        let notes = prevalence
            .iter()
            .filter_map(PrevalenceBySex::convergence_note)
            .chain(
                numeric
                    .iter()
                    .filter_map(crate::summary::NumericBySex::convergence_note),
            )
            .collect();
        // Open classes stay open here: the tables by sex impute them from the known older ages
        // of the same sex (summary::by_sex::draw_ages).
        let table_ages: Vec<Option<(f64, f64)>> = a
            .individuals
            .iter()
            .zip(&in_tables)
            .map(|(i, &t)| {
                t.then(|| crate::summary::by_sex::open_interval(i.age, model.minimum_age))
                    .flatten()
            })
            .collect();
        let with_ages = table_ages.iter().any(Option::is_some);
        let groups: Vec<Option<&str>> = a.individuals.iter().map(|i| i.group.as_deref()).collect();
        let sex_ratio = crate::summary::sex_ratio_tests(
            &results.fitted.ln_lrs,
            &results.fitted.posterior,
            &estimable,
            &groups,
            &self.prior,
            self.options.reference_ratio,
        );
        // Age by sex and the life tables from the same draws of ages.
        let (age, life_tables) = if with_ages {
            let (a, l) = age_and_life_tables(
                &table_ages,
                &draws.female,
                &self.age_classes,
                &self.life_table_classes,
                seed,
            );
            (Some(a), Some(l))
        } else {
            (None, None)
        };
        BySex {
            age,
            hazards: with_ages.then(|| {
                let recorded: Vec<Option<crate::summary::hazard::RecordedAge>> = a
                    .individuals
                    .iter()
                    .zip(&in_tables)
                    .map(|(i, &t)| {
                        t.then(|| crate::summary::by_sex::recorded_age(i.age, model.minimum_age))
                            .flatten()
                    })
                    .collect();
                crate::summary::hazards_by_sex(
                    &recorded,
                    &draws.female,
                    model.minimum_age,
                    self.hazard_ages,
                    crate::summary::hazard::MAKEHAM_DRAWS,
                    seed,
                )
            }),
            life_tables,
            sex_ratio,
            prevalence,
            numeric,
            ages,
            age_classes: self.age_classes.clone(),
            left_out,
            notes,
        }
    }

    /// Analyse a table: every individual's evidence, the posteriors under the prior and the
    /// sensitivity set, the joint draws, the analyses by sex and (when asked for) the
    /// recalibration. `command` is the front door's record of how the run was asked for
    /// (written into `run.json` and the report's "reproduce with" line).
    ///
    /// # Errors
    /// [`Error::Options`] or [`Error::Input`] when options do not fit the table (before any
    /// work); [`Error::Settings`] for a group named [`NO_GROUP`]; [`Error::Numerical`] when a
    /// posterior is not a number.
    pub fn analyse(
        &self,
        a: Assemblage,
        command: Vec<String>,
        progress: &dyn Progress,
    ) -> Result<AnalysisResult, Error> {
        let TableChecked {
            columns,
            groups,
            n_draws,
        } = self.check_against(&a)?;
        let (model, o) = (&self.model, &self.options);
        let input_notes = input_notes(model, &a);
        progress.stage("weighing the evidence", a.individuals.len() as u64);
        let evidence = evaluate_with_progress(model, &a, &Context::new(o.seed), progress);
        progress.finish();
        let results = posteriors(
            &evidence,
            groups.as_deref(),
            &self.prior,
            &self.set,
            &self.thresholds,
        );
        let ids: Vec<String> = a.individuals.iter().map(|i| i.id.clone()).collect();
        results
            .check_finite(&ids)
            .map_err(|message| Error::Numerical { message })?;
        let draws = Draws::sample(
            &results.fitted.posterior,
            results.fitted.hierarchy.as_ref(),
            &results.fitted.ln_lrs,
            n_draws,
            o.seed,
        );
        let ages: Vec<Option<(f64, f64)>> = a
            .individuals
            .iter()
            .map(|i| age_interval(i.age, model.minimum_age))
            .collect();
        let by_sex = self.by_sex(&a, &evidence, &results, &columns, ages, &draws);
        let recalibration = self.recalibration.as_ref().map(|st| {
            progress.stage(
                "recalibrating measurements",
                (st.chains * st.iterations) as u64,
            );
            let r = recalibrate(model, &a.individuals, &evidence, &self.prior, st, progress);
            progress.finish();
            r
        });
        let recalibration_notes = recalibration
            .as_ref()
            .map(recalibration_notes)
            .unwrap_or_default();
        let run = RunInfo {
            program: "tessera",
            version: crate::VERSION,
            command,
            input: a.file.clone(),
            input_sha256: a.sha256.clone(),
            model: model.name.clone(),
            model_file: self.model_file.clone(),
            model_sha256: model.sha256.clone(),
            model_includes: crate::results::model_includes(model),
            seed: o.seed,
            side_policy: self.read.side_policy.as_str().into(),
        };
        let flagged = crate::likelihood::flagged(model, &a, &evidence);
        let correlation_check = (!self.correlation_check.is_empty()).then(|| {
            crate::likelihood::correlation_check::correlation_check(
                model,
                &a.individuals,
                &evidence,
                &results.main.p_female,
                &self.correlation_check,
                &Context::new(o.seed),
            )
        });
        Ok(AnalysisResult {
            run,
            model: model.clone(),
            assemblage: a,
            evidence,
            results,
            draws,
            write_draws: o.draws.is_some(),
            by_sex,
            recalibration,
            input_notes,
            recalibration_notes,
            flagged,
            correlation_check,
        })
    }
}

/// What a reader must know about a recalibration: no block to recalibrate, chains that did not
/// converge, measurements the reference does not fit.
fn recalibration_notes(r: &crate::assemblage::recalibration::Recalibration) -> Vec<String> {
    let mut notes = Vec::new();
    if r.means.is_empty() {
        notes.push(
            "the model has no block made only of measurements: nothing to recalibrate".into(),
        );
    }
    for w in &r.warnings {
        notes.push(format!("recalibration did not converge for {w}"));
    }
    for c in r.checks.iter().filter(|c| c.flagged) {
        notes.push(format!(
            "{:.1}% of the {} `{}` measurements lie outside the reference model's 99% range: the reference does not fit this assemblage",
            100.0 * c.share_outside,
            c.n,
            c.trait_id
        ));
    }
    notes
}

impl AnalysisResult {
    /// How many individuals change category when the measurements are recalibrated (0
    /// without a recalibration).
    pub fn recalibration_changes(&self) -> usize {
        let Some(r) = &self.recalibration else {
            return 0;
        };
        let t = &self.results.thresholds;
        self.results
            .main
            .p_female
            .iter()
            .zip(&r.p_female)
            .filter(|(p, q)| match (p, q) {
                (Some(p), Some(q)) => t.categorise(*p) != t.categorise(*q),
                _ => false,
            })
            .count()
    }
}

#[cfg(test)]
mod tests;
