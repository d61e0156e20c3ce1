//! `tessera plan`: how much will the analysis of an excavation be able to say?

use crate::assemblage::{Category, Thresholds};
use crate::output::write_atomic;
use crate::prior::parse_prior_set;
use crate::progress::Progress as _;
use crate::sim::plan::{plan_with_progress, PlanSettings};
use crate::sim::MissingSpec;
use crate::Error;
use std::fmt::Write as _;
use std::path::PathBuf;

/// Arguments of `tessera plan`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Model (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// Expected number of adults to be analysed; the table covers N/4, N/2, N, 2N and 4N.
    #[arg(long, value_name = "N")]
    pub n: usize,
    /// The proportion female to assume.
    #[arg(long, value_name = "P")]
    pub pi: f64,
    /// Expected preservation as key=rate, comma-separated (as for `simulate`; `none`: nothing
    /// lost). Default: a typical fragmentary cemetery.
    #[arg(long, value_name = "SPEC")]
    pub missing: Option<String>,
    /// Prior of the analysis.
    #[arg(long, value_name = "PRIOR", default_value = "flat")]
    pub prior: String,
    /// Simulated excavations per size.
    #[arg(long, value_name = "R", default_value_t = 100)]
    pub reps: usize,
    /// Seed.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Also write the table as CSV.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
}

use super::settings_error;

/// Run the command.
///
/// # Errors
/// Settings, model and file errors.
pub fn run(args: Args) -> Result<i32, Error> {
    let model = crate::pipeline::load_model(args.model.as_deref())?;
    if !(args.pi > 0.0 && args.pi < 1.0) {
        return Err(settings_error(
            "--pi",
            format!("{}: a proportion strictly between 0 and 1", args.pi),
        ));
    }
    if args.n < 4 || args.n > 100_000 || args.reps == 0 || args.reps > 10_000 {
        return Err(settings_error(
            "--n/--reps",
            "give --n from 4 to 100 000 and --reps from 1 to 10 000".into(),
        ));
    }
    let missing = MissingSpec::given_or_fragmentary(args.missing.as_deref())
        .map_err(|m| settings_error("--missing", m))?;
    let prior = parse_prior_set(&args.prior).map_err(|e| settings_error(&e.file, e.message))?;
    let sizes: Vec<usize> = [args.n / 4, args.n / 2, args.n, args.n * 2, args.n * 4]
        .into_iter()
        .filter(|&n| n > 0)
        .collect();
    let settings = PlanSettings {
        sizes,
        pi: args.pi,
        missing,
        prior: prior[0].clone(),
        thresholds: Thresholds::default(),
        replicates: args.reps,
        seed: args.seed,
    };
    let bar = super::TerminalProgress::default();
    bar.stage(
        "simulating excavations",
        (settings.sizes.len() * settings.replicates) as u64,
    );
    let rows = plan_with_progress(&model, &settings, &bar);
    bar.finish();
    let rows = rows.map_err(|e| settings_error("--model", e.to_string()))?;
    let mut t = String::new();
    let _ = writeln!(
        t,
        "Planning: {} simulated excavations per size, proportion female {}, prior {}, model {}",
        args.reps, args.pi, prior[0].name, model.name
    );
    let _ = writeln!(t);
    let _ = writeln!(t, "    n   95% interval   told from   female  prob.F  indet.  prob.M   male   not est.   wrong firm");
    let _ = writeln!(t, "        width (mean)   1:1                                                                 calls");
    for r in &rows {
        let c = &r.category_shares;
        let _ = writeln!(
            t,
            "{:>5}   {:>12.3}   {:>9.2}   {:>6.2}  {:>6.2}  {:>6.2}  {:>6.2}  {:>5.2}   {:>8.2}   {:>10.3}",
            r.n, r.mean_interval_width, r.p_differs_from_even, c[0], c[1], c[2], c[3], c[4], c[5], r.error_rate_of_firm_calls
        );
    }
    let _ = writeln!(t);
    let _ = writeln!(t, "\"told from 1:1\": share of excavations whose 95% interval for the proportion female excludes 0.5.");
    let _ = writeln!(t, "Category columns: expected share of individuals. Simulation under the model: real cemeteries fit it less well.");
    print!("{t}");
    if let Some(out) = &args.out {
        let mut w = crate::report::CsvText::default();
        let mut head = vec![
            "n".to_string(),
            "replicates".into(),
            "mean_interval_width".into(),
            "p_differs_from_even".into(),
        ];
        head.extend(
            Category::ALL
                .iter()
                .map(|c| format!("share_{}", c.as_str())),
        );
        head.push("error_rate_of_firm_calls".into());
        w.row(&head);
        for r in &rows {
            let mut rec = vec![
                r.n.to_string(),
                r.replicates.to_string(),
                format!("{:.4}", r.mean_interval_width),
                format!("{:.4}", r.p_differs_from_even),
            ];
            rec.extend(r.category_shares.iter().map(|x| format!("{x:.4}")));
            rec.push(format!("{:.4}", r.error_rate_of_firm_calls));
            w.row(&rec);
        }
        write_atomic(out, &w.finish()?, &[])?;
    }
    Ok(0)
}
