//! Writing results: CSV tables, the run record, and the readable terminal summary.

pub mod analysis;
pub mod figures;
pub mod publication;

pub use analysis::{AnalysisFiles, RunInfo};
