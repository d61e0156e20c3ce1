//! Bad numbers and odd shapes give a result or a clear error, never a panic or a wrong
//! number: NaN and infinities in every numeric position of a model and a prior, a singular
//! correlation matrix, a table with ten thousand columns. The heavy cases (a file of a
//! million rows, a file of a gigabyte) are `--ignored`:
//! `cargo test --release --test robustness -- --ignored --nocapture`.

mod common;
use common::{stderr, stdout, tessera};
use tessera::model::Model;
use tessera::prior::Prior;

const MODEL: &str = include_str!("../models/default.yaml");

/// Every number of the default model, one at a time, replaced by each bad value: the model
/// is refused with a message, never accepted and never a panic.
#[test]
fn a_bad_number_anywhere_in_a_model_is_refused() {
    let numbers: Vec<(usize, usize)> = {
        let b = MODEL.as_bytes();
        let mut v = Vec::new();
        let mut i = 0;
        while i < b.len() {
            let start_ok = i == 0
                || !(b[i - 1].is_ascii_alphanumeric() || b[i - 1] == b'_' || b[i - 1] == b'.');
            if start_ok
                && (b[i].is_ascii_digit()
                    || (b[i] == b'-' && i + 1 < b.len() && b[i + 1].is_ascii_digit()))
            {
                let mut j = i + 1;
                while j < b.len() && (b[j].is_ascii_digit() || b[j] == b'.') {
                    j += 1;
                }
                // Only numbers inside the block parameters (after `blocks:`), not prose.
                if MODEL[..i].contains("\nblocks:") && !MODEL[..i].ends_with("minimum_age: ") {
                    v.push((i, j));
                }
                i = j;
            } else {
                i += 1;
            }
        }
        v
    };
    assert!(numbers.len() > 100, "{} numbers found", numbers.len());
    let mut refused = 0;
    for &(i, j) in &numbers {
        for bad in [".nan", ".inf", "-.inf"] {
            let text = format!("{}{bad}{}", &MODEL[..i], &MODEL[j..]);
            match Model::from_yaml("m.yaml", &text) {
                Err(e) => {
                    assert!(!e.problems.is_empty());
                    refused += 1;
                }
                Ok(_) if bad == ".inf" && MODEL[..i].ends_with("atypical_z: ") => {
                    // An infinite |z| cut-off is meaningful: never flag a DNA count as atypical.
                }
                Ok(_) => {
                    panic!(
                        "accepted {bad} at byte {i}: `{}`",
                        &MODEL[i.saturating_sub(60)..(j + 10).min(MODEL.len())]
                    );
                }
            }
        }
    }
    println!("{refused} bad models refused");
}

#[test]
fn a_singular_correlation_matrix_is_refused_with_its_reason() {
    let text = MODEL.replace(
        "      - [1.00, 0.35, 0.35, 0.35, 0.35]\n      - [0.35, 1.00, 0.35, 0.35, 0.35]",
        "      - [1.00, 1.00, 0.35, 0.35, 0.35]\n      - [1.00, 1.00, 0.35, 0.35, 0.35]",
    );
    assert_ne!(text, MODEL);
    let e = Model::from_yaml("m.yaml", &text).unwrap_err();
    let all: Vec<String> = e.problems.iter().map(|p| p.message.clone()).collect();
    assert!(
        all.iter().any(|m| m.contains("positive definite")),
        "{all:?}"
    );
}

#[test]
fn bad_numbers_in_a_prior_are_refused() {
    for (a, b) in [
        (".nan", "1"),
        ("1", ".nan"),
        (".inf", "1"),
        ("-1", "1"),
        ("0", "2"),
    ] {
        let text = format!("name: x\nprovenance: a test prior of ours\nbeta: {{a: {a}, b: {b}}}\n");
        assert!(
            Prior::from_yaml("p.yaml", &text).is_err(),
            "a={a} b={b} accepted"
        );
    }
    for pi in [".nan", "-0.1", "1.5", ".inf"] {
        let text = format!("name: x\nprovenance: a test prior of ours\nfixed: {pi}\n");
        assert!(
            Prior::from_yaml("p.yaml", &text).is_err(),
            "fixed {pi} accepted"
        );
    }
}

#[test]
fn ten_thousand_columns_are_read_and_carried() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("wide.csv");
    let mut head = String::from("id,glabella,mastoid,femur_head_diameter");
    for k in 0..10_000 {
        head.push_str(&format!(",note_{k}"));
    }
    let mut t = head + "\n";
    for i in 0..5 {
        t.push_str(&format!(
            "W{i},{},{},{}",
            1 + i % 5,
            1 + (i + 2) % 5,
            40 + i
        ));
        for k in 0..10_000 {
            t.push_str(&format!(",{}", (k + i) % 7));
        }
        t.push('\n');
    }
    std::fs::write(&f, t).unwrap();
    let o = tessera(&["check", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = dir.path().join("r");
    let o = tessera(&[
        "analyse",
        f.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--priors",
        "flat",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let ind = std::fs::read_to_string(out.join("individuals.csv")).unwrap();
    assert!(ind.lines().next().unwrap().ends_with(",note_9999"));
    assert!(stdout(&o).contains("5 individuals"));
}

#[test]
#[ignore = "heavy: a million simulated individuals (about 80 MB); run with --release"]
fn a_million_rows_are_checked_and_weighed() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("million.csv");
    let o = tessera(&[
        "simulate",
        "--n",
        "1000000",
        "--missing",
        "cranium=0.35,pelvis=0.5,postcranial=0.3,dental=0.4,trait=0.15,range=0.05,subadult=0.08,dna=0.1",
        "--out",
        f.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let start = std::time::Instant::now();
    let o = tessera(&["check", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    println!("check of 10^6 rows: {:.1} s", start.elapsed().as_secs_f64());
    let start = std::time::Instant::now();
    let ledger = dir.path().join("ledger.csv");
    let o = tessera(&[
        "evidence",
        f.to_str().unwrap(),
        "--out",
        ledger.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    println!(
        "evidence of 10^6 rows: {:.1} s",
        start.elapsed().as_secs_f64()
    );
    let lines = std::io::BufRead::lines(std::io::BufReader::new(
        std::fs::File::open(&ledger).unwrap(),
    ))
    .count();
    // Five blocks and a total per individual, and the header.
    assert_eq!(lines, 1 + 6 * 1_000_000);
}

#[test]
#[ignore = "heavy: writes a 1 GB file"]
fn a_gigabyte_file_gets_a_clear_error_and_nothing_is_written() {
    use std::io::Write;
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("huge.csv");
    {
        let mut w = std::io::BufWriter::new(std::fs::File::create(&f).unwrap());
        writeln!(w, "id,glabella,femur_head_diameter").unwrap();
        let mut i = 0u64;
        let mut written = 0u64;
        while written < 1 << 30 {
            let line = format!("G{i:012},3,44.5\n");
            written += line.len() as u64;
            w.write_all(line.as_bytes()).unwrap();
            i += 1;
        }
    }
    let out = dir.path().join("r");
    let start = std::time::Instant::now();
    let o = tessera(&[
        "analyse",
        f.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(stderr(&o).contains("at most 512 MB"), "{}", stderr(&o));
    assert!(!out.exists());
    println!(
        "1 GB file refused in {:.2} s",
        start.elapsed().as_secs_f64()
    );
}
