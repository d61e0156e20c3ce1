//! `tessera validate REFERENCE (--traits SPEC | --model MODEL)`: how often a model, refitted
//! without each individual's fold, gets documented sex right; a report a lab can file.

use super::fit::{documented, load_spec};
use super::input::InputArgs;
use super::problems::render_fit_problems;
use crate::assemblage::category::Thresholds;
use crate::fit::ReferenceInfo;
use crate::model::Model;
use crate::output::write_folder;
use crate::report::validation::{headline, validation_files};
use crate::validate::{
    validate_with_progress, Folds, Subject, ValidationError, ValidationSettings,
};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera validate`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The reference table: the input columns plus `known_sex` (documented sex).
    pub reference: PathBuf,
    /// Fitting specification: the model is refitted without each fold (cross-validation).
    #[arg(
        long,
        value_name = "SPEC",
        required_unless_present = "model",
        conflicts_with = "model"
    )]
    pub traits: Option<PathBuf>,
    /// A model file to check as it stands on this reference (not a cross-validation).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Number of folds (stratified by sex).
    #[arg(long, value_name = "K", default_value_t = 10)]
    pub folds: usize,
    /// Leave one individual out at a time instead of k folds.
    #[arg(long, conflicts_with = "folds")]
    pub leave_one_out: bool,
    /// Prior probability of female used to turn likelihood ratios into P(female).
    #[arg(long, value_name = "P", default_value_t = 0.5)]
    pub prior_female: f64,
    /// Cut-offs on P(female): male, probable male, probable female, female.
    #[arg(long, value_name = "M,PM,PF,F", default_value = "0.05,0.2,0.8,0.95")]
    pub thresholds: String,
    /// Seed of the folds and of the randomised integration (same seed, same bytes).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Classify every held-out individual as a fragmentary skeleton would be found: the same
    /// `key=rate,…` preservation as `simulate --missing` and `plan --missing` (e.g.
    /// `cranium=0.35,pelvis=0.5,trait=0.15`), drawn per individual from the seed. DNA read
    /// counts are kept with probability `dna` (default 0: give `dna=1` to keep them).
    #[arg(long, value_name = "SPEC")]
    pub mask: Option<String>,
    /// Folder for the report (predictions, scores, reliability, calibration.svg, report.md).
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
}

/// Run the command; returns the exit code.
///
/// # Errors
/// Settings, model and file errors; input and fitting problems are printed and give exit 3.
pub fn run(args: Args) -> Result<i32, Error> {
    let thresholds = Thresholds::parse(&args.thresholds)
        .map_err(|m| super::settings_error("--thresholds", m))?;
    let (spec, model, catalogue) = match (&args.traits, &args.model) {
        (Some(t), _) => {
            let (spec, catalogue) = load_spec(t)?;
            (Some(spec), None, catalogue)
        }
        (None, Some(m)) => {
            let model = Model::from_path(m)?;
            let catalogue = model.catalogue.clone();
            (None, Some(model), catalogue)
        }
        (None, None) => {
            return Err(super::settings_error(
                "command line",
                "give --traits SPEC (cross-validation) or --model FILE".into(),
            ))
        }
    };
    let settings = args.input.settings(&catalogue)?;
    let a = crate::pipeline::read_path(&args.reference, &catalogue, &settings)?;
    let (known, unknown) = documented(&a);
    let command = super::command_line().join(" ");
    let info = ReferenceInfo {
        file: a.file.clone(),
        sha256: a.sha256.clone(),
        command: command.clone(),
    };
    let vs = ValidationSettings {
        folds: if args.leave_one_out {
            Folds::LeaveOneOut
        } else {
            Folds::K(args.folds)
        },
        seed: args.seed,
        prior_female: args.prior_female,
        thresholds,
        missing: args
            .mask
            .as_deref()
            .map(crate::sim::MissingSpec::parse)
            .transpose()
            .map_err(|m| super::settings_error("--mask", m))?,
    };
    let (subject, name) = match (&spec, &model) {
        (Some(s), _) => (
            Subject::Refit(s, &catalogue),
            format!("the fitting specification `{}`", s.name),
        ),
        (None, Some(m)) => (Subject::Fixed(m), format!("the model `{}`", m.name)),
        (None, None) => unreachable_settings()?,
    };
    let bar = super::TerminalProgress::default();
    let result = validate_with_progress(subject, &known, &info, &vs, &bar);
    let v = match result {
        Ok(v) => v,
        Err(ValidationError::Fit {
            fold,
            folds,
            source,
        }) => {
            eprintln!("fold {fold} of {folds}: the training part cannot be fitted");
            eprint!("{}", render_fit_problems(&source));
            return Ok(3);
        }
        Err(e) => {
            return Err(Error::Settings {
                file: "validation settings".into(),
                message: e.to_string(),
            })
        }
    };
    println!("Validation of {name} on {}", a.file);
    print!("{}", headline(&v));
    println!("By block (each alone):");
    for (id, s) in &v.by_block {
        if s.n == 0 {
            println!("  {id:<14} n     0  (not recorded in this reference)");
            continue;
        }
        println!(
            "  {:<14} n {:>5}  correct {:>5.1}%  indeterminate {:>5.1}%",
            id,
            s.n,
            100.0 * s.accuracy,
            100.0 * s.share_indeterminate
        );
    }
    println!("By age at death:");
    for (class, s) in &v.by_age {
        println!(
            "  {:<16} n {:>5}  correct {:>5.1}% ({:.1}% to {:.1}%)",
            class,
            s.n,
            100.0 * s.accuracy,
            100.0 * s.accuracy_lo,
            100.0 * s.accuracy_hi
        );
    }
    if let Some(w) = unknown {
        println!("Note: {w}.");
    }
    println!("Estimates, not identifications; these error rates hold for populations like this reference.");
    if let Some(out) = &args.out {
        let files = validation_files(&v, &a.file, &a.sha256, &name, &command)?;
        let mut protected: Vec<&Path> = vec![args.reference.as_path()];
        protected.extend(args.input.settings_files());
        if let Some(t) = &args.traits {
            protected.push(t.as_path());
        }
        if let Some(m) = &args.model {
            protected.push(m.as_path());
        }
        write_folder(out, &files, "validate", &protected)?;
        println!(
            "Wrote the report to {}/ (report.md and {} more files).",
            out.display(),
            files.files.len() - 1
        );
    }
    Ok(0)
}

fn unreachable_settings<T>() -> Result<T, Error> {
    Err(super::settings_error(
        "traits",
        "give --traits SPEC (cross-validation) or --model FILE".into(),
    ))
}
