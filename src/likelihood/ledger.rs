//! The evidence ledger: one row per individual and block, plus a total row per individual.
//!
//! | column | meaning |
//! |---|---|
//! | `id` | the individual |
//! | `block` | block id, or `total` |
//! | `block_type` | `latent`, `equations`, `dna` (empty on total rows) |
//! | `status` | `used`, `no_evidence`, `below_minimum_age`, `no_usable_equation`, `atypical`, `numerical_failure`, `counted_by_another_block`; on total rows `estimated` or `not_estimable` |
//! | `traits_used` | trait ids that entered the computation, `;`-separated |
//! | `n_traits` | how many |
//! | `ln_l_female`, `ln_l_male` | ln P(evidence \| sex) where the block defines it (latent, dna) |
//! | `ln_lr` | ln LR(F:M); 0 for a block not used |
//! | `log10_lr` | log10 LR(F:M): positive favours female, negative male |
//! | `ln_lr_error` | estimated absolute numerical error of `ln_lr` |
//! | `note` | equation used, reason not used, age note |
//! | then | every input column the model does not use, unchanged |

use crate::data::{Assemblage, Individual};
use crate::model::{BlockStatus, IndividualEvidence, Model};
use std::f64::consts::LN_10;

/// The fixed columns of the ledger, in order.
pub const LEDGER_COLUMNS: [&str; 12] = [
    "id",
    "block",
    "block_type",
    "status",
    "traits_used",
    "n_traits",
    "ln_l_female",
    "ln_l_male",
    "ln_lr",
    "log10_lr",
    "ln_lr_error",
    "note",
];

/// One ledger row.
#[derive(Debug, Clone, PartialEq)]
pub struct LedgerRow {
    /// Individual id.
    pub id: String,
    /// Block id or `total`.
    pub block: String,
    /// Block type word.
    pub block_type: String,
    /// Status word.
    pub status: String,
    /// Traits used.
    pub traits_used: Vec<String>,
    /// ln P(evidence | female).
    pub ln_l_female: Option<f64>,
    /// ln P(evidence | male).
    pub ln_l_male: Option<f64>,
    /// ln LR(F:M).
    pub ln_lr: f64,
    /// Numerical error of ln LR.
    pub error: f64,
    /// Note.
    pub note: String,
}

/// The rows of the ledger for an assemblage.
pub fn ledger_rows(
    model: &Model,
    a: &Assemblage,
    evidence: &[IndividualEvidence],
) -> Vec<(usize, LedgerRow)> {
    a.individuals
        .iter()
        .zip(evidence)
        .enumerate()
        .flat_map(|(i, (ind, ev))| rows_of(model, ind, ev).into_iter().map(move |r| (i, r)))
        .collect()
}

/// One individual's ledger rows: one per block, then the total.
fn rows_of(model: &Model, ind: &Individual, ev: &IndividualEvidence) -> Vec<LedgerRow> {
    let mut rows = Vec::with_capacity(model.blocks.len() + 1);
    for (b, e) in model.blocks.iter().zip(&ev.blocks) {
        rows.push(LedgerRow {
            id: ind.id.clone(),
            block: b.id().to_string(),
            block_type: b.kind().to_string(),
            status: e.status.as_str().to_string(),
            traits_used: e.traits_used.to_vec(),
            ln_l_female: e.ln_l_female(),
            ln_l_male: e.ln_l_male(),
            ln_lr: e.ln_lr,
            error: e.error,
            note: e.note.to_string(),
        });
    }
    let used: Vec<String> = ev
        .blocks
        .iter()
        .filter(|e| e.status == BlockStatus::Used)
        .flat_map(|e| e.traits_used.iter().cloned())
        .collect();
    rows.push(LedgerRow {
        id: ind.id.clone(),
        block: "total".into(),
        block_type: String::new(),
        status: if ev.estimable {
            "estimated"
        } else {
            "not_estimable"
        }
        .into(),
        traits_used: used,
        ln_l_female: None,
        ln_l_male: None,
        ln_lr: ev.ln_lr,
        error: ev.error,
        note: ev.note.to_string(),
    });
    rows
}

fn num(x: f64) -> String {
    crate::report::number::cell(x, 6)
}

/// The ledger as CSV text (header, then rows), carried columns appended unchanged.
///
/// # Errors
/// Only if the CSV writer fails in memory (it does not for valid UTF-8).
pub fn ledger_csv(
    model: &Model,
    a: &Assemblage,
    evidence: &[IndividualEvidence],
) -> Result<Vec<u8>, csv::Error> {
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    let mut header: Vec<&str> = LEDGER_COLUMNS.to_vec();
    header.extend(a.carried_columns.iter().map(String::as_str));
    w.write_record(&header)?;
    // Row by row: the ledger of a large assemblage is never held as strings in full.
    for (i, (ind, ev)) in a.individuals.iter().zip(evidence).enumerate() {
        for r in rows_of(model, ind, ev) {
            let mut rec = vec![
                r.id,
                r.block,
                r.block_type,
                r.status,
                r.traits_used.join(";"),
                r.traits_used.len().to_string(),
                r.ln_l_female.map(num).unwrap_or_default(),
                r.ln_l_male.map(num).unwrap_or_default(),
                num(r.ln_lr),
                num(r.ln_lr / LN_10),
                format!("{:.2e}", r.error),
                r.note,
            ];
            rec.extend(a.individuals[i].carried.iter().cloned());
            w.write_record(&rec)?;
        }
    }
    w.into_inner()
        .map_err(|e| csv::Error::from(std::io::Error::other(e.to_string())))
}
