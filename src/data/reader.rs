//! From a file to validated [`Individual`]s: every problem collected before anything is
//! computed.

use super::age::{parse_age, parse_known_sex, AgeAtDeath, Sex};
use super::cell::{parse_count, parse_grade, parse_measurement, Observation};
use super::columns::{assign_roles, ColumnRole, Side};
use super::problem::{Problem, ProblemKind, Warning, WarningKind};
use super::settings::{ReadSettings, SidePolicy};
use super::source::{is_workbook, read_text, read_workbook, RawRow, RawTable, TableFormat};
use crate::catalogue::{Catalogue, TraitKind};
use serde::Serialize;
use sha2::{Digest, Sha256};
use std::collections::HashMap;
use std::path::Path;

/// Largest input file read (512 MiB): the whole table is held in memory while it is checked,
/// at several times its size on disk. A choice of ours, far above any cemetery.
pub const MAX_INPUT_BYTES: u64 = crate::limits::MAX_TABLE_BYTES;

/// Which side an observation of a bilateral trait came from.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum SideUsed {
    /// An unsided column.
    Unsided,
    /// The left side.
    Left,
    /// The right side.
    Right,
    /// Both sides combined (policy `both`).
    Both,
}

/// One individual (one row of the input), validated.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Individual {
    /// Identifier, unique in the file.
    pub id: String,
    /// Row number as a spreadsheet shows it.
    pub row: usize,
    /// Burial zone, phase or site.
    pub group: Option<String>,
    /// Age at death.
    pub age: Option<AgeAtDeath>,
    /// Documented sex of a reference individual.
    pub known_sex: Option<Sex>,
    /// One entry per catalogue trait, in catalogue order; `None` where not observed. Each
    /// holds the side it came from ([`super::Observations::side`]).
    pub observations: super::Observations,
    /// The cells of the carried columns, unchanged, aligned with
    /// [`Assemblage::carried_columns`].
    pub carried: Vec<String>,
}

impl Individual {
    /// Number of traits observed.
    pub fn n_observed(&self) -> usize {
        self.observations.n_recorded()
    }
}

/// A validated input table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Assemblage {
    /// The file as named by the user.
    pub file: String,
    /// Text or workbook.
    pub format: TableFormat,
    /// Delimiter of a text table.
    pub delimiter: Option<char>,
    /// Whether decimal commas were read as decimal points (semicolon- or tab-separated text).
    pub decimal_comma: bool,
    /// SHA-256 of the file's bytes, lower-case hex.
    pub sha256: String,
    /// The catalogue the columns were matched against.
    #[serde(skip)]
    pub catalogue: Catalogue,
    /// For each catalogue trait, whether the file has a column for it (any side).
    pub trait_columns: Vec<bool>,
    /// Names (as written) of the columns carried through unchanged.
    pub carried_columns: Vec<String>,
    /// The individuals in file order.
    pub individuals: Vec<Individual>,
    /// Things a person should look at.
    pub warnings: Vec<Warning>,
    /// The settings the file was read with.
    pub settings: ReadSettings,
}

/// An input file with problems: all of them, and the warnings found on the way.
#[derive(Debug, Clone, PartialEq, Serialize, thiserror::Error)]
#[error("{file}: {} problem{} found; nothing was computed", problems.len(), if problems.len() == 1 { "" } else { "s" })]
pub struct InputError {
    /// The file.
    pub file: String,
    /// Every problem, in row order.
    pub problems: Vec<Problem>,
    /// Warnings found before the problems stopped the reading.
    pub warnings: Vec<Warning>,
}

/// Read and validate an input table (CSV, TSV, semicolon-separated text, or a workbook).
///
/// # Errors
/// [`InputError`] listing every problem found in the file.
pub fn read_assemblage(
    path: &Path,
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, InputError> {
    let name = path.display().to_string();
    let fail = |problems| InputError {
        file: name.clone(),
        problems,
        warnings: Vec::new(),
    };
    // Bounded whatever the metadata says: a pipe or a device has no length.
    let bytes = crate::limits::read_bounded(path, MAX_INPUT_BYTES).map_err(|e| {
        fail(vec![match e {
            crate::limits::BoundedReadError::TooLarge { .. } => too_large(&name),
            crate::limits::BoundedReadError::Io(e) => Problem {
                file: name.clone(),
                row: None,
                column: None,
                value: None,
                kind: ProblemKind::Unreadable,
                expected: format!("a readable file ({e})"),
            },
        }])
    })?;
    read_assemblage_bytes(&name, &bytes, catalogue, settings)
}

/// The problem of a table larger than [`MAX_INPUT_BYTES`].
fn too_large(name: &str) -> Problem {
    Problem {
        file: name.to_string(),
        row: None,
        column: None,
        value: Some(format!("more than {} MiB", MAX_INPUT_BYTES >> 20)),
        kind: ProblemKind::Unreadable,
        expected: format!(
            "a table of at most {} MiB (about three million individuals); split larger files by site, phase or zone and analyse them as groups of one study",
            MAX_INPUT_BYTES >> 20
        ),
    }
}

/// Read and validate a table held in memory (an upload): a workbook when `name` ends in a
/// workbook's extension (`.xlsx`, `.xlsm`, `.xlsb`, `.xls`, `.ods`), delimited text otherwise.
/// `name` is used in messages and the record of the run.
///
/// # Errors
/// [`InputError`] listing every problem found.
pub fn read_assemblage_bytes(
    name: &str,
    bytes: &[u8],
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, InputError> {
    let fail = |problems| InputError {
        file: name.to_string(),
        problems,
        warnings: Vec::new(),
    };
    let table = raw_table(name, bytes, settings.sheet.as_deref()).map_err(fail)?;
    build(name, table, sha256_hex(bytes), catalogue, settings)
}

/// The header row of a table held in memory (a workbook's sheet, or delimited text), or
/// `None` when the file cannot be split into cells: what a column mapping starts from, even
/// when the table has problems.
pub fn header_of_bytes(name: &str, bytes: &[u8], sheet: Option<&str>) -> Option<Vec<String>> {
    raw_table(name, bytes, sheet).ok().map(|t| t.header)
}

/// The cells of a table held in memory: a workbook's sheet (by the name's extension) or
/// delimited text, within the size bound.
fn raw_table(name: &str, bytes: &[u8], sheet: Option<&str>) -> Result<RawTable, Vec<Problem>> {
    if bytes.len() as u64 > MAX_INPUT_BYTES {
        return Err(vec![too_large(name)]);
    }
    let path = Path::new(name);
    if is_workbook(path) {
        read_workbook(path, bytes, sheet)
    } else {
        read_text(name, bytes)
    }
}

/// Read and validate delimited text held in memory. `name` is used in messages.
///
/// # Errors
/// [`InputError`] listing every problem found.
pub fn read_assemblage_text(
    name: &str,
    bytes: &[u8],
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, InputError> {
    let table = read_text(name, bytes).map_err(|problems| InputError {
        file: name.to_string(),
        problems,
        warnings: Vec::new(),
    })?;
    build(name, table, sha256_hex(bytes), catalogue, settings)
}

/// SHA-256 of bytes as lower-case hex.
pub fn sha256_hex(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

struct SidedCells {
    unsided: Option<Observation>,
    left: Option<Observation>,
    right: Option<Observation>,
}

/// Column names longer than the limit, refused before any name matching (which costs their
/// length).
fn long_column_names(name: &str, header: &[String]) -> Vec<Problem> {
    header
        .iter()
        .enumerate()
        .filter(|(_, h)| h.chars().count() > crate::limits::MAX_COLUMN_NAME_CHARS)
        .map(|(c, h)| Problem {
            file: name.to_string(),
            row: Some(1),
            column: Some(format!("column {}", c + 1)),
            value: Some(format!(
                "{}… ({} characters)",
                h.chars().take(40).collect::<String>(),
                h.chars().count()
            )),
            kind: ProblemKind::LimitExceeded,
            expected: format!(
                "a column name of at most {} characters",
                crate::limits::MAX_COLUMN_NAME_CHARS
            ),
        })
        .collect()
}

fn build(
    name: &str,
    table: RawTable,
    sha256: String,
    catalogue: &Catalogue,
    settings: &ReadSettings,
) -> Result<Assemblage, InputError> {
    let long = long_column_names(name, &table.header);
    if !long.is_empty() {
        return Err(InputError {
            file: name.to_string(),
            problems: long,
            warnings: Vec::new(),
        });
    }
    let (roles, problems, warnings) = assign_roles(
        name,
        &table.header,
        catalogue,
        settings.group_column.as_deref(),
        &settings.renames,
    );
    if problems.iter().any(|p| {
        matches!(
            p.kind,
            ProblemKind::MissingIdColumn
                | ProblemKind::DuplicateColumn
                | ProblemKind::MissingGroupColumn
        )
    }) {
        return Err(InputError {
            file: name.to_string(),
            problems,
            warnings,
        });
    }
    let carried: Vec<usize> = (0..roles.len())
        .filter(|&c| roles[c] == ColumnRole::Carried && !table.header[c].trim().is_empty())
        .collect();
    let mut trait_columns = vec![false; catalogue.len()];
    for r in &roles {
        if let ColumnRole::Trait { index, .. } = r {
            trait_columns[*index] = true;
        }
    }
    // The catalogue traits that have a column, and where each sits among them: a row's work
    // is for the traits the table holds, not for the whole catalogue.
    let mut present: Vec<usize> = roles
        .iter()
        .filter_map(|r| match r {
            ColumnRole::Trait { index, .. } => Some(*index),
            _ => None,
        })
        .collect();
    present.sort_unstable();
    present.dedup();
    let mut slots = vec![usize::MAX; catalogue.len()];
    for (k, &index) in present.iter().enumerate() {
        slots[index] = k;
    }
    let reader = RowReader {
        name,
        header: &table.header,
        roles: &roles,
        present: &present,
        slots: &slots,
        catalogue,
        settings,
        carried: &carried,
        dna: catalogue
            .position("dna_x_reads")
            .zip(catalogue.position("dna_y_reads"))
            .map(|(x, y)| (x, y, catalogue.position("dna_autosome_reads"))),
        decimal_comma: table.decimal_comma,
    };
    let mut found = Findings {
        problems,
        warnings,
        seen_ids: HashMap::new(),
        comma_cells: 0,
        second_side_unused: vec![0; catalogue.len()],
    };
    let individuals: Vec<Individual> = table
        .rows
        .iter()
        .map(|raw| reader.read(&raw, &mut found))
        .collect();
    let Findings {
        mut problems,
        mut warnings,
        comma_cells,
        second_side_unused,
        ..
    } = found;
    warnings.extend(second_sides_unused(
        name,
        catalogue,
        settings,
        &second_side_unused,
    ));
    if table.rows.is_empty() {
        problems.push(Problem {
            file: name.to_string(),
            row: None,
            column: None,
            value: None,
            kind: ProblemKind::Empty,
            expected: "at least one row of data below the header".into(),
        });
    }
    if comma_cells > 0 {
        warnings.push(Warning {
            file: name.to_string(),
            row: None,
            column: None,
            kind: WarningKind::DecimalComma,
            message: format!(
                "{comma_cells} measurement(s) written with a decimal comma were read as decimals"
            ),
        });
    }
    if !problems.is_empty() {
        problems.sort_by_key(|p| (p.row.unwrap_or(0), p.column.clone()));
        return Err(InputError {
            file: name.to_string(),
            problems,
            warnings,
        });
    }
    Ok(Assemblage {
        file: name.to_string(),
        format: table.format,
        delimiter: table.delimiter,
        decimal_comma: table.decimal_comma,
        sha256,
        catalogue: catalogue.clone(),
        trait_columns,
        carried_columns: carried.iter().map(|&c| reader.column(c)).collect(),
        individuals,
        warnings,
        settings: settings.clone(),
    })
}

/// One warning per trait whose two sides were both recorded for some individuals while the
/// side policy used one: the other side is not evidence, and the reader must know it.
fn second_sides_unused(
    name: &str,
    catalogue: &Catalogue,
    settings: &ReadSettings,
    counts: &[usize],
) -> Vec<Warning> {
    let (used, other) = match settings.side_policy {
        SidePolicy::LeftFirst => ("left", "right"),
        SidePolicy::RightFirst => ("right", "left"),
        SidePolicy::Both => return Vec::new(),
    };
    counts
        .iter()
        .enumerate()
        .filter(|(_, &n)| n > 0)
        .map(|(k, &n)| {
            let id = &catalogue.traits()[k].id;
            Warning {
                file: name.to_string(),
                row: None,
                column: Some(format!("{id}_l, {id}_r")),
                kind: WarningKind::SecondSideUnused,
                message: format!(
                    "both sides recorded for {n} individual{}: under {} only the {used} is used (one side per trait, as is common practice) and the {other} is not evidence (--sides both combines the two)",
                    if n == 1 { "" } else { "s" },
                    settings.side_policy.as_str()
                ),
            }
        })
        .collect()
}

/// What reading the rows finds, over every row: problems and warnings (after those of the
/// header), the ids seen (by row), and how many measurements had a decimal comma.
struct Findings {
    problems: Vec<Problem>,
    warnings: Vec<Warning>,
    seen_ids: HashMap<String, usize>,
    comma_cells: usize,
    /// Per trait, rows with both sides recorded of which the side policy used one.
    second_side_unused: Vec<usize>,
}

/// Everything needed to read one row, fixed for the whole table.
struct RowReader<'a> {
    name: &'a str,
    header: &'a [String],
    roles: &'a [ColumnRole],
    /// Catalogue positions of the traits with a column, in order.
    present: &'a [usize],
    /// For each catalogue position, its place in `present` (`usize::MAX`: no column).
    slots: &'a [usize],
    catalogue: &'a Catalogue,
    settings: &'a ReadSettings,
    /// Columns carried through unchanged.
    carried: &'a [usize],
    /// Catalogue positions of the X and Y read counts, when the catalogue has both, and of
    /// the autosomal count.
    dna: Option<(usize, usize, Option<usize>)>,
    decimal_comma: bool,
}

/// The cells of one row other than traits.
#[derive(Default)]
struct RowFields {
    id: String,
    group: Option<String>,
    age: Option<AgeAtDeath>,
    known_sex: Option<Sex>,
}

impl RowReader<'_> {
    fn column(&self, c: usize) -> String {
        self.header[c].trim().to_string()
    }

    fn problem(
        &self,
        row: usize,
        c: usize,
        value: &str,
        kind: ProblemKind,
        expected: String,
    ) -> Problem {
        Problem {
            file: self.name.to_string(),
            row: Some(row),
            column: Some(self.column(c)),
            value: Some(value.to_string()),
            kind,
            expected,
        }
    }

    /// One row as an individual; its problems and warnings go to `found`.
    fn read(&self, raw: &RawRow<'_>, found: &mut Findings) -> Individual {
        let n = self.catalogue.len();
        let mut written = vec![false; n];
        let mut cells: Vec<SidedCells> = (0..self.present.len())
            .map(|_| SidedCells {
                unsided: None,
                left: None,
                right: None,
            })
            .collect();
        let fields = self.read_cells(raw, &mut cells, &mut written, found);
        let observations = self.combine(raw.row, cells, found);
        self.check_reads_pair(raw.row, &written, found);
        if !fields.id.is_empty() && observations.n_recorded() == 0 {
            found.warnings.push(Warning {
                file: self.name.to_string(),
                row: Some(raw.row),
                column: None,
                kind: WarningKind::NoEvidence,
                message: format!(
                    "`{}` has no trait recorded: it will be reported as not estimable",
                    fields.id
                ),
            });
        }
        Individual {
            id: fields.id,
            row: raw.row,
            group: fields.group,
            age: fields.age,
            known_sex: fields.known_sex,
            observations,
            carried: self
                .carried
                .iter()
                .map(|&c| raw.cell(c).to_string())
                .collect(),
        }
    }

    /// Every cell of the row by its column's role: the row's fields, and each trait's
    /// observation on its side.
    fn read_cells(
        &self,
        raw: &RawRow<'_>,
        cells: &mut [SidedCells],
        written: &mut [bool],
        found: &mut Findings,
    ) -> RowFields {
        let (row, settings) = (raw.row, self.settings);
        let mut f = RowFields::default();
        for (c, cell) in raw.cells().enumerate() {
            let missing = settings.is_missing(cell);
            let mut push = |kind, expected: String| {
                found
                    .problems
                    .push(self.problem(row, c, cell, kind, expected));
            };
            match self.roles[c] {
                ColumnRole::Id => {
                    f.id = cell.trim().to_string();
                    if f.id.is_empty() {
                        push(
                            ProblemKind::MissingId,
                            "an identifier: every row needs one".into(),
                        );
                    } else if let Some(first) = found.seen_ids.get(&f.id) {
                        let expected =
                            format!("a unique identifier; `{}` is also on row {first}", f.id);
                        found.problems.push(self.problem(
                            row,
                            c,
                            cell,
                            ProblemKind::DuplicateId,
                            expected,
                        ));
                    } else {
                        found.seen_ids.insert(f.id.clone(), row);
                    }
                }
                ColumnRole::Group if !missing => f.group = Some(cell.trim().to_string()),
                ColumnRole::Age if !missing => {
                    let own = self.settings.age_map.get(&cell.trim().to_lowercase());
                    match own
                        .map(|a| Ok(*a))
                        .unwrap_or_else(|| parse_age(cell, self.decimal_comma))
                    {
                        Ok(a) => f.age = Some(a),
                        Err(e) if self.settings.age_map.is_empty() => push(ProblemKind::BadAge, e),
                        Err(e) => push(
                            ProblemKind::BadAge,
                            format!(
                                "{e}, or a word of the age map ({})",
                                self.settings
                                    .age_map
                                    .keys()
                                    .take(12)
                                    .cloned()
                                    .collect::<Vec<_>>()
                                    .join(", ")
                            ),
                        ),
                    }
                }
                ColumnRole::KnownSex if !missing => match parse_known_sex(cell) {
                    Some(s) => f.known_sex = Some(s),
                    None => push(
                        ProblemKind::BadKnownSex,
                        "F, M, female or male (or a missing code)".into(),
                    ),
                },
                ColumnRole::Trait { index, side } if !missing => {
                    written[index] = true;
                    match self.parse_trait(index, cell, &mut found.comma_cells) {
                        Ok(o) => {
                            let slot = &mut cells[self.slots[index]];
                            match side {
                                Side::Unsided => slot.unsided = Some(o),
                                Side::Left => slot.left = Some(o),
                                Side::Right => slot.right = Some(o),
                            }
                        }
                        Err((kind, expected)) => found
                            .problems
                            .push(self.problem(row, c, cell, kind, expected)),
                    }
                }
                _ => {}
            }
        }
        f
    }

    /// A trait's cell read by the trait's kind; `comma_cells` counts decimal commas.
    fn parse_trait(
        &self,
        index: usize,
        cell: &str,
        comma_cells: &mut usize,
    ) -> Result<Observation, (ProblemKind, String)> {
        let def = &self.catalogue.traits()[index];
        match &def.kind {
            TraitKind::Ordinal { lowest, highest } => {
                parse_grade(cell, *lowest, *highest, self.settings.scale_map(&def.id))
            }
            TraitKind::Metric { unit, low, high } => {
                parse_measurement(cell, unit, *low, *high, self.decimal_comma).map(|(o, conv)| {
                    *comma_cells += usize::from(conv);
                    o
                })
            }
            TraitKind::Count => parse_count(cell),
        }
    }

    /// Each trait's observation from its sides under the side policy, with a warning where
    /// the two sides disagree beyond the tolerance.
    fn combine(
        &self,
        row: usize,
        cells: Vec<SidedCells>,
        found: &mut Findings,
    ) -> super::Observations {
        let settings = self.settings;
        let mut entries = Vec::with_capacity(cells.len());
        for (slot, sc) in cells.into_iter().enumerate() {
            let index = self.present[slot];
            let def = &self.catalogue.traits()[index];
            let (obs, side) = combine_sides(sc, settings.side_policy);
            if let (Some(l), Some(r)) = (obs.1, obs.2) {
                if settings.side_policy != SidePolicy::Both {
                    found.second_side_unused[index] += 1;
                }
                if let Some(msg) = sides_disagree(&l, &r, settings) {
                    found.warnings.push(Warning {
                        file: self.name.to_string(),
                        row: Some(row),
                        column: Some(format!("{0}_l, {0}_r", def.id)),
                        kind: WarningKind::SidesDisagree,
                        message: format!("{msg}; used: {}", settings.side_policy.as_str()),
                    });
                }
            }
            if obs.0.is_some() {
                entries.push((index, side, obs.0));
            }
        }
        super::Observations::from_recorded(self.catalogue.len(), entries)
    }

    /// Read counts come in pairs: a Y or an autosomal count needs the X count it is compared
    /// with, and an X count needs a Y count, an autosomal count, or both.
    fn check_reads_pair(&self, row: usize, written: &[bool], found: &mut Findings) {
        let Some((x, y, autosome)) = self.dna else {
            return;
        };
        let has_autosome = autosome.is_some_and(|a| written[a]);
        let lack = if written[x] && !written[y] && !has_autosome {
            Some((
                "dna_y_reads",
                match autosome {
                    Some(_) => "a Y or an autosomal read count beside `dna_x_reads`: an X count is compared with one of them (write 0 where no reads mapped)",
                    None => "a read count beside `dna_x_reads`: X and Y read counts come as a pair (write 0 where no reads mapped)",
                },
            ))
        } else if !written[x] && (written[y] || has_autosome) {
            Some((
                "dna_x_reads",
                if written[y] {
                    "a read count beside `dna_y_reads`: X and Y read counts come as a pair (write 0 where no reads mapped)"
                } else {
                    "a read count beside `dna_autosome_reads`: the autosomal count is compared with the X count (write 0 where no reads mapped)"
                },
            ))
        } else {
            None
        };
        if let Some((column, expected)) = lack {
            found.problems.push(Problem {
                file: self.name.to_string(),
                row: Some(row),
                column: Some(column.to_string()),
                value: None,
                kind: ProblemKind::UnpairedReads,
                expected: expected.to_string(),
            });
        }
    }
}

type Combined = (
    Option<Observation>,
    Option<Observation>,
    Option<Observation>,
);

/// Choose (or join) the sides of one trait. Returns the observation used, and the left and
/// right observations when both were recorded (for the disagreement check).
fn combine_sides(sc: SidedCells, policy: SidePolicy) -> (Combined, Option<SideUsed>) {
    match (sc.unsided, sc.left, sc.right) {
        (Some(u), _, _) => ((Some(u), None, None), Some(SideUsed::Unsided)),
        (None, Some(l), None) => ((Some(l), None, None), Some(SideUsed::Left)),
        (None, None, Some(r)) => ((Some(r), None, None), Some(SideUsed::Right)),
        (None, None, None) => ((None, None, None), None),
        (None, Some(l), Some(r)) => {
            let (used, side) = match policy {
                SidePolicy::LeftFirst => (l, SideUsed::Left),
                SidePolicy::RightFirst => (r, SideUsed::Right),
                SidePolicy::Both => (join(l, r), SideUsed::Both),
            };
            ((Some(used), Some(l), Some(r)), Some(side))
        }
    }
}

fn join(l: Observation, r: Observation) -> Observation {
    match (l, r) {
        (Observation::Measurement { value: a }, Observation::Measurement { value: b }) => {
            Observation::Measurement {
                value: (a + b) / 2.0,
            }
        }
        (Observation::Grade { low: a, high: b }, Observation::Grade { low: c, high: d }) => {
            Observation::Grade {
                low: a.min(c),
                high: b.max(d),
            }
        }
        // Each count is at most MAX_READS (10^12), so the sum cannot wrap; saturating all
        // the same, so that no input can make it.
        (Observation::Count { value: a }, Observation::Count { value: b }) => Observation::Count {
            value: a.saturating_add(b),
        },
        (l, _) => l,
    }
}

fn sides_disagree(l: &Observation, r: &Observation, s: &ReadSettings) -> Option<String> {
    match (l, r) {
        (Observation::Grade { low: a, high: b }, Observation::Grade { low: c, high: d }) => {
            // Distance between the two grade intervals (0 when they overlap).
            let gap = (c - b).max(a - d).max(0);
            (gap > s.side_tolerance.grades).then(|| {
                format!(
                    "left and right grades differ by {gap} (tolerance {})",
                    s.side_tolerance.grades
                )
            })
        }
        (Observation::Measurement { value: a }, Observation::Measurement { value: b }) => {
            let rel = (a - b).abs() / ((a + b) / 2.0);
            (rel > s.side_tolerance.relative).then(|| {
                format!(
                    "left {a} and right {b} differ by {:.1}% (tolerance {:.1}%)",
                    rel * 100.0,
                    s.side_tolerance.relative * 100.0
                )
            })
        }
        _ => None,
    }
}

#[cfg(test)]
#[path = "tests/reader.rs"]
mod tests;
