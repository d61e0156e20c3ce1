//! Unit tests of `assemblage/posterior.rs`.

use super::*;
use statrs::distribution::{Beta, ContinuousCDF};
use statrs::statistics::Distribution;

fn flat() -> Prior {
    Prior::from_yaml(
        "t",
        "name: t\nprovenance: uniform prior for a test\nbeta: {a: 2, b: 3}\n",
    )
    .unwrap()
}

/// With every LR extreme each individual's sex is known, and p(π | D) is
/// Beta(a + n_F, b + n_M) (conjugacy); checked against statrs' Beta.
#[test]
fn extreme_evidence_gives_the_conjugate_beta() {
    let mut l = vec![300.0 * std::f64::consts::LN_10; 7];
    l.extend(vec![-300.0 * std::f64::consts::LN_10; 12]);
    let post = PiPosterior::compute(&l, &flat());
    let s = post.summary();
    let beta = Beta::new(2.0 + 7.0, 3.0 + 12.0).unwrap();
    assert!(
        (s.mean - beta.mean().unwrap()).abs() < 1e-6,
        "{} vs {}",
        s.mean,
        beta.mean().unwrap()
    );
    for (got, q) in [(s.median, 0.5), (s.lo, 0.025), (s.hi, 0.975)] {
        assert!(
            (got - beta.inverse_cdf(q)).abs() < 1e-5,
            "q {q}: {got} vs {}",
            beta.inverse_cdf(q)
        );
    }
    assert!((s.p_below_half - beta.cdf(0.5)).abs() < 1e-6);
    // Individuals' P(F) are 1 and 0.
    assert!(post.p_female(300.0) > 1.0 - 1e-12 && post.p_female(-300.0) < 1e-12);
}

#[test]
fn evidence_and_the_one_sex_bayes_factor() {
    // Flat prior, one individual: ∫ (π LR + 1 − π) dπ = (LR + 1)/2.
    let p = Prior::from_yaml(
        "t",
        "name: t\nprovenance: uniform prior for a test\nbeta: {a: 1, b: 1}\n",
    )
    .unwrap();
    let post = PiPosterior::compute(&[2.0], &p);
    assert!((post.ln_evidence - ((2f64.exp() + 1.0) / 2.0).ln()).abs() < 1e-7);
    // Ten males, LR = e^-10 each: ∫ (1 − cπ)^10 dπ = (1 − (1 − c)^11)/(11 c) with
    // c = 1 − e^-10 (closed form), so BF = ½(1 + e^-100) · 11c / (1 − e^-110) ≈ 5.5.
    let c = 1.0 - (-10f64).exp();
    let exact = (0.5f64).ln() - ((1.0 - (1.0 - c).powi(11)) / (11.0 * c)).ln();
    let got = PiPosterior::compute(&[-10.0; 10], &p).ln_bf_one_sex(&[-10.0; 10]);
    assert!((got - exact).abs() < 1e-6, "{got} vs {exact}");
    let mixed = [10.0, -10.0, 10.0, -10.0, 10.0, -10.0];
    assert!(PiPosterior::compute(&mixed, &p).ln_bf_one_sex(&mixed) < -20.0);
}

#[test]
fn fixed_prior_gives_the_logistic_formula() {
    let p = Prior::fixed(0.3).unwrap();
    let post = PiPosterior::compute(&[1.0, -2.0], &p);
    let l: f64 = 1.2;
    assert!((post.p_female(l) - 0.3 * l.exp() / (0.3 * l.exp() + 0.7)).abs() < 1e-15);
    assert_eq!(post.summary().mean, 0.3);
}

#[test]
fn no_evidence_returns_the_prior() {
    let post = PiPosterior::compute(&[0.0, 0.0], &flat());
    let beta = Beta::new(2.0, 3.0).unwrap();
    assert!((post.summary().mean - 0.4).abs() < 1e-6);
    assert!((post.quantile(0.9) - beta.inverse_cdf(0.9)).abs() < 1e-5);
}

#[test]
fn mirroring_the_sexes_mirrors_the_posterior() {
    let l = [2.0, -0.5, 3.3, -4.0, 0.7];
    let neg: Vec<f64> = l.iter().map(|x| -x).collect();
    let a = PiPosterior::compute(&l, &flat());
    let b = PiPosterior::compute(&neg, &flat().mirrored());
    assert!((a.summary().mean - (1.0 - b.summary().mean)).abs() < 1e-9);
    assert!((a.summary().lo - (1.0 - b.summary().hi)).abs() < 1e-6);
    for x in l {
        assert!((a.p_female(x) - (1.0 - b.p_female(-x))).abs() < 1e-9);
    }
}

#[test]
fn hdi_is_no_wider_than_the_equal_tailed_interval() {
    let post = PiPosterior::compute(&[5.0, 5.0, 5.0, -1.0], &flat());
    let s = post.summary();
    assert!(s.hdi_hi - s.hdi_lo <= s.hi - s.lo + 1e-3);
}

#[test]
fn gauss_legendre_rule_is_exact_for_polynomials_up_to_degree_15() {
    // ∫₀¹ x^k dx = 1/(k+1); the composite rule of 8-point panels is exact to degree 15.
    let rule = composite_gauss_legendre(0.0, 1.0);
    assert_eq!(rule.len(), 128);
    for k in 0..=15 {
        let v: f64 = rule.iter().map(|&(x, w)| w * x.powi(k)).sum();
        assert!(
            (v - 1.0 / (k as f64 + 1.0)).abs() < 1e-14,
            "degree {k}: {v}"
        );
    }
}

#[test]
fn p_female_by_the_node_rule_equals_the_fine_grid() {
    // Assemblages large enough for a narrow posterior, with ordinary and extreme LRs.
    let mut worst: f64 = 0.0;
    let mut used_nodes = 0;
    for (n, a, b, shift) in [
        (400usize, 1.0, 1.0, 0.0),
        (2000, 0.5, 0.5, 1.5),
        (5000, 48.78, 51.22, -2.0),
        (300, 1.0, 1.0, -3.0),
    ] {
        let l: Vec<f64> = (0..n)
            .map(|i| match i % 13 {
                0 => 60.0,
                1 => -55.0,
                k => ((i * 37 % 23) as f64 - 11.0) * 0.7 + shift + k as f64 * 0.01,
            })
            .collect();
        let prior = Prior {
            shape: crate::prior::PriorShape::Beta { a, b },
            ..flat()
        };
        let post = PiPosterior::compute(&l, &prior);
        if post.nodes.len() != post.grid.len() {
            used_nodes += 1;
        }
        for x in [-50.0, -8.0, -1.0, 0.0, 0.4, 3.0, 12.0, 60.0] {
            let grid = p_female_on_grid(&post.grid, &post.mass, x);
            worst = worst.max((post.p_female(x) - grid).abs());
        }
    }
    assert!(used_nodes >= 2, "node rule used in {used_nodes} cases");
    assert!(worst < 1e-9, "largest difference {worst:e}");
    // A small assemblage has a wide region: the grid itself serves.
    let post = PiPosterior::compute(&[2.0, -1.0, 0.3], &flat());
    assert_eq!(post.nodes, post.grid);
}

#[test]
fn the_fast_path_equals_direct_evaluation_on_large_assemblages() {
    // Interpolated data log-likelihood and node rule against every cell evaluated directly.
    for (n, a, b) in [
        (3000usize, 1.0, 1.0),
        (20_000, 48.78, 51.22),
        (8000, 0.5, 0.5),
    ] {
        let l: Vec<f64> = (0..n)
            .map(|i| match i % 17 {
                0 => 70.0,
                1 => -65.0,
                k => ((i * 53 % 29) as f64 - 13.0) * 0.8 + k as f64 * 0.02,
            })
            .collect();
        let prior = Prior {
            shape: crate::prior::PriorShape::Beta { a, b },
            ..flat()
        };
        let fast = PiPosterior::compute(&l, &prior);
        let direct = PiPosterior::compute_with(&l, &prior, false);
        assert_ne!(
            fast.nodes.len(),
            fast.grid.len(),
            "n = {n}: the fast path was not taken"
        );
        let (x, y) = (fast.summary(), direct.summary());
        for (u, v) in [
            (x.mean, y.mean),
            (x.lo, y.lo),
            (x.hi, y.hi),
            (x.median, y.median),
        ] {
            assert!((u - v).abs() < 1e-10, "n = {n}: {u} vs {v}");
        }
        for q in [-60.0, -5.0, -0.3, 0.0, 2.0, 9.0, 45.0] {
            let (u, v) = (fast.p_female(q), direct.p_female(q));
            assert!((u - v).abs() < 1e-9, "n = {n}, l = {q}: {u} vs {v}");
        }
    }
}

#[test]
fn mixture_sum_equals_the_term_by_term_sum() {
    // Moderate and extreme ln LRs (beyond ±40, up to ±700) at π near 0, ½ and 1: the split
    // and chunked forms against the plain log-sum-exp of every term (summed in f64 pairs
    // with a compensated sum, so that the reference carries no growing rounding).
    let l: Vec<f64> = (0..20_000)
        .map(|i| match i % 11 {
            0 => 45.0 + (i % 650) as f64,
            1 => -41.0 - (i % 650) as f64,
            k => ((i * 53 % 29) as f64 - 14.0) * 1.3 + k as f64 * 0.01,
        })
        .collect();
    let m = MixtureSum::new(&l);
    for pi in [1e-6, 0.02, 0.37, 0.5, 0.81, 0.999_999] {
        let (lp, lq) = (f64::ln(pi), f64::ln(1.0 - pi));
        let reference = compensated_sum(l.iter().map(|&x| ln_mixture(lp, lq, x)));
        let got = m.ln_sum(pi);
        assert!(
            (got - reference).abs() < 1e-9 * reference.abs().max(1.0),
            "π {pi}: {got} vs {reference}"
        );
    }
}

/// Data prepared once and shared by several priors (its coarse pass computed by the first)
/// gives each prior the same posterior, bit for bit, as data prepared for that prior alone.
#[test]
fn shared_data_gives_each_prior_its_own_posterior() {
    let l: Vec<f64> = (0..3000)
        .map(|i| ((i * 37 % 101) as f64 - 45.0) * 0.11)
        .collect();
    let priors: Vec<Prior> = ["{a: 2, b: 3}", "{a: 0.5, b: 0.5}", "{a: 40, b: 8}"]
        .iter()
        .map(|b| {
            Prior::from_yaml(
                "t",
                &format!("name: t\nprovenance: a prior for a test\nbeta: {b}\n"),
            )
            .unwrap()
        })
        .collect();
    let shared = PiData::new(&l);
    for p in &priors {
        let alone = PiPosterior::compute_on(&PiData::new(&l), p, true);
        assert_eq!(PiPosterior::compute_on(&shared, p, true), alone);
    }
    // The priors do pull the posterior apart (else the test would not tell).
    let means: Vec<f64> = priors
        .iter()
        .map(|p| PiPosterior::compute_on(&shared, p, true).summary().mean)
        .collect();
    assert!((means[2] - means[0]).abs() > 1e-3, "{means:?}");
}
