//! A minimal HTTP/1.1 server for the page: one request per connection (`Connection: close`),
//! bodies by `Content-Length` only, every size bounded before anything is allocated.
//!
//! Written here rather than taken from a crate: the small blocking server crate tried first
//! (tiny_http 0.12) allocates a buffer of the size a request *declares* when it discards an
//! unread body, so one request declaring 100 GB aborted the process (found by the
//! malformed-request test in tests/serve.rs); the asynchronous stacks would do the job but
//! bring a runtime the rest of the program does not need. The page needs only GET and POST
//! on 127.0.0.1.

use super::{route, State, WebRequest, WebResponse, MAX_UPLOAD_BYTES};
use std::io::{Read, Write};
use std::net::{TcpListener, TcpStream};
use std::sync::atomic::{AtomicBool, Ordering};
use std::time::Duration;

/// Largest request line and headers together (a choice of ours: the page's own requests
/// take well under 2 KiB).
pub const MAX_HEAD_BYTES: usize = 16 << 10;
/// How long a client may take to send its request, or to take the answer (a choice of ours).
const TIMEOUT: Duration = Duration::from_secs(20);

/// The reason phrase of a status code.
fn reason(status: u16) -> &'static str {
    match status {
        200 => "OK",
        400 => "Bad Request",
        403 => "Forbidden",
        404 => "Not Found",
        405 => "Method Not Allowed",
        408 => "Request Timeout",
        411 => "Length Required",
        413 => "Content Too Large",
        422 => "Unprocessable Content",
        431 => "Request Header Fields Too Large",
        500 => "Internal Server Error",
        501 => "Not Implemented",
        505 => "HTTP Version Not Supported",
        _ => "",
    }
}

/// The head of a request: method, target, and the headers the page uses.
#[derive(Debug, Default, PartialEq)]
struct Head {
    method: String,
    target: String,
    host: Option<String>,
    content_length: Option<usize>,
    chunked: bool,
}

/// Parse a request head (without the blank line); `Err(status)` when it is not one.
fn parse_head(text: &str) -> Result<Head, u16> {
    let mut lines = text.split("\r\n");
    let first = lines.next().unwrap_or("");
    let mut parts = first.split(' ');
    let (Some(method), Some(target), Some(version), None) =
        (parts.next(), parts.next(), parts.next(), parts.next())
    else {
        return Err(400);
    };
    if !version.starts_with("HTTP/1.") {
        return Err(505);
    }
    if method.is_empty()
        || !method.bytes().all(|b| b.is_ascii_uppercase())
        || !target.starts_with('/')
    {
        return Err(400);
    }
    let mut head = Head {
        method: method.to_string(),
        target: target.to_string(),
        ..Head::default()
    };
    for line in lines.filter(|l| !l.is_empty()) {
        let Some((name, value)) = line.split_once(':') else {
            return Err(400);
        };
        let value = value.trim();
        match name.trim().to_ascii_lowercase().as_str() {
            "host" => head.host = Some(value.to_string()),
            "content-length" => {
                let n = value.parse::<u64>().map_err(|_| 400u16)?;
                // Declared beyond the cap: refused before a byte of it is read.
                head.content_length = Some(
                    usize::try_from(n)
                        .unwrap_or(usize::MAX)
                        .min(MAX_UPLOAD_BYTES + 1),
                );
            }
            "transfer-encoding" => head.chunked = true,
            _ => {}
        }
    }
    Ok(head)
}

/// Read up to the end of the head; `Err(status)` when it is too long, malformed or late.
fn read_head(stream: &mut TcpStream) -> Result<(Head, Vec<u8>), u16> {
    let mut buf = Vec::with_capacity(1024);
    let mut chunk = [0u8; 1024];
    loop {
        if let Some(end) = buf.windows(4).position(|w| w == b"\r\n\r\n") {
            let text = std::str::from_utf8(&buf[..end]).map_err(|_| 400u16)?;
            let head = parse_head(text)?;
            let rest = buf[end + 4..].to_vec();
            return Ok((head, rest));
        }
        if buf.len() > MAX_HEAD_BYTES {
            return Err(431);
        }
        match stream.read(&mut chunk) {
            Ok(0) => return Err(400),
            Ok(n) => buf.extend_from_slice(&chunk[..n]),
            Err(_) => return Err(408),
        }
    }
}

/// The request as the router sees it, or the status to answer with.
fn read_request(stream: &mut TcpStream) -> Result<WebRequest, WebResponse> {
    let (head, mut body) = read_head(stream)
        .map_err(|s| WebResponse::error(s, "this is not a request the page understands"))?;
    if head.chunked {
        return Err(WebResponse::error(
            411,
            "send the body with a Content-Length (chunked bodies are not taken)",
        ));
    }
    let length = head.content_length.unwrap_or(0);
    if length > MAX_UPLOAD_BYTES {
        return Err(super::upload_too_large());
    }
    if body.len() > length {
        body.truncate(length);
    }
    let mut chunk = vec![0u8; 64 << 10];
    while body.len() < length {
        let want = (length - body.len()).min(chunk.len());
        match stream.read(&mut chunk[..want]) {
            Ok(0) => {
                return Err(WebResponse::error(
                    400,
                    "the body ended before its declared length",
                ))
            }
            Ok(n) => body.extend_from_slice(&chunk[..n]),
            Err(_) => return Err(WebResponse::error(408, "the body came too slowly")),
        }
    }
    let (path, query) = match head.target.split_once('?') {
        Some((p, q)) => (p.to_string(), q.to_string()),
        None => (head.target.clone(), String::new()),
    };
    Ok(WebRequest {
        method: head.method,
        path,
        query,
        host: head.host,
        body,
    })
}

/// The bytes of an answer: status line, headers (with the page's security headers), body.
pub fn response_bytes(r: &WebResponse) -> Vec<u8> {
    let mut head = format!(
        "HTTP/1.1 {} {}\r\nContent-Type: {}\r\nContent-Length: {}\r\nConnection: close\r\nCache-Control: no-store\r\nX-Content-Type-Options: nosniff\r\nContent-Security-Policy: default-src 'self'; img-src 'self' blob:; style-src 'self'; script-src 'self'; connect-src 'self'\r\n",
        r.status,
        reason(r.status),
        r.media_type,
        r.body.len()
    );
    if let Some(name) = &r.download {
        head.push_str(&format!(
            "Content-Disposition: attachment; filename=\"{name}\"\r\n"
        ));
    }
    head.push_str("\r\n");
    let mut out = head.into_bytes();
    out.extend_from_slice(&r.body);
    out
}

/// Answer one connection: read its request, route it, write the answer, close.
fn serve_connection(state: &State, mut stream: TcpStream) {
    let _ = stream.set_read_timeout(Some(TIMEOUT));
    let _ = stream.set_write_timeout(Some(TIMEOUT));
    let response = match read_request(&mut stream) {
        Ok(req) => route(state, &req),
        Err(r) => r,
    };
    // A client that went away is not the server's failure.
    let _ = stream.write_all(&response_bytes(&response));
    let _ = stream.flush();
    let _ = stream.shutdown(std::net::Shutdown::Both);
}

/// Accept connections on `listener` (blocking) and hand each to one of `workers` threads,
/// which answers it whole; returns once `stop` is set and a connection wakes the loop
/// ([`Server::stop`](super::Server::stop) does both).
pub fn accept_loop(listener: &TcpListener, state: &State, workers: usize, stop: &AtomicBool) {
    let _ = listener.set_nonblocking(false);
    let (send, receive) = std::sync::mpsc::sync_channel::<TcpStream>(64);
    let receive = std::sync::Mutex::new(receive);
    std::thread::scope(|scope| {
        for _ in 0..workers.max(1) {
            scope.spawn(|| loop {
                let next = match receive.lock() {
                    Ok(r) => r.recv(),
                    Err(_) => return,
                };
                match next {
                    Ok(stream) => serve_connection(state, stream),
                    Err(_) => return,
                }
            });
        }
        for stream in listener.incoming() {
            if stop.load(Ordering::Relaxed) {
                break;
            }
            if let Ok(stream) = stream {
                if send.send(stream).is_err() {
                    break;
                }
            }
        }
        drop(send);
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn heads_are_parsed_and_bad_ones_refused() {
        let h = parse_head(
            "POST /api/tables?name=a.csv HTTP/1.1\r\nHost: 127.0.0.1:1\r\nContent-Length: 12",
        )
        .unwrap();
        assert_eq!(h.method, "POST");
        assert_eq!(h.target, "/api/tables?name=a.csv");
        assert_eq!(h.host.as_deref(), Some("127.0.0.1:1"));
        assert_eq!(h.content_length, Some(12));
        // A declared length beyond the cap is clamped, never allocated.
        let h = parse_head("POST / HTTP/1.1\r\nContent-Length: 99999999999999999").unwrap();
        assert_eq!(h.content_length, Some(MAX_UPLOAD_BYTES + 1));
        assert_eq!(parse_head("GET / HTTP/2"), Err(505));
        assert_eq!(parse_head("GET /"), Err(400));
        assert_eq!(parse_head("get / HTTP/1.1"), Err(400));
        assert_eq!(parse_head("GET x HTTP/1.1"), Err(400));
        assert_eq!(parse_head("GET / HTTP/1.1\r\nno colon"), Err(400));
        assert_eq!(parse_head("GET / HTTP/1.1\r\nContent-Length: -1"), Err(400));
        assert!(
            parse_head("POST / HTTP/1.1\r\nTransfer-Encoding: chunked")
                .unwrap()
                .chunked
        );
    }

    #[test]
    fn an_answer_carries_its_length_and_the_security_headers() {
        let r = WebResponse::error(404, "no");
        let text = String::from_utf8(response_bytes(&r)).unwrap();
        assert!(text.starts_with("HTTP/1.1 404 Not Found\r\n"));
        assert!(text.contains(&format!("Content-Length: {}\r\n", r.body.len())));
        assert!(text.contains("Content-Security-Policy: default-src 'self'"));
        assert!(text.ends_with("{\"error\":\"no\"}"));
    }
}
