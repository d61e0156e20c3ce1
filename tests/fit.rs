//! `tessera fit` and `tessera validate` as a user runs them, and the promise behind them: a
//! model fitted to a reference sample classifies as well as the model that made the sample.

mod common;
use common::{fixture, stderr, stdout, tessera};
use tessera::data::Sex;
use tessera::fit::{fit, FitSpec, ReferenceInfo};
use tessera::model::{Block, Context, Model};
use tessera::sim::{simulate, GroupSpec, MissingSpec};

fn one_group(n: usize) -> Vec<GroupSpec> {
    vec![GroupSpec::single(n, 0.5)]
}

/// Share of individuals with usable evidence whose P(F) at prior ½ is on the right side; an
/// LR of exactly 1 (a pattern the model weighs evenly, as a symmetric model does a middle
/// grade, now that such boxes are integrated deterministically) counts as half right.
fn accuracy(model: &Model, sim: &tessera::sim::Simulated) -> (f64, usize) {
    let ctx = Context::new(3);
    let cache = tessera::model::EvidenceCache::default();
    let (mut right, mut n) = (0.0, 0);
    for (ind, sex) in sim.individuals.iter().zip(&sim.true_sex) {
        let e = model.evaluate_cached(ind, &ctx, &cache);
        if !e.estimable {
            continue;
        }
        n += 1;
        if e.ln_lr == 0.0 {
            right += 0.5;
        } else if (e.ln_lr > 0.0) == (*sex == Sex::Female) {
            right += 1.0;
        }
    }
    (right / n as f64, n)
}

#[test]
fn a_model_fitted_to_a_simulated_reference_classifies_as_well_as_the_true_model() {
    let truth = Model::default_model().unwrap();
    // The default model without its DNA and dental blocks: the blocks the spec refits.
    let spec =
        FitSpec::from_yaml(&std::fs::read_to_string(fixture("fit/spec.yaml")).unwrap()).unwrap();
    let reference = simulate(
        &truth,
        &one_group(600),
        &MissingSpec::parse("trait=0.15,range=0.03").unwrap(),
        101,
    )
    .unwrap();
    let refs: Vec<_> = reference
        .individuals
        .iter()
        .zip(reference.true_sex.iter().copied())
        .collect();
    let info = ReferenceInfo {
        file: "simulated reference".into(),
        sha256: String::new(),
        command: "test".into(),
    };
    let fitted = fit(&spec, &truth.catalogue, &refs, &info).unwrap();
    // `include: []` writes a model of the fitted blocks only.
    let mut bare = spec.clone();
    bare.include = Some(Vec::new());
    let only = fit(&bare, &truth.catalogue, &refs, &info).unwrap();
    let only = Model::from_yaml("fitted", &only.to_yaml().unwrap()).unwrap();
    assert!(only.blocks.iter().all(|b| matches!(b, Block::Latent(_))));
    let fitted = Model::from_yaml("fitted", &fitted.to_yaml().unwrap()).unwrap();
    // The fitted model takes the shipped DNA block by default (`include:`), unfitted.
    assert!(matches!(fitted.blocks.last(), Some(Block::Dna(_))));
    assert_eq!(fitted.included[0].blocks, vec!["dna".to_string()]);
    // The true model restricted to the same blocks, for a fair comparison.
    let mut same_blocks = truth.clone();
    same_blocks.blocks.retain(|b| match b {
        Block::Latent(l) => l.id != "dental",
        Block::Dna(_) | Block::DnaX(_) => true,
        Block::Equations(_) => false,
    });
    let cemetery = simulate(&truth, &one_group(3000), &MissingSpec::fragmentary(), 202).unwrap();
    let (a_true, n) = accuracy(&same_blocks, &cemetery);
    let (a_fit, n2) = accuracy(&fitted, &cemetery);
    println!("accuracy on {n} individuals: true model {a_true:.4}, fitted {a_fit:.4}");
    assert_eq!(n, n2);
    assert!(n > 2000);
    assert!(
        (a_true - a_fit).abs() < 0.01,
        "true {a_true:.4} vs fitted {a_fit:.4}"
    );
}

#[test]
fn fit_and_validate_from_the_command_line() {
    let dir = tempfile::tempdir().unwrap();
    let p = |n: &str| dir.path().join(n).to_str().unwrap().to_string();
    let o = tessera(&[
        "simulate",
        "--n",
        "300",
        "--missing",
        "trait=0.15,cranium=0.2,pelvis=0.3,range=0.03",
        "--as-reference",
        "--seed",
        "9",
        "--out",
        &p("ref.csv"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let spec = fixture("fit/spec.yaml");
    let spec = spec.to_str().unwrap();
    let o = tessera(&[
        "fit",
        &p("ref.csv"),
        "--traits",
        spec,
        "--out",
        &p("m.yaml"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("females and"));
    let model = std::fs::read_to_string(p("m.yaml")).unwrap();
    assert!(model.contains("FITTED by tessera"));
    assert!(model.contains("SHA-256"));
    let est = std::fs::read_to_string(p("m.estimates.csv")).unwrap();
    assert!(est.starts_with("block,trait,parameter,scale,estimate,se,lower_95,upper_95,n\n"));
    // The fitted model is a normal model file.
    let o = tessera(&[
        "evidence",
        &p("ref.csv"),
        "--model",
        &p("m.yaml"),
        "--out",
        &p("l.csv"),
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    // The methods paragraph of an analysis with the fitted model says how it was fitted.
    let o = tessera(&[
        "analyse",
        &p("ref.csv"),
        "--model",
        &p("m.yaml"),
        "--out",
        &p("a"),
        "--priors",
        "flat",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let methods = std::fs::read_to_string(dir.path().join("a/methods.md")).unwrap();
    assert!(
        methods.contains("from a documented reference collection (file `ref.csv`, SHA-256"),
        "{methods}"
    );
    assert!(methods.contains("McCullagh, P. (1980)") && methods.contains("Olsson, U. (1979)"));
    assert!(!methods.contains("Noussios"));
    // The program's name and version in a model's provenance are informational: a model
    // fitted by an earlier build (another name, another version) loads and reads the same.
    let renamed = model.replacen("FITTED by tessera", "FITTED by an-earlier-build", 1);
    assert_ne!(renamed, model);
    std::fs::write(p("old.yaml"), renamed).unwrap();
    let o = tessera(&[
        "analyse",
        &p("ref.csv"),
        "--model",
        &p("old.yaml"),
        "--out",
        &p("a-old"),
        "--priors",
        "flat",
    ]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let old = std::fs::read_to_string(dir.path().join("a-old/methods.md")).unwrap();
    assert!(
        old.contains("from a documented reference collection (file `ref.csv`, SHA-256"),
        "{old}"
    );
    // Cross-validation with a report folder; same seed, same bytes.
    for out in ["v1", "v2"] {
        let o = tessera(&[
            "validate",
            &p("ref.csv"),
            "--traits",
            spec,
            "--folds",
            "5",
            "--out",
            &p(out),
        ]);
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        assert!(stdout(&o).contains("5-fold cross-validation"));
        // Standard error is not a terminal here: no progress bar is drawn into it.
        assert!(
            !stderr(&o).contains("classifying held-out"),
            "{}",
            stderr(&o)
        );
    }
    for f in [
        "predictions.csv",
        "scores.csv",
        "scores_by_block.csv",
        "scores_by_traits.csv",
        "scores_by_category.csv",
        "reliability.csv",
        "calibration.svg",
        "columns.md",
        "report.md",
    ] {
        let a = std::fs::read_to_string(dir.path().join("v1").join(f)).unwrap();
        let b = std::fs::read_to_string(dir.path().join("v2").join(f)).unwrap();
        // The report quotes the command, whose output folder differs.
        let b = b.replace(&p("v2"), &p("v1"));
        assert!(a == b, "{f} differs between two runs with the same seed");
    }
    let columns = std::fs::read_to_string(dir.path().join("v1/columns.md")).unwrap();
    assert!(columns.contains("## scores_by_age.csv") && !columns.contains("(not described)"));
    let report = std::fs::read_to_string(dir.path().join("v1/report.md")).unwrap();
    assert!(report.contains("not identifications"));
    assert!(report.contains("What each call is worth"), "{report}");
    // Calls per category: every scored individual is in exactly one category, and the share
    // of females is within its own Wilson interval.
    let calls = std::fs::read_to_string(dir.path().join("v1/scores_by_category.csv")).unwrap();
    let mut r = csv::Reader::from_reader(calls.as_bytes());
    let mut called = 0;
    for row in r.records() {
        let row = row.unwrap();
        called += row[1].parse::<usize>().unwrap();
        if let (Ok(s), Ok(lo), Ok(hi)) = (
            row[3].parse::<f64>(),
            row[4].parse::<f64>(),
            row[5].parse::<f64>(),
        ) {
            assert!(
                lo <= s && s <= hi && (0.0..=1.0).contains(&lo) && hi <= 1.0,
                "{row:?}"
            );
        }
    }
    let scores = std::fs::read_to_string(dir.path().join("v1/scores.csv")).unwrap();
    let n: usize = scores
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .nth(1)
        .unwrap()
        .parse()
        .unwrap();
    assert_eq!(called, n);
    // A fixed model is checked as it stands; on the file it was fitted to, the rates are
    // resubstitution rates, and the run says so.
    let o = tessera(&["validate", &p("ref.csv"), "--model", &p("m.yaml")]);
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).contains("fixed model (not cross-validated)"));
    assert!(stdout(&o).contains("resubstitution"), "{}", stdout(&o));
    // Neither a spec nor a model: a usage error.
    assert_eq!(tessera(&["validate", &p("ref.csv")]).status.code(), Some(2));
}

#[test]
fn a_bad_spec_lists_every_problem_and_writes_nothing() {
    let dir = tempfile::tempdir().unwrap();
    let spec = dir.path().join("bad.yaml");
    std::fs::write(
        &spec,
        "name: bad\nblocks:\n  - {id: a, traits: [glabella, nosuch]}\n  - {id: b, traits: [glabella, dna_y_reads]}\n",
    )
    .unwrap();
    let out = dir.path().join("m.yaml");
    let o = tessera(&[
        "fit",
        fixture("good/tabs.tsv").to_str().unwrap(),
        "--traits",
        spec.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(4), "{}", stderr(&o));
    let e = stderr(&o);
    assert!(
        e.contains("`nosuch`") && e.contains("listed twice") && e.contains("count"),
        "{e}"
    );
    assert!(!out.exists());
}

#[test]
fn a_reference_that_cannot_support_a_threshold_says_which_grade() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("ref.csv");
    // Nobody is scored 5 on the glabella.
    let mut t = String::from("id,known_sex,glabella,mastoid\n");
    for i in 0..40 {
        let male = i % 2 == 1;
        let g = if male { 2 + i % 3 } else { 1 + i % 3 };
        t.push_str(&format!(
            "R{i},{},{g},{}\n",
            if male { "M" } else { "F" },
            1 + i % 5
        ));
    }
    std::fs::write(&f, t).unwrap();
    let spec = dir.path().join("s.yaml");
    std::fs::write(
        &spec,
        "name: t\nblocks:\n  - {id: c, traits: [glabella, mastoid]}\n",
    )
    .unwrap();
    let out = dir.path().join("m.yaml");
    let o = tessera(&[
        "fit",
        f.to_str().unwrap(),
        "--traits",
        spec.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(3), "{}", stdout(&o));
    assert!(
        stderr(&o).contains("grade 5 is never recorded"),
        "{}",
        stderr(&o)
    );
    assert!(!out.exists());
}

/// The shipped published-summary model is what `fit --from-summary` builds from its committed
/// source today (the provenance differs only by the command line), and it loads.
#[test]
fn the_shipped_published_model_is_rebuilt_from_its_summary() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("femur.yaml");
    let o = tessera(&[
        "fit",
        "--from-summary",
        fixture("../../models/femur-noussios-2019.summary.yaml")
            .to_str()
            .unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", stderr(&o));
    let rebuilt: serde_yaml::Value =
        serde_yaml::from_str(&std::fs::read_to_string(&out).unwrap()).unwrap();
    let shipped: serde_yaml::Value = serde_yaml::from_str(
        &std::fs::read_to_string(fixture("../../models/femur-noussios-2019.yaml")).unwrap(),
    )
    .unwrap();
    assert_eq!(rebuilt["blocks"], shipped["blocks"]);
    assert_eq!(rebuilt["built_from"], shipped["built_from"]);
    let model = Model::from_path(&fixture("../../models/femur-noussios-2019.yaml")).unwrap();
    assert!(model.built_from.is_some());
    // The published values, seen in Noussios et al. (2019): female head diameter 42.01 mm.
    let Block::Latent(b) = &model.blocks[0] else {
        panic!()
    };
    assert_eq!(b.mean[0][0], 42.01);
    assert!(dir.path().join("femur.estimates.csv").exists());
}

/// A bad summary: every problem at once, with its field, and nothing written.
#[test]
fn a_bad_summary_is_refused_whole_and_nothing_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let summary = dir.path().join("bad.yaml");
    std::fs::write(
        &summary,
        "name: bad
source: {citation: a paper, sample: a sample, females: 10}
blocks:
  - id: femur
    traits:
      - id: femur_head_diameter
        female: {n: 50, mean: 42, sd: -1}
        male: {n: 60, mean: 47, sd: 2.8}
      - id: glabella
        female: {shares: [0.5, 0.5, 0.5, 0, 0], n: 20}
        male: {counts: [0, 1, 5, 9, 4]}
",
    )
    .unwrap();
    let out = dir.path().join("model.yaml");
    let o = tessera(&[
        "fit",
        "--from-summary",
        summary.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(3), "{}", stderr(&o));
    let e = stderr(&o);
    for field in [
        "source.males",
        "blocks[femur].traits[femur_head_diameter].female.sd",
        "blocks[femur].traits[glabella].female.shares",
    ] {
        assert!(e.contains(field), "{field} not in {e}");
    }
    assert!(!out.exists());
    assert!(!dir.path().join("model.estimates.csv").exists());
}
