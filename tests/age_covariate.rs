//! Age as a covariate of the latent means (blocks with `age_slope: true` in `fit`, `age:` and
//! `age_slope` in a model).
//!
//! Checked against the world: the fit against statsmodels' OrderedModel and OLS on the same
//! data (tests/reference/age_probit.py, statsmodels 0.15.0, fixtures committed); the
//! likelihood averaged over an age interval against its closed form; and, on seeded
//! simulations with a known slope, the slope recovered within its standard error and old
//! women's posteriors corrected.

mod common;
use std::collections::BTreeMap;
use tessera::data::{AgeAtDeath, Individual, Observation, Sex};
use tessera::fit::{fit, FitSpec, ReferenceInfo};
use tessera::model::evidence::Context;
use tessera::model::{Block, Model};
use tessera::sim::{simulate, GroupSpec, MissingSpec};

fn info() -> ReferenceInfo {
    ReferenceInfo {
        file: "simulated".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    }
}

fn person(
    id: usize,
    trait_index: usize,
    catalogue_len: usize,
    age: f64,
    obs: Observation,
) -> Individual {
    let mut observations = vec![None; catalogue_len];
    observations[trait_index] = Some(obs);
    Individual {
        id: format!("R{id}"),
        row: id + 1,
        group: None,
        age: Some(AgeAtDeath::Years {
            low: age,
            high: Some(age),
        }),
        known_sex: None,
        observations: observations.into(),
        carried: Vec::new(),
    }
}

/// The fixture's cases as reference individuals of the default catalogue: the five-grade
/// cases as glabella, the three-grade as Phenice's ventral arc, the measurement as the
/// femoral head diameter.
#[test]
fn age_slopes_equal_statsmodels_ordered_probit_and_least_squares() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let model = Model::default_model().unwrap();
    let cat = &model.catalogue;
    let mut cases: BTreeMap<String, Vec<(Individual, Sex)>> = BTreeMap::new();
    let mut r = csv::Reader::from_path(format!("{dir}age_probit_data.csv")).unwrap();
    for (i, row) in r.records().enumerate() {
        let row = row.unwrap();
        let k: usize = row[1].parse().unwrap();
        let sex = if &row[2] == "1" {
            Sex::Male
        } else {
            Sex::Female
        };
        let age: f64 = row[3].parse().unwrap();
        let (id, obs) = match k {
            0 => (
                "femur_head_diameter",
                Observation::Measurement {
                    value: row[4].parse().unwrap(),
                },
            ),
            5 | 3 => {
                let g: i32 = row[4].parse().unwrap();
                (
                    if k == 5 {
                        "glabella"
                    } else {
                        "phenice_ventral_arc"
                    },
                    Observation::Grade { low: g, high: g },
                )
            }
            _ => panic!("{k}"),
        };
        let ind = person(i, cat.position(id).unwrap(), cat.len(), age, obs);
        cases
            .entry(row[0].to_string())
            .or_default()
            .push((ind, sex));
    }
    let mut r = csv::Reader::from_path(format!("{dir}age_probit_expected.csv")).unwrap();
    let mut expected: BTreeMap<(String, String), f64> = BTreeMap::new();
    for row in r.records() {
        let row = row.unwrap();
        expected.insert(
            (row[0].to_string(), row[1].to_string()),
            row[2].parse().unwrap(),
        );
    }
    let mut worst: f64 = 0.0;
    let mut checked = 0;
    for (case, people) in &cases {
        let t = if case.starts_with("metric") {
            "femur_head_diameter"
        } else if case.contains("three") {
            "phenice_ventral_arc"
        } else {
            "glabella"
        };
        let spec = FitSpec::from_yaml(&format!(
            "name: t\ninclude: []\nblocks:\n  - {{id: b, traits: [{t}], age_slope: true, age_centre: 50}}\n"
        ))
        .unwrap();
        let refs: Vec<(&Individual, Sex)> = people.iter().map(|(i, s)| (i, *s)).collect();
        let fitted = fit(&spec, cat, &refs, &info()).unwrap();
        let est = |parameter: &str| {
            let e = fitted
                .estimates
                .iter()
                .find(|e| e.parameter == parameter)
                .unwrap_or_else(|| panic!("{case}: no {parameter}"));
            (e.estimate, e.se)
        };
        for ((c, quantity), want) in expected.iter().filter(|((c, _), _)| c == case) {
            let (name, se) = match quantity.strip_suffix("_se") {
                Some(q) => (q, true),
                None => (quantity.as_str(), false),
            };
            let (estimate, its_se) = match name {
                "shift" => est("male - female latent mean"),
                "slope_female" => est("age slope female"),
                "slope_male" => est("age slope male"),
                "mean_female" => est("mean female at age 50"),
                "mean_male" => est("mean male at age 50"),
                "sd_female" => est("sd female"),
                "sd_male" => est("sd male"),
                q => {
                    // Both scales start at grade 1: threshold_j lies between grades j and j + 1.
                    let j: usize = q.trim_start_matches("threshold_").parse().unwrap();
                    est(&format!("threshold {j}|{}", j + 1))
                }
            };
            let got = if se { its_se } else { estimate };
            // statsmodels' standard errors come from a numerical Hessian: relative 1e-3
            // (as tests/reference_fit.rs); estimates: its score stops below 1e-6, so 1e-4.
            let tol = if se { 1e-3 * want.abs() } else { 1e-4 };
            let d = (got - want).abs();
            assert!(d < tol, "{c} {quantity}: tessera {got} reference {want}");
            if !se {
                worst = worst.max(d);
            }
            checked += 1;
        }
    }
    assert_eq!(checked, 10 + 8 + 10, "rows checked");
    println!("largest difference from statsmodels (estimates): {worst:.2e}");
}

const AGE_MODEL: &str = "name: age-test
provenance: invented numbers for a test of age as a covariate
blocks:
  - id: b
    type: latent
    age: {centre: 50, lowest: 20, highest: 80}
    traits:
      - {id: femur_head_diameter, mean: {female: 42.0, male: 47.0}, sd: {female: 2.5, male: 2.8}, age_slope: {female: 0.05, male: 0.01}}
      - {id: glabella, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {female: -1.0, male: 1.0}, age_slope: {female: 0.03, male: -0.01}}
";

fn one(model: &Model, trait_id: &str, obs: Observation, age: Option<AgeAtDeath>) -> [f64; 2] {
    let cat = &model.catalogue;
    let mut ind = person(0, cat.position(trait_id).unwrap(), cat.len(), 0.0, obs);
    ind.age = age;
    let e = model.evaluate(&ind, &Context::new(1));
    [
        e.blocks[0].ln_l_female().unwrap(),
        e.blocks[0].ln_l_male().unwrap(),
    ]
}

/// The likelihood averaged over an age interval, against its closed form evaluated with
/// mpmath at 40 digits (tests/reference/age_interval.py; the formulas are there): a
/// measurement and an ordinal grade, each sex, four intervals. The recorded ages that give
/// each interval within the reference's 20–80 years are listed beside it.
#[test]
fn the_likelihood_over_an_age_interval_equals_its_closed_form() {
    use statrs::distribution::{Continuous, Normal};
    let model = Model::from_yaml("age-test.yaml", AGE_MODEL).unwrap();
    let years = |low: f64, high: Option<f64>| Some(AgeAtDeath::Years { low, high });
    let recorded = |low: &str, high: &str| -> Vec<Option<AgeAtDeath>> {
        match (low, high) {
            ("40", "60") => vec![years(40.0, Some(60.0))],
            ("50", "80") => vec![years(50.0, None), years(50.0, Some(95.0))],
            ("20", "80") => vec![Some(AgeAtDeath::Adult), None, years(18.0, None)],
            ("20", "30") => vec![years(10.0, Some(30.0))],
            _ => panic!("{low}-{high}"),
        }
    };
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::Reader::from_path(format!("{dir}age_interval_expected.csv")).unwrap();
    let mut worst: f64 = 0.0;
    let mut checked = 0;
    for row in r.records() {
        let row = row.unwrap();
        let obs = match &row[0] {
            "glabella" => Observation::Grade { low: 3, high: 3 },
            _ => Observation::Measurement {
                value: row[1].parse().unwrap(),
            },
        };
        let s = usize::from(&row[2] == "male");
        let exact: f64 = row[5].parse().unwrap();
        for age in recorded(&row[3], &row[4]) {
            let got = one(&model, &row[0], obs, age)[s];
            // 8-point Gauss–Legendre on a normal density whose centre moves by at most
            // 1.2 SD over the interval: measured at most 1.9e-13 here.
            assert!(
                (got - exact).abs() < 1e-11,
                "{} {} {age:?}: {got} vs {exact}",
                &row[0],
                &row[2]
            );
            worst = worst.max((got - exact).abs());
            checked += 1;
        }
    }
    assert_eq!(checked, 4 * (1 + 2 + 3 + 1));
    // A point age is one evaluation at that age; beyond the reference's ages, at its edge.
    let n = Normal::standard();
    for (t, at) in [(35.0, 35.0), (95.0, 80.0)] {
        let got = one(
            &model,
            "femur_head_diameter",
            Observation::Measurement { value: 45.0 },
            years(t, Some(t)),
        );
        let exact = n.ln_pdf((45.0 - 42.0 - 0.05 * (at - 50.0)) / 2.5) - 2.5f64.ln();
        assert!((got[0] - exact).abs() < 1e-12);
    }
    println!("largest difference from the closed forms (ln L): {worst:.2e}");
}

/// A model without `age` refuses an `age_slope`, and a bad age range is named.
#[test]
fn age_slopes_without_ages_and_bad_ranges_are_refused() {
    let no_age = AGE_MODEL.replace("    age: {centre: 50, lowest: 20, highest: 80}\n", "");
    let e = Model::from_yaml("m.yaml", &no_age).unwrap_err().to_string();
    assert!(e.contains("age_slope needs the block's `age"), "{e}");
    let bad = AGE_MODEL.replace("centre: 50, lowest: 20", "centre: 10, lowest: 20");
    let e = Model::from_yaml("m.yaml", &bad).unwrap_err().to_string();
    assert!(e.contains("centre 10"), "{e}");
}

/// An invented cranial model whose women masculinise with age (female slopes 0.02–0.03 latent
/// SD per year, male slopes about 0; numbers for this test only).
const CRANIUM_AGEING: &str = "name: cranium-ageing
provenance: invented numbers for a test of age as a covariate
blocks:
  - id: cranium
    type: latent
    age: {centre: 50, lowest: 20, highest: 85}
    traits:
      - {id: glabella, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {female: -1.0, male: 1.0}, age_slope: {female: 0.025, male: 0.0}}
      - {id: mastoid, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {female: -0.9, male: 0.9}, age_slope: {female: 0.02, male: 0.005}}
      - {id: nuchal_crest, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {female: -0.7, male: 0.7}, age_slope: {female: 0.03, male: 0.0}}
      - {id: femur_head_diameter, mean: {female: 42.0, male: 47.5}, sd: {female: 2.4, male: 2.7}, age_slope: {female: 0.0, male: 0.0}}
    correlation:
      - [1, 0.4, 0.3, 0.1]
      - [0.4, 1, 0.3, 0.1]
      - [0.3, 0.3, 1, 0.1]
      - [0.1, 0.1, 0.1, 1]
";

fn fit_to(
    truth: &Model,
    n: usize,
    seed: u64,
    age_slope: bool,
) -> (Model, tessera::fit::FittedModel) {
    let reference = simulate(
        truth,
        &[GroupSpec::single(n, 0.5)],
        &MissingSpec::parse("trait=0.1").unwrap(),
        seed,
    )
    .unwrap();
    let refs: Vec<(&Individual, Sex)> = reference
        .individuals
        .iter()
        .zip(reference.true_sex.iter().copied())
        .collect();
    let spec = FitSpec::from_yaml(&format!(
        "name: fitted\ninclude: []\nblocks:\n  - {{id: cranium, traits: [glabella, mastoid, nuchal_crest, femur_head_diameter], age_slope: {age_slope}}}\n"
    ))
    .unwrap();
    let fitted = fit(&spec, &truth.catalogue, &refs, &info()).unwrap();
    let model = Model::from_yaml("fitted.yaml", &fitted.to_yaml().unwrap()).unwrap();
    (model, fitted)
}

/// Seeded simulation with known slopes: `fit` recovers each slope within 3.5 standard errors,
/// and on a separate simulated cemetery the model with age slopes gives old women (65 and
/// over) their sex back where the model without it calls many of them male, with a better
/// log score overall.
#[test]
fn a_known_age_slope_is_recovered_and_corrects_old_women() {
    let truth = Model::from_yaml("truth.yaml", CRANIUM_AGEING).unwrap();
    let Block::Latent(t) = &truth.blocks[0] else {
        panic!()
    };
    let t_age = t.age.as_ref().unwrap();
    let (aged, fitted) = fit_to(&truth, 3000, 51, true);
    let (flat, _) = fit_to(&truth, 3000, 51, false);
    for (j, id) in ["glabella", "mastoid", "nuchal_crest", "femur_head_diameter"]
        .iter()
        .enumerate()
    {
        for (s, word) in [(0, "female"), (1, "male")] {
            let e = fitted
                .estimates
                .iter()
                .find(|e| e.trait_id == *id && e.parameter == format!("age slope {word}"))
                .unwrap();
            let truth_slope = t_age.slope[s][j];
            assert!(
                (e.estimate - truth_slope).abs() < 3.5 * e.se,
                "{id} {word}: {} ± {} vs {truth_slope}",
                e.estimate,
                e.se
            );
        }
    }
    // A separate cemetery of the same population.
    let target = simulate(
        &truth,
        &[GroupSpec::single(3000, 0.5)],
        &MissingSpec::parse("trait=0.1").unwrap(),
        52,
    )
    .unwrap();
    let ctx = Context::new(7);
    let mut wrong_old_women = [0usize; 2];
    let mut old_women = 0;
    let mut log_score = [0.0f64; 2];
    for (ind, sex) in target.individuals.iter().zip(&target.true_sex) {
        let Some(AgeAtDeath::Years { low: age, .. }) = ind.age else {
            continue;
        };
        for (m, model) in [&aged, &flat].into_iter().enumerate() {
            let e = model.evaluate(ind, &ctx);
            if !e.estimable {
                continue;
            }
            let p_female = 1.0 / (1.0 + (-e.ln_lr).exp());
            let p_true = if *sex == Sex::Female {
                p_female
            } else {
                1.0 - p_female
            };
            log_score[m] += p_true.max(1e-300).ln();
            if *sex == Sex::Female && age >= 65.0 && p_female < 0.5 {
                wrong_old_women[m] += 1;
            }
        }
        if *sex == Sex::Female && age >= 65.0 {
            old_women += 1;
        }
    }
    println!(
        "women 65+: {old_women}; called male with age slopes {}, without {}; log score {:.1} vs {:.1}",
        wrong_old_women[0], wrong_old_women[1], log_score[0], log_score[1]
    );
    // Seed 52: 528 women of 65 and over, 49 called male with age slopes, 72 without; log
    // score −584.5 against −644.1.
    assert!(old_women > 200);
    assert!(
        (wrong_old_women[0] as f64) < 0.8 * wrong_old_women[1] as f64,
        "{wrong_old_women:?}"
    );
    assert!(log_score[0] > log_score[1]);
}

/// A case report under a model with age effects says over which ages the likelihood ratio
/// was averaged, for the reader to weigh the age estimate.
#[test]
fn a_case_report_names_the_ages_its_likelihood_ratio_covers() {
    let dir = tempfile::tempdir().unwrap();
    let model = dir.path().join("age.yaml");
    std::fs::write(&model, AGE_MODEL).unwrap();
    let table = dir.path().join("case.csv");
    std::fs::write(&table, "id,age,femur_head_diameter\nK1,40-60,45.0\n").unwrap();
    let out = dir.path().join("k1");
    let o = common::tessera(&[
        "case",
        table.to_str().unwrap(),
        "--id",
        "K1",
        "--model",
        model.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
    ]);
    assert!(o.status.success(), "{}", common::stderr(&o));
    let md = std::fs::read_to_string(out.join("case.md")).unwrap();
    assert!(md.contains("averaged over ages 40 to 60 years"), "{md}");
}
