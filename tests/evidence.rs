//! `tessera evidence` as a user runs it.

mod common;
use common::{fixture, stderr, stdout, tessera};
use std::path::Path;

fn demo() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/mirefold.csv")
        .display()
        .to_string()
}

fn read_csv(p: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    let mut r = csv::Reader::from_path(p).unwrap();
    let h = r.headers().unwrap().iter().map(String::from).collect();
    let rows = r
        .records()
        .map(|x| x.unwrap().iter().map(String::from).collect())
        .collect();
    (h, rows)
}

#[test]
fn the_ledger_of_the_demo_has_the_documented_columns() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("ledger.csv");
    let o = tessera(&["evidence", &demo(), "--out", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("not identifications"));
    let (h, rows) = read_csv(&out);
    assert_eq!(
        &h[..12],
        [
            "id",
            "block",
            "block_type",
            "status",
            "traits_used",
            "n_traits",
            "ln_l_female",
            "ln_l_male",
            "ln_lr",
            "log10_lr",
            "ln_lr_error",
            "note"
        ]
    );
    assert_eq!(
        &h[12..],
        [
            "phase",
            "zone",
            "cribra_orbitalia",
            "grave_goods",
            "stature_cm"
        ]
    );
    // 75 individuals × (5 blocks + total).
    assert_eq!(rows.len(), 75 * 6);
    // The total row is the sum of its blocks.
    for chunk in rows.chunks(6) {
        let sum: f64 = chunk[..5]
            .iter()
            .map(|r| r[8].parse::<f64>().unwrap())
            .sum();
        let total: f64 = chunk[5][8].parse().unwrap();
        assert_eq!(chunk[5][1], "total");
        assert!((sum - total).abs() < 1e-5);
    }
    // The grave with nothing surviving stays in the ledger as not estimable.
    assert!(rows
        .iter()
        .any(|r| r[0] == "MH-075" && r[1] == "total" && r[3] == "not_estimable"));
    let record: serde_json::Value =
        serde_json::from_slice(&std::fs::read(dir.path().join("ledger.run.json")).unwrap())
            .unwrap();
    assert_eq!(record["model"], "default");
    assert_eq!(record["seed"], 1);
    assert_eq!(record["input_sha256"].as_str().unwrap().len(), 64);
}

#[test]
fn same_seed_same_bytes_and_row_order_does_not_matter() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.csv");
    let b = dir.path().join("b.csv");
    for p in [&a, &b] {
        assert_eq!(
            tessera(&[
                "evidence",
                &demo(),
                "--out",
                p.to_str().unwrap(),
                "--seed",
                "7"
            ])
            .status
            .code(),
            Some(0)
        );
    }
    assert_eq!(std::fs::read(&a).unwrap(), std::fs::read(&b).unwrap());
    // Reverse the data rows: every individual's rows are unchanged.
    let text = std::fs::read_to_string(demo()).unwrap();
    let mut lines: Vec<&str> = text.lines().collect();
    lines[1..].reverse();
    let rev = dir.path().join("reversed.csv");
    std::fs::write(&rev, lines.join("\n") + "\n").unwrap();
    let c = dir.path().join("c.csv");
    assert_eq!(
        tessera(&[
            "evidence",
            rev.to_str().unwrap(),
            "--out",
            c.to_str().unwrap(),
            "--seed",
            "7"
        ])
        .status
        .code(),
        Some(0)
    );
    let (_, mut x) = read_csv(&a);
    let (_, mut y) = read_csv(&c);
    x.sort();
    y.sort();
    assert_eq!(x, y);
}

#[test]
fn published_equations_give_the_worked_example() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("pubis.csv");
    std::fs::write(&input, "id,ventral_arc_l,ischiopubic_ramus_l,subpubic_concavity_l,glabella,mastoid_l\nP1,1,1,1,,\nP2,5,5,5,2,\n").unwrap();
    let out = dir.path().join("l.csv");
    let model = Path::new(env!("CARGO_MANIFEST_DIR")).join("models/published-equations.yaml");
    let o = tessera(&[
        "evidence",
        input.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--model",
        model.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let (_, rows) = read_csv(&out);
    let get = |id: &str, block: &str| {
        rows.iter()
            .find(|r| r[0] == id && r[1] == block)
            .unwrap()
            .clone()
    };
    // Klales et al. (2012): all grades 1 → score −11.299, so ln LR(F:M) = +11.299.
    assert_eq!(get("P1", "pubis")[8], "11.299000");
    assert_eq!(get("P2", "pubis")[8], "-8.753000");
    // P2 has glabella but no mastoid or mental eminence: no Walker equation is complete.
    assert_eq!(get("P2", "cranium")[3], "no_usable_equation");
}

#[test]
fn inputs_are_never_overwritten_and_bad_models_list_every_problem() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("in.csv");
    std::fs::write(&input, "id,glabella\nA,3\n").unwrap();
    let o = tessera(&[
        "evidence",
        input.to_str().unwrap(),
        "--out",
        input.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(5));
    assert_eq!(
        std::fs::read_to_string(&input).unwrap(),
        "id,glabella\nA,3\n"
    );
    let model = dir.path().join("m.yaml");
    std::fs::write(&model, "name: m\nprovenance: x\nblocks:\n  - {id: a, type: latent, traits: [{id: glabella, thresholds: [1, 0, 2, 3], mean: {female: 0, male: 1}}]}\n").unwrap();
    let out = dir.path().join("o.csv");
    let o = tessera(&[
        "evidence",
        input.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--model",
        model.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4));
    let err = stderr(&o);
    assert!(
        err.contains("provenance") && err.contains("strictly increasing"),
        "{err}"
    );
    assert!(!out.exists());
    // Bad input: problems listed, nothing written.
    let o = tessera(&[
        "evidence",
        fixture("bad/grade_out_of_range.csv").to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(3));
    assert!(!out.exists());
}

#[test]
fn scored_individuals_below_the_minimum_age_are_counted_and_the_age_can_be_set() {
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("ado.csv");
    // A 17-year-old (certainly below 18), a 15-20 range (reaches 18: used), an adult.
    std::fs::write(&input, "id,glabella,age\nA,3,17\nB,4,15-20\nC,2,30\n").unwrap();
    let run = |extra: &[&str], out: &str| {
        let out = dir.path().join(out);
        let mut a = vec![
            "evidence",
            input.to_str().unwrap(),
            "--out",
            out.to_str().unwrap(),
        ];
        a.extend_from_slice(extra);
        let o = tessera(&a);
        (
            o.status.code(),
            stderr(&o),
            std::fs::read_to_string(&out).unwrap_or_default(),
        )
    };
    let (code, err, ledger) = run(&[], "a.csv");
    assert_eq!(code, Some(0), "{err}");
    assert!(err.contains("1 individual with skeletal scores or measurements recorded is below the minimum age (18 years)"), "{err}");
    let cranium_a = ledger
        .lines()
        .find(|l| l.starts_with("A,cranium"))
        .unwrap()
        .to_string();
    assert!(cranium_a.contains("below_minimum_age"), "{cranium_a}");
    // With a minimum age of 16 the 17-year-old's skull is used, and no warning is given.
    let (code, err, ledger) = run(&["--minimum-age", "16"], "b.csv");
    assert_eq!(code, Some(0), "{err}");
    assert!(!err.contains("below the minimum age"), "{err}");
    let cranium_a16 = ledger
        .lines()
        .find(|l| l.starts_with("A,cranium"))
        .unwrap()
        .to_string();
    assert_ne!(cranium_a, cranium_a16);
    let (code, err, _) = run(&["--minimum-age", "160"], "c.csv");
    assert_eq!(code, Some(4), "{err}");
    assert!(err.contains("from 0 to 100"), "{err}");
}
