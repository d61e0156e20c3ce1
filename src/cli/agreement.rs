//! `tessera agreement A.csv B.csv`: how well two observers' scorings agree.

use super::input::InputArgs;
use crate::agreement::compare;
use crate::data::read_assemblage;
use crate::output::write_folder;
use crate::report::agreement::{agreement_files, agreement_summary, agreement_warnings};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera agreement`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The first observer's table.
    pub first: PathBuf,
    /// The second observer's table (same ids).
    pub second: PathBuf,
    /// Folder for agreement.csv and disagreements.csv.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Model whose trait catalogue the columns are matched against.
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Seed of the bootstrap intervals.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// How to read the tables.
    #[command(flatten)]
    pub input: InputArgs,
}

/// Run the command.
///
/// # Errors
/// Settings, model and file errors; input problems are printed (exit 3).
pub fn run(args: Args) -> Result<i32, Error> {
    let model = crate::pipeline::load_model(args.model.as_deref())?;
    let settings = args.input.settings(&model.catalogue)?;
    let mut tables = Vec::new();
    let mut bad = false;
    for f in [&args.first, &args.second] {
        match read_assemblage(f, &model.catalogue, &settings) {
            Ok(a) => tables.push(a),
            Err(e) => {
                eprint!("{}", super::problems::render_problems(&e));
                bad = true;
            }
        }
    }
    if bad {
        return Ok(3);
    }
    let r = compare(&tables[0], &tables[1], args.seed);
    if r.n_common == 0 {
        return Err(Error::Settings {
            file: format!("{} and {}", args.first.display(), args.second.display()),
            message: "the two tables share no id, so no individual was scored twice: agreement needs the same individuals, with the same ids, in both".into(),
        });
    }
    print!("{}", agreement_summary(&r));
    for w in agreement_warnings(&r) {
        eprintln!("warning: {w}");
    }
    if let Some(out) = &args.out {
        let mut protected: Vec<&Path> = vec![args.first.as_path(), args.second.as_path()];
        protected.extend(args.input.settings_files());
        write_folder(out, &agreement_files(&r)?, "agreement", &protected)?;
    }
    Ok(0)
}
