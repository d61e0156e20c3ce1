//! Unit tests of `summary/prevalence.rs`.

use super::*;
use statrs::distribution::{ContinuousCDF, Normal};

/// With every sex certain (|ln LR| = 60) the prevalences are the conjugate Beta posteriors:
/// p_F ~ Beta(1 + 3, 1 + 1) has mean 4/6 and p_M ~ Beta(1 + 1, 1 + 3) mean 2/6 (closed form).
#[test]
fn certain_sexes_give_the_conjugate_beta_posteriors() {
    let ln_lrs = [60.0, 60.0, 60.0, 60.0, -60.0, -60.0, -60.0, -60.0, 60.0];
    let present = [
        Some(true),
        Some(true),
        Some(false),
        Some(true),
        Some(false),
        Some(true),
        Some(false),
        Some(false),
        None,
    ];
    let est = [true; 9];
    let tab = [true; 9];
    let mem = [0; 9];
    let ev = no_groups(&ln_lrs, &est, &mem, &tab);
    let p = prevalence_by_sex(&ev, "c", &present, &ChainLength::default_with_seed(3));
    assert_eq!((p.n_recorded, p.n_present, p.n_left_out), (8, 4, 0));
    assert_eq!((p.n_female, p.n_male), (4.0, 4.0));
    // Independent Beta draws: the Monte Carlo SE of the mean is sd/√4000.
    let sd = (4.0f64 * 2.0 / (36.0 * 7.0)).sqrt();
    let se = sd / (p.draws as f64).sqrt();
    assert!((p.female.0 - 4.0 / 6.0).abs() < 4.0 * se, "{:?}", p.female);
    assert!((p.male.0 - 2.0 / 6.0).abs() < 4.0 * se, "{:?}", p.male);
    // The 2.5% quantile of Beta(4, 2): 0.28358 (scipy.stats.beta.ppf(0.025, 4, 2); statrs
    // computes it here). The sample quantile of 4 000 draws has SD
    // √(0.025·0.975/4000)/f(0.2836) = 0.0075 (f the Beta(4, 2) density, 0.327), so 0.02 is
    // 2.7 SD.
    let q = statrs::distribution::Beta::new(4.0, 2.0)
        .unwrap()
        .inverse_cdf(0.025);
    assert!((p.female.1 - q).abs() < 0.02, "{} vs {q}", p.female.1);
    assert!(p.female.1 >= 0.0 && p.female.2 <= 1.0);
    assert!(p.difference.1 >= -1.0 && p.difference.2 <= 1.0);
    assert!(p.rhat < MAX_RHAT && p.ess > MIN_ESS, "{} {}", p.rhat, p.ess);
    assert!(p.convergence_note().is_none());
}

/// Simulated assemblage: sexes 50:50, condition in 60% of females and 10% of males (true
/// difference 0.5), 40% of individuals without skeletal evidence, and calibrated skeletal
/// likelihood ratios for the rest: ln LR ~ N(+δ, 2δ) for females and N(−δ, 2δ) for males
/// (δ = 1.5; a normal ln LR with variance twice its mean is itself a likelihood ratio, a
/// closed form). Counting the condition among sexes drawn from the evidence alone dilutes the
/// difference; the joint posterior recovers it.
fn simulated(n: usize, seed: u64) -> (Vec<f64>, Vec<bool>, Vec<Option<bool>>, Vec<usize>) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let delta: f64 = 1.5;
    let z = Normal::standard();
    let (mut l, mut est, mut y, mut g) = (vec![], vec![], vec![], vec![]);
    for i in 0..n {
        let female = rng.random::<f64>() < 0.5;
        let has = rng.random::<f64>() >= 0.4;
        let e: f64 = rand::distr::Distribution::sample(&z, &mut rng);
        let m = if female { delta } else { -delta };
        l.push(if has {
            m + (2.0 * delta).sqrt() * e
        } else {
            0.0
        });
        est.push(has);
        y.push(Some(rng.random::<f64>() < if female { 0.6 } else { 0.1 }));
        g.push(i % 3);
    }
    (l, est, y, g)
}

#[test]
fn the_difference_by_sex_is_not_attenuated() {
    let (l, est, y, _) = simulated(3000, 20261203);
    let mem = vec![0; l.len()];
    let ev = no_groups(&l, &est, &mem, &est);
    let p = prevalence_by_sex(&ev, "c", &y, &ChainLength::default_with_seed(1));
    let (d, lo, hi) = p.difference;
    assert!((0.42..=0.58).contains(&d), "difference {d}");
    assert!(lo < 0.5 && 0.5 < hi, "interval {lo} to {hi}");
    assert_eq!(p.n_left_out + p.n_recorded, 3000);
    assert!(p.rhat < MAX_RHAT, "R-hat {}", p.rhat);

    // The diluted estimate this replaces: sexes drawn from the evidence alone under the
    // posterior-mean π, then the condition counted among them.
    let mut rng = ChaCha8Rng::seed_from_u64(9);
    let mut diffs = Vec::new();
    for _ in 0..200 {
        let (mut af, mut nf, mut am, mut nm) = (0.0, 0.0, 0.0, 0.0);
        for ((&li, &e), yi) in l.iter().zip(&est).zip(&y) {
            if !e {
                continue;
            }
            let f = rng.random::<f64>() < 1.0 / (1.0 + (-li).exp());
            let x = f64::from(u8::from(yi == &Some(true)));
            if f {
                af += x;
                nf += 1.0;
            } else {
                am += x;
                nm += 1.0;
            }
        }
        diffs.push(af / nf - am / nm);
    }
    let naive = diffs.iter().sum::<f64>() / diffs.len() as f64;
    println!(
        "joint posterior {d:.3} ({lo:.3} to {hi:.3}); sexes drawn from evidence alone {naive:.3}"
    );
    assert!(naive < 0.42, "the naive estimate {naive} should be diluted");
}

#[test]
fn groups_recover_the_difference_too_and_the_seed_fixes_the_bytes() {
    let (l, est, y, g) = simulated(1500, 77);
    let prior = crate::prior::library::parse_prior("flat").unwrap();
    let hyper = HyperGrid::new(&prior);
    let ev = SexEvidence {
        ln_lrs: &l,
        estimable: &est,
        membership: &g,
        in_tables: &est,
        prior: SexRatioPrior::Groups(&hyper, 3),
    };
    let len = ChainLength::default_with_seed(5);
    let p = prevalence_by_sex(&ev, "c", &y, &len);
    let (d, lo, hi) = p.difference;
    assert!(
        lo < 0.5 && 0.5 < hi && (0.35..=0.65).contains(&d),
        "{d} ({lo} to {hi})"
    );
    assert_eq!(p, prevalence_by_sex(&ev, "c", &y, &len));
    // One thread gives the same numbers as several.
    let one = rayon::ThreadPoolBuilder::new()
        .num_threads(1)
        .build()
        .unwrap()
        .install(|| prevalence_by_sex(&ev, "c", &y, &len));
    assert_eq!(p, one);
}

#[test]
fn short_chains_are_said_to_be_rough() {
    let (l, est, y, _) = simulated(200, 4);
    let mem = vec![0; l.len()];
    let ev = no_groups(&l, &est, &mem, &est);
    let len = ChainLength {
        chains: 4,
        iterations: 30,
        burn_in: 10,
        seed: 1,
    };
    let p = prevalence_by_sex(&ev, "c", &y, &len);
    assert!(p.convergence_note().is_some(), "ESS {}", p.ess);
}
