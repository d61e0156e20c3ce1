//! Hostile inputs and output targets: each is refused cleanly (a clear message, the right exit
//! code, nothing written), never by aborting or by touching what is not ours. The files are made
//! in the test, small.

mod common;
use common::{fixture, stderr, tessera};
use std::io::Write;
use std::path::Path;

fn good() -> String {
    fixture("good/tabs.tsv").to_str().unwrap().to_string()
}

#[test]
fn a_stray_cell_at_the_far_corner_of_a_sheet_costs_one_cell() {
    use rust_xlsxwriter::Workbook;
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("corner.xlsx");
    let mut wb = Workbook::new();
    let ws = wb.add_worksheet();
    ws.write_string(0, 0, "id").unwrap();
    ws.write_string(0, 1, "glabella").unwrap();
    ws.write_string(1, 0, "W-1").unwrap();
    ws.write_number(1, 1, 3.0).unwrap();
    // The last cell of the sheet (row 1 048 576, column XFD).
    ws.write_string(1_048_575, 16_383, "x").unwrap();
    wb.save(&path).unwrap();
    let o = tessera(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(stderr(&o).contains("1048576"), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("right of the last named column"),
        "{}",
        stderr(&o)
    );
}

/// An .ods holding `content` as its content.xml.
fn ods(path: &Path, content: &str) {
    let f = std::fs::File::create(path).unwrap();
    let mut z = zip::ZipWriter::new(f);
    let stored =
        zip::write::SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    z.start_file("mimetype", stored).unwrap();
    z.write_all(b"application/vnd.oasis.opendocument.spreadsheet")
        .unwrap();
    z.start_file("META-INF/manifest.xml", stored).unwrap();
    z.write_all(br#"<?xml version="1.0" encoding="UTF-8"?><manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0"><manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/><manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/></manifest:manifest>"#).unwrap();
    z.start_file("content.xml", stored).unwrap();
    z.write_all(content.as_bytes()).unwrap();
    z.finish().unwrap();
}

const ODS_HEAD: &str = r#"<?xml version="1.0" encoding="UTF-8"?><office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0"><office:body><office:spreadsheet><table:table table:name="s">"#;
const ODS_TAIL: &str =
    "</table:table></office:spreadsheet></office:body></office:document-content>";

#[test]
fn repeated_rows_times_repeated_columns_are_refused_before_they_expand() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bomb.ods");
    let header = r#"<table:table-row><table:table-cell office:value-type="string"><text:p>id</text:p></table:table-cell></table:table-row>"#;
    let bomb = r#"<table:table-row table:number-rows-repeated="1048575"><table:table-cell table:number-columns-repeated="16384" office:value-type="float" office:value="1"><text:p>1</text:p></table:table-cell></table:table-row>"#;
    ods(&path, &format!("{ODS_HEAD}{header}{bomb}{ODS_TAIL}"));
    assert!(std::fs::metadata(&path).unwrap().len() < 2000);
    let o = tessera(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(stderr(&o).contains("10000000 cells"), "{}", stderr(&o));
    // A normal .ods, with the trailing repeats a spreadsheet program writes, still reads.
    let ok = dir.path().join("ok.ods");
    let rows = r#"<table:table-row><table:table-cell office:value-type="string"><text:p>id</text:p></table:table-cell><table:table-cell office:value-type="string"><text:p>glabella</text:p></table:table-cell><table:table-cell table:number-columns-repeated="1022"/></table:table-row><table:table-row><table:table-cell office:value-type="string"><text:p>W-1</text:p></table:table-cell><table:table-cell office:value-type="float" office:value="3"><text:p>3</text:p></table:table-cell><table:table-cell table:number-columns-repeated="1022"/></table:table-row><table:table-row table:number-rows-repeated="1048574"><table:table-cell table:number-columns-repeated="1024"/></table:table-row>"#;
    ods(&ok, &format!("{ODS_HEAD}{rows}{ODS_TAIL}"));
    let o = tessera(&["check", ok.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[cfg(unix)]
#[test]
fn a_stream_without_end_is_read_only_up_to_the_limit() {
    let o = tessera(&["check", "/dev/zero"]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(stderr(&o).contains("at most 512 MiB"), "{}", stderr(&o));
}

#[test]
fn a_column_name_of_megabytes_is_refused_at_once() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("long.csv");
    let name = "g".repeat(4 << 20);
    std::fs::write(&path, format!("id,{name}\nA,1\n")).unwrap();
    let o = tessera(&["check", path.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(
        stderr(&o).contains("at most 256 characters"),
        "{}",
        stderr(&o)
    );
}

#[test]
fn model_and_prior_files_that_expand_without_limit_are_refused() {
    let dir = tempfile::tempdir().unwrap();
    let mut doc = String::from("a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n");
    for k in 1..12 {
        let p = format!("*a{}", k - 1);
        doc.push_str(&format!("a{k}: &a{k} [{}]\n", [p.as_str(); 10].join(", ")));
    }
    let model = dir.path().join("laughs.yaml");
    std::fs::write(&model, &doc).unwrap();
    let out = dir.path().join("l.csv");
    let o = tessera(&[
        "evidence",
        &good(),
        "--model",
        model.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("aliases"), "{}", stderr(&o));
    assert!(!out.exists());
    let deep = dir.path().join("deep.yaml");
    std::fs::write(&deep, "[".repeat(100_000) + &"]".repeat(100_000)).unwrap();
    let o = tessera(&[
        "analyse",
        &good(),
        "--prior",
        deep.to_str().unwrap(),
        "--out",
        dir.path().join("a").to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("nested more than 64"), "{}", stderr(&o));
    assert!(!dir.path().join("a").exists());
}

#[cfg(unix)]
#[test]
fn a_device_named_as_output_is_never_replaced() {
    use std::os::unix::fs::FileTypeExt;
    let o = tessera(&["evidence", &good(), "--out", "/dev/null"]);
    assert_eq!(o.status.code(), Some(5), "{}", stderr(&o));
    assert!(stderr(&o).contains("not a regular file"), "{}", stderr(&o));
    let t = std::fs::symlink_metadata("/dev/null").unwrap().file_type();
    assert!(t.is_char_device());
    let o = tessera(&["analyse", &good(), "--out", "/dev/null"]);
    assert_eq!(o.status.code(), Some(5), "{}", stderr(&o));
    assert!(std::fs::symlink_metadata("/dev/null")
        .unwrap()
        .file_type()
        .is_char_device());
}

fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[test]
fn a_rerun_into_an_old_folder_leaves_exactly_the_new_runs_files() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("run");
    let o_s = out.to_str().unwrap();
    let o = tessera(&["analyse", &good(), "--out", o_s, "--draws", "20"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(out.join("draws.csv").exists());
    let o = tessera(&["analyse", &good(), "--out", o_s]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!out.join("draws.csv").exists(), "{:?}", names(&out));
    // Nothing beside the folder: no staging folder, no previous run.
    assert_eq!(names(dir.path()), ["run"]);
    // A file of the user's in the folder: refused, and the folder is left as it was.
    std::fs::write(out.join("my notes.txt"), "keep").unwrap();
    let before = names(&out);
    let o = tessera(&["analyse", &good(), "--out", o_s, "--draws", "20"]);
    assert_eq!(o.status.code(), Some(5), "{}", stderr(&o));
    assert!(stderr(&o).contains("my notes.txt"), "{}", stderr(&o));
    assert_eq!(names(&out), before);
}

#[test]
fn a_not_recorded_word_that_is_a_grade_is_refused() {
    let o = tessera(&["check", &good(), "--missing", "5"]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("`glabella`"), "{}", stderr(&o));
    // A code outside every scale and range is a not-recorded word as usual.
    let o = tessera(&["check", &good(), "--missing", "999999"]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
}

#[test]
fn grouping_by_evidence_or_by_age_is_refused() {
    for col in ["glabella", "sciatic_notch_l", "id"] {
        let o = tessera(&["check", &good(), "--group-by", col]);
        assert_eq!(o.status.code(), Some(3), "{col}: {}", stderr(&o));
        assert!(stderr(&o).contains("to group by"), "{}", stderr(&o));
    }
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("aged.csv");
    std::fs::write(&p, "id,glabella,age\nA,3,10\nB,4,30\n").unwrap();
    let o = tessera(&["check", p.to_str().unwrap(), "--group-by", "age"]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    assert!(stderr(&o).contains("the age column"), "{}", stderr(&o));
}

#[test]
fn a_group_named_like_the_rows_without_one_is_refused() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("g.csv");
    std::fs::write(&p, "id,glabella,group\nA,3,(none)\nB,4,\nC,2,north\n").unwrap();
    let out = dir.path().join("a");
    let o = tessera(&[
        "analyse",
        p.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("(none)"), "{}", stderr(&o));
    assert!(!out.exists());
}

#[test]
fn priors_and_shifts_that_make_the_computation_non_finite_are_refused_before_any_work() {
    let dir = tempfile::tempdir().unwrap();
    for (a, b) in [("1e308", "1e-308"), ("1e12", "1e12")] {
        let prior = dir.path().join("p.yaml");
        std::fs::write(
            &prior,
            format!("name: extreme\nprovenance: a hostile test of the bounds\nbeta: {{a: {a}, b: {b}}}\n"),
        )
        .unwrap();
        let o = tessera(&[
            "analyse",
            &good(),
            "--prior",
            prior.to_str().unwrap(),
            "--out",
            dir.path().join("a").to_str().unwrap(),
        ]);
        assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
        assert!(
            stderr(&o).contains("from 0.001 to 1000000"),
            "{}",
            stderr(&o)
        );
    }
    let o = tessera(&[
        "analyse",
        "no-such-file.csv",
        "--recalibrate",
        "--shift",
        "1e308",
        "--out",
        dir.path().join("a").to_str().unwrap(),
    ]);
    // Refused as an option, before the (missing) input is even read.
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("at most 10"), "{}", stderr(&o));
}

#[test]
fn agreement_between_tables_without_a_shared_id_is_an_error() {
    let dir = tempfile::tempdir().unwrap();
    let a = dir.path().join("a.csv");
    let b = dir.path().join("b.csv");
    std::fs::write(&a, "id,glabella\nA,3\n").unwrap();
    std::fs::write(&b, "id,glabella\nB,3\n").unwrap();
    let o = tessera(&["agreement", a.to_str().unwrap(), b.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    assert!(stderr(&o).contains("share no id"), "{}", stderr(&o));
}

#[cfg(unix)]
#[test]
fn a_reader_that_closes_the_pipe_early_ends_the_run_normally() {
    use std::process::{Command, Stdio};
    let mut child = Command::new(env!("CARGO_BIN_EXE_tessera"))
        .args(["check", &good(), "--format", "json"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close our end before the program writes.
    drop(child.stdout.take());
    let o = child.wait_with_output().unwrap();
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    assert!(!String::from_utf8_lossy(&o.stderr).contains("panicked"));
}
