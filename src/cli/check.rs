//! `tessera check FILE`: validate an input table and summarise how complete it is.

use super::input::{GroupArgs, InputArgs};
use crate::data::{read_assemblage, Completeness, InputError, TableFormat};
use crate::Error;
use clap::ValueEnum;
use serde::Serialize;
use std::fmt::Write as _;
use std::path::PathBuf;

/// Output form.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// Readable text.
    Text,
    /// One JSON document on standard output.
    Json,
}

/// Arguments of `tessera check`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The input table (.csv, .tsv, .txt, .xlsx, .xls, .ods).
    pub file: PathBuf,
    /// Output form.
    #[arg(long, value_enum, default_value = "text")]
    pub format: Format,
    /// Minimum age (years) for counting adults (default: the model's, usually 18).
    #[arg(long, value_name = "YEARS")]
    pub minimum_age: Option<f64>,
    /// Model file whose traits the columns are matched against (default: the embedded model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
    /// Which column holds the groups.
    #[command(flatten)]
    pub groups: GroupArgs,
}

#[derive(Serialize)]
struct JsonReport<'a> {
    program: &'static str,
    version: &'static str,
    status: &'static str,
    #[serde(skip_serializing_if = "Option::is_none")]
    summary: Option<&'a Completeness>,
    #[serde(skip_serializing_if = "Option::is_none")]
    problems: Option<&'a InputError>,
}

/// Run the command; returns the exit code (0 readable, 3 problems).
///
/// # Errors
/// Settings and file-access errors; input problems are printed, not returned.
pub fn run(args: Args) -> Result<i32, Error> {
    let model = crate::pipeline::with_minimum_age(
        crate::pipeline::load_model(args.model.as_deref())?,
        args.minimum_age,
    )?;
    let catalogue = &model.catalogue;
    let settings = args.input.settings_grouped(catalogue, &args.groups)?;
    let minimum_age = model.minimum_age;
    match read_assemblage(&args.file, catalogue, &settings) {
        Ok(a) => {
            for w in model.unused_evidence(&a) {
                eprintln!("warning: {w}");
            }
            let c = Completeness::of(&a, Some(minimum_age));
            match args.format {
                Format::Text => {
                    let delim = match (a.format, a.delimiter) {
                        (TableFormat::Workbook, _) => "workbook".to_string(),
                        (_, Some('\t')) => "tab-separated text".to_string(),
                        (_, Some(';')) => "semicolon-separated text".to_string(),
                        _ => "comma-separated text".to_string(),
                    };
                    print!("{}", render_text(&c, &delim));
                }
                Format::Json => print_json(&JsonReport {
                    program: "tessera",
                    version: crate::VERSION,
                    status: "readable",
                    summary: Some(&c),
                    problems: None,
                }),
            }
            Ok(0)
        }
        Err(e) => {
            match args.format {
                Format::Text => eprint!("{}", super::problems::render_problems(&e)),
                Format::Json => print_json(&JsonReport {
                    program: "tessera",
                    version: crate::VERSION,
                    status: "problems",
                    summary: None,
                    problems: Some(&e),
                }),
            }
            Ok(3)
        }
    }
}

fn print_json<T: Serialize>(v: &T) {
    match serde_json::to_string_pretty(v) {
        Ok(s) => println!("{s}"),
        Err(e) => eprintln!("tessera: could not write JSON: {e}"),
    }
}

fn pct(x: f64) -> String {
    format!("{:.0}%", x * 100.0)
}

/// The readable summary of a file that passed.
pub fn render_text(c: &Completeness, form: &str) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "Input file   {} ({form})", c.file);
    let _ = writeln!(s, "SHA-256      {}", c.sha256);
    let _ = writeln!(
        s,
        "Individuals  {}: {} adult (from {} years), {} subadult, {} age unknown or straddling",
        c.individuals, c.adults, c.minimum_age, c.subadults, c.maturity_unknown
    );
    if c.without_evidence > 0 {
        let _ = writeln!(
            s,
            "             {} with no trait recorded (they stay in every output as not estimable)",
            c.without_evidence
        );
    }
    if c.with_known_sex > 0 {
        let _ = writeln!(s, "             {} with a documented sex", c.with_known_sex);
    }
    if !c.groups.is_empty() {
        let list: Vec<String> = c
            .groups
            .iter()
            .map(|g| format!("{} ({})", g.group, g.individuals))
            .collect();
        let _ = writeln!(s, "Groups       {}", list.join(", "));
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "Body region    traits  individuals  of all");
    for r in &c.regions {
        let _ = writeln!(
            s,
            "{:<14} {:>6}  {:>11}  {:>6}",
            r.region.as_str(),
            r.traits_in_file,
            r.individuals,
            pct(r.share)
        );
    }
    let _ = writeln!(s);
    let _ = writeln!(
        s,
        "Trait                          recorded  of all  as range  left  right  both"
    );
    for t in &c.traits {
        let _ = writeln!(
            s,
            "{:<30} {:>8}  {:>6}  {:>8}  {:>4}  {:>5}  {:>4}",
            t.trait_id,
            t.recorded,
            pct(t.share),
            t.as_range,
            t.left,
            t.right,
            t.both
        );
    }
    if c.traits.is_empty() {
        let _ = writeln!(
            s,
            "(no trait columns: nothing in this file can serve as evidence)"
        );
    }
    if !c.carried_columns.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(
            s,
            "Carried through unchanged (not evidence): {}",
            c.carried_columns.join(", ")
        );
    }
    if !c.warnings.is_empty() {
        let _ = writeln!(s);
        let _ = writeln!(s, "Warnings ({}):", c.warnings.len());
        for w in crate::data::problem::shown_warnings(
            &c.warnings,
            crate::data::problem::WARNINGS_SHOWN_PER_KIND,
        ) {
            let _ = writeln!(s, "  {w}");
        }
    }
    let _ = writeln!(s);
    let _ = writeln!(s, "No problems found: the file can be analysed.");
    s
}
