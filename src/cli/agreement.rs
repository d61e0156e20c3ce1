//! `tessera agreement A.csv B.csv`: how well two observers' scorings agree.

use super::input::InputArgs;
use crate::agreement::compare;
use crate::data::read_assemblage;
use crate::output::write_folder;
use crate::report::csv_bytes;
use crate::report::header;
use crate::Error;
use std::fmt::Write as _;
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
    let mut s = String::new();
    let _ = writeln!(s, "Individuals in both tables: {}", r.n_common);
    let list = |v: &[String]| {
        let mut t = v.iter().take(8).cloned().collect::<Vec<_>>().join(", ");
        if v.len() > 8 {
            t.push_str(", …");
        }
        t
    };
    if !r.only_a.is_empty() {
        let _ = writeln!(
            s,
            "Only in the first table: {} ({})",
            r.only_a.len(),
            list(&r.only_a)
        );
    }
    if !r.only_b.is_empty() {
        let _ = writeln!(
            s,
            "Only in the second table: {} ({})",
            r.only_b.len(),
            list(&r.only_b)
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Scores (weighted kappa, Cohen 1968; 95% bootstrap intervals)"
    );
    let _ = writeln!(s, "trait                      pairs   linear (95%)            quadratic (95%)         exact agreement   latent r   noise share");
    for t in r.traits.iter().filter(|t| t.kind == "ordinal") {
        let _ = writeln!(
            s,
            "{:<26} {:>5}   {:.2} ({:.2} to {:.2})      {:.2} ({:.2} to {:.2})      {:>4.0}%            {}{}",
            t.trait_id,
            t.n,
            t.first.0,
            t.first.1,
            t.first.2,
            t.second.0,
            t.second.1,
            t.second.2,
            100.0 * t.third,
            match t.observer_error {
                Some((r, share)) => format!("{r:.2}       {share:.2}"),
                None => "–          –".to_string(),
            },
            if t.ranges_left_out > 0 {
                format!("  ({} ranges left out)", t.ranges_left_out)
            } else {
                String::new()
            }
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Measurements (technical error of measurement; ICC(2,1), Shrout & Fleiss 1979)"
    );
    let _ = writeln!(
        s,
        "trait                      pairs   TEM (95%)                relative TEM   ICC (95%)"
    );
    for t in r.traits.iter().filter(|t| t.kind == "metric") {
        let _ = writeln!(
            s,
            "{:<26} {:>5}   {:.3} ({:.3} to {:.3})    {:>6.2}%        {:.3} ({:.3} to {:.3})",
            t.trait_id,
            t.n,
            t.first.0,
            t.first.1,
            t.first.2,
            t.third,
            t.second.0,
            t.second.1,
            t.second.2
        );
    }
    let _ = writeln!(
        s,
        "\n{} disagreements (grades that differ; measurements more than 2 TEM apart)",
        r.disagreements.len()
    );
    print!("{s}");
    if let Some(out) = &args.out {
        let mut rows = vec![header(&[
            "trait",
            "kind",
            "pairs",
            "ranges_left_out",
            "kappa_linear_or_tem",
            "lo",
            "hi",
            "kappa_quadratic_or_icc",
            "lo",
            "hi",
            "exact_agreement_or_relative_tem",
            "polychoric_r",
            "observer_error_sd_share",
        ])];
        for t in &r.traits {
            rows.push(vec![
                t.trait_id.clone(),
                t.kind.into(),
                t.n.to_string(),
                t.ranges_left_out.to_string(),
                format!("{:.4}", t.first.0),
                format!("{:.4}", t.first.1),
                format!("{:.4}", t.first.2),
                format!("{:.4}", t.second.0),
                format!("{:.4}", t.second.1),
                format!("{:.4}", t.second.2),
                format!("{:.4}", t.third),
                t.observer_error
                    .map(|(r, _)| format!("{r:.4}"))
                    .unwrap_or_default(),
                t.observer_error
                    .map(|(_, e)| format!("{e:.4}"))
                    .unwrap_or_default(),
            ]);
        }
        let protected: Vec<&Path> = vec![args.first.as_path(), args.second.as_path()];
        let table = csv_bytes(rows)?;
        let mut d = vec![vec![
            "id".to_string(),
            "trait".into(),
            "first".into(),
            "second".into(),
        ]];
        d.extend(
            r.disagreements
                .iter()
                .map(|x| vec![x.id.clone(), x.trait_id.clone(), x.a.clone(), x.b.clone()]),
        );
        let listed = csv_bytes(d)?;
        write_folder(
            out,
            &[("agreement.csv", table), ("disagreements.csv", listed)]
                .into_iter()
                .collect(),
            "agreement",
            &protected,
        )?;
    }
    Ok(0)
}
