//! The files of `tessera analyse` and its terminal summary.
//!
//! `individuals.csv`: `id, group, status, n_traits, log10_lr, lr_support, p_female, p_male,
//! category, p_female_min, p_female_max, prior_sensitive, p_female_equal_prior,
//! category_equal_prior, category_note, age, flags, dna_reads, y_fraction`, `rx` where the model has an X:autosome block, then `log10_lr_<block>` for every
//! block of the model (empty where the block was not used), then every input column the model
//! did not use, unchanged. Individuals without usable evidence have `status = not_estimable`,
//! `category = not_estimable` and empty numbers.
//!
//! `assemblage.csv`: one row per prior and model (the chosen prior first, then the sensitivity
//! set): `prior, model, pi_mean, pi_median, pi_lo, pi_hi, n_individuals, n_estimable,
//! expected_females, pi_hdi_lo, pi_hdi_hi, p_pi_below_half, sex_ratio_median, sex_ratio_lo,
//! sex_ratio_hi, log10_bf_one_sex`, then — on the chosen prior's row of the model the joint
//! draws come from — `n_female_mean, n_female_lo, n_female_hi, n_male_mean, n_male_lo,
//! n_male_hi`, then — on `groups` rows — `kappa_median, kappa_lo, kappa_hi,
//! log10_bf_groups_differ`. `model` is `one population` or `groups` (the hierarchy, with
//! groups and a prior that is not fixed; its `pi_*` columns describe μ).
//!
//! `groups.csv` (with groups): `group, n, pi_mean, pi_lo, pi_hi, expected_females`, then
//! `n_estimable, pi_median`.
//!
//! `draws.csv` and `assemblage_draws.csv` (with `--draws N`): `draw, id, sex` in long form, and
//! per draw `draw, mu, kappa, pi_<group>…, n_female, n_male, sex_ratio`.
//!
//! `sensitivity.csv`: `id, prior, p_female, category`, one row per individual and prior.
//!
//! `run.json`: program version, command line, input, model, prior and sensitivity set (names
//! and SHA-256), thresholds, seed. No clock time, so the same inputs and seed give the same
//! bytes.

use super::RenderError;
use crate::assemblage::draws::count_summary;
use crate::assemblage::{category_note, lr_support, Category, PriorResult};
use crate::model::{BlockStatus, IndividualEvidence, Model};
use crate::output::OutputSet;
use crate::results::{AnalysisResult, RunInfo};
use serde::Serialize;
use std::f64::consts::LN_10;
use std::fmt::Write as _;

use super::number::probability as prob;

fn f6(x: f64) -> String {
    super::number::cell(x, 6)
}

/// Three significant digits (κ, whose quantiles are good to about 0.1%).
fn significant3(x: f64) -> String {
    if !x.is_finite() || x <= 0.0 {
        return super::number::cell(x, 3);
    }
    let decimals = (2 - x.log10().floor() as i32).max(0) as usize;
    format!("{x:.decimals$}")
}

fn f4(x: f64) -> String {
    super::number::cell(x, 4)
}

/// (reads on X and Y, reads on Y) of an individual under the model's DNA block, when both
/// counts are recorded.
fn dna_reads(model: &Model, ind: &crate::data::Individual) -> Option<(u64, u64)> {
    use crate::data::Observation;
    model.blocks.iter().find_map(|b| match b {
        crate::model::Block::Dna(d) => match (
            ind.observations.get(d.x_index).copied().flatten(),
            ind.observations.get(d.y_index).copied().flatten(),
        ) {
            (Some(Observation::Count { value: x }), Some(Observation::Count { value: y })) => {
                Some((x.saturating_add(y), y))
            }
            _ => None,
        },
        _ => None,
    })
}

/// An age at death as recorded: `34`, `25-35`, `50+`, `adult`, `subadult`.
pub fn age_text(age: crate::data::AgeAtDeath) -> String {
    use crate::data::AgeAtDeath;
    match age {
        AgeAtDeath::Years { low, high: Some(h) } if h == low => format!("{low}"),
        AgeAtDeath::Years { low, high: Some(h) } => format!("{low}-{h}"),
        AgeAtDeath::Years { low, high: None } => format!("{low}+"),
        AgeAtDeath::Adult => "adult".into(),
        AgeAtDeath::Subadult => "subadult".into(),
    }
}

/// Largest error on an individual's ln LR from the box integration before it is flagged
/// (a choice of ours: 0.05, about 5% on the likelihood ratio).
pub const LARGE_INTEGRATION_ERROR: f64 = 0.05;

/// The individual's flags, `;`-separated: `dna_atypical` (a read count fitting neither sex),
/// `numerical_failure`, `integration_error` (error on ln LR above
/// [`LARGE_INTEGRATION_ERROR`]), `sides_disagree` (left and right differ beyond the
/// tolerance), `below_minimum_age` (skeletal evidence recorded but not used), `prior_sensitive`
/// (the category changes under some prior of the sensitivity set).
fn flags(sides_disagree: bool, ev: &IndividualEvidence, prior_sensitive: bool) -> String {
    let mut f: Vec<&str> = Vec::new();
    let any = |st: BlockStatus| ev.blocks.iter().any(|b| b.status == st);
    if any(BlockStatus::Atypical) {
        f.push("dna_atypical");
    }
    if any(BlockStatus::NumericalFailure) {
        f.push("numerical_failure");
    }
    if ev.error > LARGE_INTEGRATION_ERROR {
        f.push("integration_error");
    }
    if sides_disagree {
        f.push("sides_disagree");
    }
    if any(BlockStatus::BelowMinimumAge) {
        f.push("below_minimum_age");
    }
    if prior_sensitive {
        f.push("prior_sensitive");
    }
    f.join(";")
}

use super::{csv_bytes, header, CsvText};
use crate::assemblage::posterior::p_female_given;

/// The analysis's tables and run record, in writing order: `individuals.csv`,
/// `assemblage.csv`, `sensitivity.csv`, `groups.csv` (with groups), `draws.csv` and
/// `assemblage_draws.csv` (with `--draws N`), `run.json`.
///
/// Each file is handed to `sink` as soon as it is made, so that a long table (a million
/// individuals' rows under every prior) need not be held beside the others.
///
/// # Errors
/// [`crate::Error::Render`] when a table or the record cannot be built; the sink's own errors.
pub fn render_files(
    r: &AnalysisResult,
    sink: &mut crate::output::FileSink<'_>,
) -> Result<(), crate::Error> {
    // The two long tables go out in pieces (consecutive calls with one name continue the
    // file): a million individuals' sensitivity rows are 0.5 GB of text.
    individuals_csv(r, &mut |bytes| sink("individuals.csv", bytes))?;
    sink("assemblage.csv", assemblage_csv(r)?)?;
    sensitivity_csv(r, &mut |bytes| sink("sensitivity.csv", bytes))?;
    if !r.results.main.groups.is_empty() {
        sink("groups.csv", groups_csv(r)?)?;
    }
    if r.write_draws {
        sink("draws.csv", draws_csv(r)?)?;
        sink("assemblage_draws.csv", assemblage_draws_csv(r)?)?;
    }
    sink("run.json", run_json(r)?)
}

/// Rows of a long table per piece handed on (a choice of ours: a few MB of text).
const ROWS_PER_PIECE: usize = 50_000;

/// A long table's text: the header, then `rows_of(i, text)` for every unit i in order (an
/// individual, giving `rows_per_unit` rows), handed to `emit` in pieces of about
/// [`ROWS_PER_PIECE`] rows. The pieces are made in parallel, as many at a time as there are
/// threads, and handed on in order: the pieces joined are the bytes one [`CsvText`] would
/// give for the whole table, and no more than a batch of pieces is held at once.
fn long_table(
    head: &[String],
    units: usize,
    rows_per_unit: usize,
    rows_of: &(dyn Fn(usize, &mut CsvText) + Sync),
    emit: &mut dyn FnMut(Vec<u8>) -> Result<(), crate::Error>,
) -> Result<(), crate::Error> {
    use rayon::prelude::*;
    let per_piece = (ROWS_PER_PIECE / rows_per_unit.max(1)).max(1);
    let pieces: Vec<std::ops::Range<usize>> = (0..units.div_ceil(per_piece).max(1))
        .map(|k| k * per_piece..((k + 1) * per_piece).min(units))
        .collect();
    let piece = |range: &std::ops::Range<usize>| {
        // Row numbers in an error count from the table's first row.
        let mut text = CsvText::from_row(1 + range.start * rows_per_unit);
        if range.start == 0 {
            text.row(head);
        }
        for i in range.clone() {
            rows_of(i, &mut text);
        }
        text.finish()
    };
    for batch in pieces.chunks(rayon::current_num_threads().max(1)) {
        let made: Vec<Result<Vec<u8>, RenderError>> = batch.par_iter().map(piece).collect();
        for bytes in made {
            emit(bytes?)?;
        }
    }
    Ok(())
}

/// `individuals.csv`: one row per individual (the columns are listed in the module's doc),
/// handed to `emit` in pieces.
fn individuals_csv(
    r: &AnalysisResult,
    emit: &mut dyn FnMut(Vec<u8>) -> Result<(), crate::Error>,
) -> Result<(), crate::Error> {
    let (model, a, evidence, analysis) = (&r.model, &r.assemblage, &r.evidence, &r.results);
    let main = &analysis.main;
    let mut head: Vec<String> = header(&[
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
        "p_female_equal_prior",
        "category_equal_prior",
        "category_note",
        "age",
        "flags",
        "dna_reads",
        "y_fraction",
    ]);
    // The X:autosome ratio, where the model has such a block.
    let x_block = model.blocks.iter().find_map(|b| match b {
        crate::model::Block::DnaX(d) => Some(d),
        _ => None,
    });
    if x_block.is_some() {
        head.push("rx".into());
    }
    head.extend(model.blocks.iter().map(|b| format!("log10_lr_{}", b.id())));
    head.extend(a.carried_columns.iter().cloned());
    // Rows whose sides disagree, found once (not once per individual).
    let disagreeing: std::collections::HashSet<usize> = a
        .warnings
        .iter()
        .filter(|w| w.kind == crate::data::WarningKind::SidesDisagree)
        .filter_map(|w| w.row)
        .collect();
    // Written row by row: a million individuals' rows held as strings took 1.4 GB.
    let digits = super::number::probability_decimals;
    let main_digits = digits(main.hyper.is_some());
    let any_digits = digits(analysis.results().any(|r| r.hyper.is_some()));
    let prob = |p: f64| super::number::probability_to(p, main_digits);
    let prob_any = |p: f64| super::number::probability_to(p, any_digits);
    let row = |i: usize, text: &mut CsvText| {
        let (ind, ev) = (&a.individuals[i], &evidence[i]);
        let s = &analysis.individual_sensitivity[i];
        let est = ev.estimable;
        let equal = est.then(|| p_female_given(0.5, ev.ln_lr));
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
            main.p_female[i].map(prob).unwrap_or_default(),
            main.p_female[i].map(|p| prob(1.0 - p)).unwrap_or_default(),
            main.categories[i].as_str().to_string(),
            s.p_female_min.map(prob_any).unwrap_or_default(),
            s.p_female_max.map(prob_any).unwrap_or_default(),
            s.prior_sensitive.to_string(),
            // The evidence alone (π fixed at ½): beside the assemblage-informed value, so
            // that a reader sees how much of a call comes from the cemetery's sex ratio.
            equal.map(super::number::probability).unwrap_or_default(),
            match equal {
                Some(p) => analysis.thresholds.categorise(p).as_str().to_string(),
                None => main.categories[i].as_str().to_string(),
            },
            // Where the category and the words of the LR speak with different strength,
            // why (the prior, or the cut-offs of the two scales).
            if est {
                category_note(
                    &analysis.thresholds,
                    main.categories[i],
                    ev.ln_lr / LN_10,
                    &main.prior.name,
                )
                .unwrap_or_default()
            } else {
                String::new()
            },
            ind.age.map(age_text).unwrap_or_default(),
            flags(disagreeing.contains(&ind.row), ev, s.prior_sensitive),
        ];
        // Reads on X and Y and the Y fraction, where the model has a DNA block and both
        // counts are recorded (what a referee checks first).
        let reads = dna_reads(model, ind);
        r.push(reads.map(|(n, _)| n.to_string()).unwrap_or_default());
        r.push(
            reads
                .filter(|&(n, _)| n > 0)
                .map(|(n, y)| format!("{:.4}", y as f64 / n as f64))
                .unwrap_or_default(),
        );
        if let Some(d) = x_block {
            use crate::data::Observation::Count;
            r.push(
                match (
                    ind.observations[d.x_index],
                    ind.observations[d.autosome_index],
                ) {
                    (Some(Count { value: x }), Some(Count { value: a })) if a > 0 => {
                        format!("{:.4}", d.rx(x, a))
                    }
                    _ => String::new(),
                },
            );
        }
        for b in &ev.blocks {
            r.push(if b.status == BlockStatus::Used {
                f4(b.ln_lr / LN_10)
            } else {
                String::new()
            });
        }
        r.extend(ind.carried.iter().cloned());
        text.row(&r);
    };
    long_table(&head, a.individuals.len(), 1, &row, emit)
}

/// `assemblage.csv`: one row per prior and model, the chosen prior first. Every row
/// describes one model, named in `model`: `one population` (one π for the whole assemblage)
/// and, with groups under a prior that is not fixed, `groups` (the hierarchy: its `pi_*`
/// columns are μ, the population's proportion behind the groups). The counts from the joint
/// draws go on the chosen prior's row of the model the draws come from.
fn assemblage_csv(r: &AnalysisResult) -> Result<Vec<u8>, RenderError> {
    let (a, analysis, draws) = (&r.assemblage, &r.results, &r.draws);
    let all: Vec<&PriorResult> = analysis.results().collect();
    let mut rows = vec![header(&[
        "prior",
        "model",
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
        "sex_ratio_median",
        "sex_ratio_lo",
        "sex_ratio_hi",
        "log10_bf_one_sex",
        "n_female_mean",
        "n_female_lo",
        "n_female_hi",
        "n_male_mean",
        "n_male_lo",
        "n_male_hi",
        "kappa_median",
        "kappa_lo",
        "kappa_hi",
        "log10_bf_groups_differ",
    ])];
    let n_female = draws.n_female();
    let n = a.individuals.len();
    let (fm, flo, fhi) = count_summary(&n_female);
    let n_male: Vec<usize> = n_female.iter().map(|f| n - f).collect();
    let (mm, mlo, mhi) = count_summary(&n_male);
    let counts = [
        f4(fm),
        flo.to_string(),
        fhi.to_string(),
        f4(mm),
        mlo.to_string(),
        mhi.to_string(),
    ];
    // Males per 100 females: a decreasing function of π, so quantiles map across.
    let ratio = |pi: f64| {
        if pi > 0.0 {
            format!("{:.2}", 100.0 * (1.0 - pi) / pi)
        } else {
            "inf".into()
        }
    };
    // Digits: the one-population posterior is good to about 1e-9, the hierarchy's μ to about
    // 2e-4 (tests/reference_hierarchy.rs), so its row has four decimals.
    let proportion =
        |p: &crate::assemblage::PiSummary, r: &PriorResult, expected: f64, d: usize| {
            vec![
                super::number::cell(p.mean, d),
                super::number::cell(p.median, d),
                super::number::cell(p.lo, d),
                super::number::cell(p.hi, d),
                r.n_individuals.to_string(),
                r.n_estimable.to_string(),
                f4(expected),
                super::number::cell(p.hdi_lo, d),
                super::number::cell(p.hdi_hi, d),
                super::number::cell(p.p_below_half, d),
                ratio(p.median),
                ratio(p.hi),
                ratio(p.lo),
            ]
        };
    let blank = |k: usize| std::iter::repeat_n(String::new(), k);
    for (k, r) in all.iter().enumerate() {
        // The draws come from the hierarchy when the chosen prior has one.
        let draws_here = k == 0 && !n_female.is_empty();
        let mut row = vec![r.prior.name.clone(), "one population".into()];
        row.extend(proportion(&r.pi, r, r.expected_females_one_population, 6));
        row.push(f4(r.ln_bf_one_sex / LN_10));
        if draws_here && r.hyper.is_none() {
            row.extend(counts.iter().cloned());
        } else {
            row.extend(blank(6));
        }
        row.extend(blank(4));
        rows.push(row);
        if let Some(h) = &r.hyper {
            let mut row = vec![r.prior.name.clone(), "groups".into()];
            row.extend(proportion(&h.mu, r, r.expected_females, 4));
            row.push(String::new());
            if draws_here {
                row.extend(counts.iter().cloned());
            } else {
                row.extend(blank(6));
            }
            // κ's quantiles are good to about 0.1% (relative): three significant digits.
            row.extend([
                significant3(h.kappa_median),
                significant3(h.kappa_lo),
                significant3(h.kappa_hi),
                f4(h.ln_bf_groups_differ / LN_10),
            ]);
            rows.push(row);
        }
    }
    csv_bytes(rows)
}

/// `sensitivity.csv`: one row per individual and prior, handed to `emit` in pieces.
fn sensitivity_csv(
    r: &AnalysisResult,
    emit: &mut dyn FnMut(Vec<u8>) -> Result<(), crate::Error>,
) -> Result<(), crate::Error> {
    let all: Vec<&PriorResult> = r.results.results().collect();
    let individuals = &r.assemblage.individuals;
    let row = |i: usize, text: &mut CsvText| {
        for x in &all {
            let p = x.p_female[i]
                .map(|p| {
                    super::number::probability_to(
                        p,
                        super::number::probability_decimals(x.hyper.is_some()),
                    )
                })
                .unwrap_or_default();
            text.row([
                individuals[i].id.as_str(),
                x.prior.name.as_str(),
                p.as_str(),
                x.categories[i].as_str(),
            ]);
        }
    };
    let head = header(&["id", "prior", "p_female", "category"]);
    long_table(&head, individuals.len(), all.len(), &row, emit)
}

/// `run.json`: the run's provenance, priors and cut-offs (no clock time).
fn run_json(r: &AnalysisResult) -> Result<Vec<u8>, RenderError> {
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
        run: &r.run,
        prior: pref(&r.results.main),
        sensitivity_priors: r.results.sensitivity.iter().map(pref).collect(),
        thresholds: r.results.thresholds,
    };
    let mut json = serde_json::to_vec_pretty(&record)?;
    json.push(b'\n');
    Ok(json)
}

/// `groups.csv`: one row per group.
fn groups_csv(r: &AnalysisResult) -> Result<Vec<u8>, RenderError> {
    {
        let mut rows = vec![header(&[
            "group",
            "n",
            "pi_mean",
            "pi_lo",
            "pi_hi",
            "expected_females",
            "n_estimable",
            "pi_median",
        ])];
        for g in &r.results.main.groups {
            rows.push(vec![
                g.group.clone(),
                g.n.to_string(),
                f4(g.pi.mean),
                f4(g.pi.lo),
                f4(g.pi.hi),
                f4(g.expected_females),
                g.n_estimable.to_string(),
                f4(g.pi.median),
            ]);
        }
        csv_bytes(rows)
    }
}

/// `draws.csv`: the joint draws of every individual's sex, in long form.
fn draws_csv(r: &AnalysisResult) -> Result<Vec<u8>, RenderError> {
    let (a, draws) = (&r.assemblage, &r.draws);
    {
        let mut text = CsvText::default();
        text.row(["draw", "id", "sex"]);
        for (d, sexes) in draws.female.iter().enumerate() {
            let draw = (d + 1).to_string();
            for (ind, f) in a.individuals.iter().zip(sexes.iter()) {
                text.row([draw.as_str(), ind.id.as_str(), if f { "F" } else { "M" }]);
            }
        }
        text.finish()
    }
}

/// `assemblage_draws.csv`: per draw the hierarchy, the proportions and the counts.
fn assemblage_draws_csv(r: &AnalysisResult) -> Result<Vec<u8>, RenderError> {
    let (draws, main) = (&r.draws, &r.results.main);
    let n_female = draws.n_female();
    let n = r.assemblage.individuals.len();
    {
        let mut head = vec!["draw".to_string(), "mu".into(), "kappa".into()];
        if main.groups.is_empty() {
            head.push("pi".into());
        } else {
            head.extend(draws.groups.iter().map(|g| format!("pi_{g}")));
        }
        head.extend(["n_female".to_string(), "n_male".into(), "sex_ratio".into()]);
        let mut rows = vec![head];
        for (d, &nf) in n_female.iter().enumerate() {
            let mut r = vec![
                (d + 1).to_string(),
                f6(draws.mu[d]),
                draws.kappa[d]
                    .map(|k| format!("{k:.3}"))
                    .unwrap_or_default(),
            ];
            r.extend(draws.pi[d].iter().map(|&p| f6(p)));
            r.push(nf.to_string());
            r.push((n - nf).to_string());
            r.push(if nf > 0 {
                format!("{:.2}", 100.0 * (n - nf) as f64 / nf as f64)
            } else {
                "inf".into()
            });
            rows.push(r);
        }
        csv_bytes(rows)
    }
}

/// The readable summary printed after an analysis.
pub fn terminal_summary(r: &AnalysisResult) -> String {
    let (model, a, analysis, draws) = (&r.model, &r.assemblage, &r.results, &r.draws);
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
    if let Some(h) = &main.hyper {
        let _ = writeln!(
            s,
            "Proportion female of the population behind the groups (μ)  {:.3} (95% interval {:.3} to {:.3})",
            h.mu.mean, h.mu.lo, h.mu.hi
        );
    }
    let _ = writeln!(
        s,
        "Proportion female{}  {:.3} (median {:.3}; 95% interval {:.3} to {:.3}; highest density {:.3} to {:.3})",
        if main.hyper.is_some() { ", the assemblage as one population" } else { "" },
        p.mean, p.median, p.lo, p.hi, p.hdi_lo, p.hdi_hi
    );
    let _ = writeln!(
        s,
        "Expected number of females{}: {:.1} of {}",
        if main.hyper.is_some() {
            " (groups' model)"
        } else {
            ""
        },
        main.expected_females,
        main.n_individuals
    );
    let (fm, flo, fhi) = count_summary(&draws.n_female());
    let _ = writeln!(
        s,
        "Number of females among the {}: {:.1} (95% interval {} to {}, from {} joint draws)",
        main.n_individuals,
        fm,
        flo,
        fhi,
        draws.mu.len()
    );
    let _ = writeln!(
        s,
        "Males per 100 females in the population{}: {:.0} (95% interval {:.0} to {:.0})",
        if main.hyper.is_some() {
            " (one population)"
        } else {
            ""
        },
        100.0 * (1.0 - p.median) / p.median,
        100.0 * (1.0 - p.hi) / p.hi,
        100.0 * (1.0 - p.lo) / p.lo
    );
    let _ = writeln!(
        s,
        "P(fewer females than males in the population) = {:.3}",
        p.p_below_half
    );
    let _ = writeln!(
        s,
        "A community of one sex against a mixed one: log10 Bayes factor {:.1}; {}",
        main.ln_bf_one_sex / LN_10,
        super::number::bayes_factor_words(
            main.ln_bf_one_sex,
            "the community was of one sex",
            "it was mixed"
        )
    );
    if !main.groups.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "Group          n   proportion female (95% interval)   expected females"
        );
        for g in &r.results.main.groups {
            let _ = writeln!(
                s,
                "  {:<10} {:>4}   {:.3} ({:.3} to {:.3})             {:>6.1}",
                g.group, g.n, g.pi.mean, g.pi.lo, g.pi.hi, g.expected_females
            );
        }
        match &main.hyper {
            Some(h) => {
                let _ = writeln!(
                    s,
                    "Groups that differ against groups that share one proportion: log10 Bayes factor {:.2}; {}",
                    h.ln_bf_groups_differ / LN_10,
                    super::number::bayes_factor_words(
                        h.ln_bf_groups_differ,
                        "the groups differ",
                        "the groups share one proportion"
                    )
                );
            }
            None => {
                let _ = writeln!(
                    s,
                    "The prior fixes the proportion female of every group at {:.3}.",
                    main.pi.mean
                );
            }
        }
    }
    if let Some(first) = r.by_sex.sex_ratio.first() {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "Against a reference of {} males per 100 females (each group on its own; sex_ratio.csv):",
            super::number::short(first.reference, 1)
        );
        let _ = writeln!(
            s,
            "  {:<14} {:>5}   males per 100 females (95% interval)   P(more males)   log10 BF reference:any",
            "", "n"
        );
        for x in &r.by_sex.sex_ratio {
            let ratio = format!("{:.0} ({:.0} to {:.0})", x.median, x.lo, x.hi);
            let _ = writeln!(
                s,
                "  {:<14} {:>5}   {:<36}   {:<13.3}   {:>6.2}",
                x.group.as_deref().unwrap_or("all"),
                x.n,
                ratio,
                x.p_more_males,
                x.ln_bf_reference / LN_10
            );
        }
    }
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
    // A fixed prior's row would only repeat its value: those priors are counted, and their
    // effect on individuals is in the list below and in sensitivity.csv.
    let mut fixed = 0;
    for r in analysis.results() {
        if r.prior.is_fixed() {
            fixed += 1;
            continue;
        }
        let _ = writeln!(
            s,
            "  {:<16} {:.3}  ({:.3} to {:.3})",
            r.prior.name, r.pi.mean, r.pi.lo, r.pi.hi
        );
    }
    if fixed > 0 {
        let _ = writeln!(
            s,
            "  and {fixed} fixed proportions (each individual under them: sensitivity.csv)"
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
            super::named_at_most(
                sensitive.len(),
                sensitive.iter().map(|id| id.to_string()),
                "the `prior_sensitive` column of individuals.csv"
            )
            .join(", ")
        );
    }
    let _ = writeln!(
        s,
        "These are estimates, not identifications; biological sex is not gender."
    );
    s
}

/// The recalibration's files: `recalibration.csv` (trait, sex, reference_mean,
/// recalibrated_mean, lo, hi, shift_sd, rhat, ess), `recalibration_check.csv` (trait, n,
/// share_outside_99, flagged) and `recalibrated_individuals.csv` (id, p_female_reference,
/// p_female_recalibrated, category_reference, category_recalibrated, category_changed); none
/// without a recalibration.
///
/// # Errors
/// [`RenderError`] when a table cannot be built.
pub fn recalibration_files(result: &AnalysisResult) -> Result<OutputSet, RenderError> {
    let Some(r) = &result.recalibration else {
        return Ok(OutputSet::default());
    };
    let (a, analysis) = (&result.assemblage, &result.results);
    let mut rows = vec![header(&[
        "trait",
        "sex",
        "reference_mean",
        "recalibrated_mean",
        "lo",
        "hi",
        "shift_sd",
        "rhat",
        "ess",
    ])];
    for m in &r.means {
        rows.push(vec![
            m.trait_id.clone(),
            m.sex.to_string(),
            f4(m.reference),
            f4(m.mean),
            f4(m.lo),
            f4(m.hi),
            format!("{:.3}", m.shift_sd),
            format!("{:.4}", m.rhat),
            format!("{:.0}", m.ess),
        ]);
    }
    let mut checks = vec![vec![
        "trait".to_string(),
        "n".into(),
        "share_outside_99".into(),
        "flagged".into(),
    ]];
    for c in &r.checks {
        checks.push(vec![
            c.trait_id.clone(),
            c.n.to_string(),
            f4(c.share_outside),
            c.flagged.to_string(),
        ]);
    }
    let t = analysis.thresholds;
    let mut ind = vec![header(&[
        "id",
        "p_female_reference",
        "p_female_recalibrated",
        "category_reference",
        "category_recalibrated",
        "category_changed",
    ])];
    for (i, x) in a.individuals.iter().enumerate() {
        let (p, q) = (analysis.main.p_female[i], r.p_female[i]);
        let cat = |v: Option<f64>| v.map(|v| t.categorise(v)).unwrap_or(Category::NotEstimable);
        ind.push(vec![
            x.id.clone(),
            p.map(prob).unwrap_or_default(),
            q.map(prob).unwrap_or_default(),
            cat(p).as_str().into(),
            cat(q).as_str().into(),
            (cat(p) != cat(q)).to_string(),
        ]);
    }
    let mut files = OutputSet::default();
    files.push("recalibration.csv", csv_bytes(rows)?);
    files.push("recalibration_check.csv", csv_bytes(checks)?);
    files.push("recalibrated_individuals.csv", csv_bytes(ind)?);
    Ok(files)
}

/// `correlation_check.csv` (id, correlation, p_female, p_female_main, change, category,
/// category_main, category_changed): one row per individual whose evidence used a varied
/// block and per correlation tried; none without a correlation check.
///
/// # Errors
/// [`RenderError`] when the table cannot be built.
pub fn correlation_check_files(result: &AnalysisResult) -> Result<OutputSet, RenderError> {
    let Some(c) = &result.correlation_check else {
        return Ok(OutputSet::default());
    };
    let analysis = &result.results;
    let t = analysis.thresholds;
    let mut rows = vec![header(&[
        "id",
        "correlation",
        "p_female",
        "p_female_main",
        "change",
        "category",
        "category_main",
        "category_changed",
    ])];
    for (v, ps) in c.values.iter().zip(&c.p_female) {
        for (&i, &q) in c.individuals.iter().zip(ps) {
            let p = analysis.main.p_female[i].unwrap_or(f64::NAN);
            let (cp, cq) = (t.categorise(p), t.categorise(q));
            rows.push(vec![
                result.assemblage.individuals[i].id.clone(),
                format!("{v}"),
                prob(q),
                prob(p),
                f4(q - p),
                cq.as_str().into(),
                cp.as_str().into(),
                (cp != cq).to_string(),
            ]);
        }
    }
    let mut files = OutputSet::default();
    files.push("correlation_check.csv", csv_bytes(rows)?);
    Ok(files)
}
