//! How the command line shows problem lists carried inside errors: every problem of an input
//! table, every problem of a fit, one per line.

use crate::data::InputError;
use crate::fit::FitError;
use std::fmt::Write as _;

/// Every problem of a file that failed, one per line.
pub fn render_problems(e: &InputError) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{e}:");
    for p in &e.problems {
        let _ = writeln!(s, "  {p}");
    }
    if !e.warnings.is_empty() {
        let _ = writeln!(s, "Warnings ({}):", e.warnings.len());
        for w in &e.warnings {
            let _ = writeln!(s, "  {w}");
        }
    }
    s
}

/// Every problem of a fit, one per line.
pub fn render_fit_problems(e: &FitError) -> String {
    let mut s = format!("{e}\n");
    for p in &e.problems {
        let _ = writeln!(s, "  {}: {}", p.place, p.message);
    }
    s
}
