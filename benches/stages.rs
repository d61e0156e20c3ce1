//! Each stage of an analysis at 10², 10³, 10⁴ and 10⁵ individuals (criterion,
//! `cargo bench --bench stages`; TESSERA_BENCH_SIZES=100,1000 to choose sizes): the evidence
//! ledger, the single-assemblage posterior under the default sensitivity set, the same with
//! three groups, and 1000 joint draws. Assemblages are simulated from the default model with
//! typical fragmentation and a fixed seed outside the timed closures.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use std::hint::black_box;
use std::time::Duration;
use tessera::assemblage::draws::Draws;
use tessera::assemblage::{analyse, Thresholds};
use tessera::data::{Assemblage, TableFormat};
use tessera::likelihood::evaluate_assemblage;
use tessera::model::{Context, Model};
use tessera::prior::parse_prior_set;
use tessera::sim::{simulate, GroupSpec, MissingSpec};

fn sizes() -> Vec<usize> {
    std::env::var("TESSERA_BENCH_SIZES")
        .ok()
        .map(|s| s.split(',').filter_map(|x| x.trim().parse().ok()).collect())
        .unwrap_or_else(|| vec![100, 1_000, 10_000, 100_000])
}

fn assemblage(model: &Model, n: usize) -> Assemblage {
    let (a, b) = (n * 4 / 10, n * 3 / 10);
    let groups = vec![
        GroupSpec {
            name: "north".into(),
            n: a,
            pi: 0.5,
        },
        GroupSpec {
            name: "south".into(),
            n: b,
            pi: 0.4,
        },
        GroupSpec {
            name: "chapel".into(),
            n: n - a - b,
            pi: 0.3,
        },
    ];
    let sim = simulate(model, &groups, &MissingSpec::fragmentary(), 7).expect("simulate");
    Assemblage {
        file: "simulated".into(),
        format: TableFormat::Text,
        delimiter: Some(','),
        decimal_comma: false,
        sha256: String::new(),
        catalogue: model.catalogue.clone(),
        trait_columns: vec![true; model.catalogue.len()],
        carried_columns: Vec::new(),
        individuals: sim.individuals,
        warnings: Vec::new(),
        settings: Default::default(),
    }
}

fn bench(c: &mut Criterion) {
    let model = Model::default_model().expect("default model");
    let set = parse_prior_set("shipped,sweep").expect("prior set");
    let flat = set[0].clone();
    let thresholds = Thresholds::default();
    let mut g = c.benchmark_group("stages");
    g.sample_size(10)
        .warm_up_time(Duration::from_millis(500))
        .measurement_time(Duration::from_secs(5));
    for n in sizes() {
        let a = assemblage(&model, n);
        let ctx = Context::new(1);
        g.bench_with_input(BenchmarkId::new("evidence ledger", n), &a, |b, a| {
            b.iter(|| black_box(evaluate_assemblage(&model, a, &ctx)))
        });
        let evidence = evaluate_assemblage(&model, &a, &ctx);
        // The same grouping rule as an analysis (rows without a group share one label).
        let groups: Vec<String> = tessera::pipeline::group_labels(&a)
            .expect("group names")
            .expect("the simulated rows have groups");
        g.bench_with_input(
            BenchmarkId::new("posterior, 16 priors", n),
            &evidence,
            |b, e| b.iter(|| black_box(analyse(e, None, &flat, &set, &thresholds))),
        );
        g.bench_with_input(
            BenchmarkId::new("posterior with 3 groups, 16 priors", n),
            &evidence,
            |b, e| b.iter(|| black_box(analyse(e, Some(&groups), &flat, &set, &thresholds))),
        );
        let fitted = analyse(&evidence, Some(&groups), &flat, &set, &thresholds).fitted;
        g.bench_with_input(BenchmarkId::new("1000 joint draws", n), &fitted, |b, f| {
            b.iter(|| {
                black_box(Draws::sample(
                    &f.posterior,
                    f.hierarchy.as_ref(),
                    &f.ln_lrs,
                    1000,
                    1,
                ))
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
