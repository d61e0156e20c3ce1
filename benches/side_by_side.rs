//! tessera beside reference implementations in Python on the same inputs:
//! `cargo bench --bench side_by_side` (needs `target/reference-venv`, see DEVELOPERS.md, or
//! TESSERA_PYTHON pointing at a Python with the pinned packages; TESSERA_PYMC_PYTHON for PyMC).
//!
//! Each comparison says what it compares, and each side's error is measured against a tighter
//! answer, not assumed:
//! 1. The single-assemblage posterior of π under the default sensitivity set (6 shipped priors
//!    and 9 fixed values, plus the chosen flat prior) with every individual's P(female), from
//!    the ln LRs of 10⁴ simulated individuals: tessera's `assemblage::analyse` against numpy
//!    (`benches/reference/side_by_side.py`) twice — with tessera's own algorithm (Chebyshev
//!    interpolation of the data term, Gauss–Legendre nodes for P(female)): implementation
//!    speed; and with the full 4000-cell grid: time to the answer by the direct method. Both
//!    measured against scipy's adaptive quadrature.
//! 2. The latent-block likelihood (ten traits: six ordinal, four measurements) of 100
//!    simulated individuals with about 30% of traits missing, both sexes, no pattern cache:
//!    tessera's `LatentBlock::evaluate` against scipy's randomised quasi-Monte Carlo (the
//!    routine behind `multivariate_normal.cdf`), both asked for the same error, 1e-3 of each
//!    box probability; both measured against an accurate scipy pass (1e-5 of p). The same
//!    method on both sides (Genz's separation of variables with randomised lattice rules), so
//!    one row: same algorithm and best method coincide.
//! 3. The group hierarchy (3 groups, flat prior on μ, log-uniform κ) against PyMC's NUTS on the
//!    same model with sex marginalised (`benches/reference/hierarchy_pymc.py`) at 10³, 10⁴ and
//!    10⁵ individuals: a comparison of methods (deterministic nested grids against MCMC), with
//!    PyMC's time with and without compilation and its Monte Carlo error.
//!
//! Prints a Markdown table. Inputs are written to a temporary folder outside the timed parts;
//! tessera's times are medians of repeated runs, the references' one run.

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
        decimal_comma: false,
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
    // Three sizes from the 10⁴ simulated individuals: every tenth (10³), all (10⁴), and ten
    // copies (10⁵) — the same groups and the same spread of evidence at each size.
    // The same grouping rule as an analysis (rows without a group share one label).
    let group_all: Vec<String> = tessera::pipeline::group_labels(&a)
        .expect("group names")
        .expect("the simulated rows have groups");
    let sizes = [1_000usize, 10_000, 100_000];
    let mut hierarchy_rows = Vec::new();
    for &n in &sizes {
        let pick: Vec<usize> = (0..n)
            .map(|k| {
                if n < ln_lrs.len() {
                    k * (ln_lrs.len() / n)
                } else {
                    k % ln_lrs.len()
                }
            })
            .collect();
        let l: Vec<f64> = pick.iter().map(|&k| ln_lrs[k]).collect();
        let g: Vec<String> = pick.iter().map(|&k| group_all[k].clone()).collect();
        let mut t = String::new();
        for x in &l {
            let _ = writeln!(t, "{x:?}");
        }
        std::fs::write(d.join(format!("ln_lr_{n}.txt")), t).expect("write");
        std::fs::write(d.join(format!("groups_{n}.txt")), g.join("\n") + "\n").expect("write");
        let mut times = Vec::new();
        let mut means = Vec::new();
        for _ in 0..5 {
            let start = Instant::now();
            let h = Hierarchy::fit(&l, &g, &flat);
            means = (0..h.groups.len())
                .map(|k| (h.groups[k].clone(), h.group_pi(k).mean))
                .collect();
            times.push(start.elapsed().as_secs_f64());
        }
        hierarchy_rows.push((n, median(times), means));
    }

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
            eprintln!("the Python reference did not run ({other:?}); tessera alone: posterior {t_post:.4} s, likelihoods {t_lik:.4} s");
            return;
        }
    }
    let read = |f: &str| std::fs::read_to_string(d.join(f)).expect("reference output");
    let timing: Vec<f64> = read("reference_times.txt")
        .lines()
        .map(|l| l.parse().unwrap_or(f64::NAN))
        .collect();
    // Posterior summaries: largest difference from the quadrature answer, for each side.
    let summaries = |text: &str| -> Vec<(String, [f64; 3])> {
        text.lines()
            .skip(1)
            .map(|line| {
                let x: Vec<&str> = line.split(',').collect();
                let v = |k: usize| x[k].parse::<f64>().expect("a number");
                (x[0].to_string(), [v(1), v(2), v(3)])
            })
            .collect()
    };
    let quad = summaries(&read("reference_posterior_quad.csv"));
    let error_vs_quad = |rows: &[(String, [f64; 3])]| -> f64 {
        rows.iter()
            .zip(&quad)
            .map(|((a, x), (b, y))| {
                assert_eq!(a, b, "prior order");
                (0..3).map(|k| (x[k] - y[k]).abs()).fold(0.0, f64::max)
            })
            .fold(0.0, f64::max)
    };
    let e_ours = error_vs_quad(&summaries(
        &std::fs::read_to_string(d.join("tessera_posterior.csv")).expect("ours"),
    ));
    let e_full = error_vs_quad(&summaries(&read("reference_posterior.csv")));
    let e_same = error_vs_quad(&summaries(&read("reference_posterior_same.csv")));
    let numbers = |text: String| -> Vec<f64> {
        text.lines()
            .map(|l| l.parse().unwrap_or(f64::NAN))
            .collect()
    };
    let ours_pf = numbers(std::fs::read_to_string(d.join("tessera_p_female.txt")).expect("ours"));
    let largest = |a: &[f64], b: &[f64]| {
        a.iter()
            .zip(b)
            .filter(|(u, v)| u.is_finite() && v.is_finite())
            .map(|(u, v)| (u - v).abs())
            .fold(0.0, f64::max)
    };
    let d_pf_full = largest(&numbers(read("reference_p_female.txt")), &ours_pf);
    let d_pf_same = largest(&numbers(read("reference_p_female_same.txt")), &ours_pf);
    // Latent block: each side against the accurate pass.
    let pairs = |text: String| -> Vec<(f64, f64)> {
        text.lines()
            .map(|l| {
                let mut it = l.split(',').map(|x| x.parse::<f64>().unwrap_or(f64::NAN));
                (it.next().unwrap_or(f64::NAN), it.next().unwrap_or(0.0))
            })
            .collect()
    };
    let scipy = pairs(read("reference_latent.csv"));
    let accurate = pairs(read("reference_latent_accurate.csv"));
    let (mut e_lik_ours, mut e_lik_scipy, mut rep_ours, mut rep_scipy, mut acc_err) =
        (0.0f64, 0.0f64, 0.0f64, 0.0f64, 0.0f64);
    for ((o, s), a) in lrs.iter().zip(&scipy).zip(&accurate) {
        e_lik_ours = e_lik_ours.max((o.ln_lr - a.0).abs());
        e_lik_scipy = e_lik_scipy.max((s.0 - a.0).abs());
        rep_ours = rep_ours.max(o.error);
        rep_scipy = rep_scipy.max(s.1);
        acc_err = acc_err.max(a.1);
    }
    // PyMC, when a Python with pymc is named.
    let pymc: Option<String> = std::env::var("TESSERA_PYMC_PYTHON").ok().and_then(|py| {
        let script = concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/benches/reference/hierarchy_pymc.py"
        );
        let mut cmd = std::process::Command::new(py);
        cmd.arg(script).arg(d);
        for n in sizes {
            cmd.arg(n.to_string());
        }
        match cmd.status() {
            Ok(s) if s.success() => Some(read("pymc.csv")),
            _ => {
                eprintln!("the PyMC reference did not run");
                None
            }
        }
    });
    println!(
        "| computation | what is compared | tessera (s) | reference (s) | ratio | achieved error |"
    );
    println!("|---|---|---|---|---|---|");
    println!(
        "| posterior of π, 16 priors + P(female) of 10⁴ individuals | same algorithm: numpy with tessera's Chebyshev interpolation and Gauss–Legendre nodes | {t_post:.4} | {:.3} | {:.0}× | π mean/quantiles vs quadrature: tessera {e_ours:.1e}, numpy {e_same:.1e}; P(female) tessera − numpy {d_pf_same:.1e} |",
        timing[1],
        timing[1] / t_post
    );
    println!(
        "| posterior of π, 16 priors + P(female) of 10⁴ individuals | each side's method: numpy's full 4000-cell grid (the direct method) | {t_post:.4} | {:.3} | {:.0}× | π vs quadrature: tessera {e_ours:.1e}, numpy {e_full:.1e}; P(female) tessera − numpy {d_pf_full:.1e} |",
        timing[0],
        timing[0] / t_post
    );
    println!(
        "| latent-block likelihood, 100 individuals × 2 sexes | same method and error target (1e-3 of each box probability, scipy's quasi-Monte Carlo given abseps = 1e-3·p after a rough pass, both timed) | {t_lik:.4} | {:.3} | {:.0}× | ln LR vs accurate pass (its own error ≤ {acc_err:.1e}): tessera {e_lik_ours:.1e}, scipy {e_lik_scipy:.1e}; largest reported error: tessera {rep_ours:.1e}, scipy {rep_scipy:.1e} |",
        timing[2],
        timing[2] / t_lik
    );
    for (n, t_hier, means) in &hierarchy_rows {
        let row = pymc.as_deref().and_then(|text| {
            let rows: Vec<Vec<&str>> = text
                .lines()
                .skip(1)
                .map(|l| l.split(',').collect::<Vec<_>>())
                .filter(|r| r[0] == n.to_string())
                .collect();
            let first = rows.first()?;
            let total: f64 = first[1].parse().ok()?;
            let sampling: f64 = first[2].parse().ok()?;
            let rhat: f64 = first[6].parse().ok()?;
            let (mut worst, mut mcse) = (0.0f64, 0.0f64);
            for r in &rows {
                let v: f64 = r[4].parse().ok()?;
                let e: f64 = r[5].parse().ok()?;
                let ours = means.iter().find(|(g, _)| g == r[3])?.1;
                worst = worst.max((ours - v).abs());
                mcse = mcse.max(e);
            }
            Some(format!(
                "| group hierarchy, 3 groups, {n} individuals | methods: nested grids against PyMC NUTS (2 chains × 1000 draws after 1000 tuning) | {t_hier:.4} | {total:.1} with compilation; {sampling:.1} sampling only | {:.0}× ; {:.0}× | group means tessera − PyMC {worst:.4}; PyMC's Monte Carlo error ≤ {mcse:.4}, R-hat ≤ {rhat:.3} |",
                total / t_hier,
                sampling / t_hier
            ))
        });
        match row {
            Some(r) => println!("{r}"),
            None => println!("| group hierarchy, 3 groups, {n} individuals | (PyMC not run: set TESSERA_PYMC_PYTHON) | {t_hier:.4} | | | |"),
        }
    }
}
