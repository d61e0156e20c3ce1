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
