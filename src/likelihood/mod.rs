//! The evidence stage: every individual's blocks evaluated, and the evidence ledger that a
//! report can quote without any prior.

pub mod correlation_check;
pub mod ledger;

pub use ledger::{ledger_csv, LedgerRow};

use crate::data::Assemblage;
use crate::model::{Context, EvidenceCache, IndividualEvidence, Model};
use rayon::prelude::*;

/// Evaluate the model for every individual of an assemblage, in file order.
///
/// Individuals are evaluated in parallel (rayon) and each latent block's observation pattern
/// is computed once per run (a shared [`EvidenceCache`]); a pattern's random streams are
/// seeded from the run seed, the block and the pattern itself, so the result is the same
/// whatever the row order or the number of threads.
pub fn evaluate_assemblage(
    model: &Model,
    assemblage: &Assemblage,
    ctx: &Context,
) -> Vec<IndividualEvidence> {
    evaluate_with_progress(model, assemblage, ctx, &crate::progress::Silent)
}

/// As [`evaluate_assemblage`], advancing `progress` by one per individual.
pub fn evaluate_with_progress(
    model: &Model,
    assemblage: &Assemblage,
    ctx: &Context,
    progress: &dyn crate::progress::Progress,
) -> Vec<IndividualEvidence> {
    let cache = EvidenceCache::default();
    assemblage
        .individuals
        .par_iter()
        .map(|ind| {
            let e = model.evaluate_cached(ind, ctx, &cache);
            progress.advance(1);
            e
        })
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
