//! `tessera check` as a user runs it: good files, every bad fixture, JSON, workbooks.

mod common;
use common::{fixture, stderr, stdout, tessera};
use std::collections::BTreeMap;

/// Every bad fixture reports exactly the problems listed in tests/fixtures/bad/expected.tsv
/// (row, column and code), exits 3, and prints nothing on standard output in text mode.
#[test]
fn every_bad_fixture_reports_every_problem_with_row_and_column() {
    let manifest = std::fs::read_to_string(fixture("bad/expected.tsv")).unwrap();
    let mut expected: BTreeMap<String, Vec<(String, String, String)>> = BTreeMap::new();
    for line in manifest
        .lines()
        .filter(|l| !l.starts_with('#') && !l.trim().is_empty())
    {
        let f: Vec<&str> = line.split('\t').collect();
        expected.entry(f[0].to_string()).or_default().push((
            f[1].to_string(),
            f[2].to_string(),
            f[3].to_string(),
        ));
    }
    // Every fixture in the folder is in the manifest.
    for entry in std::fs::read_dir(fixture("bad")).unwrap() {
        let name = entry.unwrap().file_name().to_string_lossy().into_owned();
        if name != "expected.tsv" {
            assert!(
                expected.contains_key(&name),
                "{name} is not in expected.tsv"
            );
        }
    }
    for (file, want) in &expected {
        let path = fixture(&format!("bad/{file}"));
        let out = tessera(&["check", path.to_str().unwrap(), "--format", "json"]);
        assert_eq!(out.status.code(), Some(3), "{file}: {}", stderr(&out));
        let v: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
        assert_eq!(v["status"], "problems");
        let got: Vec<(String, String, String)> = v["problems"]["problems"]
            .as_array()
            .unwrap()
            .iter()
            .map(|p| {
                let s = |k: &str| match &p[k] {
                    serde_json::Value::Null => "-".to_string(),
                    serde_json::Value::String(x) => x.clone(),
                    other => other.to_string(),
                };
                (s("row"), s("column"), s("kind"))
            })
            .collect();
        assert_eq!(&got, want, "{file}");
        for p in v["problems"]["problems"].as_array().unwrap() {
            assert!(
                !p["expected"].as_str().unwrap().is_empty(),
                "{file}: says what was expected"
            );
        }
        // Text mode: problems on stderr with the file named, nothing on stdout.
        let text = tessera(&["check", path.to_str().unwrap()]);
        assert_eq!(text.status.code(), Some(3));
        assert!(stdout(&text).is_empty());
        assert!(
            stderr(&text).contains(file.as_str()),
            "{file}: {}",
            stderr(&text)
        );
    }
}

#[test]
fn centimetre_and_decimal_comma_hints_reach_the_user() {
    let out = tessera(&[
        "check",
        fixture("bad/implausible_measurement.csv").to_str().unwrap(),
    ]);
    let err = stderr(&out);
    assert!(
        err.contains("row 3, column `femur_head_diameter_l`: found `4.4`"),
        "{err}"
    );
    assert!(err.contains("centimetres"), "{err}");
    let out = tessera(&[
        "check",
        fixture("bad/decimal_comma_in_comma_file.csv")
            .to_str()
            .unwrap(),
    ]);
    assert!(stderr(&out).contains("decimal comma"));
    let out = tessera(&["check", fixture("bad/latin1.csv").to_str().unwrap()]);
    assert!(stderr(&out).contains("offset"), "{}", stderr(&out));
}

#[test]
fn semicolons_bom_crlf_decimal_commas_and_declared_missing_words() {
    let f = fixture("good/semicolon_bom_crlf.csv");
    let out = tessera(&["check", f.to_str().unwrap()]);
    assert_eq!(
        out.status.code(),
        Some(3),
        "`nr` is not a missing code until declared"
    );
    let out = tessera(&[
        "check",
        f.to_str().unwrap(),
        "--missing",
        "nr",
        "--format",
        "json",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let v: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    let s = &v["summary"];
    assert_eq!(s["individuals"], 2);
    assert_eq!(s["carried_columns"], serde_json::json!(["notes"]));
    let glabella = s["traits"]
        .as_array()
        .unwrap()
        .iter()
        .find(|t| t["trait_id"] == "glabella")
        .unwrap();
    assert_eq!(glabella["recorded"], 1);
    let mastoid = s["traits"]
        .as_array()
        .unwrap()
        .iter()
        .find(|t| t["trait_id"] == "mastoid")
        .unwrap();
    assert_eq!(
        (mastoid["as_range"].as_u64(), mastoid["right"].as_u64()),
        (Some(1), Some(2))
    );
    assert!(s["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .any(|w| w["kind"] == "decimal_comma"));
}

#[test]
fn tabs_and_groups() {
    let out = tessera(&["check", fixture("good/tabs.tsv").to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("tab-separated"));
    assert!(text.contains("north (1), south (1)"), "{text}");
}

#[test]
fn a_scale_map_brings_other_scales_onto_the_grades() {
    let f = fixture("good/other_scale.csv");
    let out = tessera(&["check", f.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(3));
    let map = fixture("good/other_scale.yaml");
    let out = tessera(&[
        "check",
        f.to_str().unwrap(),
        "--scale-map",
        map.to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
}

#[test]
fn the_demo_file_checks_clean_and_groups_by_phase() {
    let demo = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/mirefold.csv");
    let out = tessera(&["check", demo.to_str().unwrap(), "--group-by", "phase"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    // File order (phases are chronological), the order of every other screen.
    assert!(
        text.contains("Groups       early (28), middle (24), late (23)"),
        "{text}"
    );
    assert!(text.contains("No problems found"));
}

#[test]
fn usage_errors_and_missing_files_have_their_own_exit_codes() {
    assert_eq!(tessera(&["check"]).status.code(), Some(2));
    let out = tessera(&["check", "no/such/file.csv"]);
    assert_eq!(out.status.code(), Some(3));
    assert!(stderr(&out).contains("no/such/file.csv"));
    let out = tessera(&[
        "check",
        fixture("good/tabs.tsv").to_str().unwrap(),
        "--scale-map",
        "nope.yaml",
    ]);
    assert_eq!(out.status.code(), Some(5));
    let out = tessera(&[
        "check",
        fixture("good/tabs.tsv").to_str().unwrap(),
        "--group-by",
        "phase",
    ]);
    assert_eq!(out.status.code(), Some(3));
    assert!(stderr(&out).contains("phase"));
}

#[test]
fn workbooks_read_the_first_or_the_named_sheet() {
    use rust_xlsxwriter::Workbook;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("scores.xlsx");
    let mut wb = Workbook::new();
    let notes = wb.add_worksheet();
    notes.set_name("notes").unwrap();
    notes
        .write_string(0, 0, "recorded by the field team")
        .unwrap();
    let ws = wb.add_worksheet();
    ws.set_name("scores").unwrap();
    for (c, h) in ["id", "glabella", "femur_head_diameter_l", "age"]
        .iter()
        .enumerate()
    {
        ws.write_string(0, c as u16, *h).unwrap();
    }
    ws.write_string(1, 0, "W-1").unwrap();
    ws.write_number(1, 1, 4.0).unwrap();
    ws.write_number(1, 2, 46.25).unwrap();
    ws.write_string(1, 3, "30-40").unwrap();
    ws.write_string(2, 0, "W-2").unwrap();
    ws.write_number(2, 1, 9.0).unwrap();
    wb.save(&path).unwrap();
    let p = path.to_str().unwrap();
    // The first sheet has no id column.
    assert_eq!(tessera(&["check", p]).status.code(), Some(3));
    let out = tessera(&["check", p, "--sheet", "scores", "--format", "json"]);
    assert_eq!(out.status.code(), Some(3));
    let v: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    let probs = v["problems"]["problems"].as_array().unwrap();
    assert_eq!(probs.len(), 1);
    assert_eq!(
        (probs[0]["row"].as_u64(), probs[0]["column"].as_str()),
        (Some(3), Some("glabella"))
    );
    let out = tessera(&["check", p, "--sheet", "nosuch"]);
    assert!(stderr(&out).contains("notes, scores"), "{}", stderr(&out));
}

#[test]
fn two_observers_are_compared() {
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = tempfile::tempdir().unwrap();
    let out = tessera(&[
        "agreement",
        root.join("examples/mirefold.csv").to_str().unwrap(),
        root.join("examples/mirefold-second-observer.csv")
            .to_str()
            .unwrap(),
        "--out",
        dir.path().to_str().unwrap(),
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = stdout(&out);
    assert!(text.contains("Individuals in both tables: 40"), "{text}");
    assert!(text.contains("glabella") && text.contains("femur_head_diameter"));
    let head = std::fs::read_to_string(dir.path().join("disagreements.csv")).unwrap();
    assert!(head.starts_with("id,trait,first,second\n"));
    // agreement.csv is long: one row per trait and statistic, every header name once.
    let mut r = csv::Reader::from_path(dir.path().join("agreement.csv")).unwrap();
    let names: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let mut unique = names.clone();
    unique.sort();
    unique.dedup();
    assert_eq!(unique.len(), names.len(), "{names:?}");
    let rows: Vec<csv::StringRecord> = r.records().map(Result::unwrap).collect();
    let row = |t: &str, stat: &str| {
        rows.iter()
            .find(|x| &x[0] == t && &x[4] == stat)
            .unwrap_or_else(|| panic!("no {t} {stat}"))
            .clone()
    };
    let k = row("glabella", "kappa_quadratic");
    let (est, lo, hi): (f64, f64, f64) = (
        k[5].parse().unwrap(),
        k[6].parse().unwrap(),
        k[7].parse().unwrap(),
    );
    assert!(lo <= est && est <= hi);
    // 21 pairs of five grades is below 2k² = 50: the kappa rows say so, and so does stderr.
    assert!(k[8].contains("needs 50"), "{k:?}");
    assert!(row("glabella", "exact_agreement")[8].is_empty());
    assert!(row("femur_head_diameter", "icc_2_1")[8].is_empty());
    assert!(
        stderr(&out).contains("warning: glabella: 21 pairs"),
        "{}",
        stderr(&out)
    );
    let columns = std::fs::read_to_string(dir.path().join("columns.md")).unwrap();
    assert!(columns.contains("## agreement.csv") && !columns.contains("(not described)"));
}

#[test]
fn a_column_profile_reads_a_lab_s_own_names_and_a_bad_one_lists_every_problem() {
    let dir = tempfile::tempdir().unwrap();
    let sheet = dir.path().join("lab.csv");
    std::fs::write(&sheet, "Burial,Glab,Mastoid L\nA,1,2\nB,5,unobs\nC,2,3\n").unwrap();
    let profile = dir.path().join("lab-columns.yaml");
    std::fs::write(
        &profile,
        "columns:\n  Burial: id\n  Glab: glabella\n  Mastoid L: mastoid_l\nnot_recorded: [unobs]\n",
    )
    .unwrap();
    let (s, p) = (sheet.to_str().unwrap(), profile.to_str().unwrap());
    // Without the profile there is no id column; with it the sheet reads as it is.
    assert_eq!(tessera(&["check", s]).status.code(), Some(3));
    let o = tessera(&["check", s, "--columns", p]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = stdout(&o);
    assert!(text.contains("Individuals  3"), "{text}");
    assert!(
        text.lines()
            .any(|l| l.starts_with("glabella") && l.split_whitespace().nth(1) == Some("3")),
        "{text}"
    );
    std::fs::write(
        &profile,
        "columns:\n  Burial: ident\n  Glab: glabela\n  glab: glabella\n",
    )
    .unwrap();
    let o = tessera(&["check", s, "--columns", p]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    let e = stderr(&o);
    for needle in [
        "`ident` is not a column",
        "`glabela` is not a column",
        "same column",
    ] {
        assert!(e.contains(needle), "{needle} not in {e}");
    }
}
