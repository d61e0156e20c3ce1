//! The validation report a lab can file: CSV tables, a calibration figure and report.md.

use super::figures::calibration_figure;
use super::{csv_bytes, header, RenderError};
use crate::data::Sex;
use crate::output::OutputSet;
use crate::validate::{Scores, Validation};
use std::fmt::Write;

/// Files of a validation report, by name.
pub fn validation_files(
    v: &Validation,
    reference: &str,
    reference_sha256: &str,
    subject: &str,
    command: &str,
) -> Result<OutputSet, RenderError> {
    let t = &v.settings.thresholds;
    let mut files = OutputSet::default();
    let mut rows = vec![header(&[
        "id",
        "known_sex",
        "fold",
        "log10_lr",
        "p_female",
        "category",
        "n_traits",
        "correct",
    ])];
    for p in &v.predictions {
        let correct =
            (p.sex == Sex::Female && p.p_female > 0.5) || (p.sex == Sex::Male && p.p_female < 0.5);
        rows.push(vec![
            p.id.clone(),
            sex_word(p.sex).into(),
            p.fold.to_string(),
            format!("{:.4}", p.ln_lr / std::f64::consts::LN_10),
            format!("{:.6}", p.p_female),
            t.categorise(p.p_female).as_str().into(),
            p.n_traits.to_string(),
            if correct { "yes" } else { "no" }.into(),
        ]);
    }
    files.push("predictions.csv", csv_bytes(rows)?);
    let mut s = vec![score_header("subset")];
    s.push(score_row("all", &v.overall));
    files.push("scores.csv", csv_bytes(s)?);
    let mut b = vec![score_header("block")];
    b.extend(v.by_block.iter().map(|(id, sc)| score_row(id, sc)));
    files.push("scores_by_block.csv", csv_bytes(b)?);
    let mut n = vec![score_header("traits_used")];
    n.extend(v.by_traits.iter().map(|(id, sc)| score_row(id, sc)));
    files.push("scores_by_traits.csv", csv_bytes(n)?);
    let mut g = vec![score_header("age_class")];
    g.extend(v.by_age.iter().map(|(id, sc)| score_row(id, sc)));
    files.push("scores_by_age.csv", csv_bytes(g)?);
    let mut r = vec![header(&[
        "p_female_from",
        "p_female_to",
        "n",
        "mean_p_female",
        "share_female",
    ])];
    for bin in &v.reliability {
        r.push(vec![
            format!("{:.1}", bin.low),
            format!("{:.1}", bin.high),
            bin.n.to_string(),
            num(bin.mean_p_female),
            num(bin.share_female),
        ]);
    }
    files.push("reliability.csv", csv_bytes(r)?);
    let mut c = vec![header(&[
        "category",
        "n",
        "n_female",
        "share_female",
        "share_female_lo",
        "share_female_hi",
    ])];
    for x in &v.by_category {
        c.push(vec![
            x.category.as_str().to_string(),
            x.n.to_string(),
            x.n_female.to_string(),
            num(x.share_female),
            num(x.share_female_lo),
            num(x.share_female_hi),
        ]);
    }
    files.push("scores_by_category.csv", csv_bytes(c)?);
    let bins: Vec<(f64, f64, usize)> = v
        .reliability
        .iter()
        .map(|b| (b.mean_p_female, b.share_female, b.n))
        .collect();
    files.push("calibration.svg", calibration_figure(&bins)?);
    let columns = super::dictionary::columns_md(&files, &[]);
    files.push("columns.md", columns);
    files.push(
        "report.md",
        report_md(v, reference, reference_sha256, subject, command),
    );
    Ok(files)
}

fn sex_word(s: Sex) -> &'static str {
    match s {
        Sex::Female => "female",
        Sex::Male => "male",
    }
}

fn num(x: f64) -> String {
    super::number::cell(x, 4)
}

fn score_header(first: &str) -> Vec<String> {
    header(&[
        first,
        "n",
        "n_female",
        "n_male",
        "accuracy",
        "accuracy_female",
        "accuracy_male",
        "sex_bias",
        "share_indeterminate",
        "accuracy_determinate",
        "brier",
        "log_loss",
        "accuracy_lo",
        "accuracy_hi",
    ])
}

fn score_row(label: &str, s: &Scores) -> Vec<String> {
    vec![
        label.to_string(),
        s.n.to_string(),
        s.n_female.to_string(),
        s.n_male.to_string(),
        num(s.accuracy),
        num(s.accuracy_female),
        num(s.accuracy_male),
        num(s.sex_bias),
        num(s.share_indeterminate),
        num(s.accuracy_determinate),
        num(s.brier),
        num(s.log_loss),
        num(s.accuracy_lo),
        num(s.accuracy_hi),
    ]
}

fn pct(x: f64) -> String {
    if x.is_finite() {
        format!("{:.1}%", 100.0 * x)
    } else {
        "–".into()
    }
}

/// The headline lines of a validation, for the terminal and the report.
pub fn headline(v: &Validation) -> String {
    let s = &v.overall;
    let t = &v.settings.thresholds;
    let mut m = String::new();
    for w in &v.warnings {
        let _ = writeln!(m, "Warning: {w}.");
    }
    let _ = writeln!(
        m,
        "{}: {} individuals of documented sex scored ({} females, {} males); {} without usable evidence.",
        v.design,
        s.n,
        s.n_female,
        s.n_male,
        v.no_evidence.len()
    );
    let _ = writeln!(
        m,
        "Correct at P(female) = 0.5: {} (95% interval {} to {}; females {}, males {}; sex bias {:+.1} points).",
        pct(s.accuracy),
        pct(s.accuracy_lo),
        pct(s.accuracy_hi),
        pct(s.accuracy_female),
        pct(s.accuracy_male),
        100.0 * s.sex_bias
    );
    let _ = writeln!(
        m,
        "Left indeterminate (P(female) between {} and {}): {}; correct among the others: {}.",
        t.probable_male,
        t.probable_female,
        pct(s.share_indeterminate),
        pct(s.accuracy_determinate)
    );
    let _ = writeln!(
        m,
        "Brier score {:.4}; log loss {:.4} (prior probability of female {}).",
        s.brier, s.log_loss, v.settings.prior_female
    );
    m
}

fn report_md(v: &Validation, reference: &str, sha: &str, subject: &str, command: &str) -> String {
    let mut m = String::new();
    let _ = writeln!(m, "# Validation of {subject}\n");
    let _ = writeln!(m, "> Estimates, not identifications. Error rates measured on one reference collection hold for populations like it; forensic casework needs validated methods, accredited practice and the rules of the jurisdiction. Biological sex is not gender.\n");
    let _ = writeln!(m, "- Reference: `{reference}` (SHA-256 `{sha}`)");
    let _ = writeln!(m, "- Design: {}", v.design);
    let _ = writeln!(m, "- Seed: {}", v.settings.seed);
    let _ = writeln!(m, "- Command: `{command}`");
    let _ = writeln!(m, "- tessera {}\n", crate::VERSION);
    let _ = writeln!(m, "## Headline\n");
    for line in headline(v).lines() {
        let _ = writeln!(m, "{line}  ");
    }
    let _ = writeln!(m, "\n## By block (each block's evidence alone)\n");
    table(&mut m, "block", &v.by_block);
    let _ = writeln!(m, "\n## By number of traits that entered\n");
    table(&mut m, "traits", &v.by_traits);
    let _ = writeln!(m, "\n## By age at death (adult classes after Buikstra & Ubelaker 1994; the midpoint of the recorded interval)\n");
    table(&mut m, "age", &v.by_age);
    let _ = writeln!(m, "\n## What each call is worth\n");
    let _ = writeln!(m, "Of the individuals given each category, the share documented as female (95% Wilson interval):\n");
    let _ = writeln!(
        m,
        "| category | calls | documented female | share female (95% interval) |"
    );
    let _ = writeln!(m, "|---|---:|---:|---:|");
    for x in &v.by_category {
        let _ = writeln!(
            m,
            "| {} | {} | {} | {} ({}–{}) |",
            x.category.label(),
            x.n,
            x.n_female,
            pct(x.share_female),
            pct(x.share_female_lo),
            pct(x.share_female_hi)
        );
    }
    let _ = writeln!(m, "\n## Reliability\n");
    let _ = writeln!(m, "| P(female) | n | mean predicted | share female |");
    let _ = writeln!(m, "|---|---:|---:|---:|");
    for b in &v.reliability {
        let _ = writeln!(
            m,
            "| {:.1}–{:.1} | {} | {} | {} |",
            b.low,
            b.high,
            b.n,
            num(b.mean_p_female),
            num(b.share_female)
        );
    }
    let _ = writeln!(m, "\n![Calibration](calibration.svg)\n");
    let _ = writeln!(m, "## How the numbers were made\n");
    let _ = writeln!(m, "Each individual was classified by a model that did not see it (except with a fixed model file, which is an external check of that file on this collection). P(female) combines the likelihood ratio with a prior probability of female of {}. Accuracy counts P(female) > 0.5 as female and < 0.5 as male. The Brier score (Brier 1950) is the mean squared difference between P(female) and the documented sex (0 is perfect, 0.25 is a coin); log loss is the mean of −ln P(documented sex). Individuals between the probable-male and probable-female thresholds are reported as indeterminate. Intervals of shares are Wilson score intervals (Wilson 1927). Files: predictions.csv, scores.csv, scores_by_block.csv, scores_by_traits.csv, scores_by_age.csv, scores_by_category.csv, reliability.csv, calibration.svg.", v.settings.prior_female);
    if !v.no_evidence.is_empty() {
        let _ = writeln!(
            m,
            "\nWithout usable evidence (not scored): {}.",
            v.no_evidence.join(", ")
        );
    }
    m
}

fn table(m: &mut String, first: &str, rows: &[(String, Scores)]) {
    let _ = writeln!(m, "| {first} | n | correct | females | males | sex bias | indeterminate | correct (determinate) | Brier |");
    let _ = writeln!(m, "|---|---:|---:|---:|---:|---:|---:|---:|---:|");
    for (label, s) in rows {
        let _ = writeln!(
            m,
            "| {label} | {} | {} | {} | {} | {} | {} | {} | {} |",
            s.n,
            pct(s.accuracy),
            pct(s.accuracy_female),
            pct(s.accuracy_male),
            if s.sex_bias.is_finite() {
                format!("{:+.1}", 100.0 * s.sex_bias)
            } else {
                "–".into()
            },
            pct(s.share_indeterminate),
            pct(s.accuracy_determinate),
            num(s.brier)
        );
    }
}
