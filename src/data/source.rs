//! Turning a file into a table of text cells: delimited text (CSV, TSV, semicolon) or a
//! workbook (.xlsx, .xlsm, .xls, .ods).

use super::problem::{Problem, ProblemKind};
use serde::Serialize;
use std::io::Read;
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

/// The data rows of a table, held compactly: every cell's text in one buffer, each cell's end
/// as a 4-byte offset, each row's spreadsheet number. Every row is as wide as the header. A
/// million rows of twenty short cells take about 130 MB this way; one `String` per cell took
/// about 1.1 GB (56 bytes of string and allocation per cell before its text).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct RawRows {
    width: usize,
    text: String,
    ends: Vec<u32>,
    numbers: Vec<usize>,
}

/// One data row of [`RawRows`]: its spreadsheet row number and its cells.
#[derive(Debug, Clone, Copy)]
pub struct RawRow<'a> {
    /// Row number as a spreadsheet shows it (header = 1).
    pub row: usize,
    rows: &'a RawRows,
    index: usize,
}

impl RawRows {
    /// No rows yet, each to be `width` cells wide.
    pub fn new(width: usize) -> Self {
        RawRows {
            width,
            ..RawRows::default()
        }
    }

    /// Append spreadsheet row `row` with its cells (exactly `width` of them: the readers check
    /// the field count first).
    ///
    /// # Errors
    /// The expected-text of a problem when the cells' text would pass 4 GiB in all (a workbook
    /// whose shared strings are repeated across millions of cells).
    pub fn push<'c>(
        &mut self,
        row: usize,
        cells: impl IntoIterator<Item = &'c str>,
    ) -> Result<(), String> {
        let before = self.ends.len();
        for cell in cells {
            self.text.push_str(cell);
            match u32::try_from(self.text.len()) {
                Ok(end) => self.ends.push(end),
                Err(_) => {
                    return Err(
                        "a table whose cells hold less than 4 GiB of text in all: split it by site, phase or zone".into(),
                    )
                }
            }
        }
        debug_assert_eq!(self.ends.len() - before, self.width);
        self.numbers.push(row);
        Ok(())
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.numbers.len()
    }

    /// Whether there are no rows.
    pub fn is_empty(&self) -> bool {
        self.numbers.is_empty()
    }

    /// Row `index` (0-based among the data rows).
    ///
    /// # Panics
    /// When `index` is not below [`len`](Self::len).
    pub fn get(&self, index: usize) -> RawRow<'_> {
        RawRow {
            row: self.numbers[index],
            rows: self,
            index,
        }
    }

    /// The rows in order.
    pub fn iter(&self) -> impl ExactSizeIterator<Item = RawRow<'_>> + '_ {
        (0..self.len()).map(move |i| self.get(i))
    }
}

impl<'a> RawRow<'a> {
    /// The text of cell `c` (0-based column).
    ///
    /// # Panics
    /// When `c` is not below the table's width.
    pub fn cell(&self, c: usize) -> &'a str {
        assert!(
            c < self.rows.width,
            "column {c} of a {}-wide table",
            self.rows.width
        );
        let k = self.index * self.rows.width + c;
        let start = if k == 0 {
            0
        } else {
            self.rows.ends[k - 1] as usize
        };
        &self.rows.text[start..self.rows.ends[k] as usize]
    }

    /// The row's cells in column order.
    pub fn cells(&self) -> impl ExactSizeIterator<Item = &'a str> + 'a {
        let row = *self;
        (0..self.rows.width).map(move |c| row.cell(c))
    }
}

/// A table of text cells before any interpretation.
#[derive(Debug, Clone, PartialEq)]
pub struct RawTable {
    /// Column names as written (a UTF-8 byte-order mark removed).
    pub header: Vec<String>,
    /// Data rows; rows whose cells are all blank are dropped.
    pub rows: RawRows,
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

/// The bytes as UTF-8 text (a byte-order mark removed), or the line and the explanation of
/// why they are not: UTF-16, a legacy encoding (with the offset of the first bad byte), or a
/// binary file.
fn as_text(bytes: &[u8]) -> Result<&str, (Option<usize>, String)> {
    if bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]) {
        return Err((
            None,
            "UTF-8 text; this file is UTF-16: save it again as \"CSV UTF-8\" (or open it in a text editor and save with UTF-8 encoding)".into(),
        ));
    }
    let bytes = bytes.strip_prefix(&[0xEF, 0xBB, 0xBF]).unwrap_or(bytes);
    let text = match std::str::from_utf8(bytes) {
        Ok(t) => t,
        Err(e) => {
            let offset = e.valid_up_to();
            let line = bytes[..offset].iter().filter(|&&b| b == b'\n').count() + 1;
            return Err((
                Some(line),
                format!(
                    "UTF-8 text; the byte at offset {offset} (0x{:02X}) is not UTF-8 — the file was probably saved in a legacy encoding such as Windows-1252: save it again as \"CSV UTF-8\"",
                    bytes[offset]
                ),
            ));
        }
    };
    if text.contains('\0') {
        return Err((
            None,
            "a text table; this file contains NUL bytes (is it a binary file, or a workbook with the wrong extension?)".into(),
        ));
    }
    Ok(text)
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
    let text = as_text(bytes)
        .map_err(|(row, expected)| vec![problem(ProblemKind::NotUtf8, row, expected)])?;
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
    let mut rows = RawRows::default();
    let mut problems = Vec::new();
    let mut record = csv::StringRecord::new();
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => break,
            Ok(true) => {}
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
        }
        let row = record
            .position()
            .map(|p| line_of(text.as_bytes(), &newlines, p.byte() as usize))
            .unwrap_or(0);
        if record.iter().all(|c| c.trim().is_empty()) {
            continue;
        }
        match &header {
            None => {
                let cells: Vec<String> = record.iter().map(str::to_string).collect();
                rows = RawRows::new(cells.len());
                header = Some(cells);
            }
            Some(h) => {
                if record.len() != h.len() {
                    let hint = if delimiter == ',' && record.len() > h.len() {
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
                            record.len()
                        ),
                    ));
                    continue;
                }
                if let Err(expected) = rows.push(row, record.iter()) {
                    return Err(vec![problem(
                        ProblemKind::LimitExceeded,
                        Some(row),
                        expected,
                    )]);
                }
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

/// Read the first sheet (or the named one) of a workbook held in memory. `path` names the
/// file (its extension says which format) in problems.
///
/// Bounded before anything is allocated from the file's own claims: the compressed parts may
/// unpack to at most [`MAX_UNPACKED_BYTES`](crate::limits::MAX_UNPACKED_BYTES); .xlsx/.xlsm/.xlsb
/// sheets are read cell by cell (a stray cell at the sheet's far corner costs one cell, not the
/// grid up to it); an .ods sheet's extent (repeated rows × repeated columns) is computed from its
/// XML before it is expanded. At most [`MAX_SHEET_CELLS`](crate::limits::MAX_SHEET_CELLS) cells
/// are held.
///
/// # Errors
/// A problem when the workbook cannot be opened, the sheet does not exist, or a limit is passed.
pub fn read_workbook(
    path: &Path,
    bytes: &[u8],
    sheet: Option<&str>,
) -> Result<RawTable, Vec<Problem>> {
    use calamine::{Ods, Reader, Xls, Xlsb, Xlsx};
    use std::io::Cursor;
    let name = path.display().to_string();
    let fail = |kind: ProblemKind, expected: String| {
        vec![Problem {
            file: name.clone(),
            row: None,
            column: None,
            value: None,
            kind,
            expected,
        }]
    };
    let bad = |expected: String| fail(ProblemKind::BadWorkbook, expected);
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(|e| e.to_ascii_lowercase())
        .unwrap_or_default();
    if ext != "xls" {
        check_unpacked_size(bytes, crate::limits::MAX_UNPACKED_BYTES)
            .map_err(|e| fail(ProblemKind::LimitExceeded, e))?;
    }
    if ext == "ods" {
        check_ods_extent(bytes, crate::limits::MAX_SHEET_CELLS)
            .map_err(|e| fail(ProblemKind::LimitExceeded, e))?;
    }
    let choose = |names: Vec<String>| -> Result<String, Vec<Problem>> {
        match sheet {
            Some(s) => names
                .iter()
                .find(|n| n.as_str() == s || n.trim().eq_ignore_ascii_case(s.trim()))
                .cloned()
                .ok_or_else(|| {
                    bad(format!(
                        "a sheet named `{s}`; the workbook has: {}",
                        names.join(", ")
                    ))
                }),
            None => names
                .first()
                .cloned()
                .ok_or_else(|| bad("a workbook with at least one sheet".into())),
        }
    };
    let open_failed = |e: String| bad(format!("a readable workbook ({e})"));
    let sheet_failed = |chosen: &str, e: String| bad(format!("a readable sheet `{chosen}` ({e})"));
    let mut grid = SparseSheet::default();
    let chosen;
    match ext.as_str() {
        // The two cell readers share no trait, so one macro reads either, cell by cell.
        "xlsx" | "xlsm" | "xlsb" => {
            macro_rules! read_cells {
                ($book:ty) => {{
                    let mut wb =
                        <$book>::new(Cursor::new(bytes)).map_err(|e| open_failed(e.to_string()))?;
                    chosen = choose(wb.sheet_names())?;
                    let mut cells = wb
                        .worksheet_cells_reader(&chosen)
                        .map_err(|e| sheet_failed(&chosen, e.to_string()))?;
                    while let Some(c) = cells
                        .next_cell()
                        .map_err(|e| sheet_failed(&chosen, e.to_string()))?
                    {
                        let (r, col) = c.get_position();
                        grid.push(r, col, cell_text(&c.get_value().clone().into()))
                            .map_err(|e| fail(ProblemKind::LimitExceeded, e))?;
                    }
                }};
            }
            if ext == "xlsb" {
                read_cells!(Xlsb<Cursor<&[u8]>>)
            } else {
                read_cells!(Xlsx<Cursor<&[u8]>>)
            }
        }
        _ => {
            // .ods (extent checked above) and .xls (a legacy format capped at 65 536 rows ×
            // 256 columns by the format itself) are read as whole ranges.
            let range = if ext == "ods" {
                let mut wb =
                    Ods::new(Cursor::new(bytes)).map_err(|e| open_failed(e.to_string()))?;
                chosen = choose(wb.sheet_names())?;
                wb.worksheet_range(&chosen)
                    .map_err(|e| sheet_failed(&chosen, e.to_string()))?
            } else {
                let mut wb =
                    Xls::new(Cursor::new(bytes)).map_err(|e| open_failed(e.to_string()))?;
                chosen = choose(wb.sheet_names())?;
                wb.worksheet_range(&chosen)
                    .map_err(|e| sheet_failed(&chosen, e.to_string()))?
            };
            let (r0, c0) = range.start().unwrap_or((0, 0));
            for (i, r) in range.rows().enumerate() {
                for (j, d) in r.iter().enumerate() {
                    let text = cell_text(d);
                    if !text.is_empty() {
                        grid.push(r0 + i as u32, c0 + j as u32, text)
                            .map_err(|e| fail(ProblemKind::LimitExceeded, e))?;
                    }
                }
            }
        }
    }
    grid.into_table(&name, &chosen)
}

/// Text of one workbook cell as a spreadsheet shows it (whole numbers without ".0").
fn cell_text(d: &calamine::Data) -> String {
    use calamine::Data;
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
}

/// The non-empty cells of a sheet, by row, held sparsely.
#[derive(Default)]
struct SparseSheet {
    /// (0-based row, 0-based column, text), in the order read.
    cells: Vec<(u32, u32, String)>,
}

impl SparseSheet {
    fn push(&mut self, row: u32, col: u32, text: String) -> Result<(), String> {
        if text.trim().is_empty() {
            return Ok(());
        }
        if self.cells.len() as u64 >= crate::limits::MAX_SHEET_CELLS {
            return Err(format!(
                "a sheet of at most {} filled cells; this one has more: split it by site, phase or zone",
                crate::limits::MAX_SHEET_CELLS
            ));
        }
        self.cells.push((row, col, text));
        Ok(())
    }

    /// Rows as spreadsheet rows (1-based), each as wide as the header; rows whose cells are all
    /// blank are dropped, and a value right of the last named column is a problem.
    fn into_table(mut self, name: &str, chosen: &str) -> Result<RawTable, Vec<Problem>> {
        self.cells.sort_by_key(|&(r, c, _)| (r, c));
        let mut rows_of_cells: Vec<(u32, Vec<(u32, String)>)> = Vec::new();
        for (r, c, t) in self.cells {
            match rows_of_cells.last_mut() {
                Some((last, v)) if *last == r => v.push((c, t)),
                _ => rows_of_cells.push((r, vec![(c, t)])),
            }
        }
        let mut it = rows_of_cells.into_iter();
        let Some((_, head)) = it.next() else {
            return Err(vec![Problem {
                file: name.to_string(),
                row: None,
                column: None,
                value: None,
                kind: ProblemKind::BadWorkbook,
                expected: format!("a header row on sheet `{chosen}`; the sheet is empty"),
            }]);
        };
        let width = head.last().map(|&(c, _)| c as usize + 1).unwrap_or(0);
        let mut header = vec![String::new(); width];
        for (c, t) in head {
            header[c as usize] = t;
        }
        let n_rows = it.len() as u64;
        if n_rows.saturating_mul(width as u64) > crate::limits::MAX_SHEET_CELLS {
            return Err(vec![Problem {
                file: name.to_string(),
                row: None,
                column: None,
                value: Some(format!("{n_rows} rows × {width} columns")),
                kind: ProblemKind::LimitExceeded,
                expected: format!(
                    "a sheet of at most {} cells (rows × named columns): split it by site, phase or zone",
                    crate::limits::MAX_SHEET_CELLS
                ),
            }]);
        }
        let mut rows = RawRows::new(width);
        for (r, cells) in it {
            let row = r as usize + 1;
            if cells.iter().any(|&(c, _)| c as usize >= width) {
                return Err(vec![Problem {
                    file: name.to_string(),
                    row: Some(row),
                    column: None,
                    value: None,
                    kind: ProblemKind::FieldCount,
                    expected: format!("no values right of the last named column ({width} columns)"),
                }]);
            }
            let mut v = vec![String::new(); width];
            for (c, t) in cells {
                v[c as usize] = t;
            }
            rows.push(row, v.iter().map(String::as_str))
                .map_err(|expected| {
                    vec![Problem {
                        file: name.to_string(),
                        row: Some(row),
                        column: None,
                        value: None,
                        kind: ProblemKind::LimitExceeded,
                        expected,
                    }]
                })?;
        }
        Ok(RawTable {
            header,
            rows,
            format: TableFormat::Workbook,
            delimiter: None,
            decimal_comma: false,
        })
    }
}

/// Refuse a zip-based workbook whose parts unpack to more than `limit` bytes (a "zip bomb"):
/// every part is inflated into nothing, counting, and stopped at the limit. The sizes the
/// archive declares are not trusted.
fn check_unpacked_size(bytes: &[u8], limit: u64) -> Result<(), String> {
    // Not a zip archive: left to the workbook reader, which says what it is not.
    let Ok(mut zip) = zip::ZipArchive::new(std::io::Cursor::new(bytes)) else {
        return Ok(());
    };
    let mut total: u64 = 0;
    for i in 0..zip.len() {
        let Ok(mut part) = zip.by_index(i) else {
            return Ok(());
        };
        let left = limit - total;
        let n = std::io::copy(&mut (&mut part).take(left + 1), &mut std::io::sink()).unwrap_or(0);
        total += n;
        if total > limit {
            return Err(format!(
                "a workbook whose parts unpack to at most {}; this one unpacks to more (part `{}`)",
                crate::limits::human_bytes(limit),
                part.name()
            ));
        }
    }
    Ok(())
}

/// Refuse an .ods whose sheets would expand beyond `limit` cells once repeated rows and
/// columns are written out, reading only the XML of `content.xml` (counts saturate: a repeat
/// of 10¹⁸ is still only counted).
fn check_ods_extent(bytes: &[u8], limit: u64) -> Result<(), String> {
    use quick_xml::events::Event;
    let Ok(mut zip) = zip::ZipArchive::new(std::io::Cursor::new(bytes)) else {
        return Ok(());
    };
    let Ok(content) = zip.by_name("content.xml") else {
        return Ok(());
    };
    let mut reader = quick_xml::Reader::from_reader(std::io::BufReader::new(content));
    let repeat = |e: &quick_xml::events::BytesStart, key: &[u8]| -> u64 {
        e.attributes()
            .flatten()
            .find(|a| a.key.as_ref() == key)
            .and_then(|a| {
                std::str::from_utf8(&a.value)
                    .ok()?
                    .trim()
                    .parse::<u64>()
                    .ok()
            })
            .unwrap_or(1)
            .max(1)
    };
    let mut buf = Vec::new();
    // Per sheet: rows so far (with repeats), rows up to the last filled one, widest filled row.
    let (mut rows, mut used_rows, mut width) = (0u64, 0u64, 0u64);
    // Per row: its repeat, columns so far, columns up to the last filled cell.
    let (mut row_repeat, mut cols, mut used_cols) = (1u64, 0u64, 0u64);
    // Per cell: its repeat, whether it holds something.
    let (mut cell_repeat, mut filled) = (1u64, false);
    let mut in_cell = false;
    loop {
        let event = match reader.read_event_into(&mut buf) {
            Ok(e) => e,
            // Malformed XML is left to the workbook reader.
            Err(_) => return Ok(()),
        };
        match event {
            Event::Eof => break,
            Event::Start(ref e) | Event::Empty(ref e) => {
                let empty = matches!(event, Event::Empty(_));
                match e.name().as_ref() {
                    b"table:table" => (rows, used_rows, width) = (0, 0, 0),
                    b"table:table-row" => {
                        (row_repeat, cols, used_cols) =
                            (repeat(e, b"table:number-rows-repeated"), 0, 0);
                        if empty {
                            rows = rows.saturating_add(row_repeat);
                        }
                    }
                    b"table:table-cell" | b"table:covered-table-cell" => {
                        cell_repeat = repeat(e, b"table:number-columns-repeated");
                        filled = e
                            .attributes()
                            .flatten()
                            .any(|a| a.key.as_ref() == b"office:value-type");
                        in_cell = !empty;
                        if empty {
                            cols = cols.saturating_add(cell_repeat);
                            if filled {
                                used_cols = cols;
                            }
                        }
                    }
                    _ if in_cell => filled = true,
                    _ => {}
                }
            }
            Event::Text(ref t) if in_cell && !t.as_ref().iter().all(u8::is_ascii_whitespace) => {
                filled = true;
            }
            Event::End(ref e) => match e.name().as_ref() {
                b"table:table-cell" | b"table:covered-table-cell" => {
                    in_cell = false;
                    cols = cols.saturating_add(cell_repeat);
                    if filled {
                        used_cols = cols;
                    }
                }
                b"table:table-row" => {
                    rows = rows.saturating_add(row_repeat);
                    if used_cols > 0 {
                        used_rows = rows;
                        width = width.max(used_cols);
                    }
                    // The reader holds each row once, as wide as its last filled cell.
                    if used_rows.saturating_mul(width) > limit || used_cols > limit {
                        return Err(format!(
                            "a sheet of at most {limit} cells once repeated rows and columns are written out; this one holds {} rows × {} columns",
                            used_rows, width
                        ));
                    }
                }
                _ => {}
            },
            _ => {}
        }
        buf.clear();
    }
    Ok(())
}

#[cfg(test)]
#[path = "tests/source.rs"]
mod tests;
