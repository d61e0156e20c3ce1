//! The univariate standard normal in log space: ln Φ accurate far into both tails, and the
//! log-probability of an interval. erfc comes from the `libm` crate (a port of the FreeBSD
//! msun library, accurate to about one unit in the last place).

use libm::erfc;
use std::f64::consts::{LN_2, PI, SQRT_2};

/// ln √(2π).
pub const LN_SQRT_2PI: f64 = 0.918_938_533_204_672_8;

/// Standard normal density φ(x) = exp(−x²/2) / √(2π).
pub fn pdf(x: f64) -> f64 {
    (-0.5 * x * x - LN_SQRT_2PI).exp()
}

/// Standard normal distribution function Φ(x) = ½ erfc(−x/√2).
pub fn cdf(x: f64) -> f64 {
    0.5 * erfc(-x / SQRT_2)
}

/// ln Φ(x), accurate in relative terms for every finite x.
///
/// # Formula
/// For x ≥ −30: ln(½ erfc(−x/√2)), and for x > 0 the form ln(1 − ½ erfc(x/√2)) through
/// `ln_1p` so that values near 0 keep their digits. For x < −30 the asymptotic (Mills ratio)
/// series, Abramowitz & Stegun (1964) 26.2.12:
/// ln Φ(x) = −x²/2 − ln(−x) − ln √(2π) + ln(1 − 1/x² + 3/x⁴ − 15/x⁶ + 105/x⁸ − 945/x¹⁰),
/// whose truncation error at x = −30 is below 1e-15 relative.
///
/// ```
/// use dimorph::numeric::normal::ln_cdf;
/// // ln Φ(0) = ln ½
/// assert!((ln_cdf(0.0) - 0.5f64.ln()).abs() < 1e-15);
/// // far in the tail: ln Φ(−40) = −804.6084420137539 (scipy 1.16.3 `log_ndtr`)
/// assert!((ln_cdf(-40.0) + 804.608_442_013_753_9).abs() < 1e-9);
/// ```
pub fn ln_cdf(x: f64) -> f64 {
    if x.is_nan() {
        return f64::NAN;
    }
    if x == f64::INFINITY {
        return 0.0;
    }
    if x == f64::NEG_INFINITY {
        return f64::NEG_INFINITY;
    }
    if x > 0.0 {
        (-0.5 * erfc(x / SQRT_2)).ln_1p()
    } else if x >= -30.0 {
        (0.5 * erfc(-x / SQRT_2)).ln()
    } else {
        let z = 1.0 / (x * x);
        let series = 1.0 - z * (1.0 - z * (3.0 - z * (15.0 - z * (105.0 - z * 945.0))));
        -0.5 * x * x - (-x).ln() - LN_SQRT_2PI + series.ln()
    }
}

/// ln (Φ(b) − Φ(a)) for a ≤ b (either may be infinite), accurate when the interval lies far
/// in either tail.
///
/// # Formula
/// With both ends in the upper half (a > 0) the symmetric form Φ(−a) − Φ(−b) is used; then
/// ln(Φ(hi) − Φ(lo)) = ln Φ(hi) + ln(1 − exp(ln Φ(lo) − ln Φ(hi))), computed with `ln_1p` /
/// `exp_m1` so that nothing underflows.
pub fn ln_interval(a: f64, b: f64) -> f64 {
    if a.is_nan() || b.is_nan() || a >= b {
        return f64::NEG_INFINITY;
    }
    let (lo, hi) = if a > 0.0 { (-b, -a) } else { (a, b) };
    let l_hi = ln_cdf(hi);
    let l_lo = ln_cdf(lo);
    if l_lo == f64::NEG_INFINITY {
        return l_hi;
    }
    l_hi + ln_one_minus_exp(l_lo - l_hi)
}

/// ln(1 − eˣ) for x ≤ 0, accurate near 0 and for very negative x (Mächler 2012, "Accurately
/// computing log(1 − exp(−|a|))", the `log1mexp` rule with cut-off ln 2).
pub fn ln_one_minus_exp(x: f64) -> f64 {
    if x > -LN_2 {
        (-x.exp_m1()).ln()
    } else {
        (-x.exp()).ln_1p()
    }
}

/// ln(eᵃ + eᵇ) without overflow.
pub fn ln_add_exp(a: f64, b: f64) -> f64 {
    if a == f64::NEG_INFINITY {
        return b;
    }
    if b == f64::NEG_INFINITY {
        return a;
    }
    let m = a.max(b);
    m + ((a - m).exp() + (b - m).exp()).ln()
}

/// ln of the density of N(mean, sd²) at x.
pub fn ln_pdf(x: f64, mean: f64, sd: f64) -> f64 {
    let z = (x - mean) / sd;
    -0.5 * z * z - sd.ln() - 0.5 * (2.0 * PI).ln()
}

#[cfg(test)]
mod tests {
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
    fn log_helpers() {
        assert!((ln_one_minus_exp(-1e-20) - (1e-20f64).ln()).abs() < 1e-9);
        assert!((ln_one_minus_exp(-50.0) + (-50f64).exp()).abs() < 1e-30);
        assert!((ln_add_exp(1000.0, 1000.0) - (1000.0 + LN_2)).abs() < 1e-12);
        assert!((ln_pdf(1.0, 0.0, 1.0) - pdf(1.0).ln()).abs() < 1e-15);
    }
}
