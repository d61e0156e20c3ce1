//! Writing results: CSV tables, the run record, and the readable terminal summary.

pub mod agreement;
pub mod analysis;
pub mod case;
pub mod citations;
pub mod commingled;
pub mod dictionary;
pub mod figures;
pub mod number;
pub mod publication;
pub mod validation;

pub use crate::results::{BySex, RunInfo};

/// An output that could not be built (a table row of the wrong width, a figure that cannot be
/// drawn, a record that cannot be serialised). Nothing is written when it happens.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("an output could not be built: {message}")]
pub struct RenderError {
    /// What failed, where.
    pub message: String,
}

impl RenderError {
    /// A render error with this message.
    pub fn new(message: impl Into<String>) -> Self {
        RenderError {
            message: message.into(),
        }
    }
}

impl From<figures::FigureError> for RenderError {
    fn from(e: figures::FigureError) -> Self {
        RenderError::new(e.to_string())
    }
}

impl From<serde_json::Error> for RenderError {
    fn from(e: serde_json::Error) -> Self {
        RenderError::new(format!("run record: {e}"))
    }
}

/// Rows as CSV text with `\n` line ends.
///
/// # Errors
/// [`RenderError`] when a row's width differs from the first row's.
pub fn csv_bytes(rows: Vec<Vec<String>>) -> Result<Vec<u8>, RenderError> {
    let mut b = CsvText::default();
    for r in rows {
        b.row(&r);
    }
    b.finish()
}

/// CSV text built row by row, for tables too long to hold as strings first (one row per
/// individual and prior, or per individual and draw): the same bytes as [`csv_bytes`]. The
/// first failed row is kept and reported by [`finish`](Self::finish); later rows are ignored.
pub struct CsvText {
    w: csv::Writer<Vec<u8>>,
    rows: usize,
    error: Option<RenderError>,
}

impl Default for CsvText {
    fn default() -> Self {
        CsvText {
            w: csv::WriterBuilder::new()
                .terminator(csv::Terminator::Any(b'\n'))
                .from_writer(Vec::new()),
            rows: 0,
            error: None,
        }
    }
}

impl CsvText {
    /// A piece of a longer table whose first row here is the table's row `first` (counted
    /// from 1): row numbers in an error count from there.
    pub fn from_row(first: usize) -> Self {
        CsvText {
            rows: first.saturating_sub(1),
            ..CsvText::default()
        }
    }

    /// Append one row (every row must have the header's width).
    pub fn row<I, T>(&mut self, cells: I)
    where
        I: IntoIterator<Item = T>,
        T: AsRef<[u8]>,
    {
        if self.error.is_some() {
            return;
        }
        self.rows += 1;
        if let Err(e) = self.w.write_record(cells) {
            self.error = Some(RenderError::new(format!(
                "table row {} cannot be written: {e}",
                self.rows
            )));
        }
    }

    /// The text.
    ///
    /// # Errors
    /// The first row that could not be written.
    pub fn finish(self) -> Result<Vec<u8>, RenderError> {
        if let Some(e) = self.error {
            return Err(e);
        }
        self.w
            .into_inner()
            .map_err(|e| RenderError::new(format!("table cannot be finished: {}", e.error())))
    }
}

/// How many individuals a list meant for reading (the terminal summary, report.md, the page)
/// names before it counts the rest: a choice of ours. A regional table of a million rows
/// put 313 000 ids on one line of the summary and of report.md.
pub const NAMED_AT_MOST: usize = 50;

/// The first [`NAMED_AT_MOST`] of `total` items (only those are taken from `items`, so a
/// caller may format them lazily), then one more item counting the rest and saying where
/// every one of them is (`rest_where`, e.g. "the `flags` column of individuals.csv").
pub fn named_at_most(
    total: usize,
    items: impl IntoIterator<Item = String>,
    rest_where: &str,
) -> Vec<String> {
    let mut shown: Vec<String> = items.into_iter().take(NAMED_AT_MOST).collect();
    if total > NAMED_AT_MOST {
        shown.push(format!(
            "and {} more ({total} in all; {rest_where} marks every one)",
            total - NAMED_AT_MOST
        ));
    }
    shown
}

/// A header row from column names.
pub fn header(names: &[&str]) -> Vec<String> {
    names.iter().map(|s| s.to_string()).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_lists_name_fifty_and_count_the_rest() {
        let ids: Vec<String> = (0..120).map(|i| format!("B-{i}")).collect();
        let shown = named_at_most(ids.len(), ids.clone(), "the `flags` column");
        assert_eq!(shown.len(), NAMED_AT_MOST + 1);
        assert_eq!(shown[49], "B-49");
        assert_eq!(
            shown[50],
            "and 70 more (120 in all; the `flags` column marks every one)"
        );
        assert_eq!(
            named_at_most(50, ids[..50].to_vec(), "x"),
            ids[..50].to_vec()
        );
    }

    #[test]
    fn a_row_of_the_wrong_width_is_an_error_not_a_silent_gap() {
        let ok = csv_bytes(vec![header(&["a", "b"]), header(&["1", "2"])]).unwrap();
        assert_eq!(ok, b"a,b\n1,2\n");
        let e = csv_bytes(vec![
            header(&["a", "b"]),
            header(&["1"]),
            header(&["3", "4"]),
        ])
        .unwrap_err();
        assert!(e.message.contains("row 2"), "{e}");
    }
}
