//! `tessera elements TABLE.csv`: commingled remains, one row per skeletal element — sex by
//! element, the minimum number of individuals by sex, and the proportion female.

use super::input::InputArgs;
use super::settings_error;
use crate::assemblage::Thresholds;
use crate::commingled::{analyse_elements, read_elements, ElementError, ElementOptions};
use crate::output::write_folder;
use crate::report::commingled::{element_files, element_summary};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera elements`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The element table: one row per element, with `element` (type) and `side` columns,
    /// optionally `context`, `individual` and `association`, and the trait columns.
    pub table: PathBuf,
    /// Folder for elements.csv, element_counts.csv, mni_by_sex.csv and report.md.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Model to evaluate the elements with (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Prior on the proportion female: a shipped name, fixed:VALUE or a prior file.
    #[arg(long, value_name = "PRIOR", default_value = "flat")]
    pub prior: String,
    /// Joint posterior draws for the counts by sex.
    #[arg(long, value_name = "N", default_value_t = 1000)]
    pub draws: usize,
    /// Seed of the draws (same seed, same files).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
}

/// Run the command.
///
/// # Errors
/// Settings, model and file errors; [`Error::Input`] with every problem of the table.
pub fn run(args: Args) -> Result<i32, Error> {
    let model = crate::pipeline::load_model(args.model.as_deref())?;
    let settings = args.input.settings(&model.catalogue)?;
    let prior = crate::prior::library::parse_prior(&args.prior)
        .map_err(|e| settings_error("--prior", format!("{}: {}", e.file, e.message)))?;
    let table = read_elements(&args.table, &model.catalogue, &settings)?;
    let opts = ElementOptions {
        draws: args.draws,
        seed: args.seed,
        prior,
        thresholds: Thresholds::default(),
    };
    let result = analyse_elements(&table, &model, &opts).map_err(|e| match e {
        ElementError::Draws(_) => settings_error("--draws", e.to_string()),
        ElementError::NoEvidence => Error::Settings {
            file: args.table.display().to_string(),
            message: e.to_string(),
        },
    })?;
    print!("{}", element_summary(&table, &result));
    if let Some(out) = &args.out {
        let mut protected: Vec<&Path> = vec![args.table.as_path()];
        protected.extend(args.input.settings_files());
        if let Some(m) = &args.model {
            protected.push(m.as_path());
        }
        write_folder(
            out,
            &element_files(&table, &result)?,
            "elements",
            &protected,
        )?;
        println!(
            "Written to {}: elements.csv, element_counts.csv, mni_by_sex.csv, report.md",
            out.display()
        );
    }
    Ok(0)
}
