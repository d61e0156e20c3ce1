//! Unit tests of `numeric/normal.rs`.

use super::*;

/// Largest relative error accepted against closed forms.
const REL_TOL: f64 = 1e-12;
/// Largest relative error of ln Φ accepted in the far tails against scipy.
const TAIL_REL_TOL: f64 = 1e-13;

#[test]
fn cdf_matches_reference_values() {
    // scipy 1.16.3: ndtr(1) = 0.8413447460685429; ndtr(-1.959963984540054) = 0.025.
    assert!((cdf(1.0) - 0.841_344_746_068_542_9).abs() < 1e-15);
    assert!((cdf(-1.959_963_984_540_054) - 0.025).abs() < 1e-15);
}

#[test]
fn ln_cdf_is_continuous_at_the_switch_points_and_matches_the_tail_series() {
    for x in [-30.0, 0.0] {
        let below = ln_cdf(x - 1e-9);
        let above = ln_cdf(x + 1e-9);
        assert!(((below - above) / above).abs() < 1e-7, "jump at {x}");
    }
    // Closed form through erfc at −30 equals the asymptotic series (A&S 26.2.12).
    let z: f64 = 1.0 / 900.0;
    let series = 1.0 - z * (1.0 - z * (3.0 - z * (15.0 - z * (105.0 - z * 945.0))));
    let expected = -450.0 - 30f64.ln() - LN_SQRT_2PI + series.ln();
    assert!(((ln_cdf(-30.0) - expected) / expected).abs() < REL_TOL);
    // Upper tail: 1 − Φ(10) = 7.61985302416047e-24 (scipy 1.16.3 `norm.sf(10)`).
    assert!((ln_cdf(10.0) + 7.619_853_024_160_47e-24).abs() < 1e-35);
    // No underflow to −inf however far out.
    assert!(ln_cdf(-1e6).is_finite());
    assert_eq!(ln_cdf(f64::INFINITY), 0.0);
}

#[test]
fn interval_in_the_far_tails_keeps_its_digits() {
    // [8, 9] in the upper tail equals [−9, −8] by symmetry.
    let up = ln_interval(8.0, 9.0);
    let down = ln_interval(-9.0, -8.0);
    assert!(((up - down) / down).abs() < REL_TOL);
    // scipy 1.16.3: ln(ndtr(-8) − ndtr(-9)) = −35.01361859343716.
    let expected = -35.013_618_593_437_16;
    assert!(
        ((up - expected) / expected).abs() < TAIL_REL_TOL,
        "{up} vs {expected}"
    );
    // The whole line has probability 1.
    assert!(ln_interval(f64::NEG_INFINITY, f64::INFINITY).abs() < 1e-15);
    assert_eq!(ln_interval(1.0, 1.0), f64::NEG_INFINITY);
    assert!(ln_interval(-60.0, -59.0).is_finite());
}

#[test]
fn fast_inverse_matches_the_exact_inverse() {
    use statrs::distribution::{ContinuousCDF, Normal};
    let n = Normal::standard();
    let mut worst: f64 = 0.0;
    for k in 1..20_000 {
        let p = k as f64 / 20_000.0;
        worst = worst.max((inverse_cdf_fast(p) - n.inverse_cdf(p)).abs());
    }
    for e in 3..300 {
        let p = 10f64.powi(-e);
        let x = n.inverse_cdf(p);
        worst = worst.max(((inverse_cdf_fast(p) - x) / x).abs());
        if e <= 15 {
            // Upper tail, against the exact inverse of the same represented number.
            let u = 1.0 - p;
            let y = n.inverse_cdf(u);
            worst = worst.max(((inverse_cdf_fast(u) - y) / y).abs());
        }
    }
    // Measured: 3.9e-9 (absolute in the centre, relative in the tails).
    assert!(worst < 5e-9, "largest deviation {worst:e}");
}

#[test]
fn log_helpers() {
    assert!((ln_one_minus_exp(-1e-20) - (1e-20f64).ln()).abs() < 1e-9);
    assert!((ln_one_minus_exp(-50.0) + (-50f64).exp()).abs() < 1e-30);
    assert!((ln_add_exp(1000.0, 1000.0) - (1000.0 + LN_2)).abs() < 1e-12);
    assert!((ln_pdf(1.0, 0.0, 1.0) - pdf(1.0).ln()).abs() < 1e-15);
}
