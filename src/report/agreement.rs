//! What `tessera agreement` shows and writes: the terminal summary, `agreement.csv` (one row
//! per trait: kappas with Cohen 1968 weights for grades, technical error of measurement and
//! ICC(2,1) after Shrout & Fleiss 1979 for measurements) and `disagreements.csv`.

use super::{csv_bytes, header, RenderError};
use crate::agreement::{Agreement, AgreementMeasures};
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
            if *ranges_left_out > 0 {
                format!("  ({ranges_left_out} ranges left out)")
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

/// `agreement.csv` and `disagreements.csv`.
///
/// # Errors
/// [`RenderError`] when a table cannot be built.
pub fn agreement_files(r: &Agreement) -> Result<OutputSet, RenderError> {
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
    // One row per trait; the columns hold the kind's own measures (kappas and exact
    // agreement for grades, TEM, ICC and relative TEM for measurements).
    let f4 = |x: f64| super::number::cell(x, 4);
    for t in &r.traits {
        let (first, second, third, ranges, observer) = match &t.measures {
            AgreementMeasures::Grades {
                kappa_linear,
                kappa_quadratic,
                exact_agreement,
                ranges_left_out,
                observer_error,
            } => (
                kappa_linear,
                kappa_quadratic,
                *exact_agreement,
                *ranges_left_out,
                *observer_error,
            ),
            AgreementMeasures::Measurements {
                tem,
                icc,
                relative_tem,
            } => (tem, icc, *relative_tem, 0, None),
        };
        rows.push(vec![
            t.trait_id.clone(),
            t.kind().into(),
            t.n.to_string(),
            ranges.to_string(),
            f4(first.value),
            f4(first.lo),
            f4(first.hi),
            f4(second.value),
            f4(second.lo),
            f4(second.hi),
            f4(third),
            observer.map(|(r, _)| f4(r)).unwrap_or_default(),
            observer.map(|(_, e)| f4(e)).unwrap_or_default(),
        ]);
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
    Ok(files)
}
