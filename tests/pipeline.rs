//! The analysis pipeline as a library call, without the binary: options → validation →
//! a table read from bytes → analysis → output set. The same run through the command line
//! must give the same files, byte for byte.

mod common;
use common::{stderr, tessera};
use std::path::Path;
use tessera::pipeline::{render, AnalysisOptions, ReadOptions};
use tessera::progress::Silent;
use tessera::Error;

fn demo() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/mirefold.csv")
        .display()
        .to_string()
}

#[test]
fn the_library_pipeline_on_bytes_writes_what_the_command_line_writes() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("results");
    let (demo, out_s) = (demo(), out.display().to_string());
    let args = [
        "analyse",
        demo.as_str(),
        "--out",
        out_s.as_str(),
        "--group-by",
        "phase",
        "--by-sex",
        "cribra_orbitalia",
        "--draws",
        "200",
    ];
    let o = tessera(&args);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));

    let options = AnalysisOptions {
        by_sex: vec!["cribra_orbitalia".into()],
        draws: Some(200),
        read: ReadOptions {
            group_by: Some("phase".into()),
            ..ReadOptions::default()
        },
        ..AnalysisOptions::default()
    };
    let run = options.validate().unwrap();
    let bytes = std::fs::read(&demo).unwrap();
    // Read from bytes, named as the command line names the file, so that the record matches.
    let a = run.read_bytes(&demo, &bytes).unwrap();
    let command: Vec<String> = std::iter::once("tessera")
        .chain(args)
        .map(String::from)
        .collect();
    let result = run.analyse(a, command, &Silent).unwrap();
    let files = render(&result).unwrap();
    assert!(files.names().contains(&"individuals.csv"));
    assert!(files.names().contains(&"figures/p_female.svg"));
    for f in &files.files {
        let on_disk = std::fs::read(out.join(&f.name)).unwrap();
        assert!(
            on_disk == f.bytes,
            "{} differs between the library and the CLI",
            f.name
        );
    }
    // Nothing else was written by the command line (beside its folder marker).
    let mut written = Vec::new();
    for e in walk(&out) {
        let rel = e
            .strip_prefix(&out)
            .unwrap()
            .to_string_lossy()
            .replace('\\', "/");
        written.push(rel);
    }
    for name in &written {
        assert!(
            files.get(name).is_some() || name.starts_with('.'),
            "{name} was written by the CLI but is not in the output set"
        );
    }
}

fn walk(d: &Path) -> Vec<std::path::PathBuf> {
    let mut v = Vec::new();
    for e in std::fs::read_dir(d).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            v.extend(walk(&p));
        } else {
            v.push(p);
        }
    }
    v
}

#[test]
fn every_option_problem_is_reported_at_once_before_any_work() {
    let options = AnalysisOptions {
        prior: "no-such-prior".into(),
        thresholds: "0.9,0.1".into(),
        draws: Some(0),
        recalibrate: true,
        shift: -1.0,
        iterations: 10,
        minimum_age: Some(300.0),
        read: ReadOptions {
            side_grade_tolerance: -1,
            ..ReadOptions::default()
        },
        ..AnalysisOptions::default()
    };
    let Err(Error::Options(p)) = options.validate() else {
        panic!("the options should be refused");
    };
    let named: Vec<&str> = p.0.iter().map(|x| x.option.as_str()).collect();
    for o in [
        "minimum-age",
        "prior",
        "thresholds",
        "draws",
        "shift",
        "iterations",
        "side-grade-tolerance",
    ] {
        assert!(named.contains(&o), "{o} missing from {named:?}");
    }
    assert_eq!(Error::Options(p).exit_code(), 4);
}

#[test]
fn options_that_depend_on_the_table_are_checked_before_the_evidence_is_weighed() {
    let options = AnalysisOptions {
        by_sex: vec!["nosuch".into(), "other".into()],
        draws: Some(150_000_000),
        ..AnalysisOptions::default()
    };
    let run = options.validate().unwrap();
    let a = run.read_path(Path::new(&demo())).unwrap();
    // A progress listener that fails the test if any stage starts.
    struct NoWork;
    impl tessera::progress::Progress for NoWork {
        fn stage(&self, what: &str, _steps: u64) {
            panic!("`{what}` started before the options were checked");
        }
        fn advance(&self, _n: u64) {}
        fn finish(&self) {}
    }
    let Err(Error::Options(p)) = run.analyse(a, vec![], &NoWork) else {
        panic!("the options should be refused");
    };
    let named: Vec<&str> = p.0.iter().map(|x| x.option.as_str()).collect();
    assert_eq!(named, ["draws", "by-sex", "by-sex"], "{p}");
}

#[test]
fn a_table_with_problems_is_a_typed_error_holding_every_problem() {
    let run = AnalysisOptions::default().validate().unwrap();
    let bad = b"id,glabella,mastoid_l\nA,9,2\nB,3,x\n";
    let Err(Error::Input(e)) = run.read_bytes("upload.csv", bad) else {
        panic!("the table should be refused");
    };
    assert_eq!(e.problems.len(), 2, "{e:?}");
    assert_eq!(Error::Input(e).exit_code(), 3);
}
