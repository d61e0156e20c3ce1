//! One renderer: an analysis result as the set of files it writes, in writing order (the
//! tables and run record, the tables by sex, the figures, `methods.md`, the recalibration's
//! tables, `columns.md` (what every column means), then `report.md` and `tables.tex`, whose
//! list of files names them all).

use crate::output::OutputSet;
use crate::report::analysis::{correlation_check_files, recalibration_files, render_files};
use crate::report::publication::{by_sex_tables, figures_svg, methods_md, report_md_and_tex};
use crate::results::AnalysisResult;
use crate::Error;

/// Every file of an analysis, in memory (the web page's zip, tests).
///
/// # Errors
/// [`Error::Render`] when a table, figure or record cannot be built.
pub fn render(r: &AnalysisResult) -> Result<OutputSet, Error> {
    let mut files = OutputSet::default();
    render_each(r, &mut |name, bytes| {
        files.push_piece(name, bytes);
        Ok(())
    })?;
    Ok(files)
}

/// Every file of an analysis, each handed to `sink` as soon as it is made (the command line
/// writes each into the staging folder at once, so that the long tables of a regional run are
/// not all held in memory together). The same files, in the same order, as [`render`].
///
/// # Errors
/// [`Error::Render`] when a table, figure or record cannot be built; the sink's errors.
pub fn render_each(
    r: &AnalysisResult,
    sink: &mut crate::output::FileSink<'_>,
) -> Result<(), Error> {
    let mut seen = Seen {
        names: Vec::new(),
        tables: Vec::new(),
        sink,
    };
    render_files(r, &mut |name, bytes| seen.pass(name, bytes))?;
    for set in [by_sex_tables(r)?, figures_svg(r)?] {
        for f in set.files {
            seen.pass(&f.name, f.bytes)?;
        }
    }
    seen.pass("methods.md", methods_md(r).into_bytes())?;
    for f in recalibration_files(r)?
        .files
        .into_iter()
        .chain(correlation_check_files(r)?.files)
    {
        seen.pass(&f.name, f.bytes)?;
    }
    // The data dictionary of every table above, read from their own header rows.
    let columns =
        crate::report::dictionary::columns_md_of(&seen.tables, &r.assemblage.carried_columns);
    seen.pass("columns.md", columns.into_bytes())?;
    let mut names = seen.names.clone();
    names.push("report.md".into());
    names.push("tables.tex".into());
    let (report, tables) = report_md_and_tex(r, &names);
    seen.pass("report.md", report.into_bytes())?;
    seen.pass("tables.tex", tables.into_bytes())
}

/// The files handed on so far: their names (for report.md's list) and the header rows of the
/// tables (for columns.md).
struct Seen<'a> {
    names: Vec<String>,
    tables: Vec<(String, Vec<String>)>,
    sink: &'a mut crate::output::FileSink<'a>,
}

impl Seen<'_> {
    fn pass(&mut self, name: &str, bytes: Vec<u8>) -> Result<(), Error> {
        // A further piece of the file just handed on: only its bytes go on.
        if self.names.last().is_some_and(|n| n == name) {
            return (self.sink)(name, bytes);
        }
        if name.ends_with(".csv") {
            self.tables.push((
                name.to_string(),
                crate::report::dictionary::header_of(&bytes),
            ));
        }
        self.names.push(name.to_string());
        (self.sink)(name, bytes)
    }
}
