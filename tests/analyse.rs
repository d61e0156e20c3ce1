//! `tessera analyse` as a user runs it, and the checks of the analysis that need a whole
//! assemblage.

mod common;
use common::{stderr, stdout, tessera};
use std::path::Path;
use tessera::assemblage::{analyse, Thresholds};
use tessera::data::{read_assemblage, ReadSettings};
use tessera::likelihood::evaluate_assemblage;
use tessera::model::{Context, Model};
use tessera::prior::parse_prior_set;

fn demo() -> String {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("examples/mirefold.csv")
        .display()
        .to_string()
}

fn header(p: &Path) -> Vec<String> {
    let mut r = csv::Reader::from_path(p).unwrap();
    r.headers().unwrap().iter().map(String::from).collect()
}

#[test]
fn the_demo_gives_four_files_with_the_documented_columns() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("results");
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--group-by",
        "phase",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = stdout(&o);
    assert!(text.contains("Proportion female"), "{text}");
    assert!(text.contains("not identifications"));
    let ind = header(&out.join("individuals.csv"));
    let fixed = [
        "id",
        "group",
        "status",
        "n_traits",
        "log10_lr",
        "lr_support",
        "p_female",
        "p_male",
        "category",
        "p_female_min",
        "p_female_max",
        "prior_sensitive",
        "p_female_equal_prior",
        "category_equal_prior",
        "category_note",
        "age",
        "flags",
        "dna_reads",
        "y_fraction",
        "log10_lr_cranium",
        "log10_lr_pelvis",
        "log10_lr_postcranial",
        "log10_lr_dental",
        "log10_lr_dna",
    ];
    assert_eq!(&ind[..fixed.len()], fixed);
    assert_eq!(
        &ind[fixed.len()..],
        ["zone", "cribra_orbitalia", "grave_goods", "stature_cm"],
        "carried columns (phase is the group)"
    );
    assert_eq!(
        &header(&out.join("assemblage.csv"))[..9],
        [
            "prior",
            "model",
            "pi_mean",
            "pi_median",
            "pi_lo",
            "pi_hi",
            "n_individuals",
            "n_estimable",
            "expected_females"
        ]
    );
    // One row per prior and model: the five Beta priors of the set have a `groups` row
    // beside their `one population` row; a fixed prior fixes every group, so it has one.
    let mut r = csv::Reader::from_path(out.join("assemblage.csv")).unwrap();
    let models: Vec<(String, String)> = r
        .records()
        .map(|x| {
            let x = x.unwrap();
            (x[0].to_string(), x[1].to_string())
        })
        .collect();
    assert_eq!(models.len(), 20);
    assert_eq!(
        models[..2],
        [
            ("flat".to_string(), "one population".to_string()),
            ("flat".to_string(), "groups".to_string())
        ]
    );
    assert!(models
        .iter()
        .filter(|(p, _)| p.starts_with("fixed"))
        .all(|(_, m)| m == "one population"));
    assert_eq!(
        header(&out.join("sensitivity.csv")),
        ["id", "prior", "p_female", "category"]
    );
    let run: serde_json::Value =
        serde_json::from_slice(&std::fs::read(out.join("run.json")).unwrap()).unwrap();
    assert_eq!(run["prior"]["name"], "flat");
    assert_eq!(run["thresholds"]["female"], 0.95);
    assert_eq!(run["sensitivity_priors"].as_array().unwrap().len(), 15);
    // Every individual is in every output, not estimable ones included.
    let mut r = csv::Reader::from_path(out.join("individuals.csv")).unwrap();
    let rows: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(rows.len(), 75);
    let last = rows.iter().find(|x| &x[0] == "MH-075").unwrap();
    assert_eq!(
        (&last[2], &last[8], &last[6]),
        ("not_estimable", "not_estimable", "")
    );
    assert_eq!(&rows[0][1], "early");
    // p_female + p_male = 1 and min ≤ p ≤ max.
    for x in rows.iter().filter(|x| &x[2] == "estimated") {
        let p: f64 = x[6].parse().unwrap();
        let q: f64 = x[7].parse().unwrap();
        // Four decimals under the group hierarchy: each rounding is at most 5e-5.
        assert!((p + q - 1.0).abs() < 1.1e-4);
        assert!(
            x[9].parse::<f64>().unwrap() <= p + 1e-9 && p <= x[10].parse::<f64>().unwrap() + 1e-9
        );
    }
}

#[test]
fn same_seed_same_bytes() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r");
    let run = || {
        let o = tessera(&[
            "analyse",
            &demo(),
            "--out",
            out.to_str().unwrap(),
            "--seed",
            "11",
        ]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        [
            "individuals.csv",
            "assemblage.csv",
            "sensitivity.csv",
            "run.json",
        ]
        .map(|f| std::fs::read(out.join(f)).unwrap())
    };
    assert_eq!(run(), run());
}

#[test]
fn options_are_checked_before_anything_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r");
    for bad in [
        vec!["--prior", "nonsense"],
        vec!["--prior", "fixed:1.5"],
        vec!["--priors", "flat,nope"],
        vec!["--thresholds", "0.5,0.2,0.8,0.95"],
        vec!["--life-table-classes", "18-25,30-40,40+"],
        vec!["--life-table-classes", "18-30,25-40,40-50"],
        vec!["--reference-ratio", "0"],
        vec!["--hazard-ages", "35-18"],
        vec!["--hazard-ages", "young"],
        vec!["--reference-ratio=-105"],
    ] {
        let d = demo();
        let mut args = vec!["analyse", &d, "--out", out.to_str().unwrap()];
        args.extend(bad.iter().copied());
        let o = tessera(&args);
        assert_eq!(o.status.code(), Some(4), "{bad:?}: {}", stderr(&o));
        assert!(!out.exists(), "{bad:?} wrote output");
    }
}

#[test]
fn a_bad_life_table_class_names_the_option_and_every_problem() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r");
    let d = demo();
    let o = tessera(&[
        "analyse",
        &d,
        "--out",
        out.to_str().unwrap(),
        "--life-table-classes",
        "18-30,25-40,40-50",
    ]);
    let err = stderr(&o);
    assert!(err.contains("life-table-classes"), "{err}");
    assert!(err.contains("`18-30` and `25-40` overlap"), "{err}");
    assert!(err.contains("the last class `40-50` is closed"), "{err}");
    assert!(!out.exists());
}

/// Swapping F and M (every ln LR negated, the prior mirrored) mirrors every result.
#[test]
fn swapping_the_sexes_mirrors_every_result() {
    let model = Model::default_model().unwrap();
    let a = read_assemblage(
        Path::new(&demo()),
        &model.catalogue,
        &ReadSettings::default(),
    )
    .unwrap();
    let ev = evaluate_assemblage(&model, &a, &Context::new(1));
    let mut neg = ev.clone();
    for e in &mut neg {
        e.ln_lr = -e.ln_lr;
    }
    let set = parse_prior_set("birth-ratio").unwrap();
    let x = analyse(&ev, None, &set[0], &[], &Thresholds::default());
    let y = analyse(&neg, None, &set[0].mirrored(), &[], &Thresholds::default());
    assert!((x.main.pi.mean - (1.0 - y.main.pi.mean)).abs() < 1e-9);
    assert!((x.main.pi.lo - (1.0 - y.main.pi.hi)).abs() < 1e-6);
    for (p, q) in x.main.p_female.iter().zip(&y.main.p_female) {
        match (p, q) {
            (Some(p), Some(q)) => assert!((p - (1.0 - q)).abs() < 1e-9),
            (None, None) => {}
            _ => panic!("estimability changed"),
        }
    }
}

#[test]
fn groups_and_draws_are_written_in_tidy_form() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("g");
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--group-by",
        "phase",
        "--draws",
        "200",
        "--priors",
        "flat",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("Groups that differ against groups that share one proportion"));
    assert_eq!(
        header(&out.join("groups.csv"))[..6],
        [
            "group",
            "n",
            "pi_mean",
            "pi_lo",
            "pi_hi",
            "expected_females"
        ]
    );
    let mut r = csv::Reader::from_path(out.join("groups.csv")).unwrap();
    let groups: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(groups.len(), 3);
    let n: usize = groups.iter().map(|g| g[1].parse::<usize>().unwrap()).sum();
    assert_eq!(n, 75, "every individual counted in a group");
    assert_eq!(header(&out.join("draws.csv")), ["draw", "id", "sex"]);
    let mut r = csv::Reader::from_path(out.join("draws.csv")).unwrap();
    let draws: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(draws.len(), 200 * 75);
    assert!(draws.iter().all(|d| &d[2] == "F" || &d[2] == "M"));
    let h = header(&out.join("assemblage_draws.csv"));
    assert_eq!(
        h,
        [
            "draw",
            "mu",
            "kappa",
            "pi_early",
            "pi_middle",
            "pi_late",
            "n_female",
            "n_male",
            "sex_ratio"
        ]
    );
    // The per-draw counts agree with the long table.
    let mut r = csv::Reader::from_path(out.join("assemblage_draws.csv")).unwrap();
    let first = r.records().next().unwrap().unwrap();
    let females = draws
        .iter()
        .filter(|d| &d[0] == "1" && &d[2] == "F")
        .count();
    assert_eq!(first[6].parse::<usize>().unwrap(), females);
}

#[test]
fn without_groups_the_single_posterior_is_used_and_no_group_files_are_written() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("n");
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--priors",
        "flat",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(!out.join("groups.csv").exists());
    assert!(!out.join("draws.csv").exists());
    // One distinct group is one population: the same numbers as no groups.
    let text = std::fs::read_to_string(demo())
        .unwrap()
        .replace(",early,", ",same,")
        .replace(",late,", ",same,")
        .replace(",middle,", ",same,");
    let one = dir.path().join("one.csv");
    std::fs::write(&one, text).unwrap();
    let out2 = dir.path().join("o");
    let o = tessera(&[
        "analyse",
        one.to_str().unwrap(),
        "--out",
        out2.to_str().unwrap(),
        "--priors",
        "flat",
        "--group-by",
        "phase",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let col = |p: &Path, c: usize| -> Vec<String> {
        let mut r = csv::Reader::from_path(p).unwrap();
        r.records().map(|x| x.unwrap()[c].to_string()).collect()
    };
    assert_eq!(
        col(&out.join("individuals.csv"), 6),
        col(&out2.join("individuals.csv"), 6)
    );
}

#[test]
fn recalibration_writes_its_tables() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("rc");
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--priors",
        "flat",
        "--recalibrate",
        "--iterations",
        "400",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert_eq!(
        header(&out.join("recalibration.csv")),
        [
            "trait",
            "sex",
            "reference_mean",
            "recalibrated_mean",
            "lo",
            "hi",
            "shift_sd",
            "rhat",
            "ess"
        ]
    );
    assert_eq!(
        header(&out.join("recalibration_check.csv")),
        ["trait", "n", "share_outside_99", "flagged"]
    );
    assert_eq!(
        header(&out.join("recalibrated_individuals.csv"))[5],
        "category_changed"
    );
    let mut r = csv::Reader::from_path(out.join("recalibration.csv")).unwrap();
    assert_eq!(r.records().count(), 8, "4 measurements × 2 sexes");
}

#[test]
fn the_same_bytes_with_one_thread_or_several() {
    let dir = tempfile::tempdir().unwrap();
    let mut outputs = Vec::new();
    for threads in ["1", "2"] {
        let out = dir.path().join(format!("t{threads}"));
        let o = std::process::Command::new(env!("CARGO_BIN_EXE_tessera"))
            .args([
                "analyse",
                &demo(),
                "--out",
                out.to_str().unwrap(),
                "--group-by",
                "phase",
                "--draws",
                "100",
                "--priors",
                "shipped",
            ])
            .env("RAYON_NUM_THREADS", threads)
            .output()
            .unwrap();
        assert_eq!(
            o.status.code(),
            Some(0),
            "{}",
            String::from_utf8_lossy(&o.stderr)
        );
        outputs.push(
            [
                "individuals.csv",
                "assemblage.csv",
                "groups.csv",
                "draws.csv",
                "by_sex_age.csv",
                "life_table.csv",
                "hazards.csv",
            ]
            .map(|f| std::fs::read(out.join(f)).unwrap()),
        );
    }
    assert_eq!(outputs[0], outputs[1]);
}

#[test]
fn individuals_carry_the_evidence_alone_beside_the_assemblage_and_their_flags() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("r");
    let o = tessera(&["analyse", &demo(), "--out", out.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut r = csv::Reader::from_path(out.join("individuals.csv")).unwrap();
    let h: Vec<String> = r.headers().unwrap().iter().map(String::from).collect();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (id, lr, pe, ce, flags, status) = (
        col("id"),
        col("log10_lr"),
        col("p_female_equal_prior"),
        col("category_equal_prior"),
        col("flags"),
        col("status"),
    );
    let mut seen_flag = false;
    for rec in r.records() {
        let rec = rec.unwrap();
        if &rec[status] != "estimated" {
            assert_eq!(&rec[pe], "");
            assert_eq!(&rec[ce], "not_estimable");
            continue;
        }
        // Closed form: π = ½ gives P(female) = LR / (1 + LR), LR = 10^log10_lr (the column's
        // 4 decimals bound the agreement: d p / d log10 LR ≤ ln 10 / 4, times 5e-5).
        let l: f64 = rec[lr].parse().unwrap();
        let p: f64 = rec[pe].parse().unwrap();
        let expected = 1.0 / (1.0 + 10f64.powf(-l));
        assert!(
            (p - expected).abs() < 3e-5 + 1e-6,
            "{}: {p} vs {expected}",
            &rec[id]
        );
        if &rec[id] == "MH-011" {
            assert!(rec[flags].contains("dna_atypical"), "{:?}", &rec[flags]);
            // examples/mirefold.csv: 5730 X and 270 Y reads.
            assert_eq!(&rec[col("dna_reads")], "6000");
            assert_eq!(&rec[col("y_fraction")], "0.0450");
            seen_flag = true;
        }
    }
    assert!(seen_flag);
}

/// `--correlation-check` with the shipped published femur model, whose correlation is
/// assumed: the model's own value moves nothing, and bad values are refused before any work.
#[test]
fn the_correlation_check_moves_nothing_at_the_model_s_own_value() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("results");
    let model = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("models/femur-noussios-2019.yaml")
        .display()
        .to_string();
    let bad = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--model",
        &model,
        "--correlation-check",
        "0,1,x",
    ]);
    assert_eq!(bad.status.code(), Some(4), "{}", stderr(&bad));
    assert!(stderr(&bad).contains("correlation-check"));
    assert!(!out.exists());
    let o = tessera(&[
        "analyse",
        &demo(),
        "--out",
        out.to_str().unwrap(),
        "--model",
        &model,
        "--correlation-check",
        "0,0.5",
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(stdout(&o).contains("within-sex correlations of block `femur`"));
    let mut r = csv::Reader::from_path(out.join("correlation_check.csv")).unwrap();
    let (mut at_half, mut moved_at_zero) = (0, 0);
    for row in r.records() {
        let row = row.unwrap();
        let change: f64 = row[4].parse().unwrap();
        if &row[1] == "0.5" {
            at_half += 1;
            assert_eq!(change, 0.0, "{row:?}");
            assert_eq!(&row[2], &row[3]);
        } else if change != 0.0 {
            moved_at_zero += 1;
        }
    }
    assert!(at_half > 0 && moved_at_zero > 0);
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    assert!(report.contains("## Dependence on the within-sex correlations"));
    let columns = std::fs::read_to_string(out.join("columns.md")).unwrap();
    assert!(columns.contains("correlation_check.csv"));
}

/// The bakehouse infants with reads on X, Y and the autosomes (models/dna-reads.yaml): the
/// libraries without Y counts are sexed by the X:autosome ratio, the others by the Y fraction
/// alone, and the invented X0-like and XXY-like libraries are flagged, not forced to a sex.
#[test]
fn the_bakehouse_infants_use_the_x_ratio_where_there_is_no_y_count() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("bakehouse");
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let o = tessera(&[
        "analyse",
        root.join("examples/mirefold-infants-rx.csv")
            .to_str()
            .unwrap(),
        "--model",
        root.join("models/dna-reads.yaml").to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let mut r = csv::Reader::from_path(out.join("individuals.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let col = |name: &str| h.iter().position(|c| c == name).unwrap();
    let (by_x, by_y) = (col("log10_lr_dna_x"), col("log10_lr_dna"));
    for row in r.records() {
        let row = row.unwrap();
        let note = &row[col("note")];
        match &row[0] {
            "MX-07" | "MX-15" => {
                assert_eq!(&row[col("status")], "not_estimable");
                assert!(row[col("flags")].contains("dna_atypical"));
            }
            _ if note.contains("without Y") => {
                assert!(!row[by_x].is_empty() && row[by_y].is_empty(), "{row:?}");
                // Sexed right by the X dosage alone.
                let female = row[col("p_female")].parse::<f64>().unwrap() > 0.5;
                assert_eq!(female, &row[col("true_sex")] == "F", "{row:?}");
            }
            _ => assert!(row[by_x].is_empty() && !row[by_y].is_empty(), "{row:?}"),
        }
    }
    let methods = std::fs::read_to_string(out.join("methods.md")).unwrap();
    assert!(methods.contains("X:autosome ratio Rx of Mittnik et al., 2016"));
    assert!(methods.contains("Mittnik, A."));
}

/// A laboratory's own age words (`--age-map`) and age classes (`--age-classes`): the words
/// are read as the ages they stand for, an adult of unknown age is a row of its own, and a
/// bad class list or an unknown word is refused, naming what would do.
#[test]
fn a_laboratory_s_age_words_and_classes() {
    let dir = tempfile::tempdir().unwrap();
    let table = dir.path().join("ages.csv");
    std::fs::write(
        &table,
        "id,age,glabella,mastoid\nA1,adultus,2,2\nA2,Maturus,4,5\nA3,senilis,3,4\nA4,juvenis,1,2\nA5,40±5,5,4\nA6,old adult,2,1\nA7,\"adult, age unknown\",3,3\n",
    )
    .unwrap();
    let map = Path::new(env!("CARGO_MANIFEST_DIR")).join("examples/age-map-classes.yaml");
    let out = dir.path().join("results");
    let run = |classes: &str| {
        tessera(&[
            "analyse",
            table.to_str().unwrap(),
            "--age-map",
            map.to_str().unwrap(),
            "--age-classes",
            classes,
            "--out",
            out.to_str().unwrap(),
        ])
    };
    let bad = run("18-40,40+");
    assert_eq!(bad.status.code(), Some(4), "{}", stderr(&bad));
    assert!(stderr(&bad).contains("age-classes") && stderr(&bad).contains("starts above 0"));
    let o = run("0-20,20-40,40-60,60+");
    assert!(o.status.success(), "{}", stderr(&o));
    let text = std::fs::read_to_string(out.join("category_by_age.csv")).unwrap();
    let labels: Vec<&str> = text
        .lines()
        .skip(1)
        .map(|l| l.rsplitn(7, ',').last().unwrap())
        .collect();
    assert_eq!(
        labels,
        [
            "under 20",
            "20-40",
            "40-60",
            "60+",
            "adult of unknown age",
            "unknown"
        ]
    );
    let mut r = csv::Reader::from_path(out.join("individuals.csv")).unwrap();
    let h = r.headers().unwrap().clone();
    let age = h.iter().position(|c| c == "age").unwrap();
    let ages: Vec<String> = r.records().map(|x| x.unwrap()[age].to_string()).collect();
    assert_eq!(
        ages,
        ["20-40", "40-60", "60+", "14-20", "35-45", "50+", "adult"]
    );
    std::fs::write(&table, "id,age,glabella\nA1,elderly,2\n").unwrap();
    let o = tessera(&[
        "check",
        table.to_str().unwrap(),
        "--age-map",
        map.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(3));
    assert!(
        stderr(&o).contains("a word of the age map (adult?, adultus"),
        "{}",
        stderr(&o)
    );
}
