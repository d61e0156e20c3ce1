//! The local web page (`tessera serve`): a thin layer over the same library calls as the
//! command line. A table is uploaded and held in memory (never written to disk), checked as
//! `check` checks it, analysed by the library's pipeline with options the page sends, and the
//! run's files — the same bytes as `analyse` writes — can be downloaded as one zip.
//!
//! Safety: the server binds 127.0.0.1 only; it answers only requests whose `Host` names this
//! machine (a page elsewhere cannot reach it through a renamed host); uploads are capped
//! ([`MAX_UPLOAD_BYTES`]); options that would read files of the machine (a model, prior or
//! scale-map path) are refused; at most [`KEPT_TABLES`] tables and [`KEPT_RUNS`] runs are kept,
//! the oldest dropped first. Every request gets an answer; no input can stop the server.

pub mod api;
pub mod case;
pub mod http;
mod jobs;
mod store;

use std::sync::atomic::AtomicBool;
use std::sync::Arc;

/// Largest upload (a choice of ours): a table of this size is far beyond any cemetery (the
/// demo's 75 individuals take 6 KB) and still fits in memory.
pub const MAX_UPLOAD_BYTES: usize = 64 << 20;
/// Tables kept in memory at once (a choice of ours: at most 8 × 64 MB).
pub const KEPT_TABLES: usize = 8;
/// Runs kept in memory at once, for their downloads (a choice of ours).
pub const KEPT_RUNS: usize = 8;

/// The page, its script and its style, inside the binary (no network, no build step).
const INDEX_HTML: &str = include_str!("page/index.html");
const PAGE_JS: &str = include_str!("page/page.js");
const PAGE_CSS: &str = include_str!("page/page.css");

/// One request as the router sees it: method, path, query string, the `Host` header, body.
#[derive(Debug, Clone, Default)]
pub struct WebRequest {
    /// `GET`, `POST`, …
    pub method: String,
    /// The path without the query (`/api/tables`).
    pub path: String,
    /// The query string without `?` (`name=a.csv`), percent-encoded.
    pub query: String,
    /// The `Host` header, when sent.
    pub host: Option<String>,
    /// The body.
    pub body: Vec<u8>,
}

/// An answer: status, media type, body, and a file name for downloads.
#[derive(Debug, Clone, PartialEq)]
pub struct WebResponse {
    /// HTTP status code.
    pub status: u16,
    /// Media type of the body.
    pub media_type: &'static str,
    /// The body.
    pub body: Vec<u8>,
    /// `Content-Disposition: attachment; filename=…` when set.
    pub download: Option<String>,
}

impl WebResponse {
    fn new(status: u16, media_type: &'static str, body: impl Into<Vec<u8>>) -> WebResponse {
        WebResponse {
            status,
            media_type,
            body: body.into(),
            download: None,
        }
    }

    /// A JSON answer.
    pub fn json(status: u16, value: &serde_json::Value) -> WebResponse {
        WebResponse::new(status, "application/json", value.to_string())
    }

    /// An error as JSON: `{"error": message, "problems": [...]}`.
    pub fn error(status: u16, message: &str) -> WebResponse {
        WebResponse::json(status, &serde_json::json!({ "error": message }))
    }
}

/// What the server holds between requests: uploaded tables, finished runs, analyses under
/// way. Cloning shares it (background analyses hold a clone).
#[derive(Debug, Default, Clone)]
pub struct State {
    store: Arc<std::sync::Mutex<store::Store>>,
    jobs: Arc<std::sync::Mutex<jobs::Jobs>>,
}

impl State {
    /// A new, empty state.
    pub fn new() -> State {
        State::default()
    }
}

/// Whether a `Host` header names this machine (`127.0.0.1:PORT`, `localhost:PORT`,
/// `[::1]:PORT`): a request naming any other host is refused, so that a page served from
/// elsewhere cannot talk to this server by pointing a name of its own at 127.0.0.1.
pub fn host_is_local(host: Option<&str>) -> bool {
    let Some(h) = host else {
        return false;
    };
    let name = match h.strip_prefix('[') {
        Some(rest) => rest.split(']').next().unwrap_or(""),
        None => h.split(':').next().unwrap_or(""),
    };
    matches!(name, "127.0.0.1" | "localhost" | "::1")
}

/// Answer one request. Pure: no network, so tests call it directly.
pub fn route(state: &State, req: &WebRequest) -> WebResponse {
    if !host_is_local(req.host.as_deref()) {
        return WebResponse::error(
            403,
            "this page answers only requests addressed to this machine (127.0.0.1 or localhost)",
        );
    }
    let segments: Vec<&str> = req.path.trim_matches('/').split('/').collect();
    match (req.method.as_str(), segments.as_slice()) {
        ("GET", [""]) | ("GET", ["index.html"]) => {
            WebResponse::new(200, "text/html; charset=utf-8", INDEX_HTML)
        }
        ("GET", ["page.js"]) => WebResponse::new(200, "text/javascript; charset=utf-8", PAGE_JS),
        ("GET", ["page.css"]) => WebResponse::new(200, "text/css; charset=utf-8", PAGE_CSS),
        ("POST", ["api", "tables"]) => api::upload(state, &req.query, &req.body),
        ("POST", ["api", "tables", table, "check"]) => api::recheck(state, table, &req.body),
        ("POST", ["api", "tables", table, "analyse"]) => api::analyse(state, table, &req.body),
        ("POST", ["api", "tables", table, "start"]) => api::start(state, table, &req.body),
        ("GET", ["api", "jobs", job]) => api::poll(state, job),
        ("POST", ["api", "profile"]) => api::profile(&req.body),
        ("GET", ["api", "runs", run, "outputs.zip"]) => api::download(state, run),
        ("GET", ["api", "about"]) => api::about(),
        ("GET", ["api", "catalogue"]) => case::catalogue(),
        ("POST", ["api", "case"]) => case::case(&req.body),
        (_, ["api", ..]) => WebResponse::error(404, "no such request"),
        ("GET", _) => WebResponse::error(404, "no such page"),
        _ => WebResponse::error(405, "this page answers GET and POST only"),
    }
}

/// A running server on 127.0.0.1.
pub struct Server {
    listener: std::net::TcpListener,
    state: State,
    stop: AtomicBool,
}

impl Server {
    /// Bind 127.0.0.1 at `port` (0: any free port).
    ///
    /// # Errors
    /// [`crate::Error::Settings`] when the port cannot be bound.
    pub fn bind(port: u16) -> Result<Server, crate::Error> {
        let listener = std::net::TcpListener::bind(("127.0.0.1", port)).map_err(|e| {
            crate::Error::Settings {
                file: format!("--port {port}"),
                message: format!("cannot listen on 127.0.0.1:{port}: {e}"),
            }
        })?;
        Ok(Server {
            listener,
            state: State::new(),
            stop: AtomicBool::new(false),
        })
    }

    /// The port the server listens on.
    pub fn port(&self) -> u16 {
        self.listener.local_addr().map(|a| a.port()).unwrap_or(0)
    }

    /// Serve with `workers` threads until [`Server::stop`] is called.
    pub fn run(&self, workers: usize) {
        http::accept_loop(&self.listener, &self.state, workers, &self.stop);
    }

    /// Stop [`Server::run`]: no connection is taken after the one that wakes it.
    pub fn stop(&self) {
        self.stop.store(true, std::sync::atomic::Ordering::Relaxed);
        let _ = std::net::TcpStream::connect(("127.0.0.1", self.port()));
    }
}

fn upload_too_large() -> WebResponse {
    WebResponse::error(
        413,
        &format!(
            "the file is larger than {} MB, more than any table this page takes: analyse it with the command line",
            MAX_UPLOAD_BYTES >> 20
        ),
    )
}

#[cfg(test)]
mod tests;
