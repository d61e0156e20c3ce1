//! tessera beside a reference implementation in Python (numpy and scipy) on the same inputs:
//! `cargo bench --bench side_by_side` (needs `target/reference-venv`, see DEVELOPERS.md, or
//! TESSERA_PYTHON pointing at a Python with the pinned packages).
//!
//! 1. The single-assemblage posterior of π under the default sensitivity set (6 shipped priors
//!    and 9 fixed values, plus the chosen flat prior) with every individual's P(female), from
//!    the ln LRs of 10⁴ simulated individuals: tessera's `assemblage::analyse` against
//!    `benches/reference/side_by_side.py`, which does the same computation vectorised in numpy.
//! 2. The latent-block likelihood (ten traits: six ordinal, four measurements) of 100
//!    simulated individuals with about 30% of traits missing, both sexes, no pattern cache:
//!    tessera's `LatentBlock::evaluate` against scipy's `multivariate_normal` (logpdf for the
//!    measurements, Genz's MVNDST `cdf` with releps = 1e-3 for the conditional ordinal box).
//!
//! 3. The group hierarchy (3 groups, flat prior on μ, log-uniform κ) against PyMC's NUTS on the
//!    same model with sex marginalised (`benches/reference/hierarchy_pymc.py`), when
//!    TESSERA_PYMC_PYTHON names a Python with pymc installed.
//!
//! Prints a Markdown table: time of each, the ratio, and the largest difference in results.
//! Inputs are written to a temporary folder outside the timed parts; times are medians.

#[path = "support.rs"]
mod support;

use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use std::fmt::Write as _;
use std::time::Instant;
use tessera::assemblage::hierarchy::Hierarchy;
use tessera::assemblage::{analyse, Thresholds};
use tessera::data::{Observation, Sex};
use tessera::likelihood::evaluate_assemblage;
use tessera::model::latent::LatentKind;
use tessera::model::{Block, Context, Model};
use tessera::prior::{parse_prior_set, PriorShape};
use tessera::sim::{draw_observations, individual, simulate, GroupSpec, MissingSpec};

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn python() -> String {
    std::env::var("TESSERA_PYTHON").unwrap_or_else(|_| {
        concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/target/reference-venv/bin/python"
        )
        .to_string()
    })
}

fn main() {
    let dir = tempfile::tempdir().expect("a temporary folder");
    // TESSERA_KEEP=FOLDER keeps the inputs and the reference's outputs there.
    let kept = std::env::var_os("TESSERA_KEEP").map(std::path::PathBuf::from);
    let d = kept.as_deref().unwrap_or(dir.path());
    std::fs::create_dir_all(d).expect("the folder");
    // ---------------------------------------------------------------- posterior inputs
    let model = Model::default_model().expect("default model");
    let groups = vec![
        GroupSpec {
            name: "north".into(),
            n: 4_000,
            pi: 0.5,
        },
        GroupSpec {
            name: "south".into(),
            n: 3_000,
            pi: 0.4,
        },
        GroupSpec {
            name: "chapel".into(),
            n: 3_000,
            pi: 0.3,
        },
    ];
    let sim = simulate(&model, &groups, &MissingSpec::fragmentary(), 7).expect("simulate");
    let a = tessera::data::Assemblage {
        file: "simulated".into(),
        format: tessera::data::TableFormat::Text,
        delimiter: Some(','),
        sha256: String::new(),
        catalogue: model.catalogue.clone(),
        trait_columns: vec![true; model.catalogue.len()],
        carried_columns: Vec::new(),
        individuals: sim.individuals.clone(),
        warnings: Vec::new(),
        settings: Default::default(),
    };
    let evidence = evaluate_assemblage(&model, &a, &Context::new(1));
    let ln_lrs: Vec<f64> = evidence.iter().map(|e| e.ln_lr).collect();
    let mut t = String::new();
    for l in &ln_lrs {
        let _ = writeln!(t, "{l:?}");
    }
    std::fs::write(d.join("ln_lr.txt"), t).expect("write");
    let set = parse_prior_set("shipped,sweep").expect("prior set");
    let flat = set[0].clone();
    let mut p = String::from("name,kind,a,b,pi\n");
    for pr in std::iter::once(&flat).chain(&set) {
        match pr.shape {
            PriorShape::Beta { a, b } => {
                let _ = writeln!(p, "{},beta,{a:?},{b:?},", pr.name);
            }
            PriorShape::Fixed { pi } => {
                let _ = writeln!(p, "{},fixed,,,{pi:?}", pr.name);
            }
        }
    }
    std::fs::write(d.join("priors.csv"), p).expect("write");
    let thresholds = Thresholds::default();
    let mut times = Vec::new();
    let mut result = None;
    for _ in 0..5 {
        let start = Instant::now();
        let r = analyse(&evidence, None, &flat, &set, &thresholds);
        times.push(start.elapsed().as_secs_f64());
        result = Some(r);
    }
    let r = result.expect("ran");
    let t_post = median(times);
    let mut out = String::from("prior,mean,q025,q975\n");
    for pr in std::iter::once(&r.main).chain(&r.sensitivity) {
        let _ = writeln!(
            out,
            "{},{:?},{:?},{:?}",
            pr.prior.name, pr.pi.mean, pr.pi.lo, pr.pi.hi
        );
    }
    std::fs::write(d.join("tessera_posterior.csv"), out).expect("write");
    let pf: String = r
        .main
        .p_female
        .iter()
        .map(|p| format!("{:?}\n", p.unwrap_or(f64::NAN)))
        .collect();
    std::fs::write(d.join("tessera_p_female.txt"), pf).expect("write");

    // ---------------------------------------------------------------- group hierarchy
    let group_of: Vec<String> = sim
        .individuals
        .iter()
        .map(|i| i.group.clone().unwrap_or_default())
        .collect();
    std::fs::write(d.join("groups.txt"), group_of.join("\n") + "\n").expect("write");
    let mut times = Vec::new();
    let mut hier = None;
    for _ in 0..5 {
        let start = Instant::now();
        let h = Hierarchy::fit(&ln_lrs, &group_of, &flat);
        let means: Vec<(String, f64)> = (0..h.groups.len())
            .map(|g| (h.groups[g].clone(), h.group_pi(g).mean))
            .collect();
        times.push(start.elapsed().as_secs_f64());
        hier = Some(means);
    }
    let t_hier = median(times);
    let group_means = hier.expect("ran");

    // ---------------------------------------------------------------- latent-block inputs
    let m = support::ten_trait_model();
    let Some(Block::Latent(block)) = m.blocks.first() else {
        panic!("the bench model has one latent block");
    };
    let mut rng = ChaCha8Rng::seed_from_u64(2026);
    let people: Vec<_> = (0..100)
        .map(|i| {
            let mut obs = draw_observations(
                &m,
                if i % 2 == 0 { Sex::Female } else { Sex::Male },
                0,
                &mut rng,
            );
            for o in obs.iter_mut() {
                if rng.random::<f64>() < 0.3 {
                    *o = None;
                }
            }
            individual(format!("b{i}"), obs)
        })
        .collect();
    // The block's parameters and each case as latent bounds, for the reference.
    let mut par = String::new();
    for s in 0..2 {
        let mu: Vec<String> = block.mean[s].iter().map(|x| format!("{x:?}")).collect();
        let _ = writeln!(par, "mean,{s},{}", mu.join(","));
        for i in 0..block.traits.len() {
            let row: Vec<String> = (0..block.traits.len())
                .map(|j| format!("{:?}", block.cov[s][(i, j)]))
                .collect();
            let _ = writeln!(par, "cov,{s},{}", row.join(","));
        }
    }
    std::fs::write(d.join("block.csv"), par).expect("write");
    let mut cases = String::from("case,trait,kind,value,lower,upper\n");
    for (k, ind) in people.iter().enumerate() {
        for (j, tr) in block.traits.iter().enumerate() {
            match (&tr.kind, ind.observations[tr.catalogue_index]) {
                (LatentKind::Metric, Some(Observation::Measurement { value })) => {
                    let _ = writeln!(cases, "{k},{j},m,{value:?},,");
                }
                (kind, Some(Observation::Grade { low, high })) => {
                    if let Some((a, b)) = kind.bounds(low, high) {
                        let _ = writeln!(cases, "{k},{j},o,,{a:?},{b:?}");
                    }
                }
                _ => {}
            }
        }
    }
    std::fs::write(d.join("cases.csv"), cases).expect("write");
    let ctx = Context::new(1);
    let mut times = Vec::new();
    let mut lrs = Vec::new();
    for _ in 0..3 {
        let start = Instant::now();
        lrs = people.iter().map(|ind| block.evaluate(ind, &ctx)).collect();
        times.push(start.elapsed().as_secs_f64());
    }
    let t_lik = median(times);
    let lr: String = lrs
        .iter()
        .map(|e| format!("{:?},{:?}\n", e.ln_lr, e.error))
        .collect();
    std::fs::write(d.join("tessera_latent.csv"), lr).expect("write");

    // ---------------------------------------------------------------- the reference
    let script = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/benches/reference/side_by_side.py"
    );
    let status = std::process::Command::new(python())
        .arg(script)
        .arg(d)
        .status();
    match status {
        Ok(s) if s.success() => {}
        other => {
            eprintln!("the Python reference did not run ({other:?}); tessera alone: posterior {t_post:.4} s, likelihoods {t_lik:.4} s, hierarchy {t_hier:.4} s");
            return;
        }
    }
    let read = |f: &str| std::fs::read_to_string(d.join(f)).expect("reference output");
    let timing: Vec<f64> = read("reference_times.txt")
        .lines()
        .map(|l| l.parse().unwrap_or(f64::NAN))
        .collect();
    // Largest differences.
    let theirs = read("reference_posterior.csv");
    let ours = std::fs::read_to_string(d.join("tessera_posterior.csv")).expect("ours");
    let mut d_post: f64 = 0.0;
    for (a, b) in ours.lines().skip(1).zip(theirs.lines().skip(1)) {
        let x: Vec<&str> = a.split(',').collect();
        let y: Vec<&str> = b.split(',').collect();
        assert_eq!(x[0], y[0], "prior order");
        for k in 1..4 {
            let u: f64 = x[k].parse().expect("tessera's number");
            let v: f64 = y[k].parse().expect("the reference's number");
            d_post = d_post.max((u - v).abs());
        }
    }
    let mut d_pf: f64 = 0.0;
    for (a, b) in read("reference_p_female.txt").lines().zip(
        std::fs::read_to_string(d.join("tessera_p_female.txt"))
            .expect("ours")
            .lines(),
    ) {
        let u: f64 = a.parse().expect("the reference's number");
        let v: f64 = b.parse().expect("tessera's number");
        if u.is_finite() && v.is_finite() {
            d_pf = d_pf.max((u - v).abs());
        }
    }
    let mut d_lik: f64 = 0.0;
    let mut beyond = 0;
    for (a, e) in read("reference_latent.csv").lines().zip(&lrs) {
        let mut it = a.split(',');
        let v: f64 = it
            .next()
            .and_then(|x| x.parse().ok())
            .expect("the reference's ln LR");
        let err: f64 = it.next().and_then(|x| x.parse().ok()).unwrap_or(0.0);
        let diff = (v - e.ln_lr).abs();
        d_lik = d_lik.max(diff);
        if diff > e.error + err + 1e-9 {
            beyond += 1;
        }
    }
    // PyMC, when a Python with pymc is named.
    let pymc_row = std::env::var("TESSERA_PYMC_PYTHON").ok().and_then(|py| {
        let script = concat!(env!("CARGO_MANIFEST_DIR"), "/benches/reference/hierarchy_pymc.py");
        let ok = std::process::Command::new(py)
            .arg(script)
            .arg(d)
            .status()
            .map(|s| s.success())
            .unwrap_or(false);
        if !ok {
            eprintln!("the PyMC reference did not run");
            return None;
        }
        let text = read("pymc.csv");
        let mut lines = text.lines();
        let secs: f64 = lines.next()?.parse().ok()?;
        let mut worst: f64 = 0.0;
        for line in lines {
            let (name, v) = line.split_once(',')?;
            let v: f64 = v.parse().ok()?;
            let ours = group_means.iter().find(|(g, _)| g == name)?.1;
            worst = worst.max((ours - v).abs());
        }
        Some(format!(
            "| group hierarchy, 3 groups of 10⁴ individuals (PyMC NUTS, 2 chains × 1000 draws) | {t_hier:.4} | {secs:.1} | {:.0}× | group means {worst:.4} |",
            secs / t_hier
        ))
    });
    println!("| computation | tessera (s) | reference (s) | ratio | largest difference |");
    println!("|---|---|---|---|---|");
    println!(
        "| posterior of π, 16 priors + P(female) of 10⁴ individuals | {t_post:.4} | {:.3} | {:.0}× | π mean/quantiles {d_post:.1e}; P(female) {d_pf:.1e} |",
        timing[0],
        timing[0] / t_post
    );
    println!(
        "| latent-block likelihood, 100 individuals × 2 sexes | {t_lik:.4} | {:.3} | {:.0}× | ln LR {d_lik:.1e} ({beyond} beyond the two error estimates) |",
        timing[1],
        timing[1] / t_lik
    );
    match pymc_row {
        Some(r) => println!("{r}"),
        None => println!("| group hierarchy, 3 groups of 10⁴ individuals | {t_hier:.4} | (PyMC not run: set TESSERA_PYMC_PYTHON) | | |"),
    }
}
