//! The `dimorph` command: parses arguments, calls the library, maps errors to exit codes.
#![forbid(unsafe_code)]

use clap::Parser;

fn main() {
    let cli = dimorph::cli::Cli::parse();
    std::process::exit(dimorph::cli::run(cli));
}
