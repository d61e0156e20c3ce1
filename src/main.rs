//! The `tessera` command: parses arguments, calls the library, maps errors to exit codes.
#![forbid(unsafe_code)]

use clap::Parser;

fn main() {
    // Interrupted (Ctrl-C, SIGTERM): remove any output still being written, say truthfully
    // what is in place, then stop.
    let _ = ctrlc::set_handler(|| {
        match tessera::output::finish_interrupted() {
            None => eprintln!("tessera: interrupted; nothing of this run was written"),
            Some(done) => eprintln!(
                "tessera: interrupted after this run's outputs were written in full ({done}); nothing partial was left"
            ),
        }
        std::process::exit(130);
    });
    // A reader that closes the pipe early (`tessera check … | head`) ends the output normally:
    // printing to a closed standard output is not a failure of the run (whose files, if any,
    // are already complete), so it exits 0 quietly instead of panicking.
    let default_hook = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        let message = info
            .payload()
            .downcast_ref::<String>()
            .map(String::as_str)
            .or_else(|| info.payload().downcast_ref::<&str>().copied())
            .unwrap_or("");
        if message.contains("failed printing to stdout") && message.contains("Broken pipe") {
            std::process::exit(0);
        }
        default_hook(info);
    }));
    let cli = tessera::cli::Cli::parse();
    std::process::exit(tessera::cli::run(cli));
}
