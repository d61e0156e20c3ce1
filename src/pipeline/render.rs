//! One renderer: an analysis result as the set of files it writes, in writing order (the
//! tables and run record, the tables by sex, the figures, `methods.md`, the recalibration's
//! tables, `columns.md` (what every column means), then `report.md` and `tables.tex`, whose
//! list of files names them all).

use crate::output::OutputSet;
use crate::report::analysis::{recalibration_files, render_files};
use crate::report::publication::{by_sex_tables, figures_svg, methods_md, report_md_and_tex};
use crate::results::AnalysisResult;
use crate::Error;

/// Every file of an analysis.
///
/// # Errors
/// [`Error::Render`] when a table, figure or record cannot be built (nothing is then written).
pub fn render(r: &AnalysisResult) -> Result<OutputSet, Error> {
    let mut files = render_files(r)?;
    files.append(by_sex_tables(r)?);
    files.append(figures_svg(r)?);
    files.push("methods.md", methods_md(r));
    files.append(recalibration_files(r)?);
    // The data dictionary of every table above, read from their own header rows.
    let columns = crate::report::dictionary::columns_md(&files, &r.assemblage.carried_columns);
    files.push("columns.md", columns);
    let mut names: Vec<String> = files.names().into_iter().map(String::from).collect();
    names.push("report.md".into());
    names.push("tables.tex".into());
    let (report, tables) = report_md_and_tex(r, &names);
    files.push("report.md", report);
    files.push("tables.tex", tables);
    Ok(files)
}
