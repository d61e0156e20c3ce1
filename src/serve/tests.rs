//! Unit tests of the page's router (no network: `route` is called directly).

use super::*;

fn get(path: &str) -> WebRequest {
    WebRequest {
        method: "GET".into(),
        path: path.into(),
        host: Some("127.0.0.1:8726".into()),
        ..WebRequest::default()
    }
}

fn post(path: &str, query: &str, body: &[u8]) -> WebRequest {
    WebRequest {
        method: "POST".into(),
        path: path.into(),
        query: query.into(),
        host: Some("localhost:8726".into()),
        body: body.to_vec(),
    }
}

fn json(r: &WebResponse) -> serde_json::Value {
    serde_json::from_slice(&r.body).expect("a JSON answer")
}

const TABLE: &[u8] = b"id,phase,glabella,mastoid,ventral_arc,lesion\n\
A,early,1,2,1,0\nB,early,5,4,5,1\nC,late,2,,2,0\nD,late,4,5,,1\nE,late,,,,0\n";

#[test]
fn the_page_and_its_files_are_served_and_other_hosts_refused() {
    let s = State::new();
    let r = route(&s, &get("/"));
    assert_eq!(r.status, 200);
    assert!(String::from_utf8_lossy(&r.body).contains("<script src=\"page.js\">"));
    assert_eq!(route(&s, &get("/page.js")).status, 200);
    assert_eq!(route(&s, &get("/page.css")).status, 200);
    assert_eq!(route(&s, &get("/nothing")).status, 404);
    let mut away = get("/");
    away.host = Some("example.org".into());
    assert_eq!(route(&s, &away).status, 403);
    away.host = None;
    assert_eq!(route(&s, &away).status, 403);
    assert!(host_is_local(Some("[::1]:80")));
    assert!(!host_is_local(Some("127.0.0.1.example.org:80")));
}

#[test]
fn a_table_is_checked_analysed_and_downloaded() {
    let s = State::new();
    let up = route(&s, &post("/api/tables", "name=dig%20one.csv", TABLE));
    assert_eq!(up.status, 200, "{}", String::from_utf8_lossy(&up.body));
    let up = json(&up);
    assert_eq!(up["name"], "dig one.csv");
    assert_eq!(up["summary"]["individuals"], 5);
    assert!(up["columns"]
        .as_array()
        .unwrap()
        .iter()
        .any(|c| c == "lesion"));
    let table = up["table"].as_str().unwrap();
    let options = br#"{"group_by": "phase", "by_sex": ["lesion"], "priors": "flat,fixed:0.3"}"#;
    let r = route(
        &s,
        &post(&format!("/api/tables/{table}/analyse"), "", options),
    );
    assert_eq!(r.status, 200, "{}", String::from_utf8_lossy(&r.body));
    let r = json(&r);
    assert_eq!(r["individuals"].as_array().unwrap().len(), 5);
    assert_eq!(r["cautions"].as_array().unwrap().len(), 4);
    assert_eq!(r["groups"].as_array().unwrap().len(), 2);
    let a = &r["individuals"][0];
    assert_eq!(a["id"], "A");
    assert_eq!(a["under_priors"].as_array().unwrap().len(), 2);
    // The regions' log10 LRs add up to the total (blocks are independent given sex).
    let total: f64 = a["regions"]
        .as_array()
        .unwrap()
        .iter()
        .filter_map(|g| g["log10_lr"].as_f64())
        .sum();
    assert!((total - a["log10_lr"].as_f64().unwrap()).abs() < 1e-9);
    assert!(r["command"]
        .as_str()
        .unwrap()
        .starts_with("tessera analyse 'dig one.csv' --out results --priors flat,fixed:0.3 --group-by phase --by-sex lesion"));
    let run = r["run"].as_str().unwrap();
    let z = route(&s, &get(&format!("/api/runs/{run}/outputs.zip")));
    assert_eq!(z.status, 200);
    assert_eq!(&z.body[..2], b"PK");
    assert_eq!(z.download.as_deref(), Some("dig_one-results.zip"));
    // The same run gives the same zip.
    let again = route(&s, &get(&format!("/api/runs/{run}/outputs.zip")));
    assert_eq!(z.body, again.body);
}

#[test]
fn bad_tables_and_options_are_answered_with_every_problem() {
    let s = State::new();
    let bad = b"id,glabella,mastoid\nA,7,2\nA,1,x\n";
    let r = route(&s, &post("/api/tables", "name=bad.csv", bad));
    assert_eq!(r.status, 200);
    assert_eq!(json(&r)["readable"], false);
    let problems = json(&r)["problems"]["problems"].as_array().unwrap().len();
    assert!(problems >= 3, "{problems} problems");
    assert_eq!(route(&s, &post("/api/tables", "", TABLE)).status, 400);
    assert_eq!(
        route(&s, &post("/api/tables", "name=e.csv", b"")).status,
        400
    );
    let up = json(&route(&s, &post("/api/tables", "name=t.csv", TABLE)));
    let table = up["table"].as_str().unwrap();
    let path = format!("/api/tables/{table}/analyse");
    // A prior file, a model or an unknown option: refused before anything runs.
    for body in [
        &br#"{"prior": "/etc/passwd"}"#[..],
        br#"{"priors": "flat,../secret.yaml"}"#,
        br#"{"model": "x.yaml"}"#,
        b"{not json",
    ] {
        let r = route(&s, &post(&path, "", body));
        assert!(
            r.status == 400 || r.status == 422,
            "{}: {}",
            String::from_utf8_lossy(body),
            r.status
        );
    }
    let r = route(
        &s,
        &post(&path, "", br#"{"thresholds": "0.9,0.1,0.5,0.2"}"#),
    );
    assert_eq!(r.status, 422);
    assert_eq!(
        route(&s, &post("/api/tables/t999/analyse", "", b"")).status,
        404
    );
    assert_eq!(route(&s, &get("/api/runs/r999/outputs.zip")).status, 404);
}

#[test]
fn tables_beyond_the_cap_are_dropped_oldest_first() {
    let s = State::new();
    let ids: Vec<String> = (0..KEPT_TABLES + 2)
        .map(|_| {
            json(&route(&s, &post("/api/tables", "name=t.csv", TABLE)))["table"]
                .as_str()
                .unwrap()
                .to_string()
        })
        .collect();
    let first = format!("/api/tables/{}/analyse", ids[0]);
    assert_eq!(route(&s, &post(&first, "", b"")).status, 404);
    let last = format!("/api/tables/{}/analyse", ids[ids.len() - 1]);
    assert_eq!(route(&s, &post(&last, "", b"")).status, 200);
}

#[test]
fn query_values_are_decoded() {
    assert_eq!(
        api::query_value("a=1&name=caf%C3%A9+1.csv", "name").as_deref(),
        Some("café 1.csv")
    );
    assert_eq!(api::query_value("name=%", "name").as_deref(), Some("%"));
    assert_eq!(
        api::query_value("name=%e9%", "name").as_deref(),
        Some("\u{fffd}%")
    );
    assert_eq!(api::query_value("x=1", "name"), None);
}

#[test]
fn a_lab_s_own_column_names_are_mapped_saved_and_used() {
    let s = State::new();
    let sheet = b"Individual,Phase,Glab,Mastoid L,vent arc\nA,early,1,2,1\nB,early,5,4,unobs\nC,late,2,,2\n";
    let up = json(&route(&s, &post("/api/tables", "name=lab.csv", sheet)));
    // No `id` column: not readable as it is, and every unrecognised column has suggestions.
    assert_eq!(up["readable"], false);
    let unrecognised = up["unrecognised"].as_array().unwrap();
    let of = |c: &str| {
        unrecognised
            .iter()
            .find(|u| u["column"] == c)
            .unwrap_or_else(|| panic!("{c} not listed"))["suggestions"][0]
            .clone()
    };
    assert_eq!(of("Glab"), "glabella");
    assert_eq!(of("Mastoid L"), "mastoid_l");
    let table = up["table"].as_str().unwrap();
    let mapping = br#"{"columns": {"Individual": "id", "Glab": "glabella", "Mastoid L": "mastoid_l", "vent arc": "ventral_arc"}, "not_recorded": ["unobs"]}"#;
    let checked = json(&route(
        &s,
        &post(&format!("/api/tables/{table}/check"), "", mapping),
    ));
    assert_eq!(checked["readable"], true, "{checked}");
    assert_eq!(checked["summary"]["individuals"], 3);
    // The mapping saved as a profile, which the command line reads with --columns.
    let yaml = route(&s, &post("/api/profile", "", mapping));
    assert_eq!(yaml.status, 200);
    let text = String::from_utf8(yaml.body).unwrap();
    let cat = crate::catalogue::Catalogue::standard().unwrap();
    let p = crate::data::ColumnProfile::from_yaml(&text, &cat).unwrap();
    assert_eq!(p.columns["Glab"], "glabella");
    assert_eq!(p.not_recorded, ["unobs"]);
    let bad = br#"{"columns": {"Glab": "glabela"}}"#;
    assert_eq!(route(&s, &post("/api/profile", "", bad)).status, 422);
    // The analysis reads the sheet as mapped, and says how to do the same from a terminal.
    let mut options: serde_json::Value = serde_json::from_slice(mapping).unwrap();
    options["group_by"] = "Phase".into();
    options["priors"] = "flat".into();
    let r = route(
        &s,
        &post(
            &format!("/api/tables/{table}/analyse"),
            "",
            options.to_string().as_bytes(),
        ),
    );
    assert_eq!(r.status, 200, "{}", String::from_utf8_lossy(&r.body));
    let r = json(&r);
    assert_eq!(r["individuals"][0]["id"], "A");
    assert!(r["command"]
        .as_str()
        .unwrap()
        .contains("--group-by Phase --columns lab-columns.yaml"));
}

#[test]
fn an_analysis_in_the_background_is_polled_until_it_answers() {
    let s = State::new();
    let up = json(&route(&s, &post("/api/tables", "name=t.csv", TABLE)));
    let table = up["table"].as_str().unwrap();
    let started = route(
        &s,
        &post(
            &format!("/api/tables/{table}/start"),
            "",
            br#"{"priors": "flat"}"#,
        ),
    );
    assert_eq!(started.status, 202);
    let job = json(&started)["job"].as_str().unwrap().to_string();
    let start = std::time::Instant::now();
    let answer = loop {
        let r = route(&s, &get(&format!("/api/jobs/{job}")));
        if r.status != 202 {
            break r;
        }
        let p = json(&r);
        assert!(p["stage"].is_string() && p["done"].is_u64() && p["steps"].is_u64());
        assert!(start.elapsed().as_secs() < 60, "no answer");
        std::thread::sleep(std::time::Duration::from_millis(20));
    };
    assert_eq!(answer.status, 200);
    // The same answer as the direct request (the run ids aside).
    let direct = json(&route(
        &s,
        &post(
            &format!("/api/tables/{table}/analyse"),
            "",
            br#"{"priors": "flat"}"#,
        ),
    ));
    let mut polled = json(&answer);
    polled["run"] = direct["run"].clone();
    assert_eq!(polled, direct);
    assert_eq!(route(&s, &get("/api/jobs/j999")).status, 404);
}

#[test]
fn two_tabs_running_at_once_each_get_their_own_results() {
    let s = State::new();
    let up = json(&route(&s, &post("/api/tables", "name=t.csv", TABLE)));
    let table = up["table"].as_str().unwrap().to_string();
    let (a, b) = std::thread::scope(|scope| {
        let run = |prior: &'static str| {
            let (s, table) = (&s, &table);
            scope.spawn(move || {
                let body = format!(r#"{{"prior": "{prior}", "priors": "{prior}"}}"#);
                json(&route(
                    s,
                    &post(&format!("/api/tables/{table}/analyse"), "", body.as_bytes()),
                ))
            })
        };
        let (x, y) = (run("mostly-female"), run("mostly-male"));
        (x.join().unwrap(), y.join().unwrap())
    });
    assert_eq!(a["prior"], "mostly-female");
    assert_eq!(b["prior"], "mostly-male");
    assert_ne!(a["run"], b["run"]);
    assert!(a["proportion_female"]["mean"].as_f64() > b["proportion_female"]["mean"].as_f64());
}

#[test]
fn one_case_typed_in_gives_the_case_report_s_numbers() {
    let s = State::new();
    assert_eq!(route(&s, &get("/api/catalogue")).status, 200);
    let form = br#"{"values": {"glabella": "1", "mastoid_l": "2", "femur_head_diameter": "41.5"},
        "age": "30-40", "priors": ["flat", "fixed:0.3"], "case_number": "K-7"}"#;
    let r = route(&s, &post("/api/case", "", form));
    assert_eq!(r.status, 200, "{}", String::from_utf8_lossy(&r.body));
    let r = json(&r);
    // The same individual through the library's reader and case report.
    let model = crate::model::Model::default_model().unwrap();
    let a = crate::data::read_assemblage_text(
        "x",
        b"id,age,glabella,mastoid_l,femur_head_diameter\ncase,30-40,1,2,41.5\n",
        &model.catalogue,
        &Default::default(),
    )
    .unwrap();
    let e = model.evaluate(&a.individuals[0], &crate::model::Context::new(1));
    let shown = r["report"]["log10_lr"].as_f64().unwrap();
    assert!((shown - e.ln_lr / std::f64::consts::LN_10).abs() < 1e-12);
    assert_eq!(r["report"]["under_priors"].as_array().unwrap().len(), 2);
    assert_eq!(r["report"]["details"]["case_number"], "K-7");
    assert!(r["markdown"].as_str().unwrap().contains("K-7"));
    assert!(r["html"].as_str().unwrap().contains("<html"));
    assert_eq!(r["cautions"].as_array().unwrap().len(), 4);
    // A value out of scale, a column the model does not know, a prior file: refused.
    let bad = route(
        &s,
        &post(
            "/api/case",
            "",
            br#"{"values": {"glabella": "7", "mastoid_l": "x"}}"#,
        ),
    );
    assert_eq!(bad.status, 422);
    assert_eq!(
        json(&bad)["problems"]["problems"].as_array().unwrap().len(),
        2
    );
    let unknown = route(&s, &post("/api/case", "", br#"{"values": {"skull": "2"}}"#));
    assert_eq!(unknown.status, 422);
    let prior = route(
        &s,
        &post(
            "/api/case",
            "",
            br#"{"values": {"glabella": "2"}, "priors": ["/etc/passwd"]}"#,
        ),
    );
    assert_eq!(prior.status, 422);
}
