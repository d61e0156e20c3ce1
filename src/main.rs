//! The `dimorph` command: parses arguments, calls the library, maps errors to exit codes.
#![forbid(unsafe_code)]

use clap::Parser;

fn main() {
    // Interrupted (Ctrl-C, SIGTERM): remove any output file still being written, then stop.
    let _ = ctrlc::set_handler(|| {
        dimorph::output::remove_partial_files();
        eprintln!("dimorph: interrupted; no partial output was left");
        std::process::exit(130);
    });
    let cli = dimorph::cli::Cli::parse();
    std::process::exit(dimorph::cli::run(cli));
}
