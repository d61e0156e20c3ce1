//! Writing results: CSV tables, the run record, and the readable terminal summary.

pub mod analysis;
pub mod figures;
pub mod publication;
pub mod validation;

pub use analysis::{AnalysisFiles, RunInfo};

/// Rows as CSV text with `\n` line ends (writing to memory cannot fail for text records).
pub fn csv_bytes(rows: Vec<Vec<String>>) -> Vec<u8> {
    let mut b = CsvText::default();
    for r in rows {
        b.row(&r);
    }
    b.finish()
}

/// CSV text built row by row, for tables too long to hold as strings first (one row per
/// individual and prior, or per individual and draw): the same bytes as [`csv_bytes`].
pub struct CsvText {
    w: csv::Writer<Vec<u8>>,
}

impl Default for CsvText {
    fn default() -> Self {
        CsvText {
            w: csv::WriterBuilder::new()
                .terminator(csv::Terminator::Any(b'\n'))
                .from_writer(Vec::new()),
        }
    }
}

impl CsvText {
    /// Append one row.
    pub fn row<I, T>(&mut self, cells: I)
    where
        I: IntoIterator<Item = T>,
        T: AsRef<[u8]>,
    {
        let _ = self.w.write_record(cells);
    }

    /// The text.
    pub fn finish(self) -> Vec<u8> {
        self.w.into_inner().unwrap_or_default()
    }
}

/// A header row from column names.
pub fn header(names: &[&str]) -> Vec<String> {
    names.iter().map(|s| s.to_string()).collect()
}
