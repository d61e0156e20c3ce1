//! Time per individual of the latent-block likelihood: a block of ten traits (six ordinal,
//! four metric, within-sex correlation 0.3), every trait observed (the ordinal box is then
//! six-dimensional: Genz's randomised integration) and with half the traits missing.
//! Data are drawn outside the timed closure with a fixed seed.

use criterion::{criterion_group, criterion_main, Criterion};
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;
use std::hint::black_box;
use tessera::data::{Observation, Sex};
use tessera::model::Context;
use tessera::sim::{draw_observations, individual};

#[path = "support.rs"]
mod support;
use support::ten_trait_model;

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
            let mut dense = ind.observations.to_dense();
            let mut k = 0;
            for o in dense.iter_mut() {
                if o.is_some() {
                    if k % 2 == 1 {
                        *o = None::<Observation>;
                    }
                    k += 1;
                }
            }
            ind.observations = dense.into();
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
