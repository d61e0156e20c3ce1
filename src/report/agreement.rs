//! What `tessera agreement` shows and writes: the terminal summary, `agreement.csv` (tidy: one
//! row per trait and statistic — kappas with Cohen 1968 weights for grades, technical error of
//! measurement and ICC(2,1) after Shrout & Fleiss 1979 for measurements) and
//! `disagreements.csv`.

use super::{csv_bytes, header, RenderError};
use crate::agreement::{Agreement, AgreementMeasures, WithInterval};
use crate::output::OutputSet;
use std::fmt::Write as _;

/// The readable summary of an agreement between two observers.
pub fn agreement_summary(r: &Agreement) -> String {
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
    for t in &r.traits {
        let AgreementMeasures::Grades {
            kappa_linear: l,
            kappa_quadratic: q,
            exact_agreement,
            ranges_left_out,
            observer_error,
            ..
        } = &t.measures
        else {
            continue;
        };
        let _ = writeln!(
            s,
            "{:<26} {:>5}   {:.2} ({:.2} to {:.2})      {:.2} ({:.2} to {:.2})      {:>4.0}%            {}{}",
            t.trait_id,
            t.n,
            l.value,
            l.lo,
            l.hi,
            q.value,
            q.lo,
            q.hi,
            100.0 * exact_agreement,
            match observer_error {
                Some((r, share)) => format!("{r:.2}       {share:.2}"),
                None => "–          –".to_string(),
            },
            match ranges_left_out {
                0 => String::new(),
                1 => "  (1 range left out)".to_string(),
                n => format!("  ({n} ranges left out)"),
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
    for t in &r.traits {
        let AgreementMeasures::Measurements {
            tem,
            icc,
            relative_tem,
        } = &t.measures
        else {
            continue;
        };
        let _ = writeln!(
            s,
            "{:<26} {:>5}   {:.3} ({:.3} to {:.3})    {:>6.2}%        {:.3} ({:.3} to {:.3})",
            t.trait_id, t.n, tem.value, tem.lo, tem.hi, relative_tem, icc.value, icc.lo, icc.hi
        );
    }
    let _ = writeln!(
        s,
        "\n{} disagreements (grades that differ; measurements more than 2 TEM apart)",
        r.disagreements.len()
    );
    s
}

/// The warnings of an agreement: every graded trait with fewer pairs than a kappa needs.
pub fn agreement_warnings(r: &Agreement) -> Vec<String> {
    r.traits
        .iter()
        .filter_map(|t| {
            t.too_few_pairs().map(|needed| {
                format!(
                    "{}: {} pairs; a weighted kappa on this scale needs {needed} (2k² for k grades, Cicchetti 1981) before its interval can be relied on: score more individuals twice",
                    t.trait_id, t.n
                )
            })
        })
        .collect()
}

/// `agreement.csv` and `disagreements.csv`.
///
/// `agreement.csv` is long ("tidy"): `trait, kind, pairs, ranges_left_out, statistic,
/// estimate, lo, hi, note`, one row per trait and statistic, so that each column holds one
/// kind of value. The statistics: `kappa_linear`, `kappa_quadratic` (with 95% bootstrap
/// intervals), `exact_agreement`, `polychoric_r` and `observer_error_sd_share` for grades;
/// `tem` (unit of the trait), `icc_2_1` (with intervals) and `relative_tem_percent` for
/// measurements. `note` says when a kappa rests on fewer pairs than it needs.
///
/// # Errors
/// [`RenderError`] when a table cannot be built.
pub fn agreement_files(r: &Agreement) -> Result<OutputSet, RenderError> {
    let mut rows = vec![header(&[
        "trait",
        "kind",
        "pairs",
        "ranges_left_out",
        "statistic",
        "estimate",
        "lo",
        "hi",
        "note",
    ])];
    let f4 = |x: f64| super::number::cell(x, 4);
    for t in &r.traits {
        let mut stats: Vec<(&str, f64, Option<&WithInterval>)> = Vec::new();
        let mut ranges = 0;
        match &t.measures {
            AgreementMeasures::Grades {
                kappa_linear,
                kappa_quadratic,
                exact_agreement,
                ranges_left_out,
                observer_error,
                ..
            } => {
                ranges = *ranges_left_out;
                stats.push(("kappa_linear", kappa_linear.value, Some(kappa_linear)));
                stats.push((
                    "kappa_quadratic",
                    kappa_quadratic.value,
                    Some(kappa_quadratic),
                ));
                stats.push(("exact_agreement", *exact_agreement, None));
                if let Some((r, share)) = observer_error {
                    stats.push(("polychoric_r", *r, None));
                    stats.push(("observer_error_sd_share", *share, None));
                }
            }
            AgreementMeasures::Measurements {
                tem,
                icc,
                relative_tem,
            } => {
                stats.push(("tem", tem.value, Some(tem)));
                stats.push(("icc_2_1", icc.value, Some(icc)));
                stats.push(("relative_tem_percent", *relative_tem, None));
            }
        }
        for (name, estimate, interval) in stats {
            let note = match t.too_few_pairs() {
                Some(needed) if name.starts_with("kappa") => {
                    format!(
                        "{} pairs; a kappa needs {needed} (2k², Cicchetti 1981)",
                        t.n
                    )
                }
                _ => String::new(),
            };
            rows.push(vec![
                t.trait_id.clone(),
                t.kind().into(),
                t.n.to_string(),
                ranges.to_string(),
                name.to_string(),
                f4(estimate),
                interval.map(|i| f4(i.lo)).unwrap_or_default(),
                interval.map(|i| f4(i.hi)).unwrap_or_default(),
                note,
            ]);
        }
    }
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
    let mut files = OutputSet::default();
    files.push("agreement.csv", table);
    files.push("disagreements.csv", listed);
    let columns = super::dictionary::columns_md(&files, &[]);
    files.push("columns.md", columns);
    Ok(files)
}
