//! Time per individual of the latent-block likelihood: a block of ten traits (six ordinal,
//! four metric, within-sex correlation 0.3), every trait observed (the ordinal box is then
//! six-dimensional: Genz's randomised integration) and with half the traits missing.
//! Data are drawn outside the timed closure with a fixed seed.

use criterion::{criterion_group, criterion_main, Criterion};
use dimorph::data::{Observation, Sex};
use dimorph::model::{Context, Model};
use dimorph::sim::{draw_observations, individual};
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use std::hint::black_box;

fn ten_trait_model() -> Model {
    let ord = [
        "glabella",
        "mastoid",
        "supraorbital_margin",
        "mental_eminence",
        "nuchal_crest",
        "sciatic_notch",
    ];
    let met = [
        ("femur_head_diameter", 42.0, 47.6, 2.4, 2.8),
        ("femur_midshaft_circumference", 82.5, 90.0, 6.9, 10.0),
        ("humerus_head_diameter", 41.5, 47.5, 2.4, 2.7),
        ("canine_bl_diameter", 7.0, 7.7, 0.5, 0.55),
    ];
    let mut y = String::from("name: bench\nprovenance: \"invented parameters for a benchmark only\"\nblocks:\n  - id: ten\n    type: latent\n    traits:\n");
    for t in ord {
        y += &format!("      - {{id: {t}, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {{female: -0.8, male: 0.8}}}}\n");
    }
    for (t, mf, mm, sf, sm) in met {
        y += &format!("      - {{id: {t}, mean: {{female: {mf}, male: {mm}}}, sd: {{female: {sf}, male: {sm}}}}}\n");
    }
    y += "    correlation:\n";
    for i in 0..10 {
        let row: Vec<String> = (0..10)
            .map(|j| if i == j { "1.0".into() } else { "0.3".into() })
            .collect();
        y += &format!("      - [{}]\n", row.join(", "));
    }
    Model::from_yaml("bench", &y).expect("bench model")
}

fn bench(c: &mut Criterion) {
    let m = ten_trait_model();
    let mut rng = ChaCha8Rng::seed_from_u64(2026);
    let full: Vec<_> = (0..64)
        .map(|i| {
            individual(
                format!("b{i}"),
                draw_observations(
                    &m,
                    if i % 2 == 0 { Sex::Female } else { Sex::Male },
                    0,
                    &mut rng,
                ),
            )
        })
        .collect();
    let half: Vec<_> = full
        .iter()
        .map(|ind| {
            let mut ind = ind.clone();
            let mut k = 0;
            for o in ind.observations.iter_mut() {
                if o.is_some() {
                    if k % 2 == 1 {
                        *o = None::<Observation>;
                    }
                    k += 1;
                }
            }
            ind
        })
        .collect();
    let ctx = Context::new(1);
    c.bench_function("latent block, 10 traits observed (per individual)", |b| {
        let mut i = 0;
        b.iter(|| {
            i = (i + 1) % full.len();
            black_box(m.evaluate(&full[i], &ctx))
        })
    });
    c.bench_function(
        "latent block, 5 of 10 traits observed (per individual)",
        |b| {
            let mut i = 0;
            b.iter(|| {
                i = (i + 1) % half.len();
                black_box(m.evaluate(&half[i], &ctx))
            })
        },
    );
}

criterion_group!(benches, bench);
criterion_main!(benches);
