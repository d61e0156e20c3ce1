//! Writing results: CSV tables, the run record, and the readable terminal summary.

pub mod analysis;
pub mod figures;
pub mod publication;
pub mod validation;

pub use analysis::{AnalysisFiles, RunInfo};

/// Rows as CSV text with `\n` line ends (writing to memory cannot fail for text records).
pub fn csv_bytes(rows: Vec<Vec<String>>) -> Vec<u8> {
    let mut w = csv::WriterBuilder::new()
        .terminator(csv::Terminator::Any(b'\n'))
        .from_writer(Vec::new());
    for r in rows {
        let _ = w.write_record(&r);
    }
    w.into_inner().unwrap_or_default()
}

/// A header row from column names.
pub fn header(names: &[&str]) -> Vec<String> {
    names.iter().map(|s| s.to_string()).collect()
}
