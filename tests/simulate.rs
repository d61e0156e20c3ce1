//! `tessera simulate` and `tessera plan` as a user runs them.

mod common;
use common::{stderr, stdout, tessera};

#[test]
fn a_simulated_cemetery_runs_through_check_and_analyse() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("sim.csv");
    let o = tessera(&[
        "simulate",
        "--groups",
        "north:30:0.6,south:20:0.3",
        "--missing",
        "cranium=0.3,range=0.1,subadult=0.1,dna=0.2",
        "--seed",
        "5",
        "--out",
        f.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = std::fs::read_to_string(&f).unwrap();
    assert!(text.starts_with("id,group,age,glabella,"));
    assert!(text.lines().next().unwrap().ends_with(",true_sex"));
    assert_eq!(text.lines().count(), 51);
    assert_eq!(
        tessera(&["check", f.to_str().unwrap()]).status.code(),
        Some(0)
    );
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
    assert!(out.join("groups.csv").exists());
    // Same seed, same file.
    let g = dir.path().join("again.csv");
    tessera(&[
        "simulate",
        "--groups",
        "north:30:0.6,south:20:0.3",
        "--missing",
        "cranium=0.3,range=0.1,subadult=0.1,dna=0.2",
        "--seed",
        "5",
        "--out",
        g.to_str().unwrap(),
    ]);
    assert_eq!(std::fs::read(&f).unwrap(), std::fs::read(&g).unwrap());
}

#[test]
fn bad_specs_are_settings_errors() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("sim.csv");
    for args in [
        vec!["simulate", "--n", "10", "--missing", "skull=0.2"],
        vec!["simulate", "--groups", "a:b:c"],
        vec!["simulate", "--n", "10", "--pi", "2"],
    ] {
        let mut a = args.clone();
        a.extend(["--out", f.to_str().unwrap()]);
        assert_eq!(tessera(&a).status.code(), Some(4), "{args:?}");
        assert!(!f.exists());
    }
}

#[test]
fn plan_prints_a_table_over_sizes() {
    let o = tessera(&["plan", "--n", "16", "--pi", "0.3", "--reps", "4"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let t = stdout(&o);
    for n in ["    4 ", "    8 ", "   16 ", "   32 ", "   64 "] {
        assert!(t.contains(n), "{t}");
    }
}
