//! The local web page's server: its download equals the command line's folder byte for byte,
//! and it survives malformed requests on the network (127.0.0.1 only, a bounded loop).

mod common;
use common::{stderr, tessera_in};
use std::io::{Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::time::Duration;
use tessera::serve::{route, Server, State, WebRequest};

fn demo_bytes() -> Vec<u8> {
    std::fs::read(Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/mirefold.csv")).unwrap()
}

fn request(method: &str, path: &str, query: &str, body: &[u8]) -> WebRequest {
    WebRequest {
        method: method.into(),
        path: path.into(),
        query: query.into(),
        host: Some("127.0.0.1:8726".into()),
        body: body.to_vec(),
    }
}

/// Run a table through the page (upload, analyse with `options`, download) and through the
/// command line the page shows, in a folder holding the same file (and the column profile the
/// page saves, when there is a mapping); every file of the zip must equal the folder's.
fn page_and_command_line_agree(
    name: &str,
    bytes: &[u8],
    options: &serde_json::Value,
) -> Vec<String> {
    page_and_command_line_agree_with_file(name, bytes, options, ("", ""))
}

/// [`page_and_command_line_agree`] with one more file beside the table for the command line
/// (a settings file the page was given as text).
fn page_and_command_line_agree_with_file(
    name: &str,
    bytes: &[u8],
    options: &serde_json::Value,
    beside: (&str, &str),
) -> Vec<String> {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join(name), bytes).unwrap();
    if !beside.0.is_empty() {
        std::fs::write(dir.path().join(beside.0), beside.1).unwrap();
    }
    let state = State::new();
    let up = route(
        &state,
        &request("POST", "/api/tables", &format!("name={name}"), bytes),
    );
    assert_eq!(up.status, 200);
    let up: serde_json::Value = serde_json::from_slice(&up.body).unwrap();
    let table = up["table"].as_str().unwrap();
    if let Some(name) = options.get("model_name").and_then(|n| n.as_str()) {
        std::fs::write(
            dir.path().join(name),
            options["model_yaml"].as_str().unwrap(),
        )
        .unwrap();
    }
    if options.get("columns").is_some() {
        let mapping = serde_json::json!({"columns": options["columns"], "not_recorded": options.get("not_recorded").cloned().unwrap_or_default()});
        let yaml = route(
            &state,
            &request("POST", "/api/profile", "", mapping.to_string().as_bytes()),
        );
        assert_eq!(yaml.status, 200);
        std::fs::write(
            dir.path().join(up["profile_name"].as_str().unwrap()),
            yaml.body,
        )
        .unwrap();
    }
    let r = route(
        &state,
        &request(
            "POST",
            &format!("/api/tables/{table}/analyse"),
            "",
            options.to_string().as_bytes(),
        ),
    );
    assert_eq!(r.status, 200, "{}", String::from_utf8_lossy(&r.body));
    let r: serde_json::Value = serde_json::from_slice(&r.body).unwrap();
    let command = r["command"].as_str().unwrap().to_string();
    let args: Vec<String> = r["command_args"]
        .as_array()
        .unwrap()
        .iter()
        .map(|a| a.as_str().unwrap().to_string())
        .collect();
    let zip = route(
        &state,
        &request(
            "GET",
            &format!("/api/runs/{}/outputs.zip", r["run"].as_str().unwrap()),
            "",
            b"",
        ),
    );
    assert_eq!(zip.status, 200);
    let args: Vec<&str> = args.iter().skip(1).map(String::as_str).collect();
    let o = tessera_in(dir.path(), &args);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut archive = zip::ZipArchive::new(std::io::Cursor::new(zip.body)).unwrap();
    let mut names = Vec::new();
    for k in 0..archive.len() {
        let mut f = archive.by_index(k).unwrap();
        let mut content = Vec::new();
        f.read_to_end(&mut content).unwrap();
        let on_disk = std::fs::read(dir.path().join("results").join(f.name())).unwrap();
        assert!(
            content == on_disk,
            "{} differs from the command line's",
            f.name()
        );
        names.push(f.name().to_string());
    }
    // Every file the command line wrote is in the zip (its folder marker aside).
    let manifest = std::fs::read_to_string(dir.path().join("results/.tessera-output")).unwrap();
    for line in manifest
        .lines()
        .filter(|l| !l.starts_with('#') && !l.is_empty())
    {
        assert!(
            names.iter().any(|n| n == line),
            "{line} missing from the zip"
        );
    }
    names.push(command);
    names
}

#[test]
fn the_page_s_zip_holds_the_command_line_s_files_byte_for_byte() {
    let options = serde_json::json!({
        "group_by": "phase",
        "draws": 200,
        "by_sex": ["cribra_orbitalia", "stature_cm"],
        "life_table_classes": "20-30,30-40,40+",
        "reference_ratio": 100.0,
        "hazard_ages": "20-40",
        "correlation_check": "0,0.6",
    });
    let names = page_and_command_line_agree("mirefold.csv", &demo_bytes(), &options);
    for file in [
        "individuals.csv",
        "figures/p_female.png",
        "by_sex_numeric.csv",
        "life_table.csv",
        "hazards.csv",
        "sex_ratio.csv",
        "figures/sex_ratio.svg",
        "correlation_check.csv",
    ] {
        assert!(names.iter().any(|n| n == file), "{file} missing");
    }
    assert_eq!(
        names.last().unwrap(),
        "tessera analyse mirefold.csv --out results --group-by phase --draws 200 --by-sex cribra_orbitalia --by-sex stature_cm --life-table-classes 20-30,30-40,40+ --reference-ratio 100 --hazard-ages 20-40 --correlation-check 0,0.6"
    );
}

#[test]
fn a_mapped_sheet_gives_the_same_files_as_the_command_line_with_its_profile() {
    // The demo as a lab might keep it: its own names for the id and two traits, and its own
    // word for a score that could not be taken.
    let text = String::from_utf8(demo_bytes()).unwrap();
    let mut lines = text.lines();
    let header = lines
        .next()
        .unwrap()
        .replace("id,", "Burial,")
        .replace("glabella", "Glab")
        .replace("mental_eminence", "Mental Em");
    let body: Vec<String> = lines.map(|l| l.replace(",NA,", ",unobs,")).collect();
    let sheet = format!("{header}\n{}\n", body.join("\n"));
    let options = serde_json::json!({
        "priors": "flat,birth-ratio",
        "columns": {"Burial": "id", "Glab": "glabella", "Mental Em": "mental_eminence"},
        "not_recorded": ["unobs"],
    });
    let names = page_and_command_line_agree("lab sheet.csv", sheet.as_bytes(), &options);
    let command = names.last().unwrap();
    assert!(
        command.starts_with("tessera analyse 'lab sheet.csv' --out results")
            && command.ends_with("--columns 'lab sheet-columns.yaml'"),
        "{command}"
    );
}

/// Send raw bytes and read whatever comes back, within a second.
fn exchange(port: u16, bytes: &[u8]) -> Vec<u8> {
    let Ok(mut s) = TcpStream::connect(("127.0.0.1", port)) else {
        return Vec::new();
    };
    let _ = s.set_read_timeout(Some(Duration::from_secs(1)));
    let _ = s.set_write_timeout(Some(Duration::from_secs(1)));
    let _ = s.write_all(bytes);
    let _ = s.shutdown(std::net::Shutdown::Write);
    let mut out = Vec::new();
    let _ = s.read_to_end(&mut out);
    out
}

#[test]
fn the_server_answers_after_ten_thousand_malformed_requests() {
    let server = Server::bind(0).unwrap();
    let port = server.port();
    std::thread::scope(|scope| {
        scope.spawn(|| server.run(4));
        let garbage: Vec<Vec<u8>> = vec![
            b"\x00\x01\x02\xff\xfe".to_vec(),
            b"GET\r\n\r\n".to_vec(),
            b"GET / HTTP/9.9\r\nHost: 127.0.0.1\r\n\r\n".to_vec(),
            b"POST /api/tables?name=a.csv HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Length: 99999999999\r\n\r\nid".to_vec(),
            b"POST /api/tables?name=a.csv HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Length: 10\r\n\r\nid,glab".to_vec(),
            b"POST /api/tables/t1/analyse HTTP/1.1\r\nHost: 127.0.0.1\r\nContent-Length: 5\r\n\r\n{{{{{".to_vec(),
            b"GET /api/runs/../../etc/passwd/outputs.zip HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n".to_vec(),
            b"GET / HTTP/1.1\r\nHost: attacker.example\r\n\r\n".to_vec(),
            b"DELETE / HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n".to_vec(),
            format!("GET /{} HTTP/1.1\r\nHost: 127.0.0.1\r\n\r\n", "a".repeat(20_000)).into_bytes(),
            b"POST /api/tables?name=%ZZ%00.csv HTTP/1.1\r\nHost: 127.0.0.1\r\nTransfer-Encoding: chunked\r\n\r\nzz\r\n".to_vec(),
        ];
        for k in 0..10_000 {
            exchange(port, &garbage[k % garbage.len()]);
        }
        // Still answering, and correctly.
        let ok = exchange(
            port,
            b"GET /api/about HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n",
        );
        let text = String::from_utf8_lossy(&ok);
        assert!(text.starts_with("HTTP/1.1 200"), "{text}");
        assert!(text.contains("\"program\":\"tessera\""), "{text}");
        let refused = exchange(
            port,
            b"GET / HTTP/1.1\r\nHost: attacker.example\r\nConnection: close\r\n\r\n",
        );
        assert!(String::from_utf8_lossy(&refused).starts_with("HTTP/1.1 403"));
        server.stop();
    });
}

#[test]
fn a_model_file_chosen_in_the_page_gives_the_command_line_s_files() {
    // A model fitted to the invented reference collection, as a user would bring it.
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("saltmarsh.yaml");
    let o = common::tessera(&[
        "fit",
        root.join("examples/saltmarsh-reference.csv")
            .to_str()
            .unwrap(),
        "--traits",
        root.join("examples/saltmarsh-spec.yaml").to_str().unwrap(),
        "--out",
        model.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let options = serde_json::json!({
        "priors": "flat",
        "model_name": "saltmarsh.yaml",
        "model_yaml": std::fs::read_to_string(&model).unwrap(),
    });
    let names = page_and_command_line_agree("mirefold.csv", &demo_bytes(), &options);
    assert!(
        names.last().unwrap().contains("--model saltmarsh.yaml"),
        "{names:?}"
    );
    // A model that includes a file (not the shipped model) is refused: the page reads no
    // file of the machine.
    let state = State::new();
    let up = route(
        &state,
        &request("POST", "/api/tables", "name=m.csv", &demo_bytes()),
    );
    let up: serde_json::Value = serde_json::from_slice(&up.body).unwrap();
    let bad = serde_json::json!({
        "model_name": "x.yaml",
        "model_yaml": "name: x\nprovenance: test\ninclude: [{model: /etc/other.yaml, blocks: [dna]}]\nblocks: []\n",
    });
    let r = route(
        &state,
        &request(
            "POST",
            &format!("/api/tables/{}/analyse", up["table"].as_str().unwrap()),
            "",
            bad.to_string().as_bytes(),
        ),
    );
    assert_eq!(r.status, 422, "{}", String::from_utf8_lossy(&r.body));
}

#[test]
fn a_scale_map_chosen_in_the_page_gives_the_command_line_s_files() {
    let options = serde_json::json!({
        "priors": "flat",
        "scale_map_name": "lab-scales.yaml",
        "scale_map_yaml": "glabella: {1: 1, 2: 1, 3: 3, 4: 5, 5: 5, \"3-4\": 4}\n",
    });
    let dir_name = "lab-scales.yaml";
    let names = page_and_command_line_agree_with_file(
        "mirefold.csv",
        &demo_bytes(),
        &options,
        (dir_name, options["scale_map_yaml"].as_str().unwrap()),
    );
    assert!(
        names
            .last()
            .unwrap()
            .ends_with("--scale-map lab-scales.yaml"),
        "{names:?}"
    );
}
