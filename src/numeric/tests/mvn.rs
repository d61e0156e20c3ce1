//! Unit tests of `numeric/mvn.rs`.

use super::*;

/// Independent check: P(X > h, Y > k) = ∫_h^∞ φ(x) Φ((r x − k)/√(1 − r²)) dx by composite
/// Simpson's rule on a fine grid (a textbook identity, not the routine under test).
fn bvn_upper_by_quadrature(h: f64, k: f64, r: f64) -> f64 {
    let hi = 12.0;
    let lo = h.max(-12.0);
    let n = 20_000;
    let step = (hi - lo) / n as f64;
    let s = (1.0 - r * r).sqrt();
    let f = |x: f64| pdf(x) * cdf((r * x - k) / s);
    let mut sum = f(lo) + f(hi);
    for i in 1..n {
        sum += f(lo + i as f64 * step) * if i % 2 == 1 { 4.0 } else { 2.0 };
    }
    sum * step / 3.0
}

#[test]
fn orthant_probability_has_a_closed_form() {
    // Sheppard (1899): P(X > 0, Y > 0) = 1/4 + asin(r)/(2π).
    for r in [-0.99, -0.9, -0.5, 0.0, 0.2, 0.6, 0.93, 0.999] {
        let exact = 0.25 + f64::asin(r) / (2.0 * PI);
        assert!((bvn_upper(0.0, 0.0, r) - exact).abs() < 1e-14, "r = {r}");
    }
}

#[test]
fn upper_probability_agrees_with_one_dimensional_quadrature() {
    let mut worst: f64 = 0.0;
    for &r in &[-0.95, -0.7, -0.3, 0.1, 0.5, 0.8, 0.95] {
        for &(h, k) in &[
            (-1.0, 0.5),
            (0.3, 1.2),
            (1.5, -0.4),
            (-2.0, -2.5),
            (2.2, 2.0),
        ] {
            let d = (bvn_upper(h, k, r) - bvn_upper_by_quadrature(h, k, r)).abs();
            worst = worst.max(d);
        }
    }
    assert!(worst < 1e-10, "largest deviation {worst:e}");
}

#[test]
fn identity_correlation_is_a_product() {
    let cov = DMatrix::<f64>::identity(4, 4);
    let a = [-1.0, -0.5, 0.2, f64::NEG_INFINITY];
    let b = [0.5, 1.5, 2.0, -0.3];
    let exact: f64 = (0..4).map(|i| ln_interval(a[i], b[i])).sum();
    let got = ln_box_probability(&a, &b, &cov, 7, &QmcSettings::default()).unwrap();
    assert!((got.ln_p - exact).abs() < 1e-12, "{} vs {exact}", got.ln_p);
    let two = ln_box_probability(
        &a[..2],
        &b[..2],
        &DMatrix::identity(2, 2),
        7,
        &QmcSettings::default(),
    )
    .unwrap();
    assert!((two.ln_p - (ln_interval(a[0], b[0]) + ln_interval(a[1], b[1]))).abs() < 1e-13);
}

#[test]
fn trivariate_orthant_has_a_closed_form() {
    // P(X₁ > 0, X₂ > 0, X₃ > 0) = 1/8 + (asin ρ₁₂ + asin ρ₁₃ + asin ρ₂₃)/(4π)
    // (a classical result, e.g. Genz & Bretz 2009, §2.1).
    let r: [f64; 3] = [0.3, 0.5, 0.7];
    let cov = DMatrix::from_row_slice(3, 3, &[1.0, r[0], r[1], r[0], 1.0, r[2], r[1], r[2], 1.0]);
    let exact = 0.125 + r.iter().map(|x| x.asin()).sum::<f64>() / (4.0 * PI);
    let inf = f64::INFINITY;
    let got = ln_box_probability(&[0.0; 3], &[inf; 3], &cov, 11, &QmcSettings::default()).unwrap();
    assert!(
        (got.ln_p - exact.ln()).abs() < 2e-3,
        "{} vs {}",
        got.ln_p.exp(),
        exact
    );
    assert!(got.error < 2e-3);
}

#[test]
fn same_seed_same_answer() {
    let cov = DMatrix::from_row_slice(3, 3, &[1.0, 0.4, 0.2, 0.4, 1.0, 0.3, 0.2, 0.3, 1.0]);
    let q = QmcSettings::default();
    let x = ln_box_probability(&[-1.0, -0.5, 0.0], &[1.0, 0.5, 2.0], &cov, 42, &q).unwrap();
    let y = ln_box_probability(&[-1.0, -0.5, 0.0], &[1.0, 0.5, 2.0], &cov, 42, &q).unwrap();
    assert_eq!(x, y);
}

#[test]
fn bad_matrices_are_errors_not_panics() {
    let q = QmcSettings::default();
    let singular = DMatrix::from_element(3, 3, 1.0);
    assert_eq!(
        ln_box_probability(&[0.0; 3], &[1.0; 3], &singular, 1, &q),
        Err(MvnError::NotPositiveDefinite)
    );
    let two = DMatrix::from_element(2, 2, 1.0);
    assert!(ln_box_probability(&[0.0; 2], &[1.0; 2], &two, 1, &q).is_err());
    assert!(ln_box_probability(&[0.0; 2], &[1.0; 3], &two, 1, &q).is_err());
}
