//! The evidence stage: every individual's blocks evaluated, and the evidence ledger that a
//! report can quote without any prior.

pub mod ledger;

pub use ledger::{ledger_csv, LedgerRow};

use crate::data::Assemblage;
use crate::model::{Context, IndividualEvidence, Model};

/// Evaluate the model for every individual of an assemblage, in file order.
///
/// Each individual's random streams are seeded from the run seed, its id and the block, so
/// the result does not depend on row order.
pub fn evaluate_assemblage(
    model: &Model,
    assemblage: &Assemblage,
    ctx: &Context,
) -> Vec<IndividualEvidence> {
    assemblage
        .individuals
        .iter()
        .map(|ind| model.evaluate(ind, ctx))
        .collect()
}

/// Every block flagged for a person to look at (DNA fitting neither sex, numerical failure),
/// as `ID (block): note`, in file order.
pub fn flagged(
    model: &Model,
    assemblage: &Assemblage,
    evidence: &[IndividualEvidence],
) -> Vec<String> {
    use crate::model::BlockStatus;
    let mut out = Vec::new();
    for (ind, e) in assemblage.individuals.iter().zip(evidence) {
        for (b, be) in model.blocks.iter().zip(&e.blocks) {
            if matches!(
                be.status,
                BlockStatus::Atypical | BlockStatus::NumericalFailure
            ) {
                out.push(format!("{} ({}): {}", ind.id, b.id(), be.note));
            }
        }
    }
    out
}
