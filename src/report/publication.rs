//! What goes into the paper: `report.md`, `tables.tex`, `methods.md`, the by-sex CSV tables
//! and the figures.

use super::{citations, figures, RenderError};
use crate::assemblage::Category;
use crate::model::{Block, BlockStatus, IndividualEvidence, Model};
use crate::output::OutputSet;
use crate::results::{AnalysisResult, BySex};
use crate::summary::category_by_age;
use std::collections::BTreeSet;
use std::f64::consts::LN_10;
use std::fmt::Write as _;

fn f3(x: f64) -> String {
    super::number::reading(x, 3)
}

fn f1(x: f64) -> String {
    super::number::reading(x, 1)
}

fn f2(x: f64) -> String {
    super::number::reading(x, 2)
}

/// The headline proportion female, named with its model: with groups (and a prior that lets
/// them differ) the population behind the groups, μ, with the one-population value beside.
fn headline_sentence(main: &crate::assemblage::PriorResult) -> String {
    let p = &main.pi;
    match &main.hyper {
        Some(h) => format!(
            "The proportion female of the population behind the groups (μ, hierarchical model) was estimated at {} (95% interval {}); with the assemblage taken as one population it was {} ({}).",
            f3(h.mu.mean),
            range(h.mu.lo, h.mu.hi, f3),
            f3(p.mean),
            range(p.lo, p.hi, f3)
        ),
        None => format!(
            "The proportion female was estimated at {} (95% interval {}).",
            f3(p.mean),
            range(p.lo, p.hi, f3)
        ),
    }
}

fn bf_words(ln_bf: f64) -> String {
    super::number::bayes_factor_words(
        ln_bf,
        "the groups differ",
        "the groups share one proportion",
    )
}

fn t3(x: f64) -> String {
    super::number::latex(x, 3)
}

/// "low to high" with the given number format (a range reads as words, not as "-0.2--0.4").
fn range(lo: f64, hi: f64, f: fn(f64) -> String) -> String {
    format!("{} to {}", f(lo), f(hi))
}

/// "estimate (low to high)".
fn ci(v: (f64, f64, f64), f: fn(f64) -> String) -> String {
    format!("{} ({})", f(v.0), range(v.1, v.2, f))
}

use super::{csv_bytes, header};

/// Text for LaTeX: every special character escaped (group, prior and column names come from
/// the user's files).
fn tex(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '\\' => out.push_str("\\textbackslash{}"),
            '&' | '%' | '$' | '#' | '_' | '{' | '}' => {
                out.push('\\');
                out.push(c);
            }
            '~' => out.push_str("\\textasciitilde{}"),
            '^' => out.push_str("\\textasciicircum{}"),
            _ => out.push(c),
        }
    }
    out
}

/// Text for a Markdown table cell: `|` would end the cell, a line break the row.
fn md(s: &str) -> String {
    s.replace('\\', "\\\\")
        .replace('|', "\\|")
        .replace(['\n', '\r'], " ")
}

/// The by-sex CSV tables.
///
/// # Errors
/// [`RenderError`] when a table cannot be built.
pub fn by_sex_tables(r: &AnalysisResult) -> Result<OutputSet, RenderError> {
    let (by_sex, analysis) = (&r.by_sex, &r.results);
    // CSV cells carry an ASCII minus (what every reader of CSV parses); the real minus sign
    // is for text.
    let c3 = |x: f64| super::number::cell(x, 3);
    let mut files = OutputSet::default();
    if let Some(a) = &by_sex.age {
        let mut rows = vec![vec![
            "quantity".to_string(),
            "estimate".into(),
            "lo".into(),
            "hi".into(),
        ]];
        for (q, v) in [
            ("mean_age_female", a.mean_female),
            ("mean_age_male", a.mean_male),
            ("difference_female_minus_male", a.difference),
        ] {
            rows.push(vec![q.into(), c3(v.0), c3(v.1), c3(v.2)]);
        }
        rows.push(vec![
            "p_females_die_younger".into(),
            c3(a.p_females_die_younger),
            String::new(),
            String::new(),
        ]);
        for c in &a.classes {
            rows.push(vec![
                format!("females_aged_{}", c.class.replace(' ', "_")),
                c3(c.female.0),
                c3(c.female.1),
                c3(c.female.2),
            ]);
            rows.push(vec![
                format!("males_aged_{}", c.class.replace(' ', "_")),
                c3(c.male.0),
                c3(c.male.1),
                c3(c.male.2),
            ]);
        }
        files.push("by_sex_age.csv", csv_bytes(rows)?);
    }
    if !by_sex.prevalence.is_empty() {
        let mut rows = vec![header(&[
            "condition",
            "n_recorded",
            "n_present",
            "n_left_out",
            "n_female",
            "n_male",
            "prevalence_female",
            "female_lo",
            "female_hi",
            "prevalence_male",
            "male_lo",
            "male_hi",
            "difference",
            "difference_lo",
            "difference_hi",
            "p_female_higher",
            "odds_ratio_median",
            "odds_ratio_lo",
            "odds_ratio_hi",
            "rhat",
            "effective_draws",
        ])];
        for p in &by_sex.prevalence {
            rows.push(vec![
                p.column.clone(),
                p.n_recorded.to_string(),
                p.n_present.to_string(),
                p.n_left_out.to_string(),
                f1(p.n_female),
                f1(p.n_male),
                c3(p.female.0),
                c3(p.female.1),
                c3(p.female.2),
                c3(p.male.0),
                c3(p.male.1),
                c3(p.male.2),
                c3(p.difference.0),
                c3(p.difference.1),
                c3(p.difference.2),
                c3(p.p_female_higher),
                c3(p.odds_ratio.0),
                c3(p.odds_ratio.1),
                c3(p.odds_ratio.2),
                format!("{:.3}", p.rhat),
                format!("{:.0}", p.ess),
            ]);
        }
        files.push("by_sex_prevalence.csv", csv_bytes(rows)?);
    }
    if !by_sex.numeric.is_empty() {
        let mut rows = vec![header(&[
            "outcome",
            "n_recorded",
            "n_left_out",
            "n_female",
            "n_male",
            "quantity",
            "estimate",
            "lo",
            "hi",
        ])];
        let c4 = |x: f64| super::number::cell(x, 4);
        for x in &by_sex.numeric {
            for (q, v) in [
                ("mean_female", x.mean_female),
                ("mean_male", x.mean_male),
                ("difference_female_minus_male", x.difference),
                ("sd_female", x.sd_female),
                ("sd_male", x.sd_male),
                ("median_female", x.median_female),
                ("median_male", x.median_male),
                ("p_female_higher", (x.p_female_higher, f64::NAN, f64::NAN)),
                ("rhat", (x.rhat, f64::NAN, f64::NAN)),
                ("effective_draws", (x.ess, f64::NAN, f64::NAN)),
            ] {
                rows.push(vec![
                    x.column.clone(),
                    x.n_recorded.to_string(),
                    x.n_left_out.to_string(),
                    f1(x.n_female),
                    f1(x.n_male),
                    q.to_string(),
                    c4(v.0),
                    c4(v.1),
                    c4(v.2),
                ]);
            }
        }
        files.push("by_sex_numeric.csv", csv_bytes(rows)?);
    }
    if let Some(lt) = &by_sex.life_tables {
        files.push("life_table.csv", life_table_csv(lt)?);
    }
    if let Some(h) = &by_sex.hazards {
        let mut rows = vec![header(&["quantity", "age", "estimate", "lo", "hi"])];
        let c6 = |x: f64| super::number::cell(x, 6);
        let (r0, r1) = h.range;
        for (q, v) in [
            ("alpha_female", h.alpha_female),
            ("beta_female", h.beta_female),
            ("alpha_male", h.alpha_male),
            ("beta_male", h.beta_male),
            ("hazard_ratio_female_male", h.hazard_ratio),
            ("p_female_higher", (h.p_female_higher, f64::NAN, f64::NAN)),
            (
                "makeham_identifiable_female",
                (h.makeham[0].identifiable, f64::NAN, f64::NAN),
            ),
            ("makeham_lambda_female", h.makeham[0].lambda),
            (
                "makeham_lr_statistic_female",
                (h.makeham[0].lr_statistic, f64::NAN, f64::NAN),
            ),
            (
                "makeham_identifiable_male",
                (h.makeham[1].identifiable, f64::NAN, f64::NAN),
            ),
            ("makeham_lambda_male", h.makeham[1].lambda),
            (
                "makeham_lr_statistic_male",
                (h.makeham[1].lr_statistic, f64::NAN, f64::NAN),
            ),
        ] {
            let age = if q.starts_with("hazard_ratio") || q.starts_with("p_female") {
                format!(
                    "{}-{}",
                    super::number::short(r0, 1),
                    super::number::short(r1, 1)
                )
            } else {
                String::new()
            };
            rows.push(vec![q.to_string(), age, c6(v.0), c6(v.1), c6(v.2)]);
        }
        for (age, f, m) in &h.curve {
            for (q, v) in [("hazard_female", f), ("hazard_male", m)] {
                rows.push(vec![
                    q.to_string(),
                    super::number::cell(*age, 0),
                    c6(v.0),
                    c6(v.1),
                    c6(v.2),
                ]);
            }
        }
        files.push("hazards.csv", csv_bytes(rows)?);
    }
    if !by_sex.sex_ratio.is_empty() {
        let mut rows = vec![header(&[
            "group",
            "n",
            "n_estimable",
            "reference_ratio",
            "sex_ratio_median",
            "sex_ratio_lo",
            "sex_ratio_hi",
            "p_more_males_than_reference",
            "log10_bf_reference",
        ])];
        for x in &by_sex.sex_ratio {
            rows.push(vec![
                x.group.clone().unwrap_or_else(|| "all".into()),
                x.n.to_string(),
                x.n_estimable.to_string(),
                super::number::cell(x.reference, 1),
                super::number::cell(x.median, 1),
                super::number::cell(x.lo, 1),
                super::number::cell(x.hi, 1),
                c3(x.p_more_males),
                c3(x.ln_bf_reference / LN_10),
            ]);
        }
        files.push("sex_ratio.csv", csv_bytes(rows)?);
    }
    let mut rows = vec![std::iter::once("age_class".to_string())
        .chain(Category::ALL.iter().map(|c| c.as_str().to_string()))
        .collect::<Vec<_>>()];
    let adult_unknown: Vec<bool> = r
        .assemblage
        .individuals
        .iter()
        .map(|i| i.age == Some(crate::data::AgeAtDeath::Adult))
        .collect();
    for (label, counts) in category_by_age(
        &by_sex.ages,
        &analysis.main.categories,
        &by_sex.age_classes,
        &adult_unknown,
    ) {
        rows.push(
            std::iter::once(label)
                .chain(counts.iter().map(|c| c.to_string()))
                .collect(),
        );
    }
    files.push("category_by_age.csv", csv_bytes(rows)?);
    Ok(files)
}

/// `life_table.csv`, tidy: one row per sex, age class and quantity (deaths, dx, lx, qx, Lx,
/// Tx, ex) with its mean over the joint draws, its 95% interval for these dead and its 95%
/// interval for the population (empty for deaths, a count of these dead only).
fn life_table_csv(lt: &crate::summary::LifeTables) -> Result<Vec<u8>, RenderError> {
    let mut rows = vec![header(&[
        "sex",
        "age_class",
        "age_from",
        "age_to",
        "quantity",
        "estimate",
        "lo",
        "hi",
        "population_lo",
        "population_hi",
    ])];
    let c3 = |x: f64| super::number::cell(x, 3);
    for (sex, table) in [("female", &lt.female), ("male", &lt.male), ("all", &lt.all)] {
        for row in table {
            let (d, dlo, dhi) = row.deaths;
            let deaths = crate::summary::life_table::Quantity {
                estimate: d,
                lo: dlo,
                hi: dhi,
                population_lo: f64::NAN,
                population_hi: f64::NAN,
            };
            for (q, v) in [
                ("deaths", deaths),
                ("dx", row.dx),
                ("lx", row.lx),
                ("qx", row.qx),
                ("Lx", row.big_lx),
                ("Tx", row.tx),
                ("ex", row.ex),
            ] {
                rows.push(vec![
                    sex.to_string(),
                    row.class.label.clone(),
                    super::number::cell(row.class.from, 1),
                    row.class
                        .to
                        .map(|t| super::number::cell(t, 1))
                        .unwrap_or_default(),
                    q.to_string(),
                    c3(v.estimate),
                    c3(v.lo),
                    c3(v.hi),
                    c3(v.population_lo),
                    c3(v.population_hi),
                ]);
            }
        }
    }
    csv_bytes(rows)
}

/// The figures (SVG).
///
/// # Errors
/// [`RenderError`] when plotting fails.
pub fn figures_svg(r: &AnalysisResult) -> Result<OutputSet, RenderError> {
    let (model, a, evidence, analysis, by_sex) =
        (&r.model, &r.assemblage, &r.evidence, &r.results, &r.by_sex);
    let mut out = OutputSet::default();
    let pts: Vec<(f64, f64, f64)> = analysis
        .main
        .p_female
        .iter()
        .zip(&analysis.individual_sensitivity)
        .filter_map(|(p, s)| Some((p.as_ref().copied()?, s.p_female_min?, s.p_female_max?)))
        .collect();
    let t = analysis.thresholds;
    out.push(
        "figures/p_female.svg",
        figures::p_female_figure(pts, [t.male, t.probable_male, t.probable_female, t.female])?,
    );
    let mut curves = Vec::new();
    // Posteriors already computed by the analysis: the chosen prior's, then the set's.
    let fitted = std::iter::once((&analysis.main, &analysis.fitted.posterior)).chain(
        analysis
            .sensitivity
            .iter()
            .zip(&analysis.posteriors)
            .filter(|(r, _)| r.prior.name != analysis.main.prior.name),
    );
    for (r, post) in fitted {
        if r.prior.is_fixed() || curves.len() >= 6 {
            continue;
        }
        let step = (post.grid.len() / 400).max(1);
        let pts: Vec<(f64, f64)> = (0..post.grid.len())
            .step_by(step)
            .map(|i| {
                (
                    post.grid[i],
                    post.mass[i] / (post.edges[i + 1] - post.edges[i]).max(f64::MIN_POSITIVE),
                )
            })
            .collect();
        curves.push((r.prior.name.clone(), pts));
    }
    out.push(
        "figures/pi_posterior.svg",
        figures::pi_posterior_figure(&curves)?,
    );
    let blocks: Vec<String> = model.blocks.iter().map(|b| b.id().to_string()).collect();
    // Individuals with usable evidence in the order of their total LR (ties in table order);
    // the figure builds the rows it draws.
    let mut order: Vec<(f64, usize)> = evidence
        .iter()
        .enumerate()
        .filter(|(_, e)| e.estimable)
        .map(|(i, e)| (e.ln_lr, i))
        .collect();
    order.sort_by(|x, y| x.0.total_cmp(&y.0));
    let row = |k: usize| -> figures::LrRow {
        let i = order[k].1;
        (
            a.individuals[i].id.clone(),
            evidence[i]
                .blocks
                .iter()
                .map(|b| (b.status == BlockStatus::Used).then_some(b.ln_lr / LN_10))
                .collect(),
        )
    };
    out.push(
        "figures/lr_by_region.svg",
        figures::lr_by_region_figure(&blocks, order.len(), &row)?,
    );
    if let Some(age) = &by_sex.age {
        out.push("figures/age_at_death.svg", figures::age_figure(age)?);
    }
    if let Some(lt) = &by_sex.life_tables {
        out.push(
            "figures/survivorship.svg",
            figures::survivorship_figure(lt)?,
        );
    }
    if let Some(h) = &by_sex.hazards {
        out.push("figures/hazard.svg", figures::hazard_figure(h)?);
    }
    // Drawn for up to 40 groups (their names must stay legible under the chart; a choice of
    // ours); sex_ratio.csv holds every group.
    if (2..=41).contains(&by_sex.sex_ratio.len()) {
        out.push(
            "figures/sex_ratio.svg",
            figures::sex_ratio_figure(&by_sex.sex_ratio)?,
        );
    }
    // A PNG beside every SVG, for word processors and journals that take raster images
    // (drawn in parallel, collected in the figures' order).
    use rayon::prelude::*;
    let pngs: Vec<(String, Vec<u8>)> = out
        .files
        .par_iter()
        .filter_map(|f| {
            let stem = f.name.strip_suffix(".svg")?;
            Some(figures::png_of(&f.name, &f.bytes).map(|png| (format!("{stem}.png"), png)))
        })
        .collect::<Result<_, _>>()?;
    for (name, png) in pngs {
        out.push(&name, png);
    }
    Ok(out)
}

/// The traits that entered some individual's evidence, and whether a latent block did (each
/// trait id copied once, not once per individual).
fn traits_used(model: &Model, evidence: &[IndividualEvidence]) -> (BTreeSet<String>, bool) {
    let mut used_traits: BTreeSet<String> = BTreeSet::new();
    let mut used_latent = false;
    for e in evidence {
        for (b, be) in model.blocks.iter().zip(&e.blocks) {
            if be.status != BlockStatus::Used {
                continue;
            }
            for t in be.traits_used.iter() {
                if !used_traits.contains(t) {
                    used_traits.insert(t.clone());
                }
            }
            match b {
                Block::Latent(_) => used_latent = true,
                Block::Dna(_) | Block::DnaX(_) | Block::Equations(_) => {}
            }
        }
    }
    (used_traits, used_latent)
}

/// Whether the default model's femoral means (from Noussios et al. 2019) entered the run.
fn femoral_means_used(model: &Model, used_traits: &BTreeSet<String>) -> bool {
    !is_fitted(model)
        && model.name == "default"
        && (used_traits.contains("femur_head_diameter")
            || used_traits.contains("femur_midshaft_circumference"))
}

/// The sentence citing the recording standard of every trait used, traits grouped by the
/// works their catalogue entries cite: "glabella, mastoid process, … (Walker, 2008; Buikstra &
/// Ubelaker, 1994)". Empty when no trait was used.
fn recording_sentence(model: &Model, used_traits: &BTreeSet<String>) -> String {
    let mut groups: Vec<(String, Vec<String>)> = Vec::new();
    for d in model.catalogue.traits() {
        if !used_traits.contains(&d.id) {
            continue;
        }
        let cites: Vec<String> = citations::citation_keys(&d.source)
            .into_iter()
            .map(|(key, _)| match key.rsplit_once(' ') {
                Some((authors, year)) => format!("{authors}, {year}"),
                None => key,
            })
            .collect();
        if cites.is_empty() {
            continue;
        }
        let cites = cites.join("; ");
        match groups.iter_mut().find(|(c, _)| *c == cites) {
            Some((_, names)) => names.push(d.name.clone()),
            None => groups.push((cites, vec![d.name.clone()])),
        }
    }
    if groups.is_empty() {
        return String::new();
    }
    let mut s = format!(
        "Traits were recorded after their published standards: {}. ",
        groups
            .iter()
            .map(|(c, names)| format!("{} ({c})", names.join(", ")))
            .collect::<Vec<_>>()
            .join("; ")
    );
    if femoral_means_used(model, used_traits) {
        s.push_str("The model's per-sex means of the femoral measurements are those published by Noussios et al. (2019). ");
    }
    s
}

/// Published methods actually used in a run, as (key, reference) in author–year style, from
/// the traits that entered the evidence and whether a latent block did (`traits_used`).
pub fn references_used(
    model: &Model,
    used_traits: &BTreeSet<String>,
    used_latent: bool,
    by_sex: &BySex,
) -> Vec<String> {
    let mut refs = Vec::new();
    if used_latent {
        for key in [
            "Konigsberg & Hens 1998",
            "Curnow & Dunnett 1962",
            "Genz 1992",
            "Genz 2004",
            "Piessens et al. 1983",
        ] {
            refs.push(citations::work(key));
        }
    }
    if let Some(b) = &model.built_from {
        if used_latent && !refs.contains(&b.citation) {
            refs.push(b.citation.trim().to_string());
            refs.push(citations::work("McCullagh 1980"));
        }
    }
    // The works behind each trait used, from the catalogue's sources, in catalogue order.
    for d in model.catalogue.traits() {
        if !used_traits.contains(&d.id) {
            continue;
        }
        for (key, as_written) in citations::citation_keys(&d.source) {
            let r = citations::reference(&key, &as_written);
            if !refs.contains(&r) {
                refs.push(r);
            }
        }
    }
    let fitted = is_fitted(model);
    if fitted && used_latent {
        for key in [
            "McCullagh 1980",
            "Olsson 1979",
            "Olsson, Drasgow & Dorans 1982",
        ] {
            refs.push(citations::work(key));
        }
    }
    // The default model's femoral means come from Noussios et al.; a fitted model's do not.
    if femoral_means_used(model, used_traits) {
        refs.push(citations::work("Noussios et al. 2019"));
    }
    refs.push(citations::work("Bruzek et al. 2017"));
    refs.push(citations::work("ENFSI 2015"));
    if !by_sex.sex_ratio.is_empty() {
        refs.push(citations::work("Kass & Raftery 1995"));
    }
    if by_sex.hazards.is_some() {
        for key in [
            "Gompertz 1825",
            "Makeham 1860",
            "Wood et al. 2002",
            "Rubin 1987",
        ] {
            refs.push(citations::work(key));
        }
    }
    if by_sex.age.is_some() {
        refs.push(citations::work("Andridge & Little 2010"));
    }
    if by_sex.age.is_some() && by_sex.life_tables.is_some() {
        for key in [
            "Chiang 1984",
            "Acsádi & Nemeskéri 1970",
            "Rubin 1981",
            "Wood et al. 1992",
        ] {
            refs.push(citations::work(key));
        }
    }
    if !by_sex.prevalence.is_empty() || !by_sex.numeric.is_empty() {
        refs.push(citations::work("Tanner & Wong 1987"));
        refs.push(citations::work("Gelman et al. 2013"));
    }
    refs
}

/// Whether the model was written by `tessera fit` (it then records what it was fitted to).
fn is_fitted(model: &Model) -> bool {
    model.fitted_to.is_some()
}

/// "file `x.csv`, SHA-256 `…`; 116 females and 124 males": the reference a fitted model
/// records.
fn fitted_reference(model: &Model) -> String {
    match &model.fitted_to {
        Some(o) => format!(
            "file `{}`, SHA-256 `{}`; {} females and {} males",
            o.file, o.sha256, o.females, o.males
        ),
        None => "see the model's provenance".to_string(),
    }
}

/// The methods paragraph and its reference list.
pub fn methods_md(r: &AnalysisResult) -> String {
    let (model, a, evidence, analysis, draws, by_sex, run) = (
        &r.model,
        &r.assemblage,
        &r.evidence,
        &r.results,
        &r.draws,
        &r.by_sex,
        &r.run,
    );
    let main = &analysis.main;
    let (used_traits, used_latent) = traits_used(model, evidence);
    let used_blocks: Vec<String> = model
        .blocks
        .iter()
        .enumerate()
        .filter(|(k, _)| {
            evidence
                .iter()
                .any(|e| e.blocks[*k].status == BlockStatus::Used)
        })
        .map(|(_, b)| match b {
            Block::Latent(l) => format!(
                "{} ({})",
                if l.label.is_empty() { &l.id } else { &l.label },
                l.traits
                    .iter()
                    .map(|t| model
                        .catalogue
                        .get(&t.id)
                        .map(|d| d.name.clone())
                        .unwrap_or_else(|| t.id.clone()))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
            Block::Equations(e) => format!(
                "{} (published logistic equations)",
                if e.label.is_empty() { &e.id } else { &e.label }
            ),
            Block::Dna(d) => format!(
                "{} (reads mapped to the X and Y chromosomes)",
                if d.label.is_empty() { &d.id } else { &d.label }
            ),
            Block::DnaX(d) => format!(
                "{} (reads mapped to the X chromosome and the autosomes)",
                if d.label.is_empty() { &d.id } else { &d.label }
            ),
        })
        .collect();
    let has_latent = model.blocks.iter().any(|b| matches!(b, Block::Latent(_)));
    let mut s = String::new();
    let _ = writeln!(s, "# Methods: sex estimation\n");
    let _ = write!(
        s,
        "Biological sex was estimated for the {} individuals of the assemblage ({} with usable evidence) with tessera {} (model `{}`), which combines all surviving evidence of each individual in one Bayesian computation. The evidence was treated as {}, assumed independent given sex: {}. ",
        main.n_individuals, main.n_estimable, run.version, model.name, match used_blocks.len() { 1 => "one block".to_string(), n => format!("{n} blocks") }, used_blocks.join("; ")
    );
    let _ = write!(s, "{}", recording_sentence(model, &used_traits));
    if has_latent {
        let _ = write!(s, "Ordinal trait scores and measurements were modelled jointly by a multivariate cumulative probit with correlated latent traits (Konigsberg & Hens, 1998), extended to measurements; unobserved traits were integrated out, and probabilities of ordinal score combinations were computed exactly in one and two dimensions (Genz, 2004); in three or more, as a one-dimensional integral where the within-sex correlations have one-factor form (Curnow & Dunnett, 1962), in three dimensions otherwise as a one-dimensional integral of the bivariate normal probability (Genz, 2004), both by adaptive Gauss–Kronrod quadrature (Piessens et al., 1983) to a relative error of 1e-10, and where neither applies by Genz's separation-of-variables method with randomised quasi-Monte Carlo (Genz, 1992). ");
        let sides = match run.side_policy.as_str() {
            "right-first" => {
                "the right side was used, and the left only where the right was not recorded"
            }
            "both" => "both sides were combined as two observations of the same latent trait",
            _ => "the left side was used, and the right only where the left was not recorded",
        };
        let _ = write!(s, "Traits not recorded were assumed missing at random with respect to sex (they neither count for nor against either sex); where both sides of a bilateral trait were recorded, {sides}; a score recorded as a range of two grades (e.g. 3-4) was taken to mean one of those grades, its latent value lying between the lower edge of the first and the upper edge of the second. ");
        if is_fitted(model) {
            let _ = write!(s, "The model's parameters were estimated with tessera from a documented reference collection ({}) by two-step maximum likelihood: cumulative probit margins for the ordinal traits (McCullagh, 1980), per-sex means and standard deviations of the measurements, and polychoric, polyserial or Pearson within-sex correlations given the margins (Olsson, 1979; Olsson, Drasgow & Dorans, 1982). ", fitted_reference(model));
        }
        if let Some(b) = &model.built_from {
            let _ = write!(s, "The model's parameters were built with tessera from the summary statistics published for a reference sample ({}: {}; {} females and {} males): the per-sex means and standard deviations of the measurements as published, and for ordinal traits a cumulative probit fitted by maximum likelihood to the published grade counts by sex (McCullagh, 1980). Where the publication gives no within-sex correlations, the model's are an assumption, recorded in its provenance. ", short_citation(&b.citation), b.sample.trim().trim_end_matches('.'), b.females, b.males);
        }
    }
    for f in &model.included {
        let _ = write!(
            s,
            "The block{} {} {} taken unchanged from model `{}` (SHA-256 `{}`), not estimated from this model's own sources. ",
            if f.blocks.len() == 1 { "" } else { "s" },
            f.blocks.iter().map(|b| format!("`{b}`")).collect::<Vec<_>>().join(", "),
            if f.blocks.len() == 1 { "was" } else { "were" },
            f.name,
            f.sha256
        );
    }
    for (k, b) in model.blocks.iter().enumerate() {
        let used = evidence
            .iter()
            .any(|e| e.blocks[k].status == BlockStatus::Used);
        if let (Block::Latent(l), true) = (b, used) {
            if let Some(a) = &l.age {
                let _ = write!(
                    s,
                    "In block `{}` each latent mean changed linearly with age at death, with a slope per trait and sex, from its value at {} years; outside the ages of the model's reference sample ({}–{} years) the mean at the nearer limit was used, the slope never extrapolated. Each individual's likelihood was averaged over the age interval recorded for them, age taken as uniform within it (8-point Gauss–Legendre quadrature); an open class such as 50+ ran to {} years, and an individual of unknown adult age was averaged over {}–{} years. ",
                    l.id, a.centre, a.lowest, a.highest, a.highest, a.lowest, a.highest
                );
            }
        }
        if let (Block::DnaX(d), true) = (b, used) {
            let _ = write!(
                s,
                "Reads mapped to the X chromosome were compared with reads mapped to the autosomes (the X:autosome ratio Rx of Mittnik et al., 2016: about 1 for XX, 0.5 for XY), the count of X reads modelled as beta-binomial around an expected X share of {} for XX and {:.5} for XY (half the X dosage), with concentration {} and the same contamination mixture (probability {}); counts fitting neither sex were flagged and not used. {} ",
                d.x_share,
                d.x_share / (2.0 - d.x_share),
                d.beta[0].0 / d.x_share,
                d.contamination,
                match d.beside_y_ratio {
                    crate::model::spec::BesideYRatio::NotCounted => "Where the Y fraction of the same reads was also available, the X:autosome ratio was not counted again (the two share the X reads and any contamination), and individuals whose two ratios pointed to different sexes were flagged and neither ratio used.",
                    crate::model::spec::BesideYRatio::CountedAsIndependent => "Where the Y fraction of the same reads was also available, both ratios were counted, as if independent given sex (an assumption: they share the X reads and any contamination); individuals whose two ratios pointed to different sexes were flagged and neither ratio used.",
                }
            );
        }
        if let (Block::Dna(d), true) = (b, used) {
            let _ = write!(
                s,
                "Ancient-DNA read counts were modelled as beta-binomial in the fraction of reads mapped to Y among those mapped to X and Y, per sex (after the Y-ratio reasoning of Skoglund et al., 2013), mixed with a probability of {} that a sample's reads are not the individual's own (contamination or mix-up, from someone of either sex; a stated assumption), which bounds the likelihood ratio of one sample at {:.0} either way; counts fitting neither sex were flagged and not used. ",
                d.contamination,
                d.lr_bound()
            );
        }
    }
    let _ = write!(
        s,
        "Morphological evidence was not used for individuals younger than {} years. ",
        model.minimum_age
    );
    let _ = write!(
        s,
        "Each individual's likelihood ratio (female:male) was combined with a {} prior on the proportion of females in the population, which was itself estimated from the assemblage; individual posterior probabilities of being female were integrated over that proportion. ",
        main.prior.name
    );
    if let Some(h) = &main.hyper {
        let _ = write!(
            s,
            "Groups ({}) were modelled hierarchically, each group's proportion female following a Beta distribution around a shared mean with a log-uniform prior on its concentration; the Bayes factor for groups that differ against a shared proportion was {} (log10; {}). ",
            main.groups.iter().map(|g| g.group.as_str()).collect::<Vec<_>>().join(", "),
            super::number::reading(h.ln_bf_groups_differ / LN_10, 2),
            bf_words(h.ln_bf_groups_differ)
        );
    } else if !main.groups.is_empty() {
        let _ =
            write!(
            s,
            "The fixed prior fixed the proportion female of every group ({}) at the same value. ",
            main.groups.iter().map(|g| g.group.as_str()).collect::<Vec<_>>().join(", "),
        );
    }
    let _ = write!(s, "{}", categories_sentence(&analysis.thresholds));
    let further: Vec<&crate::assemblage::PriorResult> = analysis.results().skip(1).collect();
    let fixed: Vec<f64> = further
        .iter()
        .filter_map(|r| r.prior.fixed_value())
        .collect();
    let _ = write!(
        s,
        "The sensitivity of every result to the prior was assessed by repeating the analysis under {} further priors{}{}. ",
        further.len(),
        match (fixed.iter().copied().reduce(f64::min), fixed.iter().copied().reduce(f64::max)) {
            (Some(lo), Some(hi)) if fixed.len() > 1 => format!(", {} of them fixed proportions from {lo} to {hi}", fixed.len()),
            (Some(v), _) => format!(", one of them the fixed proportion {v}"),
            _ => String::new(),
        },
        if main.groups.is_empty() || fixed.is_empty() { "" } else { " (a fixed proportion applied to every group alike)" }
    );
    if by_sex.age.is_some() || !by_sex.prevalence.is_empty() || !by_sex.numeric.is_empty() {
        let _ = write!(
            s,
            "Analyses by sex left out individuals without evidence of sex and subadults (counted beside each table){}{}. ",
            if by_sex.age.is_some() { format!("; age at death by sex was computed over {} joint posterior draws of every individual's sex, so that uncertainty in sex is carried into it, ages recorded as intervals drawn uniformly within them and open classes (50+, adult of unknown age) from the known older ages of the same sex in each draw (hot-deck imputation; Andridge & Little, 2010){}", draws.mu.len(), match &by_sex.life_tables {
                Some(lt) => format!(", and so were abridged life tables by sex (classes {}; deaths evenly spread within classes, the open last class closed at {} years; Chiang, 1984; Acsádi & Nemeskéri, 1970), with intervals for the population's table from a Bayesian bootstrap of the dead (Rubin, 1981), which assumes them a fair sample of the deaths of a stationary population (Wood et al., 1992)", lt.classes.0.iter().map(|c| c.label.as_str()).collect::<Vec<_>>().join(", "), crate::report::number::short(lt.open_end, 1)),
                None => String::new(),
            }) } else { String::new() },
            if by_sex.prevalence.is_empty() { String::new() } else { let chain = crate::summary::ChainLength::default_with_seed(run.seed); format!(
                "; the prevalence of {} by sex was estimated from the joint posterior of every individual's sex and the two prevalences (uniform priors), by Gibbs sampling with data augmentation (Tanner & Wong, 1987), so that the condition informs each sex and the comparison is not diluted toward no difference; {} chains of {} kept draws each were checked by split-R-hat and effective sample size (Gelman et al., 2013)",
                by_sex.prevalence.iter().map(|p| p.column.replace('_', " ")).collect::<Vec<_>>().join(", "),
                chain.chains,
                chain.kept(),
            ) }
        );
        if !by_sex.numeric.is_empty() {
            let _ = write!(
                s,
                "The means of {} by sex were estimated in the same way, from the joint posterior of every individual's sex and a normal distribution of the outcome in each sex (normal–inverse-gamma priors, weakly informative and centred on the pooled values; Gelman et al., 2013), so that the difference between the sexes is not diluted. ",
                by_sex.numeric.iter().map(|p| p.column.replace('_', " ")).collect::<Vec<_>>().join(", "),
            );
        }
    }
    if let Some(h) = &by_sex.hazards {
        let _ = write!(
            s,
            "Adult mortality by sex was modelled by a Gompertz hazard (Gompertz, 1825) fitted by maximum likelihood to the ages at death as recorded, interval-censored (Wood et al., 2002), in each joint draw of sex, with a draw from each fit's normal approximation pooled over the draws (Rubin, 1987), and a Makeham term (Makeham, 1860) was tried where the data could identify it; the sexes were compared by the ratio of their cumulative hazards over ages {} to {}. ",
            crate::report::number::short(h.range.0, 1),
            crate::report::number::short(h.range.1, 1)
        );
    }
    if let Some(x) = by_sex.sex_ratio.first() {
        let _ = write!(
            s,
            "The sex ratio of the population behind the assemblage{}, with individuals sexed by DNA alone counted like any other, was compared with a reference of {} males per 100 females by its posterior and by the Bayes factor of the reference ratio against the prior's (Kass & Raftery, 1995). ",
            if by_sex.sex_ratio.len() > 1 { ", and behind each group taken on its own" } else { "" },
            crate::report::number::short(x.reference, 1)
        );
    }
    if let Some(rc) = &r.recalibration {
        let _ = write!(s, "{}", recalibration_sentences(r, rc));
    }
    if let Some(c) = &r.correlation_check {
        let _ = write!(s, "{} ", correlation_check_sentences(r, c));
    }
    let _ = writeln!(
        s,
        "{} The analysis used seed {}; the input file's SHA-256 is `{}`.\n",
        headline_sentence(main),
        run.seed,
        a.sha256
    );
    let _ = writeln!(
        s,
        "Note: these are estimates, not identifications. {}\n",
        if model.provenance.to_lowercase().contains("illustrative") {
            "The model's parameters are illustrative (see its provenance); a published analysis should use a model fitted to a documented reference collection of a relevant population."
        } else {
            ""
        }
    );
    let _ = writeln!(s, "## References\n");
    for r in references_used(model, &used_traits, used_latent, by_sex) {
        let _ = writeln!(s, "- {r}");
    }
    let _ = writeln!(s, "\nReferences are in APA style; check them against the sources and restyle them for your journal before publication.");
    s
}

/// How individuals were put in categories. With the cut-offs at 0.95 / 0.05, the firm calls
/// follow the published convention of assigning a sex only at a posterior probability of at
/// least 0.95 (Bruzek et al. 2017); the three labels between are this program's own.
fn categories_sentence(t: &crate::assemblage::Thresholds) -> String {
    let convention = t.female == 0.95 && t.male == 0.05;
    format!(
        "{} An individual was labelled female when P(female) ≥ {}, male when P(female) ≤ {}, and otherwise probable female ({} to {}), indeterminate ({} to {}) or probable male ({} to {}){}. The likelihood ratios (the evidence alone, before any prior) are described with the verbal scale of the ENFSI guideline (ENFSI, 2015); an individual's category depends on the prior as well, so the two may differ in strength. ",
        if convention {
            "Sex was assigned only when its posterior probability reached 0.95, the published convention for a firm call (Bruzek et al., 2017)."
        } else {
            "The cut-offs on P(female) were chosen by the analyst."
        },
        t.female,
        t.male,
        t.probable_female,
        t.female,
        t.probable_male,
        t.probable_female,
        t.male,
        t.probable_male,
        if convention {
            "; these intermediate labels and their cut-offs are this program's, not part of the convention"
        } else {
            ""
        },
    )
}

/// The recalibration in words: what was recalibrated, how, whether the chains converged, and
/// which outputs use the recalibrated means (only `recalibrated_individuals.csv`: every other
/// table and figure uses the model's reference means).
fn recalibration_sentences(
    r: &AnalysisResult,
    rc: &crate::assemblage::recalibration::Recalibration,
) -> String {
    let mut traits: Vec<String> = Vec::new();
    for m in &rc.means {
        let name = r
            .model
            .catalogue
            .get(&m.trait_id)
            .map(|d| d.name.clone())
            .unwrap_or_else(|| m.trait_id.clone());
        if !traits.contains(&name) {
            traits.push(name);
        }
    }
    if traits.is_empty() {
        return "Recalibration of the measurements was asked for, but the model has no block made only of measurements, so nothing was recalibrated. ".into();
    }
    let st = &rc.settings;
    format!(
        "The per-sex means of the measurements ({}) were recalibrated to this assemblage: each mean of the target population had a normal prior centred on the reference mean with a standard deviation of {} reference within-sex SD, the reference within-sex covariances were kept, and the other blocks anchored each individual's sex; the joint posterior was sampled by Gibbs sampling with data augmentation of missing measurements (Tanner & Wong, 1987), {} chains of {} iterations ({} discarded), checked by split-R-hat and effective sample size (Gelman et al., 2013){}. The tables, counts and figures reported here use the model's reference means; the posterior probabilities with the recalibrated means are given separately (recalibrated_individuals.csv), where {}. ",
        traits.join(", "),
        st.shift,
        st.chains,
        st.iterations,
        st.burn_in,
        if rc.warnings.is_empty() {
            format!("; every parameter met R-hat ≤ {} and ESS ≥ {}", st.max_rhat, st.min_ess)
        } else {
            format!("; {} did not meet R-hat ≤ {} and ESS ≥ {}", rc.warnings.len(), st.max_rhat, st.min_ess)
        },
        match r.recalibration_changes() {
            0 => "no individual changes category".to_string(),
            1 => "one individual changes category".to_string(),
            n => format!("{n} individuals change category"),
        },
    )
}

/// The readable report and the LaTeX tables; `files` are the names of every file of the
/// run (listed in the report). Each section writes its Markdown and, where it has a table,
/// the same table in LaTeX.
pub fn report_md_and_tex(r: &AnalysisResult, files: &[String]) -> (String, String) {
    let mut m = String::new();
    let mut t = String::new();
    what_was_analysed(r, &mut m, &mut t);
    // Warnings come before the results they qualify: the flagged blocks, then the reader's.
    let flagged = &r.flagged;
    let a = &r.assemblage;
    if !a.warnings.is_empty() || !flagged.is_empty() {
        let _ = writeln!(m, "## Warnings\n");
        for f in super::named_at_most(
            flagged.len(),
            flagged.iter().cloned(),
            "the `flags` column of individuals.csv",
        ) {
            let _ = writeln!(m, "- {f}");
        }
        for w in crate::data::problem::shown_warnings(
            &a.warnings,
            crate::data::problem::WARNINGS_SHOWN_PER_KIND,
        ) {
            let _ = writeln!(m, "- {w}");
        }
        let _ = writeln!(m);
    }
    for section in [
        proportion_female_section,
        categories_section,
        sensitivity_section,
        groups_section,
        sex_ratio_section,
        age_section,
        life_table_section,
        hazard_section,
        prevalence_section,
        recalibration_section,
        correlation_check_section,
    ] {
        section(r, &mut m, &mut t);
    }
    // The figures, shown (PNG beside each SVG; the SVG is the one to edit or print large).
    let captions = [
        ("figures/p_female.png", "Each individual's posterior probability of female under the chosen prior (dots), with its range across the priors of the sensitivity set (bars); dashed lines: the category cut-offs."),
        ("figures/pi_posterior.png", "Posterior of the proportion female of the assemblage (as one population) under each prior that is not fixed."),
        ("figures/lr_by_region.png", "log10 likelihood ratio of each body region for each individual with usable evidence."),
        ("figures/age_at_death.png", "Age at death by sex over the joint posterior draws."),
        ("figures/sex_ratio.png", "Sex ratio (males per 100 females) of the assemblage and of each group on its own: posterior median (dot) and 95% interval (bar), against the reference ratio (dashed), on a log scale."),
        ("figures/hazard.png", "Gompertz hazard of death by sex from the adult start (median over the joint posterior draws, 95% interval dotted), on a log scale."),
        ("figures/survivorship.png", "Survivorship (lx, per cent entering each age class) by sex over the joint posterior draws, with the 95% interval of the population's table (dotted)."),
    ];
    let shown: Vec<&(&str, &str)> = captions
        .iter()
        .filter(|(f, _)| files.iter().any(|x| x == f))
        .collect();
    if !shown.is_empty() {
        let _ = writeln!(m, "## Figures\n");
        for (k, (f, cap)) in shown.iter().enumerate() {
            let _ = writeln!(
                m,
                "![Figure {}]({f})\n\n*Figure {}.* {cap} (Vector version: `{}`.)\n",
                k + 1,
                k + 1,
                f.replace(".png", ".svg")
            );
        }
    }
    let _ = writeln!(m, "## Files\n");
    for f in files {
        let _ = writeln!(m, "- `{f}`");
    }
    (m, t)
}

/// The cautions, what was analysed, how to reproduce it, and the provenance of the model and prior.
fn what_was_analysed(r: &AnalysisResult, m: &mut String, _tex: &mut String) {
    let (model, a, analysis, run) = (&r.model, &r.assemblage, &r.results, &r.run);
    let main = &r.results.main;
    let _ = writeln!(m, "# Sex estimation report: {}\n", a.file);
    let _ = writeln!(m, "> Estimates, not identifications. Forensic casework requires validated methods, accredited practice and the rules of the jurisdiction. Biological sex is not gender. These are the remains of people.\n");
    let _ = writeln!(m, "## What was analysed\n");
    let _ = writeln!(
        m,
        "- Input: `{}` (SHA-256 `{}`), {} individuals, {} with usable evidence",
        a.file, a.sha256, main.n_individuals, main.n_estimable
    );
    let _ = writeln!(
        m,
        "- Model: `{}` ({}; SHA-256 `{}`)",
        model.name, run.model_file, model.sha256
    );
    let _ = writeln!(
        m,
        "- Prior: `{}`; sensitivity set of {} priors",
        main.prior.name,
        analysis.sensitivity.len()
    );
    let th = analysis.thresholds;
    let _ = writeln!(m, "- Thresholds on P(female): male ≤ {}, probable male ≤ {}, probable female ≥ {}, female ≥ {}", th.male, th.probable_male, th.probable_female, th.female);
    let _ = writeln!(m, "- Program: tessera {}, seed {}", run.version, run.seed);
    let _ = writeln!(m, "- Reproduce with: `{}`\n", run.command.join(" "));
    let _ = writeln!(
        m,
        "### Model provenance\n\n```\n{}\n```\n",
        model.provenance.trim()
    );
    let _ = writeln!(
        m,
        "### Prior provenance\n\n```\n{}\n```\n",
        r.results.main.prior.provenance.trim()
    );
}

/// The proportion female under every prior, and the one-sex Bayes factor.
fn proportion_female_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let (analysis, run) = (&r.results, &r.run);
    let main = &r.results.main;
    let _ = writeln!(
        m,
        "## Proportion female{}\n",
        if r.results.main.groups.is_empty() {
            ""
        } else {
            " (the assemblage as one population; the groups' model is under Groups)"
        }
    );
    let _ = writeln!(m, "| prior | mean | median | 95% interval | highest density | P(π < 0.5) | expected females |");
    let _ = writeln!(m, "|---|---|---|---|---|---|---|");
    let _ = writeln!(
        t,
        "% Tables written by tessera {}; requires \\usepackage{{booktabs}}.\n",
        run.version
    );
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Posterior of the proportion female under each prior.}}\n\\begin{{tabular}}{{lrrrr}}\n\\toprule\nPrior & Mean & 2.5\\% & 97.5\\% & Expected females \\\\\n\\midrule");
    // A fixed prior's row would only repeat its value (0.100 to 0.100): those priors are
    // summarised in one sentence below (the chosen prior keeps its row even when fixed).

    let fixed: Vec<&crate::assemblage::PriorResult> = analysis
        .results()
        .skip(1)
        .filter(|r| r.prior.is_fixed())
        .collect();
    for (k, r) in analysis.results().enumerate() {
        if k > 0 && r.prior.is_fixed() {
            continue;
        }
        let _ = writeln!(
            m,
            "| {} | {:.3} | {:.3} | {} | {} | {:.3} | {:.1} |",
            md(&r.prior.name),
            r.pi.mean,
            r.pi.median,
            range(r.pi.lo, r.pi.hi, f3),
            range(r.pi.hdi_lo, r.pi.hdi_hi, f3),
            r.pi.p_below_half,
            r.expected_females_one_population
        );
        let _ = writeln!(
            t,
            "{} & {:.3} & {:.3} & {:.3} & {:.1} \\\\",
            tex(&r.prior.name),
            r.pi.mean,
            r.pi.lo,
            r.pi.hi,
            r.expected_females_one_population
        );
    }
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
    if !fixed.is_empty() {
        let expected = |f: fn(f64, f64) -> f64| {
            fixed
                .iter()
                .map(|r| r.expected_females_one_population)
                .reduce(f)
                .unwrap_or(f64::NAN)
        };
        let values = |f: fn(f64, f64) -> f64| {
            fixed
                .iter()
                .filter_map(|r| r.prior.fixed_value())
                .reduce(f)
                .unwrap_or(f64::NAN)
        };
        let _ = writeln!(
            m,
            "\nThe sensitivity set also holds {} prior{} that fix the proportion female ({} to {}): under them the expected number of females runs from {:.1} to {:.1}; every individual under every prior is in sensitivity.csv.",
            fixed.len(),
            if fixed.len() == 1 { "" } else { "s" },
            super::number::short(values(f64::min), 3),
            super::number::short(values(f64::max), 3),
            expected(f64::min),
            expected(f64::max)
        );
    }
    let _ = writeln!(
        m,
        "\nA community of one sex against a mixed one: log10 Bayes factor {}; {}.\n",
        f1(main.ln_bf_one_sex / LN_10),
        super::number::bayes_factor_words(
            main.ln_bf_one_sex,
            "the community was of one sex",
            "it was mixed"
        )
    );
}

/// Individuals per category under the chosen prior.
fn categories_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let main = &r.results.main;
    let _ = writeln!(m, "## Categories\n");
    let _ = writeln!(m, "| category | individuals |\n|---|---|");
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Individuals per category under the {} prior.}}\n\\begin{{tabular}}{{lr}}\n\\toprule\nCategory & Individuals \\\\\n\\midrule", tex(&main.prior.name));
    for c in Category::ALL {
        let n = main.categories.iter().filter(|&&x| x == c).count();
        let _ = writeln!(m, "| {} | {} |", c.label(), n);
        let _ = writeln!(t, "{} & {} \\\\", c.label(), n);
    }
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
    // The categories and the verbal scale of the likelihood ratios measure different things.
    let noted: Vec<&str> = r
        .assemblage
        .individuals
        .iter()
        .zip(&r.evidence)
        .zip(&main.categories)
        .filter(|((_, e), c)| {
            e.estimable
                && crate::assemblage::category_note(
                    &r.results.thresholds,
                    **c,
                    e.ln_lr / LN_10,
                    &main.prior.name,
                )
                .is_some()
        })
        .map(|((i, _), _)| i.id.as_str())
        .collect();
    let _ = writeln!(
        m,
        "\nThe categories are cut-offs on P(female) under the {} prior, so they depend on the prior; the words beside each likelihood ratio (`lr_support` in individuals.csv, ENFSI 2015) grade the evidence alone. {}\n",
        md(&main.prior.name),
        if noted.is_empty() {
            "For every individual the two speak with the same strength.".to_string()
        } else {
            format!(
                "Where the two speak with different strength, `category_note` says why: {} ({}).",
                match noted.len() {
                    1 => "one individual".to_string(),
                    n => format!("{n} individuals"),
                },
                super::named_at_most(
                    noted.len(),
                    noted.iter().map(|id| id.to_string()),
                    "the `category_note` column of individuals.csv"
                )
                .join(", ")
            )
        }
    );
}

/// The recalibrated means beside the reference ones, and which outputs use them.
fn recalibration_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let Some(rc) = &r.recalibration else {
        return;
    };
    let _ = writeln!(
        m,
        "## Recalibrated measurements
"
    );
    let _ = writeln!(
        m,
        "{}
",
        recalibration_sentences(r, rc).trim_end()
    );
    if rc.means.is_empty() {
        return;
    }
    let _ = writeln!(m, "| measurement | sex | reference mean | recalibrated mean (95% interval) | R-hat | ESS |\n|---|---|---|---|---|---|");
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Per-sex means of the measurements: the reference model's and those recalibrated to this assemblage (posterior mean and 95\\% interval).}}\n\\begin{{tabular}}{{llrrrr}}\n\\toprule\nMeasurement & Sex & Reference & Recalibrated & R-hat & ESS \\\\\n\\midrule");
    for x in &rc.means {
        let name = r
            .model
            .catalogue
            .get(&x.trait_id)
            .map(|d| d.name.clone())
            .unwrap_or_else(|| x.trait_id.clone());
        let sex = if x.sex == "F" { "female" } else { "male" };
        let _ = writeln!(
            m,
            "| {} | {sex} | {:.2} | {:.2} ({}) | {:.3} | {:.0} |",
            md(&name),
            x.reference,
            x.mean,
            range(x.lo, x.hi, f2),
            x.rhat,
            x.ess
        );
        let _ = writeln!(
            t,
            "{} & {sex} & {} & {} ({} to {}) & {:.3} & {:.0} \\\\",
            tex(&name),
            super::number::latex(x.reference, 2),
            super::number::latex(x.mean, 2),
            super::number::latex(x.lo, 2),
            super::number::latex(x.hi, 2),
            x.rhat,
            x.ess
        );
    }
    let _ = writeln!(m);
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
}

/// The individuals whose category depends on the prior.
fn sensitivity_section(r: &AnalysisResult, m: &mut String, _tex: &mut String) {
    let (a, analysis) = (&r.assemblage, &r.results);
    let _ = writeln!(m, "\n## Prior sensitivity\n");
    let sens: Vec<_> = a
        .individuals
        .iter()
        .zip(&analysis.individual_sensitivity)
        .filter(|(_, s)| s.prior_sensitive)
        .collect();
    // Only the individuals named are written out.
    let named = sens.iter().map(|(i, s)| {
        format!(
            "{} (P(female) {:.3} to {:.3})",
            i.id,
            s.p_female_min.unwrap_or(f64::NAN),
            s.p_female_max.unwrap_or(f64::NAN)
        )
    });
    if sens.is_empty() {
        let _ = writeln!(m, "No individual's category depends on the prior.\n");
    } else {
        let _ = writeln!(
            m,
            "{} individuals change category under some prior of the set: {}.\n",
            sens.len(),
            super::named_at_most(
                sens.len(),
                named,
                "the `prior_sensitive` column of individuals.csv"
            )
            .join(", ")
        );
    }
}

/// The groups, with the hierarchy across them.
fn groups_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let main = &r.results.main;
    if !main.groups.is_empty() {
        let _ = writeln!(m, "## Groups\n\n| group | n | proportion female | 95% interval | expected females |\n|---|---|---|---|---|");
        let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Proportion female by group (hierarchical model).}}\n\\begin{{tabular}}{{lrrrr}}\n\\toprule\nGroup & n & Mean & 95\\% interval & Expected females \\\\\n\\midrule");
        for g in &main.groups {
            let _ = writeln!(
                m,
                "| {} | {} | {:.3} | {} | {:.1} |",
                md(&g.group),
                g.n,
                g.pi.mean,
                range(g.pi.lo, g.pi.hi, f3),
                g.expected_females
            );
            let _ = writeln!(
                t,
                "{} & {} & {:.3} & {} & {:.1} \\\\",
                tex(&g.group),
                g.n,
                g.pi.mean,
                range(g.pi.lo, g.pi.hi, t3),
                g.expected_females
            );
        }
        let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
        if let Some(h) = &main.hyper {
            let _ = writeln!(m, "\nPopulation behind the groups (μ): {:.3} ({}); groups that differ against groups that share one proportion: log10 Bayes factor {} ({}).\n", h.mu.mean, range(h.mu.lo, h.mu.hi, f3), super::number::reading(h.ln_bf_groups_differ / LN_10, 2), bf_words(h.ln_bf_groups_differ));
        }
    }
}

/// Age at death by sex over the joint draws.
fn age_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let by_sex = &r.by_sex;
    if let Some(age) = &by_sex.age {
        let _ = writeln!(m, "## Age at death by sex\n\nOver the joint draws ({} individuals with evidence of sex and a recorded age; interval ages imputed uniformly within their interval; an open class such as 50+ or an adult of unknown age takes, in each draw, the age of a random individual of the same sex whose known age is at or above the class's start, and is closed at {} years only where there is none){}:\n", age.n_with_age, crate::summary::OPEN_CLASS_END, left_out_clause(by_sex));
        let _ = writeln!(m, "| | mean | 95% interval |\n|---|---|---|");
        for (q, v) in [
            ("females", age.mean_female),
            ("males", age.mean_male),
            ("difference (F − M)", age.difference),
        ] {
            let _ = writeln!(m, "| {q} | {} | {} |", f1(v.0), range(v.1, v.2, f1));
        }
        let _ = writeln!(
            m,
            "\nP(females die younger on average) = {}.\n",
            f3(age.p_females_die_younger)
        );
        let _ = writeln!(
            m,
            "Number of individuals of each sex per age class (mean count over the draws, 95% interval):\n\n| age class | females (95% interval) | males (95% interval) |\n|---|---|---|"
        );
        let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Number of individuals of each sex per age class over the joint posterior draws (mean count and 95\\% interval).}}\n\\begin{{tabular}}{{lrr}}\n\\toprule\nAge class & Females & Males \\\\\n\\midrule");
        // Counts: the mean to one decimal, the interval's ends (whole individuals) as integers.
        let count = |v: (f64, f64, f64)| format!("{:.1} ({:.0} to {:.0})", v.0, v.1, v.2);
        for c in &age.classes {
            // A class nobody sexed falls in (subadults are left out of tables by sex) is not
            // a row of zeros.
            if c.female.2 == 0.0 && c.male.2 == 0.0 {
                continue;
            }
            let _ = writeln!(
                m,
                "| {} | {} | {} |",
                c.class,
                count(c.female),
                count(c.male)
            );
            let _ = writeln!(
                t,
                "{} & {} & {} \\\\",
                tex(&c.class),
                count(c.female),
                count(c.male)
            );
        }
        let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
        let _ = writeln!(m);
    }
}

/// Adult mortality by sex: the Gompertz parameters and the comparison over the age range.
fn hazard_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let Some(h) = &r.by_sex.hazards else {
        return;
    };
    let short = |x: f64| crate::report::number::short(x, 1);
    let (r0, r1) = (short(h.range.0), short(h.range.1));
    let _ = writeln!(
        m,
        "## Mortality by sex\n\nA Gompertz hazard h(x) = α e^(β(x − {start})) fitted by maximum likelihood to the ages at death as recorded (points, intervals and open classes, without closing them), for each sex in each of {} joint draws of sex, with a draw from each fit's normal approximation so that the intervals carry the sampling of the dead as well as the uncertainty in sex ({} individuals with evidence of sex and an age from {start} years{}). Medians and 95% intervals:\n",
        h.draws - h.draws_failed,
        h.n_with_age,
        left_out_clause(&r.by_sex),
        start = short(h.start),
    );
    let g = |x: (f64, f64, f64)| {
        format!(
            "{} ({})",
            crate::report::number::reading(x.0, 4),
            range(x.1, x.2, |v| crate::report::number::reading(v, 4))
        )
    };
    let _ = writeln!(m, "| | α (per year at {}) | β (per year) |\n|---|---|---|\n| females | {} | {} |\n| males | {} | {} |\n", short(h.start), g(h.alpha_female), g(h.beta_female), g(h.alpha_male), g(h.beta_male));
    let _ = writeln!(
        m,
        "Over ages {r0} to {r1}, the females' cumulative hazard is {} times the males' (95% interval {}); P(women died faster than men at these ages) = {}.{}\n",
        f3(h.hazard_ratio.0),
        range(h.hazard_ratio.1, h.hazard_ratio.2, f3),
        f3(h.p_female_higher),
        if h.draws_failed > 0 {
            format!(" In {} draws a sex had too few ages for a fit; they are left out.", h.draws_failed)
        } else {
            String::new()
        }
    );
    // The Makeham term (Makeham, 1860): deaths not from ageing.
    let words: Vec<String> = [("females", &h.makeham[0]), ("males", &h.makeham[1])]
        .iter()
        .map(|(who, k)| {
            if k.identifiable >= 0.5 {
                format!(
                    "for {who} it was identifiable in {:.0}% of the draws tried, λ = {} per year ({}), likelihood-ratio statistic {} against Gompertz alone (above {} is the 5% level for a term on its boundary)",
                    100.0 * k.identifiable,
                    crate::report::number::reading(k.lambda.0, 4),
                    range(k.lambda.1, k.lambda.2, |v| crate::report::number::reading(v, 4)),
                    crate::report::number::reading(k.lr_statistic, 2),
                    crate::report::number::reading(crate::summary::hazard::boundary_level(0.05), 2)
                )
            } else {
                format!(
                    "for {who} the data could not separate it from the Gompertz term (identifiable in {:.0}% of the draws tried)",
                    100.0 * k.identifiable
                )
            }
        })
        .collect();
    let _ = writeln!(
        m,
        "A Makeham term λ added to the hazard (deaths at a rate that does not grow with age; Makeham, 1860) was fitted in the first draws: {}.\n",
        words.join("; ")
    );
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Gompertz mortality by sex over the joint posterior draws (medians, 95\\% intervals); hazard ratio F:M of the cumulative hazards over ages {r0} to {r1}.}}\n\\begin{{tabular}}{{lrr}}\n\\toprule\n & $\\alpha$ & $\\beta$ \\\\\n\\midrule\nFemales & {} & {} \\\\\nMales & {} & {} \\\\\n\\midrule\nHazard ratio F:M & \\multicolumn{{2}}{{r}}{{{}}} \\\\\n\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n",
        tex(&g(h.alpha_female)), tex(&g(h.beta_female)), tex(&g(h.alpha_male)), tex(&g(h.beta_male)),
        tex(&format!("{} ({})", f3(h.hazard_ratio.0), range(h.hazard_ratio.1, h.hazard_ratio.2, f3))));
}

/// The sex ratio of the assemblage and of each group against the reference.
fn sex_ratio_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let tests = &r.by_sex.sex_ratio;
    let Some(first) = tests.first() else {
        return;
    };
    let reference = crate::report::number::short(first.reference, 1);
    let _ = writeln!(
        m,
        "## Sex ratio against a reference\n\nThe sex ratio of the population behind the assemblage, and behind each group taken on its own, against a reference of {reference} males per 100 females, under the {} prior. The Bayes factor weighs \"the ratio is the reference\" against \"any ratio, as the prior allows\" (Kass & Raftery, 1995); individuals sexed by DNA alone count like any other.\n\n| group | n | with evidence | males per 100 females | 95% interval | P(more males than the reference) | log10 Bayes factor | in words |\n|---|---|---|---|---|---|---|---|",
        md(&r.results.main.prior.name)
    );
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Sex ratio (males per 100 females) against a reference of {reference}: posterior median, 95\\% interval, probability of more males than the reference and log$_{{10}}$ Bayes factor of the reference ratio against the prior's.}}\n\\begin{{tabular}}{{lrrrrr}}\n\\toprule\nGroup & n & Ratio & 95\\% interval & P(more males) & log$_{{10}}$ BF \\\\\n\\midrule");
    for x in tests {
        let name = x.group.as_deref().unwrap_or("all");
        let words = crate::report::number::bayes_factor_words(
            x.ln_bf_reference,
            "the ratio is the reference",
            "it is another",
        );
        let _ = writeln!(
            m,
            "| {} | {} | {} | {:.0} | {} | {} | {} | {words} |",
            md(name),
            x.n,
            x.n_estimable,
            x.median,
            range(x.lo, x.hi, |v| format!("{v:.0}")),
            f3(x.p_more_males),
            crate::report::number::reading(x.ln_bf_reference / LN_10, 2)
        );
        let _ = writeln!(
            t,
            "{} & {} & {:.0} & {:.0} to {:.0} & {} & {} \\\\",
            tex(name),
            x.n,
            x.median,
            x.lo,
            x.hi,
            f3(x.p_more_males),
            crate::report::number::latex(x.ln_bf_reference / LN_10, 2)
        );
    }
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
    let _ = writeln!(m);
}

/// The life tables by sex: per class, the deaths, qx and ex of each sex with their intervals.
fn life_table_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let by_sex = &r.by_sex;
    let Some(lt) = &by_sex.life_tables else {
        return;
    };
    let first = lt.classes.0.first().map(|c| c.from).unwrap_or_default();
    let last = lt.classes.0.last().map(|c| c.from).unwrap_or_default();
    let _ = writeln!(
        m,
        "## Life tables by sex

Abridged life tables (radix 100) over the joint draws of sex and of each age within its recorded interval ({} individuals with evidence of sex and a recorded age{}). Deaths are counts among these dead (mean and 95% interval over the draws); qx and ex are given with the 95% interval of the population's table, which adds the sampling of the dead (Bayesian bootstrap, Rubin, 1981) and assumes, as palaeodemography does, that they are a fair sample of the deaths of a stationary population (see Wood et al., 1992). Deaths are taken as evenly spread within each class; the open last class is closed at {} years for its years lived, so its ex, {} years, is that assumption and not a finding. Every quantity, with both intervals, is in life_table.csv.\n",
        lt.n_with_age,
        left_out_clause(by_sex),
        crate::report::number::short(lt.open_end, 1),
        crate::report::number::short((lt.open_end - last) / 2.0, 1),
    );
    if lt.below_first_class > 0.0 {
        let _ = writeln!(
            m,
            "{} individuals per draw on average have an age below {} years, where the tables start, and are not in them.\n",
            f1(lt.below_first_class),
            crate::report::number::short(first, 1)
        );
    }
    let _ = writeln!(
        m,
        "| age class | female deaths | female qx | female ex (years) | male deaths | male qx | male ex (years) |\n|---|---|---|---|---|---|---|"
    );
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Life tables by sex over the joint posterior draws: deaths, probability of dying in the class ($q_x$) and mean years still to live ($e_x$); deaths with their 95\\% interval among these dead, $q_x$ and $e_x$ with the 95\\% interval of the population's table (Bayesian bootstrap). The $e_x$ of the open last class follows from closing it at {} years.}}\n\\begin{{tabular}}{{lrrrrrr}}\n\\toprule\nAge class & Female deaths & Female $q_x$ & Female $e_x$ & Male deaths & Male $q_x$ & Male $e_x$ \\\\\n\\midrule", crate::report::number::short(lt.open_end, 1));
    let count = |v: (f64, f64, f64)| format!("{:.1} ({:.0} to {:.0})", v.0, v.1, v.2);
    // The population's interval: what a paper says of the community, not only of these dead.
    let with = |v: crate::summary::life_table::Quantity, f: fn(f64) -> String| {
        if v.estimate.is_finite() {
            format!(
                "{} ({})",
                f(v.estimate),
                range(v.population_lo, v.population_hi, f)
            )
        } else {
            "—".to_string()
        }
    };
    for (fc, mc) in lt.female.iter().zip(&lt.male) {
        let cells = [
            count(fc.deaths),
            with(fc.qx, f3),
            with(fc.ex, f1),
            count(mc.deaths),
            with(mc.qx, f3),
            with(mc.ex, f1),
        ];
        let _ = writeln!(m, "| {} | {} |", fc.class.label, cells.join(" | "));
        let _ = writeln!(
            t,
            "{} & {} \\\\",
            tex(&fc.class.label),
            cells.iter().map(|c| tex(c)).collect::<Vec<_>>().join(" & ")
        );
    }
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
    let _ = writeln!(m);
}

/// "; left out and counted beside: 3 individuals without evidence of sex", or nothing.
fn left_out_clause(by_sex: &BySex) -> String {
    by_sex
        .left_out
        .sentence()
        .map(|s| format!("; left out and counted beside: {s}"))
        .unwrap_or_default()
}

/// Prevalence by sex of each condition column.
fn prevalence_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let by_sex = &r.by_sex;
    if !by_sex.prevalence.is_empty() {
        let _ = writeln!(m, "## Prevalence by sex\n\nFrom the joint posterior of every individual's sex and the prevalences: the condition informs each sex, so the comparison is not diluted toward no difference. Posterior means with 95% intervals; the odds ratio is the posterior median{}.\n", left_out_clause(by_sex));
        let _ = writeln!(m, "| condition | recorded | left out | females | males | difference F − M | P(higher in females) | odds ratio F:M |\n|---|---|---|---|---|---|---|---|");
        let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Prevalence by sex from the joint posterior of sex and prevalence (posterior means, odds ratio median; 95\\% intervals).}}\n\\begin{{tabular}}{{lrrrr}}\n\\toprule\nCondition & Females & Males & Difference & Odds ratio \\\\\n\\midrule");
        for p in &by_sex.prevalence {
            let cells = |f: fn(f64) -> String| {
                [p.female, p.male, p.difference, p.odds_ratio].map(|v| ci(v, f))
            };
            let [f, ml, d, or] = cells(f3);
            let _ = writeln!(
                m,
                "| {} | {} | {} | {f} | {ml} | {d} | {} | {or} |",
                md(&p.column),
                p.n_recorded,
                p.n_left_out,
                f3(p.p_female_higher)
            );
            let [f, ml, d, or] = cells(t3);
            let _ = writeln!(t, "{} & {f} & {ml} & {d} & {or} \\\\", tex(&p.column));
        }
        let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
        let _ = writeln!(m);
    }
    numeric_section(r, m, t);
    if !by_sex.prevalence.is_empty() || !by_sex.numeric.is_empty() {
        let _ = writeln!(
            m,
            "Outcome columns are never used as evidence of sex: that would be circular.\n"
        );
        for n in &by_sex.notes {
            let _ = writeln!(m, "- {n}");
        }
        if !by_sex.notes.is_empty() {
            let _ = writeln!(m);
        }
    }
}

/// Each numeric outcome by sex: means, medians and the difference of the means.
fn numeric_section(r: &AnalysisResult, m: &mut String, t: &mut String) {
    let by_sex = &r.by_sex;
    if by_sex.numeric.is_empty() {
        return;
    }
    let _ = writeln!(m, "## Measurements and scores by sex\n\nFrom the joint posterior of every individual's sex and a normal distribution of the outcome in each sex (weakly informative priors centred on the pooled values): the outcome informs each sex, so the difference is not diluted toward none. Posterior means of the means with 95% intervals; the medians are those of the recorded values among the individuals drawn female and male{}.\n", left_out_clause(by_sex));
    let _ = writeln!(m, "| outcome | recorded | left out | mean, females | mean, males | difference F − M | P(higher in females) | median, females | median, males |\n|---|---|---|---|---|---|---|---|---|");
    let _ = writeln!(t, "\\begin{{table}}\n\\centering\n\\caption{{Measurements and scores by sex from the joint posterior of sex and outcome (posterior means with 95\\% intervals).}}\n\\begin{{tabular}}{{lrrrr}}\n\\toprule\nOutcome & Females & Males & Difference & P(higher in females) \\\\\n\\midrule");
    let f2 = |x: f64| crate::report::number::reading(x, 2);
    let t2 = |x: f64| crate::report::number::latex(x, 2);
    for x in &by_sex.numeric {
        let _ = writeln!(
            m,
            "| {} | {} | {} | {} | {} | {} | {} | {} | {} |",
            md(&x.column),
            x.n_recorded,
            x.n_left_out,
            ci(x.mean_female, f2),
            ci(x.mean_male, f2),
            ci(x.difference, f2),
            f3(x.p_female_higher),
            ci(x.median_female, f2),
            ci(x.median_male, f2)
        );
        let _ = writeln!(
            t,
            "{} & {} & {} & {} & {} \\\\",
            tex(&x.column),
            ci(x.mean_female, t2),
            ci(x.mean_male, t2),
            ci(x.difference, t2),
            f3(x.p_female_higher)
        );
    }
    let _ = writeln!(t, "\\bottomrule\n\\end{{tabular}}\n\\end{{table}}\n");
    let _ = writeln!(m);
}

#[cfg(test)]
#[path = "tests/publication.rs"]
mod tests;

/// Moves of P(female) by more than this are counted in the correlation check's summary (a
/// choice of ours).
pub const NOTABLE_MOVE: f64 = 0.05;

/// The correlation check in words: what was varied, over which values, and how far P(female)
/// moved (largest move and whose, how many moved by more than [`NOTABLE_MOVE`], how many
/// changed category).
pub fn correlation_check_sentences(
    r: &AnalysisResult,
    c: &crate::likelihood::correlation_check::CorrelationCheck,
) -> String {
    let values = c
        .values
        .iter()
        .map(|v| format!("{v}"))
        .collect::<Vec<_>>()
        .join(", ");
    if c.blocks.is_empty() {
        return format!(
            "A correlation check over {values} was asked for, but the model has no latent block of two or more traits: nothing depends on a within-sex correlation."
        );
    }
    let blocks = c
        .blocks
        .iter()
        .map(|b| format!("`{b}`"))
        .collect::<Vec<_>>()
        .join(", ");
    let main = &r.results.main.p_female;
    let moves = c.largest_moves(main);
    let t = r.results.thresholds;
    let changed = c
        .individuals
        .iter()
        .enumerate()
        .filter(|(k, &i)| {
            let p = main[i].unwrap_or(f64::NAN);
            c.p_female
                .iter()
                .any(|v| t.categorise(v[*k]) != t.categorise(p))
        })
        .count();
    let notable = moves.iter().filter(|m| **m > NOTABLE_MOVE).count();
    let largest = moves
        .iter()
        .enumerate()
        .fold(None, |best: Option<(usize, f64)>, (k, m)| match best {
            Some((_, b)) if b >= *m => best,
            _ => Some((k, *m)),
        });
    let whose = largest
        .map(|(k, m)| format!("{m:.3} ({})", r.assemblage.individuals[c.individuals[k]].id))
        .unwrap_or_else(|| "0".into());
    format!(
        "To see how much the results depend on the within-sex correlations of block{} {blocks}, every correlation of {} was replaced in turn by {values}, the prior odds of the main analysis held. Of the {} individuals whose evidence used {}, the largest change in P(female) was {whose}; {notable} moved by more than {NOTABLE_MOVE} and {changed} changed category under at least one value (correlation_check.csv).",
        if c.blocks.len() == 1 { "" } else { "s" },
        if c.blocks.len() == 1 { "that block" } else { "those blocks" },
        c.individuals.len(),
        if c.blocks.len() == 1 { "it" } else { "them" },
    )
}

/// The correlation check, when asked for.
fn correlation_check_section(r: &AnalysisResult, m: &mut String, _t: &mut String) {
    let Some(c) = &r.correlation_check else {
        return;
    };
    let _ = writeln!(
        m,
        "## Dependence on the within-sex correlations\n\n{}\n",
        correlation_check_sentences(r, c)
    );
}

/// "Noussios et al., 2019" from an APA reference "Noussios, G., Theologou, K., … (2019). …":
/// the first author's surname, "et al." for three or more authors ("& Second" for two), and
/// the year in brackets; the reference as written where it has no bracketed year.
pub fn short_citation(reference: &str) -> String {
    let reference = reference.trim();
    let Some(open) = reference.find(" (") else {
        return reference.to_string();
    };
    let year: String = reference[open + 2..]
        .chars()
        .take_while(|c| c.is_ascii_digit())
        .collect();
    if year.len() != 4 {
        return reference.to_string();
    }
    let authors = &reference[..open];
    let surname = |a: &str| a.split(',').next().unwrap_or(a).trim().to_string();
    let first = surname(authors);
    let names = authors.matches(".,").count() + 1;
    match (names, authors.split(" & ").nth(1)) {
        (1, _) | (_, None) if !authors.contains(" & ") => format!("{first}, {year}"),
        (2, Some(second)) => format!("{first} & {}, {year}", surname(second)),
        _ => format!("{first} et al., {year}"),
    }
}
