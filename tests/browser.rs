//! The page in a real browser: headless Chromium driven through WebDriver (chromedriver, both
//! from Debian's packages, installed by .ci/run). It loads the demo, chooses the groups, runs
//! the analysis, opens one individual and checks the numbers shown against the library's.
//!
//! Where chromedriver is not installed the test says so on standard error and passes without
//! running (`.ci/run` installs it, so CI always runs it). `TESSERA_SCREENSHOT=FILE.png` keeps a
//! screenshot of the results.

use std::io::{Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};
use tessera::serve::Server;

/// One HTTP exchange with chromedriver (Connection: close, chunked answers decoded).
fn http(
    port: u16,
    method: &str,
    path: &str,
    body: Option<&serde_json::Value>,
) -> serde_json::Value {
    let body = body.map(|b| b.to_string()).unwrap_or_default();
    let mut s = TcpStream::connect(("127.0.0.1", port)).expect("chromedriver answers");
    s.set_read_timeout(Some(Duration::from_secs(120))).unwrap();
    let req = format!(
        "{method} {path} HTTP/1.1\r\nHost: 127.0.0.1:{port}\r\nContent-Type: application/json\r\nContent-Length: {}\r\nConnection: close\r\n\r\n{body}",
        body.len()
    );
    s.write_all(req.as_bytes()).unwrap();
    // chromedriver keeps the connection open: read the head, then exactly the body it
    // announces (Content-Length, or chunks up to the last one).
    let mut raw = Vec::new();
    let mut chunk = [0u8; 8192];
    let split = loop {
        if let Some(p) = raw.windows(4).position(|w| w == b"\r\n\r\n") {
            break p;
        }
        let n = s.read(&mut chunk).unwrap();
        assert!(n > 0, "chromedriver closed the connection");
        raw.extend_from_slice(&chunk[..n]);
    };
    let head = String::from_utf8_lossy(&raw[..split]).to_ascii_lowercase();
    let mut payload = raw[split + 4..].to_vec();
    let length = head
        .lines()
        .find_map(|l| l.strip_prefix("content-length:"))
        .and_then(|v| v.trim().parse::<usize>().ok());
    let complete = |p: &[u8]| match length {
        Some(n) => p.len() >= n,
        None => p.ends_with(b"0\r\n\r\n"),
    };
    while !complete(&payload) {
        let n = s.read(&mut chunk).unwrap();
        if n == 0 {
            break;
        }
        payload.extend_from_slice(&chunk[..n]);
    }
    if head.contains("transfer-encoding: chunked") {
        let mut out = Vec::new();
        let mut rest = &payload[..];
        loop {
            let line_end = rest.windows(2).position(|w| w == b"\r\n").unwrap();
            let size = usize::from_str_radix(
                String::from_utf8_lossy(&rest[..line_end])
                    .split(';')
                    .next()
                    .unwrap()
                    .trim(),
                16,
            )
            .unwrap();
            if size == 0 {
                break;
            }
            out.extend_from_slice(&rest[line_end + 2..line_end + 2 + size]);
            rest = &rest[line_end + 2 + size + 2..];
        }
        payload = out;
    }
    serde_json::from_slice(&payload).unwrap_or(serde_json::Value::Null)
}

struct Driver {
    port: u16,
    session: String,
    process: Child,
}

impl Driver {
    fn start() -> Option<Driver> {
        let port = std::net::TcpListener::bind("127.0.0.1:0")
            .ok()?
            .local_addr()
            .ok()?
            .port();
        let process = Command::new("chromedriver")
            .arg(format!("--port={port}"))
            .stdout(Stdio::null())
            .stderr(Stdio::null())
            .spawn()
            .ok()?;
        let start = Instant::now();
        while TcpStream::connect(("127.0.0.1", port)).is_err() {
            if start.elapsed() > Duration::from_secs(20) {
                return None;
            }
            std::thread::sleep(Duration::from_millis(100));
        }
        let binary = ["/usr/bin/chromium", "/usr/bin/chromium-browser"]
            .into_iter()
            .find(|p| Path::new(p).exists())
            .unwrap_or("/usr/bin/chromium");
        let caps = serde_json::json!({"capabilities": {"alwaysMatch": {
            "browserName": "chrome",
            "goog:chromeOptions": {
                "binary": binary,
                "args": ["--headless=new", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--window-size=1400,1800"]
            }
        }}});
        let r = http(port, "POST", "/session", Some(&caps));
        let session = r["value"]["sessionId"].as_str()?.to_string();
        Some(Driver {
            port,
            session,
            process,
        })
    }

    fn call(&self, method: &str, path: &str, body: serde_json::Value) -> serde_json::Value {
        let full = format!("/session/{}{}", self.session, path);
        let body = (method == "POST").then_some(&body);
        http(self.port, method, &full, body)["value"].take()
    }

    fn go(&self, url: &str) {
        self.call("POST", "/url", serde_json::json!({ "url": url }));
    }

    fn element(&self, css: &str) -> String {
        let v = self.call(
            "POST",
            "/element",
            serde_json::json!({"using": "css selector", "value": css}),
        );
        v.as_object()
            .and_then(|o| o.values().next())
            .and_then(|x| x.as_str())
            .unwrap_or_else(|| panic!("no element {css}: {v}"))
            .to_string()
    }

    fn script(&self, js: &str) -> serde_json::Value {
        let v = self.call(
            "POST",
            "/execute/sync",
            serde_json::json!({"script": js, "args": []}),
        );
        // A script that threw is a failed step, not a value.
        assert!(v.get("error").is_none(), "{js}: {v}");
        v
    }

    /// Wait until a script returns true (20 s at most).
    fn wait(&self, js: &str) {
        let start = Instant::now();
        while self.script(js) != serde_json::Value::Bool(true) {
            assert!(
                start.elapsed() < Duration::from_secs(60),
                "timed out waiting for {js}"
            );
            std::thread::sleep(Duration::from_millis(200));
        }
    }
}

impl Drop for Driver {
    fn drop(&mut self) {
        let _ = http(
            self.port,
            "DELETE",
            &format!("/session/{}", self.session),
            None,
        );
        let _ = self.process.kill();
        let _ = self.process.wait();
    }
}

/// Decode standard base64 (the screenshot WebDriver returns).
fn base64(text: &str) -> Vec<u8> {
    let value = |c: u8| match c {
        b'A'..=b'Z' => Some(c - b'A'),
        b'a'..=b'z' => Some(c - b'a' + 26),
        b'0'..=b'9' => Some(c - b'0' + 52),
        b'+' => Some(62),
        b'/' => Some(63),
        _ => None,
    };
    let digits: Vec<u8> = text.bytes().filter_map(value).collect();
    digits
        .chunks(4)
        .flat_map(|c| {
            let n = c
                .iter()
                .enumerate()
                .fold(0u32, |n, (i, &d)| n | (u32::from(d) << (18 - 6 * i)));
            let bytes = [(n >> 16) as u8, (n >> 8) as u8, n as u8];
            bytes[..c.len().saturating_sub(1)].to_vec()
        })
        .collect()
}

#[test]
fn the_page_runs_the_demo_in_a_real_browser() {
    let found = Command::new("chromedriver")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    if !found {
        eprintln!("BROWSER TEST SKIPPED: chromedriver is not installed (apt-get install chromium chromium-driver; .ci/run installs them)");
        return;
    }
    let server = Server::bind(0).unwrap();
    let url = format!("http://127.0.0.1:{}/", server.port());
    // The demo as a lab might keep it: glabella under a name of its own, `Glab`.
    let dir = tempfile::tempdir().unwrap();
    let demo = dir.path().join("mirefold-lab.csv");
    let text = std::fs::read_to_string(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/mirefold.csv"),
    )
    .unwrap();
    let (header, rest) = text.split_once('\n').unwrap();
    std::fs::write(
        &demo,
        format!("{}\n{rest}", header.replace("glabella", "Glab")),
    )
    .unwrap();
    std::thread::scope(|scope| {
        scope.spawn(|| server.run(2));
        let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            let d = Driver::start().expect("chromedriver starts a headless Chromium");
            d.go(&url);
            d.wait("return document.getElementById('prior').options.length > 0");
            // Load the demo through the file chooser, as a person would.
            let file = d.element("#file");
            d.call(
                "POST",
                &format!("/element/{file}/value"),
                serde_json::json!({ "text": demo.display().to_string() }),
            );
            d.wait("return !document.getElementById('settings-step').hidden");
            // `Glab` is listed with glabella as its closest name; map it and read again.
            d.wait("return !document.getElementById('mapping').hidden");
            let offered = d.script("const s = document.querySelector('#mapping-table select[data-column=\"Glab\"]'); return s.options[1].value");
            assert_eq!(offered, "glabella");
            d.script("document.querySelector('#mapping-table select[data-column=\"Glab\"]').value = 'glabella'; return true");
            d.script("document.getElementById('table-status').textContent = ''; return true");
            let apply = d.element("#apply-mapping");
            d.call(
                "POST",
                &format!("/element/{apply}/click"),
                serde_json::json!({}),
            );
            d.wait("return document.getElementById('table-status').textContent.includes('no problems found')");
            let survives = d.script("return document.getElementById('table-report').textContent");
            // Five cranial traits again, glabella among them.
            assert!(
                survives.as_str().unwrap().contains("cranium552"),
                "{survives}"
            );
            if let Some(path) = std::env::var_os("TESSERA_SCREENSHOT_MAPPING") {
                d.script("document.getElementById('mapping').scrollIntoView(); return true");
                let shot = d.call("GET", "/screenshot", serde_json::Value::Null);
                std::fs::write(path, base64(shot.as_str().unwrap())).unwrap();
            }
            // Groups by phase, then run.
            d.script(
                "const g = document.getElementById('group-by'); g.value = 'phase'; return g.value",
            );
            let run = d.element("#run");
            d.call(
                "POST",
                &format!("/element/{run}/click"),
                serde_json::json!({}),
            );
            d.wait("return !document.getElementById('results-step').hidden");
            let cautions = d.script("return document.getElementById('cautions').textContent");
            assert!(cautions.as_str().unwrap().contains("not identifications"));
            assert!(cautions.as_str().unwrap().contains("not gender"));
            let headline = d.script("return document.getElementById('headline').textContent");
            assert!(
                headline
                    .as_str()
                    .unwrap()
                    .contains("population behind the groups"),
                "{headline}"
            );
            // Open MH-004 and read its numbers.
            d.script("for (const tr of document.querySelectorAll('#individuals tbody tr')) { if (tr.firstChild.textContent === 'MH-004') { tr.click(); } } return true");
            d.wait("return !document.getElementById('detail').hidden");
            let detail = d
                .script("return document.getElementById('detail').textContent")
                .as_str()
                .unwrap()
                .to_string();
            // The same numbers as the library's evidence for MH-004 (the ledger: log10 LR
            // 3.8355 in all, cranium 2.3043, postcranial 1.6436, dental −0.1125).
            let expected = expected_mh004();
            for (what, value) in &expected {
                let shown = format!("{value:.2}").replace('-', "\u{2212}");
                assert!(
                    detail.contains(&shown),
                    "{what} {shown} not shown in: {detail}"
                );
            }
            assert!(detail.contains("Why MH-004 is female"), "{detail}");
            // One case typed into the form.
            d.script("document.getElementById('case-glabella').value = '1'; document.getElementById('case-mastoid_l').value = '2'; document.getElementById('case-femur_head_diameter_l').value = '41.5'; document.getElementById('case-prior-0').checked = true; return true");
            let weigh = d.element("#case-run");
            d.call(
                "POST",
                &format!("/element/{weigh}/click"),
                serde_json::json!({}),
            );
            d.wait("return !document.getElementById('case-result').hidden");
            let headline = d
                .script("return document.getElementById('case-headline').textContent")
                .as_str()
                .unwrap()
                .to_string();
            let expected = case_log10_lr();
            let shown = format!("log10 {expected:.2}").replace('-', "\u{2212}");
            assert!(headline.contains(&shown), "{shown} not in {headline}");
            let cautions = d.script("return document.getElementById('case-cautions').textContent");
            assert!(cautions.as_str().unwrap().contains("not identifications"));
            if let Some(path) = std::env::var_os("TESSERA_SCREENSHOT_CASE") {
                d.script("document.getElementById('case-result').scrollIntoView(); return true");
                let shot = d.call("GET", "/screenshot", serde_json::Value::Null);
                std::fs::write(path, base64(shot.as_str().unwrap())).unwrap();
            }
            d.script(
                "document.getElementById('detail').scrollIntoView({block: 'end'}); return true",
            );
            if let Some(path) = std::env::var_os("TESSERA_SCREENSHOT") {
                d.script(
                    "document.getElementById('detail').scrollIntoView({block: 'end'}); return true",
                );
                let shot = d.call("GET", "/screenshot", serde_json::Value::Null);
                std::fs::write(path, base64(shot.as_str().unwrap())).unwrap();
            }
        }));
        server.stop();
        if let Err(e) = outcome {
            std::panic::resume_unwind(e);
        }
    });
}

/// MH-004's log10 LR in all and per region that was used, from the library.
fn expected_mh004() -> Vec<(String, f64)> {
    let model = tessera::model::Model::default_model().unwrap();
    let demo = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/mirefold.csv");
    let a = tessera::data::read_assemblage(&demo, &model.catalogue, &Default::default()).unwrap();
    let k = a.individuals.iter().position(|i| i.id == "MH-004").unwrap();
    let e = model.evaluate(&a.individuals[k], &tessera::model::Context::new(1));
    let mut out = vec![("all".to_string(), e.ln_lr / std::f64::consts::LN_10)];
    for (b, be) in model.blocks.iter().zip(&e.blocks) {
        if be.status == tessera::model::BlockStatus::Used {
            out.push((b.id().to_string(), be.ln_lr / std::f64::consts::LN_10));
        }
    }
    out
}

/// The log10 LR of the case typed into the form, from the library.
fn case_log10_lr() -> f64 {
    let model = tessera::model::Model::default_model().unwrap();
    let a = tessera::data::read_assemblage_text(
        "x",
        b"id,glabella,mastoid_l,femur_head_diameter_l\ncase,1,2,41.5\n",
        &model.catalogue,
        &Default::default(),
    )
    .unwrap();
    model
        .evaluate(&a.individuals[0], &tessera::model::Context::new(1))
        .ln_lr
        / std::f64::consts::LN_10
}
