//! `tessera serve`: the local web page, on 127.0.0.1 only.

use crate::serve::Server;
use crate::Error;

/// Arguments of `tessera serve`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Port on 127.0.0.1 (0: any free port).
    #[arg(long, default_value_t = 8726)]
    pub port: u16,
    /// Also open the page in the system's browser.
    #[arg(long)]
    pub open: bool,
}

/// Run the command: serve until interrupted (Ctrl-C).
///
/// # Errors
/// [`Error::Settings`] when the port cannot be bound.
pub fn run(args: Args) -> Result<i32, Error> {
    let server = Server::bind(args.port)?;
    let url = format!("http://127.0.0.1:{}/", server.port());
    println!("tessera's page is at {url} (this machine only; Ctrl-C stops it)");
    println!("Tables you load stay in this program's memory and are gone when it stops.");
    println!("Estimates, not identifications; biological sex is not gender.");
    if args.open {
        // The desktop's own opener; without one the address above is enough.
        let _ = std::process::Command::new("xdg-open")
            .arg(&url)
            .stdout(std::process::Stdio::null())
            .stderr(std::process::Stdio::null())
            .spawn();
    }
    server.run(4);
    Ok(0)
}
