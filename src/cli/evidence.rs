//! `tessera evidence INPUT --out LEDGER.csv`: the evidence ledger, per individual and block,
//! without any prior.

use super::input::InputArgs;
use crate::data::Assemblage;
use crate::likelihood::{evaluate_with_progress, ledger_csv};
use crate::model::{BlockStatus, Context, IndividualEvidence, Model};
use crate::output::write_all_atomic;
use crate::pipeline::{load_model, with_minimum_age};
use crate::progress::Progress as _;
use crate::results::RunInfo;
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera evidence`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The input table.
    pub file: PathBuf,
    /// Where to write the ledger (CSV). A record of the run goes beside it as `<name>.run.json`.
    #[arg(long, value_name = "FILE")]
    pub out: PathBuf,
    /// Model file (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Minimum age (years) from which skeletal (morphological) evidence is used; younger
    /// individuals are assessed from DNA only (default: the model's, usually 18).
    #[arg(long, value_name = "YEARS")]
    pub minimum_age: Option<f64>,
    /// Seed of the randomised integration (same seed, same bytes).
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
    let model = with_minimum_age(load_model(args.model.as_deref())?, args.minimum_age)?;
    let settings = args.input.settings(&model.catalogue)?;
    let a = crate::pipeline::read_path(&args.file, &model.catalogue, &settings)?;
    for w in crate::pipeline::input_notes(&model, &a) {
        eprintln!("warning: {w}");
    }
    let ctx = Context::new(args.seed);
    let bar = super::TerminalProgress::default();
    bar.stage("weighing the evidence", a.individuals.len() as u64);
    let evidence = evaluate_with_progress(&model, &a, &ctx, &bar);
    bar.finish();
    let csv = ledger_csv(&model, &a, &evidence).map_err(|e| Error::Io {
        path: args.out.clone(),
        source: std::io::Error::other(e.to_string()),
    })?;
    let mut protected: Vec<&Path> = vec![args.file.as_path()];
    protected.extend(args.input.settings_files());
    if let Some(m) = &args.model {
        protected.push(m.as_path());
    }
    let record_path = run_record_path(&args.out);
    // The same record as an analysis's run.json, without its priors and cut-offs.
    let record = RunInfo {
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
        model_includes: crate::results::model_includes(&model),
        seed: args.seed,
        side_policy: settings.side_policy.as_str().into(),
    };
    let json = serde_json::to_vec_pretty(&record).map_err(|e| Error::Io {
        path: record_path.clone(),
        source: std::io::Error::other(e.to_string()),
    })?;
    write_all_atomic(
        &[
            (args.out.clone(), csv.as_slice()),
            (record_path.clone(), json.as_slice()),
        ],
        &protected,
    )?;
    print!(
        "{}",
        summary(&model, &a, &evidence, &args.out, &record_path)
    );
    Ok(0)
}

fn run_record_path(out: &Path) -> PathBuf {
    let stem = out
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "ledger".into());
    out.with_file_name(format!("{stem}.run.json"))
}

/// The terminal summary of an evidence run.
pub fn summary(
    model: &Model,
    a: &Assemblage,
    ev: &[IndividualEvidence],
    out: &Path,
    record: &Path,
) -> String {
    use std::fmt::Write as _;
    let mut s = String::new();
    let estimable = ev.iter().filter(|e| e.estimable).count();
    let _ = writeln!(
        s,
        "Model        {} (sha256 {}…)",
        model.name,
        &model.sha256[..12]
    );
    let _ = writeln!(
        s,
        "Individuals  {}: {} with usable evidence, {} not estimable",
        ev.len(),
        estimable,
        ev.len() - estimable
    );
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Block          type        used  below min. age  flagged"
    );
    for (k, b) in model.blocks.iter().enumerate() {
        let count = |st: BlockStatus| ev.iter().filter(|e| e.blocks[k].status == st).count();
        let flagged = count(BlockStatus::Atypical) + count(BlockStatus::NumericalFailure);
        let _ = writeln!(
            s,
            "{:<14} {:<10} {:>5}  {:>14}  {:>7}",
            b.id(),
            b.kind(),
            count(BlockStatus::Used),
            count(BlockStatus::BelowMinimumAge),
            flagged
        );
    }
    let worst = ev.iter().map(|e| e.error).fold(0.0, f64::max);
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Largest numerical error of an individual's ln LR: {worst:.1e}"
    );
    for f in crate::likelihood::flagged(model, a, ev) {
        let _ = writeln!(s, "Flagged: {f}");
    }
    let _ = writeln!(
        s,
        "Ledger written to {} (record of the run: {})",
        out.display(),
        record.display()
    );
    let _ = writeln!(s, "Likelihood ratios are evidence, not identifications; they assume the model fits this population.");
    s
}
