//! Observer error inside the likelihood: a scorer whose grades carry latent noise σₑ is
//! weighed correctly by a model that carries `observer_error_sd: σₑ`, and over-confidently by
//! the same model without it.
//!
//! The recorded trait is x + e with e ~ N(0, σₑ²) independent of x, so data scored with noise
//! are data simulated from the model with σₑ² added to each ordinal variance; they are
//! evaluated by that model (the term) and by the model without it. Calibration is measured by
//! the expected calibration error over ten equal bins of P(female) at prior ½,
//! ECE = Σ_b (n_b / N) |mean P_b − share female_b| (Naeini, Cooper & Hauskrecht 2015, from
//! memory).

use tessera::data::Sex;
use tessera::model::{Context, EvidenceCache, Model};
use tessera::sim::{simulate, GroupSpec, MissingSpec};

/// The cranial block of the shipped model, with or without an observer error on each trait.
fn cranium(error_sd: Option<f64>) -> Model {
    let traits = [
        ("glabella", "[-1.3, -0.45, 0.45, 1.3]", 1.05),
        ("mastoid", "[-1.3, -0.45, 0.45, 1.3]", 1.0),
        ("supraorbital_margin", "[-1.3, -0.45, 0.45, 1.3]", 0.75),
        ("mental_eminence", "[-1.3, -0.45, 0.45, 1.3]", 0.8),
        ("nuchal_crest", "[-1.3, -0.45, 0.45, 1.3]", 0.7),
    ];
    let mut text = String::from(
        "name: observer-error-check\nprovenance: invented numbers for a calibration test\nblocks:\n  - id: cranium\n    type: latent\n    traits:\n",
    );
    for (id, th, half) in traits {
        let error = error_sd
            .map(|e| format!(", observer_error_sd: {e}"))
            .unwrap_or_default();
        text.push_str(&format!(
            "      - {{id: {id}, thresholds: {th}, mean: {{female: -{half}, male: {half}}}{error}}}\n"
        ));
    }
    text.push_str("    correlation:\n");
    for i in 0..5 {
        let row: Vec<&str> = (0..5).map(|j| if i == j { "1" } else { "0.35" }).collect();
        text.push_str(&format!("      - [{}]\n", row.join(", ")));
    }
    Model::from_yaml("check.yaml", &text).unwrap()
}

/// ECE over ten equal bins; the signed over-claim Σ_b (n_b / N)(|mean P_b − ½| − |share
/// female_b − ½|)·sign, positive when the probabilities are further from ½ than the outcomes
/// (over-confidence); and, among calls at 95% or more either way, the probability they claim
/// against the share that are right.
fn calibration(model: &Model, sim: &tessera::sim::Simulated) -> (f64, f64, f64, f64) {
    let ctx = Context::new(7);
    let cache = EvidenceCache::default();
    let mut bins = vec![(0.0, 0.0, 0usize); 10];
    let (mut confident, mut confident_right, mut confident_p) = (0usize, 0usize, 0.0);
    for (ind, sex) in sim.individuals.iter().zip(&sim.true_sex) {
        let e = model.evaluate_cached(ind, &ctx, &cache);
        let p = 1.0 / (1.0 + (-e.ln_lr).exp());
        let female = f64::from(u8::from(*sex == Sex::Female));
        let b = ((p * 10.0) as usize).min(9);
        bins[b].0 += p;
        bins[b].1 += female;
        bins[b].2 += 1;
        let q = p.max(1.0 - p);
        if q >= 0.95 {
            confident += 1;
            confident_p += q;
            if (p > 0.5) == (*sex == Sex::Female) {
                confident_right += 1;
            }
        }
    }
    let n = sim.individuals.len() as f64;
    let ece = bins
        .iter()
        .filter(|b| b.2 > 0)
        .map(|(p, f, k)| (*k as f64 / n) * ((p - f) / *k as f64).abs())
        .sum();
    let overclaim = bins
        .iter()
        .filter(|b| b.2 > 0)
        .map(|(p, f, k)| {
            let (p, f) = (p / *k as f64, f / *k as f64);
            (*k as f64 / n) * ((p - 0.5).abs() - (f - 0.5).abs())
        })
        .sum();
    (
        ece,
        overclaim,
        confident_p / confident as f64,
        confident_right as f64 / confident as f64,
    )
}

#[test]
fn noisy_scoring_is_calibrated_with_the_term_and_over_confident_without() {
    let sigma = 1.0;
    let with_term = cranium(Some(sigma));
    let without = cranium(None);
    // Scores recorded by the noisy observer: the model with the noise simulates them.
    let sim = simulate(
        &with_term,
        &[GroupSpec::single(20_000, 0.5)],
        &MissingSpec::parse("").unwrap(),
        2026,
    )
    .unwrap();
    let (ece_with, over_with, said_with, right_with) = calibration(&with_term, &sim);
    let (ece_without, over_without, said_without, right_without) = calibration(&without, &sim);
    println!(
        "observer error SD {sigma}: ECE {ece_with:.4} with the term, {ece_without:.4} without; \
         over-claim {over_with:.4} with, {over_without:.4} without; \
         calls at 95% or more say {said_with:.3} and are right {right_with:.3} (with), \
         say {said_without:.3} and are right {right_without:.3} (without)"
    );
    assert!(ece_with <= 0.02, "{ece_with}");
    assert!(over_with.abs() < 0.01, "{over_with}");
    assert!(ece_without > 0.02, "{ece_without}");
    // Without the term the probabilities claim more than the outcomes bear out.
    assert!(over_without > 0.02, "{over_without}");
    assert!(said_without - right_without > 0.01);
}

#[test]
fn the_term_attenuates_the_correlation_and_keeps_the_thresholds() {
    let m = cranium(Some(0.5));
    let tessera::model::Block::Latent(b) = &m.blocks[0] else {
        panic!()
    };
    // Variance 1 + 0.25; covariance 0.35 kept, so the correlation is 0.35 / 1.25.
    assert!((b.cov[0][(0, 0)] - 1.25).abs() < 1e-12);
    let r = b.cov[0][(0, 1)] / (b.cov[0][(0, 0)] * b.cov[0][(1, 1)]).sqrt();
    assert!((r - 0.35 / 1.25).abs() < 1e-12);
    let bad = "name: x\nprovenance: p\nblocks:\n  - id: c\n    type: latent\n    traits:\n      - {id: glabella, thresholds: [-1, 0, 1, 2], mean: {female: -1, male: 1}, observer_error_sd: -0.2}\n";
    let e = Model::from_yaml("bad.yaml", bad).unwrap_err();
    assert!(
        e.to_string().contains("observer_error_sd")
            || format!("{e:?}").contains("observer_error_sd")
    );
}
