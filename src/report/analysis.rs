//! The files of `dimorph analyse` and its terminal summary.
//!
//! `individuals.csv`: `id, group, status, n_traits, log10_lr, lr_support, p_female, p_male,
//! category, p_female_min, p_female_max, prior_sensitive`, then `log10_lr_<block>` for every
//! block of the model (empty where the block was not used), then every input column the model
//! did not use, unchanged. Individuals without usable evidence have `status = not_estimable`,
//! `category = not_estimable` and empty numbers.
//!
//! `assemblage.csv`: one row per prior (the chosen prior first, then the sensitivity set):
//! `prior, pi_mean, pi_median, pi_lo, pi_hi, n_individuals, n_estimable, expected_females`, then
//! `pi_hdi_lo, pi_hdi_hi, p_pi_below_half`.
//!
//! `sensitivity.csv`: `id, prior, p_female, category`, one row per individual and prior.
//!
//! `run.json`: program version, command line, input, model, prior and sensitivity set (names
//! and SHA-256), thresholds, seed. No clock time, so the same inputs and seed give the same
//! bytes.

use crate::assemblage::{lr_support, Analysis, Category, PriorResult};
use crate::data::Assemblage;
use crate::model::{BlockStatus, IndividualEvidence, Model};
use serde::Serialize;
use std::f64::consts::LN_10;
use std::fmt::Write as _;

/// Facts about the run written into `run.json`.
#[derive(Debug, Clone, Serialize)]
pub struct RunInfo {
    /// Program name.
    pub program: &'static str,
    /// Program version.
    pub version: &'static str,
    /// The command line.
    pub command: Vec<String>,
    /// Input file.
    pub input: String,
    /// Input SHA-256.
    pub input_sha256: String,
    /// Model name.
    pub model: String,
    /// Model file or `embedded default`.
    pub model_file: String,
    /// Model SHA-256.
    pub model_sha256: String,
    /// Seed of every random stream.
    pub seed: u64,
    /// Side policy used reading the input.
    pub side_policy: String,
}

/// The bytes of every file `analyse` writes, by file name.
#[derive(Debug, Clone, PartialEq)]
pub struct AnalysisFiles {
    /// (file name, contents), in writing order.
    pub files: Vec<(String, Vec<u8>)>,
}

fn f6(x: f64) -> String {
    format!("{x:.6}")
}

fn f4(x: f64) -> String {
    format!("{x:.4}")
}

fn csv_bytes(rows: Vec<Vec<String>>) -> Vec<u8> {
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    for r in rows {
        // Writing to memory cannot fail for valid UTF-8 records.
        let _ = w.write_record(&r);
    }
    w.into_inner().unwrap_or_default()
}

/// Render the four files.
///
/// # Errors
/// Only if JSON serialisation fails (it does not for these types).
pub fn render_files(
    model: &Model,
    a: &Assemblage,
    evidence: &[IndividualEvidence],
    analysis: &Analysis,
    run: &RunInfo,
) -> Result<AnalysisFiles, serde_json::Error> {
    let main = &analysis.main;
    // individuals.csv
    let mut header: Vec<String> = [
        "id",
        "group",
        "status",
        "n_traits",
        "log10_lr",
        "lr_support",
        "p_female",
        "p_male",
        "category",
        "p_female_min",
        "p_female_max",
        "prior_sensitive",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    header.extend(model.blocks.iter().map(|b| format!("log10_lr_{}", b.id())));
    header.extend(a.carried_columns.iter().cloned());
    let mut rows = vec![header];
    for (i, (ind, ev)) in a.individuals.iter().zip(evidence).enumerate() {
        let s = &analysis.individual_sensitivity[i];
        let est = ev.estimable;
        let mut r = vec![
            ind.id.clone(),
            ind.group.clone().unwrap_or_default(),
            if est { "estimated" } else { "not_estimable" }.to_string(),
            ev.n_traits.to_string(),
            if est {
                f4(ev.ln_lr / LN_10)
            } else {
                String::new()
            },
            if est {
                lr_support(ev.ln_lr / LN_10)
            } else {
                String::new()
            },
            main.p_female[i].map(f6).unwrap_or_default(),
            main.p_female[i].map(|p| f6(1.0 - p)).unwrap_or_default(),
            main.categories[i].as_str().to_string(),
            s.p_female_min.map(f6).unwrap_or_default(),
            s.p_female_max.map(f6).unwrap_or_default(),
            s.prior_sensitive.to_string(),
        ];
        for b in &ev.blocks {
            r.push(if b.status == BlockStatus::Used {
                f4(b.ln_lr / LN_10)
            } else {
                String::new()
            });
        }
        r.extend(ind.carried.iter().cloned());
        rows.push(r);
    }
    let individuals = csv_bytes(rows);
    // assemblage.csv
    let all: Vec<&PriorResult> = std::iter::once(main)
        .chain(
            analysis
                .sensitivity
                .iter()
                .filter(|r| r.prior.name != main.prior.name),
        )
        .collect();
    let mut rows = vec![[
        "prior",
        "pi_mean",
        "pi_median",
        "pi_lo",
        "pi_hi",
        "n_individuals",
        "n_estimable",
        "expected_females",
        "pi_hdi_lo",
        "pi_hdi_hi",
        "p_pi_below_half",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect::<Vec<_>>()];
    for r in &all {
        rows.push(vec![
            r.prior.name.clone(),
            f6(r.pi.mean),
            f6(r.pi.median),
            f6(r.pi.lo),
            f6(r.pi.hi),
            r.n_individuals.to_string(),
            r.n_estimable.to_string(),
            f4(r.expected_females),
            f6(r.pi.hdi_lo),
            f6(r.pi.hdi_hi),
            f6(r.pi.p_below_half),
        ]);
    }
    let assemblage = csv_bytes(rows);
    // sensitivity.csv
    let mut rows = vec![vec![
        "id".to_string(),
        "prior".into(),
        "p_female".into(),
        "category".into(),
    ]];
    for (i, ind) in a.individuals.iter().enumerate() {
        for r in &all {
            rows.push(vec![
                ind.id.clone(),
                r.prior.name.clone(),
                r.p_female[i].map(f6).unwrap_or_default(),
                r.categories[i].as_str().to_string(),
            ]);
        }
    }
    let sensitivity = csv_bytes(rows);
    // run.json
    #[derive(Serialize)]
    struct PriorRef<'a> {
        name: &'a str,
        sha256: &'a str,
        shape: crate::prior::PriorShape,
    }
    #[derive(Serialize)]
    struct Record<'a> {
        #[serde(flatten)]
        run: &'a RunInfo,
        prior: PriorRef<'a>,
        sensitivity_priors: Vec<PriorRef<'a>>,
        thresholds: crate::assemblage::Thresholds,
    }
    fn pref(r: &PriorResult) -> PriorRef<'_> {
        PriorRef {
            name: &r.prior.name,
            sha256: &r.prior.sha256,
            shape: r.prior.shape,
        }
    }
    let record = Record {
        run,
        prior: pref(main),
        sensitivity_priors: analysis.sensitivity.iter().map(pref).collect(),
        thresholds: analysis.thresholds,
    };
    let mut json = serde_json::to_vec_pretty(&record)?;
    json.push(b'\n');
    Ok(AnalysisFiles {
        files: vec![
            ("individuals.csv".into(), individuals),
            ("assemblage.csv".into(), assemblage),
            ("sensitivity.csv".into(), sensitivity),
            ("run.json".into(), json),
        ],
    })
}

/// The readable summary printed after an analysis.
pub fn terminal_summary(model: &Model, a: &Assemblage, analysis: &Analysis) -> String {
    let main = &analysis.main;
    let mut s = String::new();
    let _ = writeln!(
        s,
        "Assemblage   {} ({} individuals, {} with usable evidence)",
        a.file, main.n_individuals, main.n_estimable
    );
    let _ = writeln!(
        s,
        "Model        {}    Prior  {}",
        model.name, main.prior.name
    );
    let p = &main.pi;
    let _ = writeln!(
        s,
        "Proportion female  {:.3} (median {:.3}; 95% interval {:.3} to {:.3}; highest density {:.3} to {:.3})",
        p.mean, p.median, p.lo, p.hi, p.hdi_lo, p.hdi_hi
    );
    let _ = writeln!(
        s,
        "Expected number of females: {:.1} of {}",
        main.expected_females, main.n_individuals
    );
    let _ = writeln!(s);
    let t = &analysis.thresholds;
    let _ = writeln!(
        s,
        "Category (P(female) cut-offs {} / {} / {} / {})   individuals",
        t.male, t.probable_male, t.probable_female, t.female
    );
    for c in Category::ALL {
        let n = main.categories.iter().filter(|&&x| x == c).count();
        let _ = writeln!(s, "  {:<22} {:>5}", c.label(), n);
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Proportion female under each prior of the sensitivity set:"
    );
    for r in std::iter::once(main).chain(
        analysis
            .sensitivity
            .iter()
            .filter(|r| r.prior.name != main.prior.name),
    ) {
        let _ = writeln!(
            s,
            "  {:<16} {:.3}  ({:.3} to {:.3})",
            r.prior.name, r.pi.mean, r.pi.lo, r.pi.hi
        );
    }
    let sensitive: Vec<&str> = a
        .individuals
        .iter()
        .zip(&analysis.individual_sensitivity)
        .filter(|(_, x)| x.prior_sensitive)
        .map(|(i, _)| i.id.as_str())
        .collect();
    let _ = writeln!(s);
    if sensitive.is_empty() {
        let _ = writeln!(
            s,
            "No individual's category depends on the choice of prior."
        );
    } else {
        let _ = writeln!(
            s,
            "{} individuals change category under some prior of the set: {}",
            sensitive.len(),
            sensitive.join(", ")
        );
    }
    let _ = writeln!(
        s,
        "These are estimates, not identifications; biological sex is not gender."
    );
    s
}
