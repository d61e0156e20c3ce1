//! `tessera case`: one individual's report, whose numbers are the evidence ledger's.

mod common;
use common::{stdout, tessera};
use std::path::Path;

fn demo() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/mirefold.csv")
        .display()
        .to_string()
}

#[test]
fn the_case_report_quotes_the_ledger_and_carries_the_cautions() {
    let dir = tempfile::tempdir().unwrap();
    let ledger = dir.path().join("ledger.csv");
    let o = tessera(&["evidence", &demo(), "--out", ledger.to_str().unwrap()]);
    assert!(o.status.success());
    let out = dir.path().join("case");
    let o = tessera(&[
        "case",
        &demo(),
        "--id",
        "MH-004",
        "--out",
        out.to_str().unwrap(),
        "--case-number",
        "K-17",
        "--prior",
        "fixed:0.5",
    ]);
    assert!(o.status.success(), "{}", common::stderr(&o));
    let json: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("case.json")).unwrap()).unwrap();
    // Every region's log10 LR and the total equal the ledger's, to its six decimals.
    let mut r = csv::Reader::from_path(&ledger).unwrap();
    let head = r.headers().unwrap().clone();
    let col = |n: &str| head.iter().position(|h| h == n).unwrap();
    let (id, block, log10) = (col("id"), col("block"), col("log10_lr"));
    let mut checked = 0;
    for rec in r.records() {
        let rec = rec.unwrap();
        if &rec[id] != "MH-004" {
            continue;
        }
        let want: f64 = rec[log10].parse().unwrap();
        let got = if &rec[block] == "total" {
            json["log10_lr"].as_f64().unwrap()
        } else {
            json["regions"]
                .as_array()
                .unwrap()
                .iter()
                .find(|x| x["block"] == rec[block])
                .unwrap()["log10_lr"]
                .as_f64()
                .unwrap()
        };
        assert!(
            (got - want).abs() <= 5e-7,
            "{}: {got} vs {want}",
            &rec[block]
        );
        checked += 1;
    }
    assert_eq!(checked, 6, "five regions and the total");
    let md = std::fs::read_to_string(out.join("case.md")).unwrap();
    for needle in [
        "K-17",
        "It is not an identification",
        "never excludes a missing person by itself",
        "intersex",
        "jurisdiction's rules override",
        "ENFSI 2015",
        "Reviewer | ________________",
    ] {
        assert!(md.contains(needle), "case.md lacks {needle:?}");
    }
    let html = std::fs::read_to_string(out.join("case.html")).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>") && html.contains("<h2>Cautions</h2>"));
    assert!(stdout(&o).contains("strong support for female"));
    // An id that is not there is a settings error (exit 4, as for every option), and
    // nothing is written.
    let none = dir.path().join("none");
    let o = tessera(&[
        "case",
        &demo(),
        "--id",
        "MH-999",
        "--out",
        none.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4), "{}", common::stderr(&o));
    assert!(common::stderr(&o).contains("`MH-999` is not an id"));
    assert!(!none.exists());
}
