//! The `tessera` command: parses arguments, calls the library, maps errors to exit codes.
#![forbid(unsafe_code)]

use clap::Parser;

fn main() {
    // Interrupted (Ctrl-C, SIGTERM): remove any output file still being written, then stop.
    let _ = ctrlc::set_handler(|| {
        tessera::output::remove_partial_files();
        eprintln!("tessera: interrupted; no partial output was left");
        std::process::exit(130);
    });
    let cli = tessera::cli::Cli::parse();
    std::process::exit(tessera::cli::run(cli));
}
