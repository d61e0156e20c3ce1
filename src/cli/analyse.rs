//! `tessera analyse INPUT --out DIR`: posteriors for every individual and for the
//! assemblage's proportion of females, with the prior sensitivity analysis.

use super::input::InputArgs;
use crate::assemblage::draws::Draws;
use crate::assemblage::recalibration::{recalibrate, RecalibrationSettings};
use crate::assemblage::{analyse, Thresholds};
use crate::likelihood::evaluate_with_progress;
use crate::model::Context;
use crate::output::write_folder;
use crate::prior::{parse_prior_set, PriorError};
use crate::report::analysis::recalibration_files;
use crate::report::analysis::{render_files, terminal_summary};
use crate::report::publication::{
    by_sex_tables, figures_svg, methods_md, report_md_and_tex, BySex,
};
use crate::report::RunInfo;
use crate::summary::by_sex::age_interval;
use crate::summary::{age_by_sex, condition_column, prevalence_by_sex};
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera analyse`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The input table.
    pub file: PathBuf,
    /// Folder for the results (created if absent).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Model file (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// The prior on the proportion female: a shipped name (flat, birth-ratio, even-fixed,
    /// mostly-female, mostly-male, military), fixed:VALUE, or a prior file.
    #[arg(long, value_name = "PRIOR", default_value = "flat")]
    pub prior: String,
    /// Priors for the sensitivity analysis, comma-separated: names, fixed:VALUE, files,
    /// `shipped` (all shipped priors), `sweep` (fixed 0.1 … 0.9).
    #[arg(long, value_name = "SET", default_value = "shipped,sweep")]
    pub priors: String,
    /// Cut-offs on P(female): male, probable male, probable female, female.
    #[arg(long, value_name = "M,PM,PF,F", default_value = "0.05,0.2,0.8,0.95")]
    pub thresholds: String,
    /// Write N joint posterior draws (draws.csv, assemblage_draws.csv). Without it, 1000
    /// draws are still made for the intervals of the numbers of females and males.
    #[arg(long, value_name = "N")]
    pub draws: Option<usize>,
    /// A 0/1 condition column (e.g. a lesion) to compare between the sexes; repeatable. Such
    /// columns are never evidence of sex.
    #[arg(long = "by-sex", value_name = "COLUMN")]
    pub by_sex: Vec<String>,
    /// Let the assemblage correct the reference means of the measurements (Gibbs sampling;
    /// writes recalibration.csv, recalibration_check.csv and recalibrated_individuals.csv).
    #[arg(long)]
    pub recalibrate: bool,
    /// Prior SD of a recalibrated mean's shift, in reference within-sex SDs.
    #[arg(long, value_name = "SD", default_value_t = 1.0)]
    pub shift: f64,
    /// Iterations per chain of the recalibration (a quarter is discarded as burn-in).
    #[arg(long, value_name = "N", default_value_t = 2000)]
    pub iterations: usize,
    /// Minimum age (years) from which skeletal (morphological) evidence is used; younger
    /// individuals are assessed from DNA only (default: the model's, usually 18).
    #[arg(long, value_name = "YEARS")]
    pub minimum_age: Option<f64>,
    /// Seed of every random stream (same seed, same bytes).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
}

/// The group of rows that have none, when other rows have one.
pub const NO_GROUP: &str = "(none)";

fn prior_error(e: PriorError) -> Error {
    Error::Settings {
        file: e.file,
        message: e.message,
    }
}

/// Run the command; returns the exit code.
///
/// # Errors
/// Model, prior, settings and file errors; input problems are printed (exit code 3).
pub fn run(args: Args) -> Result<i32, Error> {
    let model = super::evidence::with_minimum_age(
        super::evidence::load_model(args.model.as_deref())?,
        args.minimum_age,
    )?;
    let prior = parse_prior_set(&args.prior).map_err(prior_error)?;
    if prior.len() != 1 {
        return Err(Error::Settings {
            file: "--prior".into(),
            message: "name exactly one prior (use --priors for the sensitivity set)".into(),
        });
    }
    let prior = &prior[0];
    let set = parse_prior_set(&args.priors).map_err(prior_error)?;
    let thresholds = Thresholds::parse(&args.thresholds).map_err(|message| Error::Settings {
        file: "--thresholds".into(),
        message,
    })?;
    // Options are checked before any work: a typo must not cost the whole run.
    if args.recalibrate && (!(args.shift > 0.0 && args.shift <= 10.0) || args.iterations < 100) {
        return Err(Error::Settings {
            file: "--shift/--iterations".into(),
            message: format!(
                "the shift is a prior SD of the recalibrated means in reference SDs, above 0 and at most 10 (found {}), and at least 100 iterations are needed (found {})",
                args.shift, args.iterations
            ),
        });
    }
    let settings = args.input.settings(&model.catalogue)?;
    let Some(a) = super::input::read_or_report(&args.file, &model.catalogue, &settings) else {
        return Ok(3);
    };
    super::evidence::warn_about_input(&model, &a);
    let n_draws = args.draws.unwrap_or(1000);
    if n_draws == 0 || n_draws.saturating_mul(a.individuals.len()) > 200_000_000 {
        return Err(Error::Settings {
            file: "--draws".into(),
            message: format!(
                "{n_draws} draws of {} individuals: give from 1 up to 200 million individual-draws in all",
                a.individuals.len()
            ),
        });
    }
    let bar = super::progress_bar(a.individuals.len(), "weighing the evidence");
    let evidence = evaluate_with_progress(&model, &a, &Context::new(args.seed), Some(&bar));
    bar.finish_and_clear();
    if a.individuals
        .iter()
        .any(|i| i.group.as_deref() == Some(NO_GROUP))
    {
        return Err(Error::Settings {
            file: args.file.display().to_string(),
            message: format!("a group is named `{NO_GROUP}`, the label given to rows without a group: rename that group so the two stay apart"),
        });
    }
    let groups: Option<Vec<String>> = a.individuals.iter().any(|i| i.group.is_some()).then(|| {
        a.individuals
            .iter()
            .map(|i| i.group.clone().unwrap_or_else(|| NO_GROUP.into()))
            .collect()
    });
    let analysis = analyse(&evidence, groups.as_deref(), prior, &set, &thresholds);
    let ids: Vec<String> = a.individuals.iter().map(|i| i.id.clone()).collect();
    analysis
        .check_finite(&ids)
        .map_err(|message| Error::Numerical { message })?;
    let draws = Draws::sample(
        &analysis.fitted.posterior,
        analysis.fitted.hierarchy.as_ref(),
        &analysis.fitted.ln_lrs,
        n_draws,
        args.seed,
    );
    // Condition columns for the analyses by sex: carried columns holding 0/1.
    let mut present_cols: Vec<(String, Vec<Option<bool>>)> = Vec::new();
    for col in &args.by_sex {
        match condition_column(&a, col) {
            Ok(Some(v)) => present_cols.push(v),
            Ok(None) => {
                return Err(Error::Settings {
                    file: "--by-sex".into(),
                    message: format!(
                        "`{col}` is not a column of the input that the model leaves unused (trait columns are evidence and cannot be outcomes); columns available: {}",
                        a.carried_columns.join(", ")
                    ),
                })
            }
            Err(e) => {
                eprint!("{}", super::check::render_problems(&e));
                return Ok(3);
            }
        }
    }
    let ages: Vec<Option<(f64, f64)>> = a
        .individuals
        .iter()
        .map(|i| age_interval(i.age, model.minimum_age))
        .collect();
    let by_sex = BySex {
        age: ages
            .iter()
            .any(Option::is_some)
            .then(|| age_by_sex(&ages, &draws.female, args.seed)),
        prevalence: present_cols
            .iter()
            .map(|(c, v)| prevalence_by_sex(c, v, &draws.female))
            .collect(),
        ages,
    };
    let run = RunInfo {
        program: "tessera",
        version: crate::VERSION,
        command: crate::cli::command_line(),
        input: a.file.clone(),
        input_sha256: a.sha256.clone(),
        model: model.name.clone(),
        model_file: args
            .model
            .as_ref()
            .map(|p| p.display().to_string())
            .unwrap_or_else(|| "embedded default".into()),
        model_sha256: model.sha256.clone(),
        seed: args.seed,
        side_policy: settings.side_policy.as_str().into(),
    };
    let files = render_files(
        &model,
        &a,
        &evidence,
        &analysis,
        &draws,
        args.draws.is_some(),
        &run,
    )
    .map_err(|e| Error::Io {
        path: args.out.clone(),
        source: std::io::Error::other(e.to_string()),
    })?;
    let mut files = files;
    files.files.extend(by_sex_tables(&by_sex, &analysis));
    let figs = figures_svg(&model, &a, &evidence, &analysis, &by_sex).map_err(|e| Error::Io {
        path: args.out.join("figures"),
        source: std::io::Error::other(e.to_string()),
    })?;
    files
        .files
        .extend(figs.into_iter().map(|(n, svg)| (n, svg.into_bytes())));
    files.files.push((
        "methods.md".into(),
        methods_md(&model, &a, &evidence, &analysis, &draws, &by_sex, &run).into_bytes(),
    ));
    if args.recalibrate {
        let st = RecalibrationSettings {
            shift: args.shift,
            iterations: args.iterations,
            burn_in: args.iterations / 4,
            seed: args.seed,
            ..RecalibrationSettings::default()
        };
        // A progress bar on the terminal (drawn only when standard error is a terminal).
        let bar = super::progress_bar(st.chains * st.iterations, "recalibrating measurements");
        let r = recalibrate(&model, &a.individuals, &evidence, prior, &st, Some(&bar));
        bar.finish_and_clear();
        files.files.extend(recalibration_files(&a, &analysis, &r));
        if r.means.is_empty() {
            eprintln!(
                "note: the model has no block made only of measurements: nothing to recalibrate"
            );
        }
        for w in &r.warnings {
            eprintln!("warning: recalibration did not converge for {w}");
        }
        for c in r.checks.iter().filter(|c| c.flagged) {
            eprintln!(
                "warning: {:.1}% of the {} `{}` measurements lie outside the reference model's 99% range: the reference does not fit this assemblage",
                100.0 * c.share_outside,
                c.n,
                c.trait_id
            );
        }
        let changed = (0..a.individuals.len())
            .filter(|&i| match (analysis.main.p_female[i], r.p_female[i]) {
                (Some(p), Some(q)) => thresholds.categorise(p) != thresholds.categorise(q),
                _ => false,
            })
            .count();
        println!("Recalibrated {} means ({} individuals change category; see recalibration.csv and recalibrated_individuals.csv)", r.means.len(), changed);
    }
    let mut names: Vec<String> = files.files.iter().map(|(n, _)| n.clone()).collect();
    names.push("report.md".into());
    names.push("tables.tex".into());
    let (report, tables) = report_md_and_tex(
        &model,
        &a,
        &evidence,
        &analysis,
        &by_sex,
        &run,
        &prior.provenance,
        &names,
    );
    files.files.push(("report.md".into(), report.into_bytes()));
    files.files.push(("tables.tex".into(), tables.into_bytes()));
    let mut protected: Vec<&Path> = vec![args.file.as_path()];
    if let Some(m) = &args.model {
        protected.push(m.as_path());
    }
    // One transaction: the folder ends holding exactly this run's files, or as it was.
    let all: Vec<(String, &[u8])> = files
        .files
        .iter()
        .map(|(name, bytes)| (name.clone(), bytes.as_slice()))
        .collect();
    write_folder(&args.out, &all, "analyse", &protected)?;
    print!("{}", terminal_summary(&model, &a, &analysis, &draws));
    for f in crate::likelihood::flagged(&model, &a, &evidence) {
        println!("Flagged for a person to look at: {f}");
    }
    println!(
        "Written to {}: {}",
        args.out.display(),
        files
            .files
            .iter()
            .map(|(n, _)| n.as_str())
            .collect::<Vec<_>>()
            .join(", ")
    );
    Ok(0)
}
