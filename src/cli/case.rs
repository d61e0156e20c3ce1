//! `tessera case FILE --id ID --out DIR`: one individual's report for a case file (Markdown,
//! printable HTML, JSON), built on the evidence ledger.

use super::input::InputArgs;
use crate::assemblage::Thresholds;
use crate::case::{case_report, CaseDetails};
use crate::output::write_folder;
use crate::pipeline::{load_model, with_minimum_age};
use crate::report::case::{case_files, ratio_words, QuotedRates};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera case`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The input table.
    pub file: PathBuf,
    /// The individual (its `id`).
    #[arg(long, value_name = "ID")]
    pub id: String,
    /// Folder for the report (case.md, case.html, case.json; created if absent).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Model file (default: the embedded default model, illustrative only).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Also give P(female) under this prior (repeatable): a shipped name, fixed:VALUE or a
    /// prior file; its mean is the prior probability of female. Without it the report gives
    /// the likelihood ratio alone.
    #[arg(long, value_name = "PRIOR")]
    pub prior: Vec<String>,
    /// Cut-offs on P(female) for the categories under the priors asked for.
    #[arg(long, value_name = "M,PM,PF,F", default_value = "0.05,0.2,0.8,0.95")]
    pub thresholds: String,
    /// The model's error rates: the scores.csv of a `tessera validate` run, quoted with its
    /// SHA-256.
    #[arg(long, value_name = "FILE")]
    pub rates: Option<PathBuf>,
    /// Case or accession number, printed on the report.
    #[arg(long, value_name = "TEXT")]
    pub case_number: Option<String>,
    /// The analyst's name.
    #[arg(long, value_name = "NAME")]
    pub analyst: Option<String>,
    /// The reviewer's name.
    #[arg(long, value_name = "NAME")]
    pub reviewer: Option<String>,
    /// Minimum age (years) from which skeletal evidence is used (default: the model's).
    #[arg(long, value_name = "YEARS")]
    pub minimum_age: Option<f64>,
    /// Seed of the randomised integration (same seed, same bytes; as for `evidence`).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
}

/// Run the command; returns the exit code.
///
/// # Errors
/// Model, settings and file errors; [`Error::Input`] with every problem of the table.
pub fn run(args: Args) -> Result<i32, Error> {
    let thresholds = Thresholds::parse(&args.thresholds)
        .map_err(|m| super::settings_error("--thresholds", m))?;
    let priors = args
        .prior
        .iter()
        .map(|p| crate::prior::library::parse_prior(p))
        .collect::<Result<Vec<_>, _>>()
        .map_err(|e| super::settings_error("--prior", e.to_string()))?;
    let rates = match &args.rates {
        Some(p) => {
            let bytes = std::fs::read(p).map_err(|source| Error::Io {
                path: p.clone(),
                source,
            })?;
            Some(
                QuotedRates::from_scores_csv(&p.display().to_string(), &bytes)
                    .map_err(|m| super::settings_error("--rates", m))?,
            )
        }
        None => None,
    };
    let model = with_minimum_age(load_model(args.model.as_deref())?, args.minimum_age)?;
    let settings = args.input.settings(&model.catalogue)?;
    let a = crate::pipeline::read_path(&args.file, &model.catalogue, &settings)?;
    let details = CaseDetails {
        case_number: args.case_number.clone(),
        analyst: args.analyst.clone(),
        reviewer: args.reviewer.clone(),
    };
    let c = case_report(
        &model,
        &a,
        &args.id,
        &priors,
        &thresholds,
        details,
        args.seed,
    )
    .map_err(|e| super::settings_error("--id", e.to_string()))?;
    let command = super::command_line().join(" ");
    let files = case_files(&c, rates.as_ref(), &command).map_err(|e| Error::Io {
        path: args.out.clone(),
        source: std::io::Error::other(e.to_string()),
    })?;
    let mut protected: Vec<&Path> = vec![args.file.as_path()];
    protected.extend(args.input.settings_files());
    if let Some(m) = &args.model {
        protected.push(m.as_path());
    }
    if let Some(r) = &args.rates {
        protected.push(r.as_path());
    }
    write_folder(&args.out, &files, "case", &protected)?;
    println!("Individual {} (row {} of {})", c.id, c.row, c.file);
    for r in &c.regions {
        if r.status == "used" {
            println!(
                "  {:<12} log10 LR {:>7.2}  {:<24} {}",
                r.block,
                r.log10_lr,
                ratio_words(r.log10_lr),
                r.support
            );
        } else {
            println!("  {:<12} {}", r.block, r.status.replace('_', " "));
        }
    }
    if c.estimable {
        println!(
            "  {:<12} log10 LR {:>7.2}  {:<24} {}",
            "all",
            c.log10_lr,
            ratio_words(c.log10_lr),
            c.support
        );
    } else {
        println!("  no usable evidence: no estimate");
    }
    for u in &c.under_priors {
        println!(
            "  under {} (prior probability of female {:.3}): P(female) {}, {}",
            u.prior,
            u.prior_female,
            crate::report::number::probability(u.p_female),
            u.category
        );
    }
    for w in &c.warnings {
        println!("Note: {w}");
    }
    println!("An estimate, not an identification; biological sex is not gender. Local rules and the lab's procedures come first.");
    println!(
        "Wrote case.md, case.html and case.json to {}/",
        args.out.display()
    );
    Ok(0)
}
