//! The files of an element analysis (`tessera elements`): elements.csv, element_counts.csv,
//! mni_by_sex.csv and report.md, and the terminal summary.

use super::number::{cell, probability};
use super::{csv_bytes, header, RenderError};
use crate::assemblage::PiSummary;
use crate::commingled::{CommingledResult, CountSummary, ElementTable};
use crate::output::OutputSet;
use std::fmt::Write;

/// Mean, median, 2.5% and 97.5% quantiles as four cells.
fn count_cells(c: &CountSummary) -> [String; 4] {
    [
        cell(c.mean, 2),
        cell(c.median, 0),
        cell(c.lo, 0),
        cell(c.hi, 0),
    ]
}

/// "12 (9 to 15)": median and 95% interval.
fn count_words(c: &CountSummary) -> String {
    format!("{} ({} to {})", c.median, c.lo, c.hi)
}

/// "0.474 (0.330 to 0.618)", or with `label` "95% interval ": a proportion female's mean and
/// 95% interval.
fn pi_words(p: &PiSummary, label: &str) -> String {
    format!(
        "{} ({label}{} to {})",
        cell(p.mean, 3),
        cell(p.lo, 3),
        cell(p.hi, 3)
    )
}

/// The cautions every element report carries.
pub const ELEMENT_CAUTIONS: [&str; 4] = [
    "These are estimates of biological sex, not identifications; biological sex is not gender.",
    "An element's likelihood ratio holds only as far as the model's reference population resembles the deposit's, and single elements carry little evidence: most stay indeterminate.",
    "MNI counts are minimums: the largest left or right count of one element type, by sex, in each joint draw. They assume elements of one type and side come from different people, and they do not pair left with right.",
    "Forensic casework needs validated methods, accredited practice and local rules; this program's defaults do not replace them.",
];

/// The output files.
///
/// # Errors
/// [`RenderError`] when a table cannot be written.
pub fn element_files(t: &ElementTable, r: &CommingledResult) -> Result<OutputSet, RenderError> {
    let mut files = OutputSet::default();
    let mut rows = vec![header(&[
        "id",
        "element",
        "side",
        "context",
        "individual",
        "association",
        "n_traits",
        "log10_lr",
        "p_female_own",
        "p_female",
        "category",
    ])];
    for e in &r.elements {
        let rec = &t.elements[e.index];
        rows.push(vec![
            t.rows.individuals[e.index].id.clone(),
            rec.element.clone(),
            rec.side.as_str().into(),
            rec.context.clone(),
            rec.individual.clone().unwrap_or_default(),
            if rec.individual.is_some() {
                cell(rec.association, 2)
            } else {
                String::new()
            },
            e.n_traits.to_string(),
            if e.estimable {
                cell(e.log10_lr, 3)
            } else {
                String::new()
            },
            probability(e.p_female_own),
            probability(e.p_female),
            e.category.as_str().into(),
        ]);
    }
    files.push("elements.csv", csv_bytes(rows)?);
    let mut rows = vec![header(&[
        "element",
        "side",
        "n_elements",
        "n_with_evidence",
        "information",
        "females_mean",
        "females_median",
        "females_lo",
        "females_hi",
        "males_mean",
        "males_median",
        "males_lo",
        "males_hi",
        "proportion_female_mean",
        "proportion_female_lo",
        "proportion_female_hi",
        "sets_proportion_female",
    ])];
    for (k, u) in r.units.iter().enumerate() {
        let mut row = vec![
            u.element.clone(),
            u.side.as_str().into(),
            u.n_elements.to_string(),
            u.n_with_evidence.to_string(),
            cell(u.information, 2),
        ];
        row.extend(count_cells(&u.females));
        row.extend(count_cells(&u.males));
        match &u.pi {
            Some(p) => row.extend([cell(p.mean, 3), cell(p.lo, 3), cell(p.hi, 3)]),
            None => row.extend([String::new(), String::new(), String::new()]),
        }
        row.push(if k == r.chosen { "yes" } else { "no" }.into());
        rows.push(row);
    }
    files.push("element_counts.csv", csv_bytes(rows)?);
    let mut rows = vec![header(&[
        "element",
        "mni",
        "females_mean",
        "females_median",
        "females_lo",
        "females_hi",
        "males_mean",
        "males_median",
        "males_lo",
        "males_hi",
        "females_set_by",
        "males_set_by",
    ])];
    for m in &r.mni {
        let mut row = vec![m.element.clone(), m.total.to_string()];
        row.extend(count_cells(&m.females));
        row.extend(count_cells(&m.males));
        let [f, ma] = m.set_by.clone().unwrap_or_default();
        row.extend([f, ma]);
        rows.push(row);
    }
    files.push("mni_by_sex.csv", csv_bytes(rows)?);
    files.push("report.md", element_report(t, r).into_bytes());
    Ok(files)
}

/// The unit whose π is the assemblage's, in words: "femur left (31 elements, 27 with evidence)".
fn chosen_words(r: &CommingledResult) -> String {
    let u = &r.units[r.chosen];
    format!(
        "{} {} ({} elements, {} with evidence)",
        u.element,
        u.side.as_str(),
        u.n_elements,
        u.n_with_evidence
    )
}

/// The report: what was done, the results, the cautions.
pub fn element_report(t: &ElementTable, r: &CommingledResult) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "# Commingled remains: sex by element\n");
    let _ = writeln!(s, "Input: `{}` (SHA-256 `{}`), {} elements of {} types; seed {}, {} joint draws, prior on the proportion female `{}`.\n", t.rows.file, t.rows.sha256, t.elements.len(), r.mni.len() - 1, r.seed, r.draws, r.prior);
    let all = r.mni.last();
    if let Some(m) = all {
        let [f, ma] = m.set_by.clone().unwrap_or_default();
        let _ = writeln!(
            s,
            "**Minimum number of individuals by sex:** females {} (set most often by the {f}), males {} (by the {ma}); medians over the draws with 95% intervals. The MNI regardless of sex is {}.\n",
            count_words(&m.females),
            count_words(&m.males),
            m.total
        );
    }
    let _ = writeln!(
        s,
        "**Proportion female:** {}, from the {} — the element type and side whose elements carry most information about it (Fisher information at one half); each element of one type and side is a different person.\n",
        pi_words(&r.pi, "95% interval "),
        chosen_words(r)
    );
    let _ = writeln!(s, "| element | side | elements | with evidence | female elements | male elements | proportion female (this type and side alone) |\n|---|---|---|---|---|---|---|");
    for u in &r.units {
        let _ = writeln!(
            s,
            "| {} | {} | {} | {} | {} | {} | {} |",
            u.element,
            u.side.as_str(),
            u.n_elements,
            u.n_with_evidence,
            count_words(&u.females),
            count_words(&u.males),
            u.pi.as_ref().map_or("—".to_string(), |p| pi_words(p, ""))
        );
    }
    if !r.associations.is_empty() {
        let _ = writeln!(
            s,
            "\n{} individuals were named by associations recorded at excavation ({} elements); in each draw an associated element shared its individual's sex with the probability recorded for it.",
            r.associations.len(),
            r.associations.iter().map(|a| a.1.len()).sum::<usize>()
        );
    }
    let _ = writeln!(s, "\n## Methods\n");
    let _ = writeln!(s, "Each element's likelihood ratio (female:male) was computed from its own traits and measurements with the model's blocks, traits it does not carry integrated out. The proportion female of the population was estimated from one element type and side, the {} — within it each element is a different person — on a grid over the prior `{}`; that type and side was chosen as the one whose elements carry most information about the proportion (the Fisher information at one half, Σ 4 tanh²(ln LRᵢ/2), which does not depend on which sex the elements favour). {} joint draws were made: the proportion female from that posterior, then every element's sex given it; elements recorded as belonging to one individual shared one sex in each draw in which they belonged together (each with its recorded association probability). In each draw the female and male elements of each type and side were counted, and the minimum number of individuals (MNI) of each sex was taken as the largest count over the sides of a type (White, 1953), and over the assemblage as the largest over the types. Counts are medians over the draws with 2.5% and 97.5% quantiles. An element's p_female_own uses its own evidence alone; p_female is the share of draws in which it is female, associations included (Monte Carlo error at most {:.3}).", chosen_words(r), r.prior, r.draws, 0.5 / (r.draws as f64).sqrt());
    let _ = writeln!(s, "\n## Cautions\n");
    for c in ELEMENT_CAUTIONS {
        let _ = writeln!(s, "- {c}");
    }
    s
}

/// What the terminal shows.
pub fn element_summary(t: &ElementTable, r: &CommingledResult) -> String {
    let mut s = String::new();
    let _ = writeln!(
        s,
        "{} elements of {} types from {}",
        t.elements.len(),
        r.mni.len() - 1,
        t.rows.file
    );
    let _ = writeln!(
        s,
        "\nMinimum number of individuals by sex (median, 95% interval over {} draws):",
        r.draws
    );
    for m in &r.mni {
        let _ = writeln!(
            s,
            "  {:<16} females {:<14} males {:<14} (MNI {})",
            m.element,
            count_words(&m.females),
            count_words(&m.males),
            m.total
        );
    }
    let _ = writeln!(
        s,
        "\nProportion female {}, from the {}",
        pi_words(&r.pi, "95% interval "),
        chosen_words(r)
    );
    let _ = writeln!(
        s,
        "These are estimates, not identifications; biological sex is not gender."
    );
    s
}
