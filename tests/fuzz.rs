//! Long property runs over everything that reads outside input: the table reader, the model
//! and prior loaders, scale maps and the specification parsers. No input may panic.
//! Run: `TESSERA_FUZZ_CASES=1000000 cargo test --release --test fuzz -- --ignored --nocapture`
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
