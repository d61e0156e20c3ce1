//! Problems (stop the run) and warnings (reported, run continues) found in an input file.

use serde::Serialize;
use std::fmt;

/// What sort of problem a cell, row or header has. The word in brackets is the stable code
/// written in JSON output.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
#[non_exhaustive]
pub enum ProblemKind {
    /// The file could not be opened or read (`unreadable`).
    Unreadable,
    /// The bytes are not UTF-8 text (`not_utf8`).
    NotUtf8,
    /// The file has no header row or no data rows (`empty`).
    Empty,
    /// The header lacks the `id` column (`missing_id_column`).
    MissingIdColumn,
    /// The column named to group by is not in the header (`missing_group_column`).
    MissingGroupColumn,
    /// Two columns have the same name after normalisation (`duplicate_column`).
    DuplicateColumn,
    /// A trait appears both unsided and sided (`ambiguous_side_columns`).
    AmbiguousSideColumns,
    /// A row has a different number of fields from the header (`field_count`).
    FieldCount,
    /// An id is empty (`missing_id`).
    MissingId,
    /// An id occurs twice (`duplicate_id`).
    DuplicateId,
    /// An ordinal score is not a grade of the trait's scale (`grade_out_of_range`).
    GradeOutOfRange,
    /// A cell could not be read as what its column holds (`unreadable_value`).
    UnreadableValue,
    /// A measurement lies outside the trait's plausible range (`implausible_measurement`).
    ImplausibleMeasurement,
    /// The age could not be read (`bad_age`).
    BadAge,
    /// The known sex is not a recognised word (`bad_known_sex`).
    BadKnownSex,
    /// DNA read counts come in pairs (`unpaired_reads`).
    UnpairedReads,
    /// A requested sheet does not exist, or the workbook cannot be read (`bad_workbook`).
    BadWorkbook,
    /// The input asks more of the machine than a limit allows: a column name too long, a sheet
    /// or workbook too large, read counts no sequencer produces (`limit_exceeded`).
    LimitExceeded,
    /// An element table lacks its `element` column (`missing_element_column`).
    MissingElementColumn,
    /// An element's type, side or association cannot be read (`bad_element_record`).
    BadElementRecord,
}

impl ProblemKind {
    /// The stable snake_case code.
    pub fn code(self) -> &'static str {
        match self {
            ProblemKind::Unreadable => "unreadable",
            ProblemKind::NotUtf8 => "not_utf8",
            ProblemKind::Empty => "empty",
            ProblemKind::MissingIdColumn => "missing_id_column",
            ProblemKind::MissingGroupColumn => "missing_group_column",
            ProblemKind::DuplicateColumn => "duplicate_column",
            ProblemKind::AmbiguousSideColumns => "ambiguous_side_columns",
            ProblemKind::FieldCount => "field_count",
            ProblemKind::MissingId => "missing_id",
            ProblemKind::DuplicateId => "duplicate_id",
            ProblemKind::GradeOutOfRange => "grade_out_of_range",
            ProblemKind::UnreadableValue => "unreadable_value",
            ProblemKind::ImplausibleMeasurement => "implausible_measurement",
            ProblemKind::BadAge => "bad_age",
            ProblemKind::BadKnownSex => "bad_known_sex",
            ProblemKind::UnpairedReads => "unpaired_reads",
            ProblemKind::BadWorkbook => "bad_workbook",
            ProblemKind::LimitExceeded => "limit_exceeded",
            ProblemKind::MissingElementColumn => "missing_element_column",
            ProblemKind::BadElementRecord => "bad_element_record",
        }
    }
}

/// One problem in an input file, located as precisely as possible.
///
/// `row` is the row number a spreadsheet shows (the header is row 1).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Problem {
    /// The file, as given by the user.
    pub file: String,
    /// Spreadsheet row number (header = 1), where the problem belongs to a row.
    pub row: Option<usize>,
    /// Column name as written in the header, where the problem belongs to a column.
    pub column: Option<String>,
    /// The offending value as written.
    pub value: Option<String>,
    /// What sort of problem.
    pub kind: ProblemKind,
    /// What was expected, in words.
    pub expected: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some(r) = self.row {
            write!(f, ", row {r}")?;
        }
        if let Some(c) = &self.column {
            write!(f, ", column `{c}`")?;
        }
        if let Some(v) = &self.value {
            write!(f, ": found `{}`", printable(v))?;
        }
        write!(f, ": {}", self.expected)
    }
}

/// What sort of warning.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
#[non_exhaustive]
pub enum WarningKind {
    /// A column name is close to a trait id (`possible_misspelling`).
    PossibleMisspelling,
    /// Both sides were recorded and differ by more than the tolerance (`sides_disagree`).
    SidesDisagree,
    /// Decimal commas were read as decimal points (`decimal_comma`).
    DecimalComma,
    /// A row has no trait observed at all (`no_evidence`).
    NoEvidence,
    /// Both sides of a trait were recorded and the side policy used one
    /// (`second_side_unused`).
    SecondSideUnused,
}

impl WarningKind {
    /// The kind in a few words, for the line that counts warnings not shown.
    pub fn words(self) -> &'static str {
        match self {
            WarningKind::PossibleMisspelling => "a column name close to a trait id",
            WarningKind::SidesDisagree => "sides that disagree",
            WarningKind::DecimalComma => "decimal commas",
            WarningKind::NoEvidence => "a row with no trait recorded",
            WarningKind::SecondSideUnused => "a second side recorded and not used",
        }
    }
}

/// How many warnings of one kind a terminal or the page shows before counting the rest.
pub const WARNINGS_SHOWN_PER_KIND: usize = 20;

/// The warnings as lines to show a person: every warning of a kind up to `per_kind`, then
/// one line per kind saying how many more there are, from which row to which. A regional
/// table of a million rows gave 93 000 lines of "no trait recorded" on the terminal; the
/// complete list stays in `tessera check FILE --format json`, and every row's own state in
/// the outputs (`status` in individuals.csv).
pub fn shown_warnings(warnings: &[Warning], per_kind: usize) -> Vec<String> {
    // Per kind: its first warning, how many, and the first and last rows not shown.
    let mut seen: Vec<(&Warning, usize, Option<usize>, Option<usize>)> = Vec::new();
    let mut lines = Vec::new();
    for w in warnings {
        let k = match seen.iter().position(|s| s.0.kind == w.kind) {
            Some(k) => k,
            None => {
                seen.push((w, 0, None, None));
                seen.len() - 1
            }
        };
        let entry = &mut seen[k];
        entry.1 += 1;
        if entry.1 <= per_kind {
            lines.push(w.to_string());
        } else {
            entry.2 = entry.2.or(w.row);
            entry.3 = w.row.or(entry.3);
        }
    }
    for (w, count, first, last) in seen {
        if count > per_kind {
            let rows = match (first, last) {
                (Some(a), Some(b)) if a != b => format!(" on rows {a} to {b}"),
                (Some(a), _) => format!(" on row {a}"),
                _ => String::new(),
            };
            let file = &w.file;
            lines.push(format!(
                "{file}: {} more warnings of {}{rows} are not shown ({count} in all; `tessera check {file} --format json` lists every one)",
                count - per_kind,
                w.kind.words()
            ));
        }
    }
    lines
}

/// Something a person should look at; the run goes on.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Warning {
    /// The file.
    pub file: String,
    /// Spreadsheet row number, where it belongs to a row.
    pub row: Option<usize>,
    /// Column (or columns) concerned.
    pub column: Option<String>,
    /// What sort of warning.
    pub kind: WarningKind,
    /// The message in words.
    pub message: String,
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file)?;
        if let Some(r) = self.row {
            write!(f, ", row {r}")?;
        }
        if let Some(c) = &self.column {
            write!(f, ", column `{c}`")?;
        }
        write!(f, ": {}", self.message)
    }
}

/// Render a value for a message: control characters escaped, long values shortened.
pub(crate) fn printable(v: &str) -> String {
    let mut out: String = v.chars().take(60).flat_map(char::escape_debug).collect();
    if v.chars().count() > 60 {
        out.push('…');
    }
    out
}

#[cfg(test)]
#[path = "tests/problem.rs"]
mod tests;
