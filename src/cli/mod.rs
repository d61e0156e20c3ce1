//! The command line: argument parsing and the glue that calls the library. One file per
//! subcommand, each with its `Args` and a `run`.

pub mod agreement;
pub mod analyse;
pub mod case;
pub mod check;
pub mod elements;
pub mod evidence;
pub mod fit;
pub mod input;
pub mod plan;
pub mod problems;
pub mod serve;
pub mod simulate;
pub mod validate;

use clap::{Parser, Subcommand};

/// Bayesian estimation of biological sex from skeletal evidence.
///
/// Estimates, not identifications. Forensic casework needs validated methods, accredited
/// practice and local rules. Biological sex is not gender.
#[derive(Debug, Parser)]
#[command(name = "tessera", version, about, long_about = None)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Posterior sex of every individual and the assemblage's proportion female, with the
    /// prior sensitivity analysis (the main job).
    Analyse(analyse::Args),
    /// Validate an input table and summarise how complete it is; lists every problem.
    Check(check::Args),
    /// Per individual and body region: the likelihood ratio female:male, without any prior.
    Evidence(evidence::Args),
    /// One individual's report for a case file: likelihood ratios by region, what was
    /// recorded, the cautions (Markdown and printable HTML).
    Case(case::Args),
    /// Draw an invented assemblage with known sex from a model (for testing and teaching).
    Simulate(simulate::Args),
    /// Before excavating: how wide will the interval of the sex ratio be, over a range of sizes?
    Plan(plan::Args),
    /// Commingled remains, one row per element: sex by element, the minimum number of
    /// individuals by sex, and the proportion female.
    Elements(elements::Args),
    /// How well two observers' scorings of the same individuals agree.
    Agreement(agreement::Args),
    /// Fit a model to a documented reference collection (individuals of known sex), or build
    /// one from the summary statistics a paper publishes (--from-summary).
    Fit(fit::Args),
    /// Error rates of a model on a documented reference collection, by cross-validation.
    Validate(validate::Args),
    /// A page in the browser on this machine: load a table, check it, analyse it, read each
    /// individual's evidence, download every output.
    Serve(serve::Args),
}

/// Run a parsed command line; returns the process exit code.
pub fn run(cli: Cli) -> i32 {
    let result = match cli.command {
        Command::Analyse(args) => analyse::run(args),
        Command::Check(args) => check::run(args),
        Command::Evidence(args) => evidence::run(args),
        Command::Case(args) => case::run(args),
        Command::Simulate(args) => simulate::run(args),
        Command::Plan(args) => plan::run(args),
        Command::Elements(args) => elements::run(args),
        Command::Agreement(args) => agreement::run(args),
        Command::Fit(args) => fit::run(args),
        Command::Validate(args) => validate::run(args),
        Command::Serve(args) => serve::run(args),
    };
    match result {
        Ok(code) => code,
        // Problem lists are shown one per line, as the front door's job.
        Err(crate::Error::Input(e)) => {
            eprint!("{}", problems::render_problems(&e));
            3
        }
        Err(crate::Error::Fit(e)) => {
            eprint!("{}", problems::render_fit_problems(&e));
            3
        }
        Err(e) => {
            eprintln!("tessera: {e}");
            e.exit_code()
        }
    }
}

/// The command line as typed, with the program path replaced by `tessera` so that the record
/// does not depend on where the binary lives.
pub fn command_line() -> Vec<String> {
    std::iter::once("tessera".to_string())
        .chain(std::env::args().skip(1))
        .collect()
}

/// An error in one command-line option.
pub(crate) fn settings_error(option: &str, message: String) -> crate::Error {
    crate::Error::Options(crate::OptionProblems::one(option, message))
}

/// Progress drawn as a bar on standard error, only when standard error is a terminal
/// (indicatif hides it otherwise), so files and pipes receive no bar.
#[derive(Debug)]
pub struct TerminalProgress {
    bar: std::sync::RwLock<indicatif::ProgressBar>,
}

impl Default for TerminalProgress {
    fn default() -> Self {
        TerminalProgress {
            bar: std::sync::RwLock::new(indicatif::ProgressBar::hidden()),
        }
    }
}

impl crate::progress::Progress for TerminalProgress {
    fn stage(&self, what: &str, steps: u64) {
        let bar = indicatif::ProgressBar::new(steps);
        bar.set_style(
            indicatif::ProgressStyle::with_template(&format!(
                "{what} [{{bar:40}}] {{pos}}/{{len}} ({{eta}} left)"
            ))
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
        );
        if let Ok(mut b) = self.bar.write() {
            *b = bar;
        }
    }
    fn advance(&self, n: u64) {
        if let Ok(b) = self.bar.read() {
            b.inc(n);
        }
    }
    fn finish(&self) {
        if let Ok(b) = self.bar.read() {
            b.finish_and_clear();
        }
    }
}
