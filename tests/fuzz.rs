//! Long property runs over everything that reads outside input: the text-table reader, the
//! workbook readers (.xlsx, .ods), the model and prior loaders, scale maps and the
//! specification parsers. No input may panic or exhaust memory.
//! Run, with a memory limit of 4 GiB on the test process (build first: the limit would also
//! bind the compiler):
//! `cargo test --release --test fuzz --no-run && (ulimit -v 4194304; TESSERA_FUZZ_CASES=1000000 cargo test --release --test fuzz -- --ignored --nocapture)`
//! (default 100 000 cases per property).

use proptest::prelude::*;
use proptest::test_runner::{Config, TestRunner};
use tessera::catalogue::Catalogue;
use tessera::data::{read_assemblage_text, settings::parse_scale_maps, ReadSettings};
use tessera::model::Model;
use tessera::prior::{parse_prior_set, Prior};
use tessera::sim::{parse_groups, MissingSpec};

fn cases() -> u32 {
    std::env::var("TESSERA_FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(100_000)
}

/// Mutate a valid document: replace, delete or insert a few bytes (kept valid UTF-8 by
/// working on chars).
fn mutated(base: &'static str) -> impl Strategy<Value = String> {
    prop::collection::vec((any::<u16>(), 0u8..3, any::<char>()), 1..6).prop_map(move |edits| {
        let mut c: Vec<char> = base.chars().collect();
        for (pos, op, ch) in edits {
            if c.is_empty() {
                break;
            }
            let i = pos as usize % c.len();
            match op {
                0 => c[i] = ch,
                1 => {
                    c.remove(i);
                }
                _ => c.insert(i, ch),
            }
        }
        c.into_iter().collect()
    })
}

/// A zip archive of `parts`, stored uncompressed so that byte mutations reach the XML.
fn stored_zip(parts: &[(String, Vec<u8>)]) -> Vec<u8> {
    use std::io::Write;
    let mut out = Vec::new();
    let mut z = zip::ZipWriter::new(std::io::Cursor::new(&mut out));
    let opts =
        zip::write::SimpleFileOptions::default().compression_method(zip::CompressionMethod::Stored);
    for (name, bytes) in parts {
        z.start_file(name.as_str(), opts).unwrap();
        z.write_all(bytes).unwrap();
    }
    z.finish().unwrap();
    out
}

/// A small valid .xlsx (written by rust_xlsxwriter), repacked uncompressed.
fn small_xlsx() -> Vec<u8> {
    use std::io::Read;
    let mut wb = rust_xlsxwriter::Workbook::new();
    let ws = wb.add_worksheet();
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
    let packed = wb.save_to_buffer().unwrap();
    let mut z = zip::ZipArchive::new(std::io::Cursor::new(packed)).unwrap();
    let parts: Vec<(String, Vec<u8>)> = (0..z.len())
        .map(|i| {
            let mut f = z.by_index(i).unwrap();
            let mut b = Vec::new();
            f.read_to_end(&mut b).unwrap();
            (f.name().to_string(), b)
        })
        .collect();
    stored_zip(&parts)
}

/// A small valid .ods.
fn small_ods() -> Vec<u8> {
    let content = r#"<?xml version="1.0" encoding="UTF-8"?><office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0"><office:body><office:spreadsheet><table:table table:name="s"><table:table-row><table:table-cell office:value-type="string"><text:p>id</text:p></table:table-cell><table:table-cell office:value-type="string"><text:p>glabella</text:p></table:table-cell><table:table-cell table:number-columns-repeated="3"/></table:table-row><table:table-row table:number-rows-repeated="2"><table:table-cell office:value-type="string"><text:p>W-1</text:p></table:table-cell><table:table-cell office:value-type="float" office:value="3"><text:p>3</text:p></table:table-cell></table:table-row></table:table></office:spreadsheet></office:body></office:document-content>"#;
    let manifest = r#"<?xml version="1.0" encoding="UTF-8"?><manifest:manifest xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0"><manifest:file-entry manifest:full-path="/" manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/><manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/></manifest:manifest>"#;
    stored_zip(&[
        (
            "mimetype".into(),
            b"application/vnd.oasis.opendocument.spreadsheet".to_vec(),
        ),
        ("META-INF/manifest.xml".into(), manifest.as_bytes().to_vec()),
        ("content.xml".into(), content.as_bytes().to_vec()),
    ])
}

/// Mutate bytes: replace, delete or insert a few, and sometimes write a digit run (so that
/// repeat counts and sizes grow).
fn mutated_bytes(base: Vec<u8>) -> impl Strategy<Value = Vec<u8>> {
    prop::collection::vec((any::<u32>(), 0u8..4, any::<u8>()), 1..6).prop_map(move |edits| {
        let mut b = base.clone();
        for (pos, op, byte) in edits {
            if b.is_empty() {
                break;
            }
            let i = pos as usize % b.len();
            match op {
                0 => b[i] = byte,
                1 => {
                    b.remove(i);
                }
                2 => b.insert(i, byte),
                _ => {
                    for _ in 0..(byte % 12) {
                        b.insert(i, b'9');
                    }
                }
            }
        }
        b
    })
}

#[test]
#[ignore = "long property run; see the module docs"]
fn workbooks_never_panic_nor_exhaust_memory() {
    use tessera::data::source::read_workbook;
    let n = cases();
    let start = std::time::Instant::now();
    let config = Config {
        cases: n,
        failure_persistence: None,
        ..Config::default()
    };
    let (xlsx, ods) = (small_xlsx(), small_ods());
    // The unmutated files read: the properties start from valid workbooks.
    assert!(read_workbook(std::path::Path::new("f.xlsx"), &xlsx, None).is_ok());
    assert!(read_workbook(std::path::Path::new("f.ods"), &ods, None).is_ok());
    for (name, base) in [("f.xlsx", xlsx), ("f.ods", ods)] {
        TestRunner::new(config.clone())
            .run(&mutated_bytes(base), |b| {
                let _ = read_workbook(std::path::Path::new(name), &b, None);
                Ok(())
            })
            .unwrap();
    }
    println!(
        "{n} cases for each of 2 workbook properties in {:.1} s, no panic",
        start.elapsed().as_secs_f64()
    );
}

#[test]
#[ignore = "long property run; see the module docs"]
fn nothing_read_from_outside_panics() {
    // Seven properties: bytes, text of table characters, mutated table, model, prior, scale map, specs.
    let n = cases();
    let cat = Catalogue::standard().unwrap();
    let start = std::time::Instant::now();
    let config = Config {
        cases: n,
        failure_persistence: None,
        ..Config::default()
    };
    let mut runner = TestRunner::new(config.clone());
    // A fresh runner per property: a runner counts its cases across runs.
    let counter = std::cell::Cell::new(0u64);
    runner
        .run(&prop::collection::vec(any::<u8>(), 0..300), |bytes| {
            counter.set(counter.get() + 1);
            let _ = read_assemblage_text("f.csv", &bytes, &cat, &ReadSettings::default());
            Ok(())
        })
        .unwrap();
    TestRunner::new(config.clone())
        .run(&"[a-z_0-9,;\t\n\r\". +/-]{0,300}", |t| {
            let _ = read_assemblage_text("f.csv", t.as_bytes(), &cat, &ReadSettings::default());
            Ok(())
        })
        .unwrap();
    let table = "id,group,age,glabella,mastoid_l,mastoid_r,femur_head_diameter_l,dna_x_reads,dna_y_reads,known_sex\nA,n,25-35,3,2-3,4,45.5,1000,3,F\nB,,adult,NA,,5,41.0,,,m\n";
    TestRunner::new(config.clone())
        .run(&mutated(table), |t| {
            let _ = read_assemblage_text("f.csv", t.as_bytes(), &cat, &ReadSettings::default());
            Ok(())
        })
        .unwrap();
    TestRunner::new(config.clone())
        .run(&mutated(tessera::model::DEFAULT_MODEL_YAML), |t| {
            let _ = Model::from_yaml("m.yaml", &t);
            Ok(())
        })
        .unwrap();
    TestRunner::new(config.clone())
        .run(
            &mutated("name: p\nprovenance: invented for a property test\nbeta: {a: 2, b: 3}\n"),
            |t| {
                let _ = Prior::from_yaml("p.yaml", &t);
                Ok(())
            },
        )
        .unwrap();
    TestRunner::new(config.clone())
        .run(
            &mutated("glabella: {-2: 1, -1: 2, 0: 3, 1: 4, 2: 5}\n"),
            |t| {
                let _ = parse_scale_maps(&t, &cat);
                Ok(())
            },
        )
        .unwrap();
    TestRunner::new(config.clone())
        .run(&".{0,40}", |t| {
            let _ = parse_groups(&t);
            let _ = MissingSpec::parse(&t);
            let _ = parse_prior_set(&t);
            let _ = tessera::assemblage::Thresholds::parse(&t);
            Ok(())
        })
        .unwrap();
    assert_eq!(counter.get(), u64::from(n));
    println!(
        "{n} cases for each of 7 properties in {:.1} s, no panic",
        start.elapsed().as_secs_f64()
    );
}
