//! Checks of the evidence models against closed forms, published worked examples, numerical
//! integration and simulation.

use super::*;
use crate::data::{AgeAtDeath, Observation};
use crate::numeric::normal::{cdf, ln_interval, ln_pdf};
use crate::sim::{draw_observations, individual};
use proptest::prelude::*;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

fn grade(g: i32) -> Option<Observation> {
    Some(Observation::Grade { low: g, high: g })
}

fn measure(v: f64) -> Option<Observation> {
    Some(Observation::Measurement { value: v })
}

fn person(model: &Model, obs: &[(&str, Option<Observation>)]) -> crate::data::Individual {
    let mut o = vec![None; model.catalogue.len()];
    for (id, v) in obs {
        o[model.catalogue.position(id).unwrap()] = *v;
    }
    individual("X".into(), o)
}

fn block(model: &Model, id: &str) -> usize {
    model
        .blocks
        .iter()
        .position(|b| b.id() == id)
        .unwrap_or_else(|| panic!("{id}"))
}

const TWO_TRAIT_MODEL: &str = r#"
name: test
provenance: "invented numbers for a unit test of the latent block"
blocks:
  - id: mixed
    type: latent
    traits:
      - {id: glabella, thresholds: [-1.0, -0.3, 0.3, 1.0], mean: {female: -0.8, male: 0.8}}
      - {id: femur_head_diameter, mean: {female: 42.0, male: 47.5}, sd: {female: 2.4, male: 2.8}}
      - {id: mastoid, thresholds: [-1.2, -0.4, 0.4, 1.2], mean: {female: -0.6, male: 0.7}}
    correlation:
      - [1.0, 0.4, 0.3]
      - [0.4, 1.0, 0.5]
      - [0.3, 0.5, 1.0]
"#;

#[test]
fn shipped_models_load() {
    let d = Model::default_model().unwrap();
    assert_eq!(
        d.blocks.iter().map(|b| b.id()).collect::<Vec<_>>(),
        vec!["cranium", "pelvis", "postcranial", "dental", "dna"]
    );
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/models/published-equations.yaml"
    );
    let p = Model::from_path(std::path::Path::new(path)).unwrap();
    assert_eq!(p.blocks.len(), 2);
}

#[test]
fn bad_models_report_every_problem() {
    let text = r#"
name: bad
provenance: short
blocks:
  - id: a
    type: latent
    traits:
      - {id: glabella, thresholds: [0.5, 0.1, 0.9, 1.0], mean: {female: 0, male: 1}}
      - {id: femur_head_diameter, mean: {female: 42, male: 47}, sd: {female: 0, male: 2}}
      - {id: nose, mean: {female: 0, male: 1}}
    correlation: [[1, 0.2, 0], [0.3, 1, 0], [0, 0, 1]]
  - id: b
    type: latent
    traits:
      - {id: mental_eminence, thresholds: [-1, 0, 1, 2], mean: {female: 0, male: 1}}
      - {id: nuchal_crest, thresholds: [-1, 0, 1, 2], mean: {female: 0, male: 1}}
    correlation: [[1, 1.0], [1.0, 1]]
  - id: c
    type: latent
    traits:
      - {id: mastoid, thresholds: [-1, 0, 1, 2], mean: {female: 0, male: 1}}
  - id: d
    type: latent
    traits:
      - {id: mastoid, thresholds: [-1, 0, 1, 2], mean: {female: 0, male: 1}}
"#;
    let e = Model::from_yaml("bad.yaml", text).unwrap_err();
    let all = e.to_string();
    for needle in [
        "provenance",
        "strictly increasing",
        "SDs must be positive",
        "`nose`",
        "symmetric",
        "positive definite",
        "in both",
    ] {
        assert!(all.contains(needle), "missing `{needle}` in: {all}");
    }
    assert!(e.problems.len() >= 7, "{all}");
}

/// Klales, Ousley & Vollner (2012) worked examples computed by hand from the published
/// coefficients (score = 2.726 VA + 1.214 MA + 1.073 SPC − 16.312): all grades 1 → −11.299,
/// all grades 5 → 8.753; with equal training classes ln LR(F:M) = −score.
#[test]
fn pubic_equation_worked_examples() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/models/published-equations.yaml"
    );
    let m = Model::from_path(std::path::Path::new(path)).unwrap();
    let k = block(&m, "pubis");
    let ctx = Context::new(1);
    for (g, score) in [(1, -11.299), (5, 8.753)] {
        let ind = person(
            &m,
            &[
                ("ventral_arc", grade(g)),
                ("ischiopubic_ramus", grade(g)),
                ("subpubic_concavity", grade(g)),
            ],
        );
        let e = &m.evaluate(&ind, &ctx).blocks[k];
        assert_eq!(e.status, BlockStatus::Used);
        assert!((e.ln_lr + score).abs() < 1e-9, "grades {g}: {}", e.ln_lr);
    }
    // A range is not an exact input: the equation is not used.
    let ind = person(
        &m,
        &[
            ("ventral_arc", Some(Observation::Grade { low: 1, high: 2 })),
            ("ischiopubic_ramus", grade(1)),
            ("subpubic_concavity", grade(1)),
        ],
    );
    assert_eq!(
        m.evaluate(&ind, &ctx).blocks[k].status,
        BlockStatus::NoUsableEquation
    );
}

/// Training odds are removed, never double-counted: an equation on logit P(male) fitted on
/// 100 F and 300 M gives ln LR = −η + ln 3 (DESIGN §3).
#[test]
fn training_odds_are_removed() {
    let text = r#"
name: t
provenance: "invented coefficients for a unit test of the odds correction"
blocks:
  - id: e
    type: equations
    equations:
      - {name: a, inputs: [glabella], coefficients: [1.0], intercept: -3.0, predicts: male, training: {female: 100, male: 300}, source: invented}
      - {name: b, inputs: [mastoid], coefficients: [-1.0], intercept: 3.0, predicts: female, training: {female: 300, male: 100}, source: invented}
"#;
    let m = Model::from_yaml("t", text).unwrap();
    let ctx = Context::new(1);
    let e = &m
        .evaluate(&person(&m, &[("glabella", grade(2))]), &ctx)
        .blocks[0];
    assert!((e.ln_lr - (1.0 + 3f64.ln())).abs() < 1e-12);
    // The first equation lacks its input: the second (logit P(F) = 3 − 2 = 1) is used.
    let e = &m
        .evaluate(&person(&m, &[("mastoid", grade(2))]), &ctx)
        .blocks[0];
    assert!((e.ln_lr - (1.0 - 3f64.ln())).abs() < 1e-12);
    assert!(e.note.contains("b"));
}

/// One ordinal trait: ln L = ln(Φ(τ_k − μ) − Φ(τ_{k−1} − μ)) (Konigsberg & Hens 1998);
/// one measurement: the normal density.
#[test]
fn single_traits_match_closed_forms() {
    let m = Model::from_yaml("t", TWO_TRAIT_MODEL).unwrap();
    let ctx = Context::new(1);
    let e = &m
        .evaluate(&person(&m, &[("glabella", grade(2))]), &ctx)
        .blocks[0];
    let f = ln_interval(-1.0 + 0.8, -0.3 + 0.8);
    let ml = ln_interval(-1.0 - 0.8, -0.3 - 0.8);
    assert!((e.ln_l_female().unwrap() - f).abs() < 1e-14);
    assert!((e.ln_lr - (f - ml)).abs() < 1e-13);
    let e = &m
        .evaluate(&person(&m, &[("femur_head_diameter", measure(44.0))]), &ctx)
        .blocks[0];
    let lr = ln_pdf(44.0, 42.0, 2.4) - ln_pdf(44.0, 47.5, 2.8);
    assert!((e.ln_lr - lr).abs() < 1e-12);
    // A range 2-3 is the box from the lower edge of 2 to the upper edge of 3.
    let e = &m
        .evaluate(
            &person(
                &m,
                &[("glabella", Some(Observation::Grade { low: 2, high: 3 }))],
            ),
            &ctx,
        )
        .blocks[0];
    assert!((e.ln_l_female().unwrap() - ln_interval(-1.0 + 0.8, 0.3 + 0.8)).abs() < 1e-14);
}

/// Conditioning an ordinal latent on a measurement (Schur complement) against the closed
/// form: x | y ~ N(μ_x + ρ (y − μ_y)/σ_y, 1 − ρ²).
#[test]
fn ordinal_given_measurement_matches_the_conditional_normal() {
    let m = Model::from_yaml("t", TWO_TRAIT_MODEL).unwrap();
    let ctx = Context::new(1);
    let e = &m
        .evaluate(
            &person(
                &m,
                &[
                    ("glabella", grade(4)),
                    ("femur_head_diameter", measure(45.0)),
                ],
            ),
            &ctx,
        )
        .blocks[0];
    let cond = |mx: f64, my: f64, sy: f64| {
        let mean = mx + 0.4 * (45.0 - my) / sy;
        let sd = (1.0f64 - 0.16).sqrt();
        ln_pdf(45.0, my, sy) + ln_interval((0.3 - mean) / sd, (1.0 - mean) / sd)
    };
    assert!((e.ln_l_female().unwrap() - cond(-0.8, 42.0, 2.4)).abs() < 1e-12);
    assert!((e.ln_l_male().unwrap() - cond(0.8, 47.5, 2.8)).abs() < 1e-12);
}

/// Dropping a missing trait equals integrating it out: the probabilities of every grade of
/// the missing trait sum to the likelihood without it (exact 2-D routine), and the density
/// of a missing measurement integrates out (Simpson's rule over ±8 SD).
#[test]
fn dropping_a_missing_trait_equals_integrating_it_out() {
    let m = Model::from_yaml("t", TWO_TRAIT_MODEL).unwrap();
    let ctx = Context::new(1);
    let without = &m
        .evaluate(&person(&m, &[("glabella", grade(3))]), &ctx)
        .blocks[0];
    let summed: f64 = (1..=5)
        .map(|g| {
            m.evaluate(
                &person(&m, &[("glabella", grade(3)), ("mastoid", grade(g))]),
                &ctx,
            )
            .blocks[0]
                .ln_l_female()
                .unwrap()
                .exp()
        })
        .sum();
    assert!((summed.ln() - without.ln_l_female().unwrap()).abs() < 1e-12);
    // Integrate the measurement out numerically.
    let (lo, hi, n) = (42.0 - 8.0 * 2.4, 42.0 + 8.0 * 2.4, 2000);
    let h = (hi - lo) / n as f64;
    let f = |y: f64| {
        m.evaluate(
            &person(
                &m,
                &[("glabella", grade(3)), ("femur_head_diameter", measure(y))],
            ),
            &ctx,
        )
        .blocks[0]
            .ln_l_female()
            .unwrap()
            .exp()
    };
    let mut s = f(lo) + f(hi);
    for i in 1..n {
        s += f(lo + i as f64 * h) * if i % 2 == 1 { 4.0 } else { 2.0 };
    }
    let integral = s * h / 3.0;
    assert!(
        (integral.ln() - without.ln_l_female().unwrap()).abs() < 1e-8,
        "{} vs {}",
        integral.ln(),
        without.ln_l_female().unwrap()
    );
}

/// With the identity correlation a block's likelihood is the product of one-dimensional
/// probabilities, also in three and more dimensions (randomised routine).
#[test]
fn identity_correlation_gives_a_product() {
    let text = TWO_TRAIT_MODEL
        .replace("[1.0, 0.4, 0.3]", "[1.0, 0.0, 0.0]")
        .replace("[0.4, 1.0, 0.5]", "[0.0, 1.0, 0.0]")
        .replace("[0.3, 0.5, 1.0]", "[0.0, 0.0, 1.0]");
    let m = Model::from_yaml("t", &text).unwrap();
    let e = &m
        .evaluate(
            &person(
                &m,
                &[
                    ("glabella", grade(1)),
                    ("mastoid", grade(5)),
                    ("femur_head_diameter", measure(43.0)),
                ],
            ),
            &Context::new(3),
        )
        .blocks[0];
    let f = ln_interval(f64::NEG_INFINITY, -1.0 + 0.8)
        + ln_interval(1.2 + 0.6, f64::INFINITY)
        + ln_pdf(43.0, 42.0, 2.4);
    assert!((e.ln_l_female().unwrap() - f).abs() < 1e-12);
}

#[test]
fn dna_block_uses_the_beta_binomial_and_flags_misfits() {
    let m = Model::default_model().unwrap();
    let k = block(&m, "dna");
    let ctx = Context::new(1);
    let reads = |x: u64, y: u64| {
        person(
            &m,
            &[
                ("dna_x_reads", Some(Observation::Count { value: x })),
                ("dna_y_reads", Some(Observation::Count { value: y })),
            ],
        )
    };
    let female = &m.evaluate(&reads(2000, 4), &ctx).blocks[k];
    let male = &m.evaluate(&reads(1820, 180), &ctx).blocks[k];
    // Clear counts reach the ceiling (2 − ε)/ε = 199 that ε = 0.01 sets, and no further.
    let ceiling = 199.0f64.ln();
    assert!(
        (female.ln_lr - ceiling).abs() < 0.02 && (male.ln_lr + ceiling).abs() < 0.02,
        "{} {}",
        female.ln_lr,
        male.ln_lr
    );
    assert!(female.ln_lr <= ceiling && male.ln_lr >= -ceiling);
    assert!(female.note.contains("ceiling of 199"), "{}", female.note);
    // Closed form for n = 1, k = 0: BB_F = β/(α + β) = 600/602, BB_M = 1820/2000, and
    // P(k | F) = (1 − ε) BB_F + ε/2 (BB_F + BB_M).
    let (bf, bm) = (600.0f64 / 602.0, 1820.0f64 / 2000.0);
    let e = &m.evaluate(&reads(1, 0), &ctx).blocks[k];
    assert!((e.ln_l_female().unwrap() - (0.99 * bf + 0.005 * (bf + bm)).ln()).abs() < 1e-12);
    assert!((e.ln_l_male().unwrap() - (0.99 * bm + 0.005 * (bf + bm)).ln()).abs() < 1e-12);
    // Half a male fraction with many reads fits neither sex: flagged, not forced.
    let e = &m.evaluate(&reads(9550, 450), &ctx).blocks[k];
    assert_eq!(e.status, BlockStatus::Atypical);
    assert_eq!(e.ln_lr, 0.0);
}

#[test]
fn read_counts_of_any_size_give_the_beta_binomial_without_cancellation() {
    use super::dna::ln_gamma_difference;
    use statrs::function::gamma::ln_gamma;
    // Where lnΓ itself is still accurate (values ~10⁶–10⁸), the series equals the direct
    // difference of statrs' lnΓ within its rounding (~1e-16 × 10⁸).
    for &x in &[1e5, 3.7e5, 1e6, 2.5e7] {
        for &(a, b) in &[(1.0, 600.0), (2.5, 0.5), (602.0, 1.0)] {
            let direct = ln_gamma(x + a) - ln_gamma(x + b);
            let series = ln_gamma_difference(x, a, b);
            assert!(
                (direct - series).abs() < 1e-7,
                "{x} {a} {b}: {direct} vs {series}"
            );
        }
    }
    // Closed-form limit (k = 0, n → ∞): P(0 | n) = B(α, n+β)/B(α, β) → Γ(α+β)/Γ(β) · n^(−α),
    // relative error O(1/n). The default model's female Beta(2, 600), male Beta(180, 1820)
    // (see models/default.yaml).
    let m = Model::default_model().unwrap();
    let dna = m
        .blocks
        .iter()
        .find_map(|b| match b {
            Block::Dna(d) => Some(d.clone()),
            _ => None,
        })
        .unwrap();
    for &n in &[1e12_f64, 1e17, 1e18] {
        for s in 0..2 {
            let (a, b) = dna.beta[s];
            let limit = ln_gamma(a + b) - ln_gamma(b) - a * n.ln();
            let got = dna.ln_pmf(s, 0, n as u64);
            assert!(
                (got - limit).abs() < 1e-6,
                "n {n} sex {s}: {got} vs limit {limit}"
            );
        }
    }
    // Zero Y reads of 10^17: overwhelming evidence for female, never for male.
    let k = block(&m, "dna");
    let ctx = Context::new(1);
    let e = &m
        .evaluate(
            &person(
                &m,
                &[
                    (
                        "dna_x_reads",
                        Some(Observation::Count {
                            value: 100_000_000_000_000_000,
                        }),
                    ),
                    ("dna_y_reads", Some(Observation::Count { value: 0 })),
                ],
            ),
            &ctx,
        )
        .blocks[k];
    // With the contamination component the ceiling holds at any read count...
    assert!((e.ln_lr - 199.0f64.ln()).abs() < 1e-9, "{}", e.ln_lr);
    assert!(e.ln_l_female().unwrap() < 0.0 && e.ln_l_male().unwrap() < 0.0);
    // ...and without it (ε = 0) the plain beta-binomial is overwhelming, never infinite.
    let text = DEFAULT_MODEL_YAML.replace("contamination: 0.01", "contamination: 0");
    let plain = Model::from_yaml("plain.yaml", &text).unwrap();
    let ind = person(
        &plain,
        &[
            (
                "dna_x_reads",
                Some(Observation::Count {
                    value: 100_000_000_000_000_000,
                }),
            ),
            ("dna_y_reads", Some(Observation::Count { value: 0 })),
        ],
    );
    let e = &plain.evaluate(&ind, &ctx).blocks[k];
    assert!(e.ln_lr > 1000.0 && e.ln_lr.is_finite(), "{}", e.ln_lr);
}

#[test]
fn a_contamination_rate_outside_zero_to_one_is_a_model_problem() {
    for bad in ["1", "-0.1", "1.5"] {
        let text =
            DEFAULT_MODEL_YAML.replace("contamination: 0.01", &format!("contamination: {bad}"));
        let e = Model::from_yaml("bad.yaml", &text).unwrap_err();
        assert!(e.to_string().contains("contamination"), "{e}");
    }
}

#[test]
fn morphology_is_not_used_below_the_minimum_age_but_dna_is() {
    let m = Model::default_model().unwrap();
    let mut ind = person(
        &m,
        &[
            ("glabella", grade(5)),
            ("dna_x_reads", Some(Observation::Count { value: 1000 })),
            ("dna_y_reads", Some(Observation::Count { value: 95 })),
        ],
    );
    ind.age = Some(AgeAtDeath::Years {
        low: 10.0,
        high: Some(12.0),
    });
    let e = m.evaluate(&ind, &Context::new(1));
    assert_eq!(
        e.blocks[block(&m, "cranium")].status,
        BlockStatus::BelowMinimumAge
    );
    assert_eq!(e.blocks[block(&m, "dna")].status, BlockStatus::Used);
    assert!(e.estimable && e.ln_lr < 0.0);
    let empty = person(&m, &[]);
    let e = m.evaluate(&empty, &Context::new(1));
    assert!(!e.estimable);
    assert_eq!(e.ln_lr, 0.0);
}

/// Accuracy of the default model's blocks with every trait observed and equal priors, by
/// simulation: cranium about 88% (Walker 2008), pelvis about 94% (Klales et al. 2012,
/// 94.5% cross-validated). A light version runs here; the heavy one with `--ignored`.
fn block_accuracy(block_id: &str, per_sex: usize, seed: u64) -> f64 {
    let m = Model::default_model().unwrap();
    let k = block(&m, block_id);
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    // Only the sign of ln LR matters here: a coarser integration target keeps the test fast.
    let mut ctx = Context::new(seed);
    ctx.qmc.rel_error = 1e-2;
    let mut correct = 0;
    for (sex, sign) in [
        (crate::data::Sex::Female, 1.0),
        (crate::data::Sex::Male, -1.0),
    ] {
        for i in 0..per_sex {
            let obs = draw_observations(&m, sex, 1000, &mut rng);
            let ind = individual(format!("s{i}"), obs);
            let lr = m.evaluate(&ind, &ctx).blocks[k].ln_lr;
            if lr * sign > 0.0 {
                correct += 1;
            }
        }
    }
    correct as f64 / (2 * per_sex) as f64
}

#[test]
fn default_blocks_reach_the_published_accuracies_light() {
    let cr = block_accuracy("cranium", 300, 5);
    let pe = block_accuracy("pelvis", 300, 6);
    // 600 individuals: standard error about 1.3 points; tolerance about 3 SE.
    assert!((cr - 0.88).abs() < 0.04, "cranium {cr}");
    assert!((pe - 0.945).abs() < 0.03, "pelvis {pe}");
}

#[test]
#[ignore = "heavy: 8000 simulated individuals per block; run with --ignored --release"]
fn default_blocks_reach_the_published_accuracies_heavy() {
    let cr = block_accuracy("cranium", 4000, 15);
    let pe = block_accuracy("pelvis", 4000, 16);
    println!("accuracy with all traits, equal priors: cranium {cr:.4}, pelvis {pe:.4}");
    assert!((cr - 0.88).abs() < 0.015, "cranium {cr}");
    assert!((pe - 0.945).abs() < 0.015, "pelvis {pe}");
}

/// A model with the sexes' parameters swapped.
fn swapped(text: &str) -> String {
    text.replace("female:", "TMP:")
        .replace("male:", "female:")
        .replace("TMP:", "male:")
}

fn grade_strategy() -> impl Strategy<Value = Option<Observation>> {
    prop_oneof![
        Just(None),
        (1..=5i32).prop_map(grade),
        (1..=4i32).prop_map(|g| Some(Observation::Grade {
            low: g,
            high: g + 1
        }))
    ]
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// Swapping the sexes' parameters flips the sign of ln LR (exactly for the exact
    /// routines; within the error estimates for the randomised one).
    #[test]
    fn swapping_the_sexes_flips_the_sign(g in grade_strategy(), mst in grade_strategy(), y in prop::option::of(35.0f64..55.0)) {
        let m = Model::from_yaml("t", TWO_TRAIT_MODEL).unwrap();
        let w = Model::from_yaml("t", &swapped(TWO_TRAIT_MODEL)).unwrap();
        let obs = [("glabella", g), ("mastoid", mst), ("femur_head_diameter", y.and_then(measure))];
        let ctx = Context::new(9);
        let a = &m.evaluate(&person(&m, &obs), &ctx).blocks[0];
        let b = &w.evaluate(&person(&w, &obs), &ctx).blocks[0];
        prop_assert!((a.ln_lr + b.ln_lr).abs() <= a.error + b.error + 1e-9, "{} vs {}", a.ln_lr, b.ln_lr);
    }

    /// Under the default model (male latent means higher), raising one robusticity grade
    /// never makes "female" more likely.
    #[test]
    fn raising_a_grade_never_favours_female(gs in prop::collection::vec(1..=5i32, 5), which in 0usize..5) {
        let m = Model::default_model().unwrap();
        let ids = ["glabella", "mastoid", "supraorbital_margin", "mental_eminence", "nuchal_crest"];
        prop_assume!(gs[which] < 5);
        let obs: Vec<_> = ids.iter().zip(&gs).map(|(i, g)| (*i, grade(*g))).collect();
        let mut raised = obs.clone();
        raised[which].1 = grade(gs[which] + 1);
        let ctx = Context::new(4);
        let k = block(&m, "cranium");
        let a = &m.evaluate(&person(&m, &obs), &ctx).blocks[k];
        let b = &m.evaluate(&person(&m, &raised), &ctx).blocks[k];
        prop_assert!(b.ln_lr <= a.ln_lr + a.error + b.error, "{} -> {}", a.ln_lr, b.ln_lr);
    }
}

#[test]
fn seeds_depend_on_the_individual_not_the_row() {
    let ctx = Context::new(5);
    assert_eq!(
        ctx.seed_for("A", "cranium", crate::data::Sex::Female),
        Context::new(5).seed_for("A", "cranium", crate::data::Sex::Female)
    );
    assert_ne!(
        ctx.seed_for("A", "cranium", crate::data::Sex::Female),
        ctx.seed_for("A", "cranium", crate::data::Sex::Male)
    );
    assert_ne!(
        ctx.seed_for("A", "cranium", crate::data::Sex::Female),
        Context::new(6).seed_for("A", "cranium", crate::data::Sex::Female)
    );
    let _ = cdf(0.0);
}

#[test]
fn recorded_evidence_that_the_model_leaves_out_is_named() {
    use crate::data::read_assemblage_text;
    // The default model without its DNA block: the read counts are recorded but unused.
    let text = crate::model::DEFAULT_MODEL_YAML;
    let start = text.find("  - id: dna\n").unwrap();
    let last = "contamination: 0.01\n";
    let end = start + text[start..].find(last).unwrap() + last.len();
    let without = format!("{}{}", &text[..start], &text[end..]);
    let m = Model::from_yaml("no-dna.yaml", &without).unwrap();
    let table = "id,glabella,dna_x_reads,dna_y_reads\nA,3,1000,2\nB,4,,\n";
    let a =
        read_assemblage_text("t.csv", table.as_bytes(), &m.catalogue, &Default::default()).unwrap();
    let w = m.unused_evidence(&a);
    assert_eq!(w.len(), 2, "{w:?}");
    assert!(
        w[0].contains("`dna_x_reads` is recorded for 1 individual but"),
        "{}",
        w[0]
    );
    // The full model uses everything recorded.
    let full = Model::default_model().unwrap();
    let a = read_assemblage_text(
        "t.csv",
        table.as_bytes(),
        &full.catalogue,
        &Default::default(),
    )
    .unwrap();
    assert!(full.unused_evidence(&a).is_empty());
}

/// The X:autosome block of models/dna-reads.yaml against scipy.stats.betabinom with the
/// contamination mixture (tests/reference/dna_x.py): 1e-9 on libraries up to ~10⁵ reads, 1e-6
/// at 10⁸ (where scipy's own sum of log-beta terms of size 10⁷ rounds at ~1e-8).
#[test]
fn the_x_autosome_block_equals_scipy_s_beta_binomial() {
    let m = Model::from_path(std::path::Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/models/dna-reads.yaml"
    )))
    .unwrap();
    let x = m
        .blocks
        .iter()
        .find_map(|b| match b {
            Block::DnaX(d) => Some(d.clone()),
            _ => None,
        })
        .unwrap();
    let text = include_str!("../../tests/reference/fixtures/dna_x_expected.csv");
    let mut checked = 0;
    for line in text.lines().skip(1) {
        let f: Vec<&str> = line.split(',').collect();
        let (k, a): (u64, u64) = (f[0].parse().unwrap(), f[1].parse().unwrap());
        let expected: f64 = f[3].parse().unwrap();
        let got = x.ln_likelihoods(k, k + a)[usize::from(f[2] == "male")];
        let tol = if k + a > 1_000_000 { 1e-6 } else { 1e-9 };
        assert!((got - expected).abs() < tol, "{line}: {got}");
        checked += 1;
    }
    assert_eq!(checked, 10);
    // XY has half the X dosage: p_M = p_F / (2 − p_F), and Rx is 1 and 0.5 at the two shares.
    let p = x.x_share;
    let male = x.beta[1].0 / (x.beta[1].0 + x.beta[1].1);
    assert!((male - p / (2.0 - p)).abs() < 1e-15);
    assert!((x.rx(511, 10_000 - 511) - 1.0).abs() < 1e-12);
    let km = (10_000.0 * male).round() as u64;
    assert!((x.rx(km, 10_000 - km) - 0.5).abs() < 0.01);
}

/// The two ratios of one library: X alone where there is no Y count; not counted again
/// beside a Y fraction that agrees; flagged (neither used) where they disagree or where the Y
/// fraction fits neither sex; both counted when the model says so.
#[test]
fn the_x_autosome_ratio_beside_the_y_fraction() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/models/dna-reads.yaml");
    let m = Model::from_path(std::path::Path::new(path)).unwrap();
    let (kx, ky) = (block(&m, "dna_x"), block(&m, "dna"));
    let ctx = Context::new(1);
    let reads = |m: &Model, x: u64, y: Option<u64>, a: u64| {
        let mut obs = vec![
            ("dna_x_reads", Some(Observation::Count { value: x })),
            ("dna_autosome_reads", Some(Observation::Count { value: a })),
        ];
        if let Some(y) = y {
            obs.push(("dna_y_reads", Some(Observation::Count { value: y })));
        }
        m.evaluate(&person(m, &obs), &ctx)
    };
    // XY without Y counts: Rx ~0.5 is used alone.
    let e = reads(&m, 2600, None, 99_500);
    assert_eq!(e.blocks[kx].status, BlockStatus::Used);
    assert!(e.ln_lr < -5.0 && e.blocks[ky].status == BlockStatus::NoEvidence);
    // XY with a male Y fraction: the Y fraction alone counts.
    let e = reads(&m, 2600, Some(231), 99_500);
    assert_eq!(e.blocks[kx].status, BlockStatus::CountedElsewhere);
    assert_eq!(e.ln_lr, e.blocks[ky].ln_lr);
    // X0-like: no Y reads but half the X dosage: flagged, neither used.
    let e = reads(&m, 2550, Some(3), 99_100);
    assert_eq!(e.blocks[kx].status, BlockStatus::Atypical);
    assert_eq!(e.blocks[ky].status, BlockStatus::Atypical);
    assert!(!e.estimable);
    // XXY-like: a Y fraction between the sexes and an XX-like Rx: not used alone.
    let e = reads(&m, 5150, Some(240), 98_500);
    assert_eq!(e.blocks[kx].status, BlockStatus::Atypical);
    assert!(!e.estimable);
    // Counted as independent when the model says so: the two ln LRs add.
    let text = std::fs::read_to_string(path).unwrap().replace(
        "beside_y_ratio: not-counted",
        "beside_y_ratio: counted-as-independent",
    );
    let both = Model::from_yaml_in(
        "both.yaml",
        &text,
        Some(std::path::Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/models"
        ))),
    )
    .unwrap();
    let e = reads(&both, 2600, Some(231), 99_500);
    assert_eq!(e.blocks[kx].status, BlockStatus::Used);
    assert!((e.ln_lr - e.blocks[kx].ln_lr - e.blocks[ky].ln_lr).abs() < 1e-12);
}

/// Libraries simulated from models/dna-reads.yaml (the X:autosome block and the default's
/// Y fraction, one contamination source per library): Rx centres on 1 for XX and 0.5 for XY
/// (Mittnik et al. 2016), the Y fraction carries the evidence, and only contaminated
/// libraries are misread.
#[test]
fn simulated_libraries_give_rx_near_one_and_one_half() {
    use crate::sim::{simulate, GroupSpec, MissingSpec};
    let m = Model::from_path(std::path::Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/models/dna-reads.yaml"
    )))
    .unwrap();
    let Some(Block::DnaX(x)) = m.blocks.iter().find(|b| matches!(b, Block::DnaX(_))) else {
        panic!()
    };
    let sim = simulate(
        &m,
        &[GroupSpec::single(2000, 0.5)],
        &MissingSpec::parse("dna=1").unwrap(),
        3,
    )
    .unwrap();
    let ctx = Context::new(1);
    let mut rx = [Vec::new(), Vec::new()];
    let mut wrong = 0;
    for (ind, sex) in sim.individuals.iter().zip(&sim.true_sex) {
        let count = |id: &str| match ind.observations[m.catalogue.position(id).unwrap()] {
            Some(Observation::Count { value }) => value,
            _ => panic!("{id}"),
        };
        let s = usize::from(*sex == crate::data::Sex::Male);
        rx[s].push(x.rx(count("dna_x_reads"), count("dna_autosome_reads")));
        let e = m.evaluate(ind, &ctx);
        if e.estimable && (e.ln_lr > 0.0) != (s == 0) {
            wrong += 1;
        }
    }
    let mean = |v: &Vec<f64>| v.iter().sum::<f64>() / v.len() as f64;
    println!(
        "mean Rx: XX {:.4}, XY {:.4}; misread {wrong}",
        mean(&rx[0]),
        mean(&rx[1])
    );
    assert!((mean(&rx[0]) - 1.0).abs() < 0.01);
    assert!((mean(&rx[1]) - 0.5).abs() < 0.01);
    // ε = 0.01: about 1% of libraries are someone else's, half of them of the other sex.
    assert!(wrong <= 25, "{wrong}");
}
