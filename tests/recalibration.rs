//! Metric recalibration checked against exact enumeration and by simulation.
//! Heavy version: `cargo test --release --test recalibration -- --ignored --nocapture`.

use statrs::distribution::{Continuous, MultivariateNormal};
use tessera::assemblage::recalibration::{recalibrate, RecalibrationSettings};
use tessera::data::{Observation, Sex};
use tessera::likelihood::evaluate_assemblage;
use tessera::model::{Block, Context, Model};
use tessera::prior::{shipped_priors, Prior};
use tessera::sim::{simulate, GroupSpec, MissingSpec};

const ONE_TRAIT: &str = "name: toy\nprovenance: invented numbers for a unit test of recalibration\nblocks:\n  - {id: femur, type: latent, traits: [{id: femur_head_diameter, mean: {female: 42.0, male: 47.5}, sd: {female: 2.4, male: 2.8}}]}\n";

/// Two individuals, one measurement each, π fixed at 0.5, the sexes' means unknown with prior
/// N(reference, (shift·σ)²). Exactly: for each assignment of sexes the measurements of one sex
/// are jointly normal with covariance σ²I + τ²11ᵀ; P(s₁ = F | y) sums over the four assignments.
#[test]
fn gibbs_agrees_with_exact_enumeration_for_two_individuals() {
    let model = Model::from_yaml("toy", ONE_TRAIT).unwrap();
    let y = [44.5, 46.0];
    let fh = model.catalogue.position("femur_head_diameter").unwrap();
    let inds: Vec<_> = y
        .iter()
        .enumerate()
        .map(|(i, &v)| {
            let mut o = vec![None; model.catalogue.len()];
            o[fh] = Some(Observation::Measurement { value: v });
            tessera::sim::individual(format!("T{i}"), o)
        })
        .collect();
    let a = tessera::data::Assemblage {
        file: "toy".into(),
        format: tessera::data::TableFormat::Text,
        delimiter: Some(','),
        decimal_comma: false,
        sha256: String::new(),
        catalogue: model.catalogue.clone(),
        trait_columns: vec![true; model.catalogue.len()],
        carried_columns: vec![],
        individuals: inds.clone(),
        warnings: vec![],
        settings: Default::default(),
    };
    let ev = evaluate_assemblage(&model, &a, &Context::new(1));
    let settings = RecalibrationSettings {
        iterations: 40_000,
        burn_in: 1_000,
        ..RecalibrationSettings::default()
    };
    let r = recalibrate(
        &model,
        &inds,
        &ev,
        &Prior::fixed(0.5).unwrap(),
        &settings,
        &tessera::progress::Silent,
    );
    // Exact.
    let group_density = |members: &[f64], mu: f64, sd: f64| -> f64 {
        let k = members.len();
        if k == 0 {
            return 1.0;
        }
        let tau2 = sd * sd; // shift 1 × σ
        let cov: Vec<f64> = (0..k * k)
            .map(|c| if c / k == c % k { sd * sd + tau2 } else { tau2 })
            .collect();
        MultivariateNormal::new(vec![mu; k], cov)
            .unwrap()
            .pdf(&nalgebra::DVector::from_vec(members.to_vec()))
    };
    let joint = |s1: bool, s2: bool| {
        let f: Vec<f64> = [(s1, y[0]), (s2, y[1])]
            .iter()
            .filter(|x| x.0)
            .map(|x| x.1)
            .collect();
        let m: Vec<f64> = [(s1, y[0]), (s2, y[1])]
            .iter()
            .filter(|x| !x.0)
            .map(|x| x.1)
            .collect();
        group_density(&f, 42.0, 2.4) * group_density(&m, 47.5, 2.8)
    };
    let total = joint(true, true) + joint(true, false) + joint(false, true) + joint(false, false);
    let exact1 = (joint(true, true) + joint(true, false)) / total;
    let exact2 = (joint(true, true) + joint(false, true)) / total;
    let (g1, g2) = (r.p_female[0].unwrap(), r.p_female[1].unwrap());
    println!("P(F): individual 1 exact {exact1:.4} Gibbs {g1:.4}; individual 2 exact {exact2:.4} Gibbs {g2:.4}");
    assert!((g1 - exact1).abs() < 0.01 && (g2 - exact2).abs() < 0.01);
}

fn shifted(model: &Model, by_sd: f64) -> Model {
    let mut m = model.clone();
    for b in &mut m.blocks {
        if let Block::Latent(lb) = b {
            if lb.id == "postcranial" {
                for s in 0..2 {
                    for j in 0..lb.traits.len() {
                        let sd = lb.cov[s][(j, j)].sqrt();
                        lb.mean[s][j] += by_sd * sd;
                    }
                }
            }
        }
    }
    m
}

/// One simulated cemetery whose postcranial means lie `by_sd` SDs above the reference: returns
/// (coverage of the six postcranial means, metric-only individuals, and how many of them are
/// misclassified before recalibration, after it, and under the true model — the floor no
/// method can beat).
fn one_cemetery(
    by_sd: f64,
    seed: u64,
    n: usize,
    settings: &RecalibrationSettings,
) -> (usize, usize, usize, usize, usize) {
    let reference = Model::default_model().unwrap();
    let truth = shifted(&reference, by_sd);
    let missing =
        MissingSpec::parse("cranium=0.5,pelvis=0.4,postcranial=0.1,dental=0.6,trait=0.1").unwrap();
    let sim = simulate(&truth, &[GroupSpec::single(n, 0.5)], &missing, seed).unwrap();
    let a = tessera::data::Assemblage {
        file: "sim".into(),
        format: tessera::data::TableFormat::Text,
        delimiter: Some(','),
        decimal_comma: false,
        sha256: String::new(),
        catalogue: reference.catalogue.clone(),
        trait_columns: vec![true; reference.catalogue.len()],
        carried_columns: vec![],
        individuals: sim.individuals.clone(),
        warnings: vec![],
        settings: Default::default(),
    };
    let ev = evaluate_assemblage(&reference, &a, &Context::new(seed));
    let flat = shipped_priors().unwrap()[0].clone();
    let before = tessera::assemblage::under_prior(&ev, None, &flat, &Default::default()).0;
    let ev_true = evaluate_assemblage(&truth, &a, &Context::new(seed));
    let oracle = tessera::assemblage::under_prior(&ev_true, None, &flat, &Default::default()).0;
    let r = recalibrate(
        &reference,
        &sim.individuals,
        &ev,
        &flat,
        &RecalibrationSettings { seed, ..*settings },
        &tessera::progress::Silent,
    );
    // Coverage of the true postcranial means.
    let Block::Latent(tb) = truth
        .blocks
        .iter()
        .find(|b| b.id() == "postcranial")
        .unwrap()
    else {
        unreachable!()
    };
    let mut covered = 0;
    for m in &r.means {
        let Some(j) = tb.traits.iter().position(|t| t.id == m.trait_id) else {
            continue; // the dental block is recalibrated too, but was not shifted
        };
        let s = if m.sex == "F" { 0 } else { 1 };
        if m.lo <= tb.mean[s][j] && tb.mean[s][j] <= m.hi {
            covered += 1;
        }
    }
    // Metric-only individuals: only the postcranial (or dental) block used.
    let (mut wrong_before, mut wrong_after, mut wrong_true, mut metric_only) = (0, 0, 0, 0);
    for (i, e) in ev.iter().enumerate() {
        let used: Vec<&str> = reference
            .blocks
            .iter()
            .zip(&e.blocks)
            .filter(|(_, b)| b.status == tessera::model::BlockStatus::Used)
            .map(|(bl, _)| bl.id())
            .collect();
        if used.is_empty() || used.iter().any(|u| !matches!(*u, "postcranial" | "dental")) {
            continue;
        }
        metric_only += 1;
        let female = sim.true_sex[i] == Sex::Female;
        if (before.p_female[i].unwrap() > 0.5) != female {
            wrong_before += 1;
        }
        if (r.p_female[i].unwrap() > 0.5) != female {
            wrong_after += 1;
        }
        if (oracle.p_female[i].unwrap() > 0.5) != female {
            wrong_true += 1;
        }
    }
    (covered, metric_only, wrong_before, wrong_after, wrong_true)
}

#[test]
fn a_shifted_cemetery_is_recalibrated_light() {
    let st = RecalibrationSettings {
        iterations: 1200,
        burn_in: 300,
        ..RecalibrationSettings::default()
    };
    let (covered, metric_only, before, after, floor) = one_cemetery(1.0, 3, 400, &st);
    println!("covered {covered}/6; metric-only {metric_only}: misclassified before {before}, after {after}, under the true model {floor}");
    assert!(covered >= 5);
    // The misclassification the shift causes (beyond the true model's) is at least halved.
    assert!(
        metric_only > 30 && (after as f64 - floor as f64) <= 0.5 * (before as f64 - floor as f64),
        "before {before}, after {after}, floor {floor}"
    );
    // No shift: recalibration changes nothing beyond noise.
    let (covered, _, before, after, _) = one_cemetery(0.0, 4, 400, &st);
    assert!(covered >= 5);
    assert!(
        (after as i64 - before as i64).abs() <= 3 + before as i64 / 4,
        "before {before}, after {after}"
    );
}

#[test]
#[ignore = "heavy: 200 simulated cemeteries; run with --release --ignored --nocapture"]
fn a_shifted_cemetery_is_recalibrated_heavy() {
    let st = RecalibrationSettings::default();
    let (mut cov, mut tot, mut n, mut before, mut after, mut floor) = (0, 0, 0, 0, 0, 0);
    for k in 0..200 {
        let (c, m, b, a, f) = one_cemetery(1.0, 100 + k, 300, &st);
        cov += c;
        tot += 6;
        n += m;
        before += b;
        after += a;
        floor += f;
    }
    let (mut b0, mut a0, mut n0) = (0, 0, 0);
    for k in 0..30 {
        let (_, m, b, a, _) = one_cemetery(0.0, 1000 + k, 300, &st);
        n0 += m;
        b0 += b;
        a0 += a;
    }
    println!(
        "shift of 1 SD, 200 cemeteries: 95% intervals cover the true means {cov}/{tot} = {:.1}%",
        100.0 * cov as f64 / tot as f64
    );
    println!("metric-only individuals {n}: misclassified {before} before, {after} after recalibration, {floor} under the true model");
    println!("no shift, 30 cemeteries: metric-only {n0}: misclassified {b0} before, {a0} after");
    assert!(cov as f64 >= 0.9 * tot as f64);
    assert!((after as f64 - floor as f64) <= 0.5 * (before as f64 - floor as f64));
}
