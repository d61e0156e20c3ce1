//! `tessera simulate`: an assemblage drawn from a model with known sex, in the input contract.

use crate::output::write_atomic;
use crate::sim::{parse_groups, simulate, GroupSpec, MissingSpec};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera simulate`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Model to draw from (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Number of individuals (one population; use --groups for several).
    #[arg(
        long,
        value_name = "N",
        required_unless_present = "groups",
        conflicts_with = "groups"
    )]
    pub n: Option<usize>,
    /// Proportion female of the one population.
    #[arg(
        long,
        value_name = "P",
        default_value_t = 0.5,
        conflicts_with = "groups"
    )]
    pub pi: f64,
    /// Groups as name:count:proportion_female, comma-separated (e.g. north:40:0.5,chapel:15:0.2).
    #[arg(long, value_name = "SPEC")]
    pub groups: Option<String>,
    /// Preservation as key=rate, comma-separated: cranium, pelvis, postcranial, dental (whole
    /// region lost), trait (single traits lost), range (grades recorded as ranges), subadult,
    /// dna (share with read counts); `none`: nothing lost. Default, as for `plan`: a typical
    /// fragmentary cemetery.
    #[arg(long, value_name = "SPEC")]
    pub missing: Option<String>,
    /// Seed (same seed, same file).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Write the sex as `known_sex` (documented sex) instead of `true_sex`: a simulated
    /// reference collection for `tessera fit` and `tessera validate`.
    #[arg(long)]
    pub as_reference: bool,
    /// Write a commingled deposit instead: the individuals broken into elements (cranium,
    /// mandible, os coxae, femur, humerus), some lost, the rest mixed, one row per element with
    /// `true_individual` and `true_sex` (for `tessera elements`).
    #[arg(long, conflicts_with_all = ["groups", "as_reference", "missing"])]
    pub as_elements: bool,
    /// Where to write the table (CSV).
    #[arg(long, value_name = "FILE")]
    pub out: PathBuf,
}

use super::settings_error;

/// Run the command.
///
/// # Errors
/// Settings, model and file errors.
pub fn run(args: Args) -> Result<i32, Error> {
    let model = crate::pipeline::load_model(args.model.as_deref())?;
    let groups = match (&args.groups, args.n) {
        (Some(spec), _) => parse_groups(spec).map_err(|m| settings_error("--groups", m))?,
        (None, Some(n)) => {
            if !(0.0..=1.0).contains(&args.pi) {
                return Err(settings_error(
                    "--pi",
                    format!("{}: a proportion from 0 to 1", args.pi),
                ));
            }
            vec![GroupSpec::single(n, args.pi)]
        }
        (None, None) => return Err(settings_error("--n", "give --n or --groups".into())),
    };
    let total: usize = groups.iter().map(|g| g.n).sum();
    if total == 0 || total > 5_000_000 {
        return Err(settings_error(
            "--n",
            format!("{total} individuals: give from 1 to 5 000 000"),
        ));
    }
    if args.as_elements {
        let sim = crate::sim::elements::simulate_elements(&model, total, args.pi, args.seed)
            .map_err(|e| settings_error("--model", e.to_string()))?;
        let protected: Vec<&Path> = args.model.iter().map(|m| m.as_path()).collect();
        write_atomic(&args.out, &sim.to_csv(&model)?, &protected)?;
        println!(
            "Simulated a commingled deposit of {} individuals ({} female) from model {}: {} elements survive, mixed, into {} (the truth is in `true_individual` and `true_sex`, never evidence)",
            total,
            sim.individuals.iter().filter(|s| **s == crate::data::Sex::Female).count(),
            model.name,
            sim.elements.len(),
            args.out.display()
        );
        println!(
            "Simulated data: invented individuals for testing and teaching, not observations."
        );
        return Ok(0);
    }
    let missing = MissingSpec::given_or_fragmentary(args.missing.as_deref())
        .map_err(|m| settings_error("--missing", m))?;
    let sim = simulate(&model, &groups, &missing, args.seed)
        .map_err(|e| settings_error("--model", e.to_string()))?;
    let mut protected: Vec<&Path> = Vec::new();
    if let Some(m) = &args.model {
        protected.push(m.as_path());
    }
    let column = if args.as_reference {
        "known_sex"
    } else {
        "true_sex"
    };
    write_atomic(
        &args.out,
        &sim.to_csv_with_sex_column(&model, column)?,
        &protected,
    )?;
    let females = sim
        .true_sex
        .iter()
        .filter(|s| **s == crate::data::Sex::Female)
        .count();
    println!(
        "Simulated {} individuals ({} female, {} male; the truth is in the `{}` column{}) from model {} into {}",
        total,
        females,
        total - females,
        column,
        if args.as_reference {
            ", as documented sex of a reference collection"
        } else {
            ", never used as evidence"
        },
        model.name,
        args.out.display()
    );
    println!("Simulated data: invented individuals for testing and teaching, not observations.");
    Ok(0)
}
