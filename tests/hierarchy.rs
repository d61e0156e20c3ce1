//! The group hierarchy checked against an independent sampler, by simulation-based
//! calibration (Talts et al. 2018) and by interval coverage. Light versions run in the
//! suite; the heavy ones with `cargo test --release --test hierarchy -- --ignored --nocapture`.

use rand::distr::Distribution;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use statrs::distribution::{Beta, Normal};
use tessera::assemblage::gibbs::gibbs_means;
use tessera::assemblage::hierarchy::{Hierarchy, KAPPA_MAX, KAPPA_MIN};
use tessera::assemblage::PiPosterior;
use tessera::prior::{shipped_priors, Prior};

fn flat() -> Prior {
    shipped_priors().unwrap()[0].clone()
}

/// ln LR of one individual whose evidence has strength m: N(+m, 2m) for a female and
/// N(−m, 2m) for a male — a consistent likelihood-ratio distribution (the density ratio of
/// the two at x is eˣ).
fn ln_lr(female: bool, m: f64, rng: &mut ChaCha8Rng) -> f64 {
    let n = Normal::new(if female { m } else { -m }, (2.0 * m).sqrt()).unwrap();
    n.sample(rng)
}

struct Sim {
    l: Vec<f64>,
    groups: Vec<String>,
    membership: Vec<usize>,
    true_pi: Vec<f64>,
    true_mu: f64,
}

fn simulate(rng: &mut ChaCha8Rng, sizes: &[usize], m: f64) -> Sim {
    let mu: f64 = rng.random::<f64>();
    let kappa = (KAPPA_MIN.ln() + rng.random::<f64>() * (KAPPA_MAX.ln() - KAPPA_MIN.ln())).exp();
    let beta = Beta::new(mu * kappa, (1.0 - mu) * kappa).unwrap();
    let mut s = Sim {
        l: vec![],
        groups: vec![],
        membership: vec![],
        true_pi: vec![],
        true_mu: mu,
    };
    for (g, &n) in sizes.iter().enumerate() {
        let pi: f64 = beta.sample(rng);
        s.true_pi.push(pi);
        for _ in 0..n {
            let female = rng.random::<f64>() < pi;
            s.l.push(ln_lr(female, m, rng));
            s.groups.push(format!("g{g}"));
            s.membership.push(g);
        }
    }
    s
}

#[test]
fn nested_grids_agree_with_the_independent_gibbs_sampler() {
    let mut rng = ChaCha8Rng::seed_from_u64(42);
    let s = simulate(&mut rng, &[25, 12, 6], 2.0);
    let h = Hierarchy::fit(&s.l, &s.groups, &flat());
    let g = gibbs_means(&s.l, &s.membership, 3, (1.0, 1.0), 30_000, 3_000, 7);
    let mut worst: f64 = 0.0;
    for k in 0..3 {
        worst = worst.max((h.group_pi(k).mean - g.pi[k]).abs());
    }
    println!(
        "largest |grid − Gibbs| group mean: {worst:.4}; μ {:.4} vs {:.4}; acceptance {:.2}",
        h.mu().mean,
        g.mu,
        g.acceptance
    );
    assert!(worst < 0.01, "largest difference {worst}");
    assert!((h.mu().mean - g.mu).abs() < 0.015);
}

/// Posterior CDF at the truth; uniform over replications when the computation is calibrated.
fn pit_hierarchy(reps: usize, seed: u64) -> (Vec<f64>, Vec<f64>) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut pit_pi = Vec::new();
    let mut pit_mu = Vec::new();
    for _ in 0..reps {
        let s = simulate(&mut rng, &[15, 15, 10], 1.5);
        let h = Hierarchy::fit(&s.l, &s.groups, &flat());
        let g = &h.grids[0];
        let cdf: f64 =
            g.pi.iter()
                .zip(&h.group_mass[0])
                .filter(|(p, _)| **p < s.true_pi[0])
                .map(|(_, m)| m)
                .sum();
        pit_pi.push(cdf);
        let mu_mass: Vec<f64> = h.w.iter().map(|r| r.iter().sum()).collect();
        let cdf_mu: f64 = h
            .hyper
            .mu
            .iter()
            .zip(&mu_mass)
            .filter(|(p, _)| **p < s.true_mu)
            .map(|(_, m)| m)
            .sum();
        pit_mu.push(cdf_mu);
    }
    (pit_pi, pit_mu)
}

/// χ² statistic of ten equal bins.
fn chi_square(u: &[f64]) -> f64 {
    let mut bins = [0usize; 10];
    for &x in u {
        bins[((x * 10.0) as usize).min(9)] += 1;
    }
    let e = u.len() as f64 / 10.0;
    bins.iter().map(|&b| (b as f64 - e).powi(2) / e).sum()
}

fn coverage(reps: usize, seed: u64) -> f64 {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut covered = 0;
    for _ in 0..reps {
        let pi: f64 = rng.random::<f64>();
        let l: Vec<f64> = (0..40)
            .map(|_| {
                let female = rng.random::<f64>() < pi;
                ln_lr(female, 2.0, &mut rng)
            })
            .collect();
        let s = PiPosterior::compute(&l, &flat()).summary();
        if s.lo <= pi && pi <= s.hi {
            covered += 1;
        }
    }
    covered as f64 / reps as f64
}

#[test]
fn calibration_light() {
    // 60 replications: χ² with 9 degrees of freedom below 27.9 (p = 0.001).
    let (pi, mu) = pit_hierarchy(60, 1);
    assert!(
        chi_square(&pi) < 27.9 && chi_square(&mu) < 27.9,
        "{} {}",
        chi_square(&pi),
        chi_square(&mu)
    );
    let c = coverage(150, 2);
    assert!((0.90..=0.99).contains(&c), "coverage {c}");
}

#[test]
#[ignore = "heavy: 200 hierarchical fits and 500 single posteriors; run with --release --ignored"]
fn calibration_heavy() {
    let (pi, mu) = pit_hierarchy(200, 11);
    let (c_pi, c_mu) = (chi_square(&pi), chi_square(&mu));
    let cov = coverage(500, 12);
    println!("SBC over 200 simulated assemblages (3 groups): chi-square (9 df) of group-1 pi ranks {c_pi:.2}, of mu ranks {c_mu:.2}");
    println!(
        "95% interval coverage of pi over 500 simulated assemblages: {:.1}%",
        cov * 100.0
    );
    assert!(
        c_pi < 21.67 && c_mu < 21.67,
        "chi-square above the 1% critical value"
    );
    assert!((0.93..=0.97).contains(&cov), "coverage {cov}");
}
