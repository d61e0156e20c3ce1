//! Turning a file into a table of text cells: delimited text (CSV, TSV, semicolon) or a
//! workbook (.xlsx, .xlsm, .xls, .ods).

use super::problem::{Problem, ProblemKind};
use serde::Serialize;
use std::path::Path;

/// How the table was stored.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum TableFormat {
    /// Delimited text; the delimiter is recorded beside.
    Text,
    /// A spreadsheet workbook.
    Workbook,
}

/// One data row: its spreadsheet row number and its cells (as many as the header).
#[derive(Debug, Clone, PartialEq)]
pub struct RawRow {
    /// Row number as a spreadsheet shows it (header = 1).
    pub row: usize,
    /// Cell texts, one per header column.
    pub cells: Vec<String>,
}

/// A table of text cells before any interpretation.
#[derive(Debug, Clone, PartialEq)]
pub struct RawTable {
    /// Column names as written (a UTF-8 byte-order mark removed).
    pub header: Vec<String>,
    /// Data rows; rows whose cells are all blank are dropped.
    pub rows: Vec<RawRow>,
    /// Text or workbook.
    pub format: TableFormat,
    /// The delimiter of a text table.
    pub delimiter: Option<char>,
    /// Whether decimal commas are read as decimal points (semicolon- or tab-separated text).
    pub decimal_comma: bool,
}

/// Detect the delimiter from the header line: the most frequent of comma, semicolon and tab
/// outside quotes (ties prefer tab, then semicolon); comma when none occurs.
pub fn detect_delimiter(header_line: &str) -> char {
    let mut counts = [0usize; 3]; // comma, semicolon, tab
    let mut quoted = false;
    for c in header_line.chars() {
        match c {
            '"' => quoted = !quoted,
            ',' if !quoted => counts[0] += 1,
            ';' if !quoted => counts[1] += 1,
            '\t' if !quoted => counts[2] += 1,
            _ => {}
        }
    }
    let best = counts.iter().copied().max().unwrap_or(0);
    if best == 0 {
        ','
    } else if counts[2] == best {
        '\t'
    } else if counts[1] == best {
        ';'
    } else {
        ','
    }
}

/// Read delimited text from bytes. `name` is used in problems.
///
/// # Errors
/// Problems for bytes that are not UTF-8 (with the byte offset), an empty file, and rows
/// whose field count differs from the header (all such rows reported).
pub fn read_text(name: &str, bytes: &[u8]) -> Result<RawTable, Vec<Problem>> {
    let problem = |kind, row, expected: String| Problem {
        file: name.to_string(),
        row,
        column: None,
        value: None,
        kind,
        expected,
    };
    if bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]) {
        return Err(vec![problem(
            ProblemKind::NotUtf8,
            None,
            "UTF-8 text; this file is UTF-16: save it again as \"CSV UTF-8\" (or open it in a text editor and save with UTF-8 encoding)".into(),
        )]);
    }
    let bytes = bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]).unwrap_or(bytes);
    let text = match std::str::from_utf8(bytes) {
        Ok(t) => t,
        Err(e) => {
            let offset = e.valid_up_to();
            let line = bytes[..offset].iter().filter(|&&b| b == b'\n').count() + 1;
            return Err(vec![problem(
                ProblemKind::NotUtf8,
                Some(line),
                format!(
                    "UTF-8 text; the byte at offset {offset} (0x{:02X}) is not UTF-8 — the file was probably saved in a legacy encoding such as Windows-1252: save it again as \"CSV UTF-8\"",
                    bytes[offset]
                ),
            )]);
        }
    };
    if text.contains('\0') {
        return Err(vec![problem(
            ProblemKind::NotUtf8,
            None,
            "a text table; this file contains NUL bytes (is it a binary file, or a workbook with the wrong extension?)".into(),
        )]);
    }
    let first_line = text.lines().find(|l| !l.trim().is_empty()).unwrap_or("");
    let delimiter = detect_delimiter(first_line);
    let mut reader = csv::ReaderBuilder::new()
        .delimiter(delimiter as u8)
        .has_headers(false)
        .flexible(true)
        .from_reader(text.as_bytes());
    // Line numbers from byte offsets (the reader's own line count is off with CRLF ends).
    let newlines: Vec<usize> = text
        .bytes()
        .enumerate()
        .filter(|(_, b)| *b == b'\n')
        .map(|(i, _)| i)
        .collect();
    let mut header: Option<Vec<String>> = None;
    let mut rows = Vec::new();
    let mut problems = Vec::new();
    for result in reader.records() {
        let record = match result {
            Ok(r) => r,
            Err(e) => {
                let row = e
                    .position()
                    .map(|p| line_of(text.as_bytes(), &newlines, p.byte() as usize));
                problems.push(problem(
                    ProblemKind::Unreadable,
                    row,
                    format!("a well-formed delimited row ({e})"),
                ));
                continue;
            }
        };
        let row = record
            .position()
            .map(|p| line_of(text.as_bytes(), &newlines, p.byte() as usize))
            .unwrap_or(0);
        let cells: Vec<String> = record.iter().map(str::to_string).collect();
        match &header {
            None => {
                if cells.iter().all(|c| c.trim().is_empty()) {
                    continue;
                }
                header = Some(cells);
            }
            Some(h) => {
                if cells.iter().all(|c| c.trim().is_empty()) {
                    continue;
                }
                if cells.len() != h.len() {
                    let hint = if delimiter == ',' && cells.len() > h.len() {
                        " (a decimal comma in a comma-separated file splits a number in two: use decimal points, or a semicolon as delimiter)"
                    } else {
                        ""
                    };
                    problems.push(problem(
                        ProblemKind::FieldCount,
                        Some(row),
                        format!(
                            "{} fields as in the header, found {}{hint}",
                            h.len(),
                            cells.len()
                        ),
                    ));
                    continue;
                }
                rows.push(RawRow { row, cells });
            }
        }
    }
    let Some(header) = header else {
        return Err(vec![problem(
            ProblemKind::Empty,
            None,
            "a header row naming the columns (id, then traits); the file is empty".into(),
        )]);
    };
    if !problems.is_empty() {
        return Err(problems);
    }
    Ok(RawTable {
        header,
        rows,
        format: TableFormat::Text,
        delimiter: Some(delimiter),
        decimal_comma: delimiter != ',',
    })
}

/// 1-based line number of a byte offset, given the offsets of every newline.
/// A record's reported start may sit on the line end before it (CRLF files), so the
/// offset is first moved past any line-end bytes.
fn line_of(text: &[u8], newlines: &[usize], mut byte: usize) -> usize {
    while byte < text.len() && matches!(text[byte], b'\r' | b'\n') {
        byte += 1;
    }
    newlines.partition_point(|&n| n < byte) + 1
}

/// Whether a path names a workbook by its extension.
pub fn is_workbook(path: &Path) -> bool {
    matches!(
        path.extension()
            .and_then(|e| e.to_str())
            .map(|e| e.to_ascii_lowercase())
            .as_deref(),
        Some("xlsx" | "xlsm" | "xlsb" | "xls" | "ods")
    )
}

/// Read the first sheet (or the named one) of a workbook.
///
/// # Errors
/// A problem when the workbook cannot be opened or the sheet does not exist.
pub fn read_workbook(path: &Path, sheet: Option<&str>) -> Result<RawTable, Vec<Problem>> {
    use calamine::{open_workbook_auto, Data, Reader};
    let name = path.display().to_string();
    let fail = |expected: String| {
        vec![Problem {
            file: name.clone(),
            row: None,
            column: None,
            value: None,
            kind: ProblemKind::BadWorkbook,
            expected,
        }]
    };
    let mut wb =
        open_workbook_auto(path).map_err(|e| fail(format!("a readable workbook ({e})")))?;
    let names = wb.sheet_names();
    let chosen = match sheet {
        Some(s) => names
            .iter()
            .find(|n| n.as_str() == s || n.trim().eq_ignore_ascii_case(s.trim()))
            .cloned()
            .ok_or_else(|| {
                fail(format!(
                    "a sheet named `{s}`; the workbook has: {}",
                    names.join(", ")
                ))
            })?,
        None => names
            .first()
            .cloned()
            .ok_or_else(|| fail("a workbook with at least one sheet".into()))?,
    };
    let range = wb
        .worksheet_range(&chosen)
        .map_err(|e| fail(format!("a readable sheet `{chosen}` ({e})")))?;
    let first_row = range.start().map(|(r, _)| r as usize).unwrap_or(0);
    let first_col = range.start().map(|(_, c)| c as usize).unwrap_or(0);
    let cell_text = |d: &Data| -> String {
        match d {
            Data::Empty => String::new(),
            Data::String(s) => s.clone(),
            Data::Int(i) => i.to_string(),
            Data::Float(f) => {
                if f.fract() == 0.0 && f.abs() < 1e15 {
                    format!("{}", *f as i64)
                } else {
                    format!("{f}")
                }
            }
            Data::Bool(b) => b.to_string(),
            Data::DateTime(dt) => dt.to_string(),
            Data::DateTimeIso(s) | Data::DurationIso(s) => s.clone(),
            Data::Error(e) => format!("#{e:?}"),
        }
    };
    let mut header: Option<Vec<String>> = None;
    let mut rows = Vec::new();
    for (i, r) in range.rows().enumerate() {
        // Spreadsheet rows are 1-based; the used range may not start at the first row, and
        // leading empty columns are kept blank so that column positions match.
        let row = first_row + i + 1;
        let mut cells: Vec<String> = vec![String::new(); first_col];
        cells.extend(r.iter().map(cell_text));
        if cells.iter().all(|c| c.trim().is_empty()) {
            continue;
        }
        match &header {
            None => {
                while cells.last().is_some_and(|c| c.trim().is_empty()) {
                    cells.pop();
                }
                header = Some(cells);
            }
            Some(h) => {
                cells.resize(h.len().max(cells.len()), String::new());
                // Cells beyond the header that hold something are reported as a field count
                // problem by the caller's check below.
                if cells.len() > h.len() && cells[h.len()..].iter().any(|c| !c.trim().is_empty()) {
                    return Err(vec![Problem {
                        file: name.clone(),
                        row: Some(row),
                        column: None,
                        value: None,
                        kind: ProblemKind::FieldCount,
                        expected: format!(
                            "no values right of the last named column ({} columns)",
                            h.len()
                        ),
                    }]);
                }
                cells.truncate(h.len());
                rows.push(RawRow { row, cells });
            }
        }
    }
    let Some(header) = header else {
        return Err(fail(format!(
            "a header row on sheet `{chosen}`; the sheet is empty"
        )));
    };
    Ok(RawTable {
        header,
        rows,
        format: TableFormat::Workbook,
        delimiter: None,
        decimal_comma: false,
    })
}

#[cfg(test)]
#[path = "tests/source.rs"]
mod tests;
