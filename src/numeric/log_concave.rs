//! The integral of a log-concave function of one variable, in log space and to a relative
//! tolerance: the integrands of the deterministic box rules ([`super::box_rules`]) are all of
//! this kind, and may be far too small for their values to be held outside logarithms.
//!
//! # Method
//! A log-concave g = exp(ln f) has one peak. It is found by golden-section search on ln f;
//! the integral is taken of g / g(peak) on each side of the peak, out to where ln f has
//! fallen by [`CUT`] (or to the end of the domain), by globally adaptive 15-point
//! Gauss–Kronrod quadrature (Piessens et al. 1983, the bisection strategy of QUADPACK's QAG).
//! Beyond a cut point z with ln g(z) = −c, concavity bounds ln g by the chord through the
//! peak, so the tail left out is at most g(z)·|z − peak| / c; that bound is added to the
//! reported error.

use super::quadrature::gauss_kronrod_15;

/// How far below its peak (in natural-log units) the integrand is followed: e⁻³² ≈ 1.3e-14
/// of its peak.
pub const CUT: f64 = 32.0;

/// How flat (in natural-log units) the bracket around the peak must be for the search to
/// stop: the integrand is then within e^0.001 of its peak across the bracket.
const PEAK_FLAT: f64 = 1e-3;

/// Pieces each side of the peak starts in.
const SIDE_PIECES: usize = 4;

/// Most bisections of the adaptive quadrature.
const MAX_SPLITS: usize = 200;

/// ln ∫ g with an error bound relative to the integral.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LnIntegral {
    /// ln ∫ g.
    pub ln_value: f64,
    /// Estimated error of the integral relative to it (≈ absolute error of `ln_value`).
    pub rel_error: f64,
}

/// ln ∫ₗₒʰⁱ exp(ln_f(z)) dz for a concave `ln_f` (either end may be infinite), to relative
/// tolerance `rel_tol`. `start` is a point of the domain where ln_f is finite (clamped into
/// the domain). `None` when ln_f is not finite at the start or at the peak found.
pub fn ln_integral_log_concave(
    mut ln_f: impl FnMut(f64) -> f64,
    lo: f64,
    hi: f64,
    start: f64,
    rel_tol: f64,
) -> Option<LnIntegral> {
    if !(lo < hi) {
        return None;
    }
    let peak = find_peak(&mut ln_f, lo, hi, start.clamp(lo, hi))?;
    let top = ln_f(peak);
    if !top.is_finite() {
        return None;
    }
    // Out from the peak on each side to the cut (or the end of the domain).
    let mut reach = |dir: f64, end: f64| -> (f64, f64) {
        // Steps doubling from the peak until the drop passes the cut, then bisection
        // between the last two steps to bring the cut point within an eighth of a step.
        let (mut inside, mut step) = (0.0, 1.0);
        loop {
            let z = peak + dir * step;
            if (dir > 0.0 && z >= end) || (dir < 0.0 && z <= end) {
                return (end, 0.0);
            }
            if !(top - ln_f(z) < CUT) {
                break;
            }
            inside = step;
            step *= 2.0;
        }
        for _ in 0..3 {
            let mid = 0.5 * (inside + step);
            if top - ln_f(peak + dir * mid) < CUT {
                inside = mid;
            } else {
                step = mid;
            }
        }
        let drop = top - ln_f(peak + dir * step);
        // The tail beyond the cut, bounded by the chord through the peak (concavity).
        let tail = if drop.is_finite() {
            (-drop).exp() * step / drop
        } else {
            0.0
        };
        (peak + dir * step, tail)
    };
    let (left, left_tail) = reach(-1.0, lo);
    let (right, right_tail) = reach(1.0, hi);
    let mut g = |z: f64| {
        let v = ln_f(z) - top;
        if v.is_nan() {
            0.0
        } else {
            v.exp()
        }
    };
    // Globally adaptive: the piece with the largest error is halved until the sum of the
    // errors meets the tolerance.
    let mut pieces: Vec<(f64, f64, f64, f64)> = Vec::with_capacity(16);
    // Each side starts in SIDE_PIECES pieces: a side spans the integrand's fall by e^CUT,
    // which one 15-point rule does not resolve (bisecting it would waste its evaluations).
    for (a, b) in [(left, peak), (peak, right)] {
        if a < b {
            let w = (b - a) / SIDE_PIECES as f64;
            for m in 0..SIDE_PIECES {
                let x0 = a + w * m as f64;
                let x1 = if m + 1 == SIDE_PIECES { b } else { x0 + w };
                let (v, e) = gauss_kronrod_15(&mut g, x0, x1);
                pieces.push((x0, x1, v, e));
            }
        }
    }
    let tails = left_tail + right_tail;
    for _ in 0..MAX_SPLITS {
        let total: f64 = pieces.iter().map(|p| p.2).sum();
        let error: f64 = pieces.iter().map(|p| p.3).sum();
        if error + tails <= rel_tol * total {
            break;
        }
        let (k, _) = pieces
            .iter()
            .enumerate()
            .max_by(|x, y| x.1 .3.total_cmp(&y.1 .3))?;
        let (a, b, _, _) = pieces[k];
        let m = 0.5 * (a + b);
        let (v1, e1) = gauss_kronrod_15(&mut g, a, m);
        let (v2, e2) = gauss_kronrod_15(&mut g, m, b);
        pieces[k] = (a, m, v1, e1);
        pieces.push((m, b, v2, e2));
    }
    let total: f64 = pieces.iter().map(|p| p.2).sum();
    let error: f64 = pieces.iter().map(|p| p.3).sum::<f64>() + tails;
    if !(total > 0.0) {
        return None;
    }
    Some(LnIntegral {
        ln_value: top + total.ln(),
        rel_error: error / total,
    })
}

/// The point where a concave function is largest on [lo, hi]: a bracket found by steps
/// doubling from `start`, narrowed by golden-section search until the function varies by
/// less than [`PEAK_FLAT`] across it (or its width is 1e-9 of its place). The peak only
/// splits the domain and scales the integrand, so its height is needed to within that, not
/// its place.
fn find_peak(ln_f: &mut impl FnMut(f64) -> f64, lo: f64, hi: f64, start: f64) -> Option<f64> {
    let f0 = ln_f(start);
    if !f0.is_finite() {
        return None;
    }
    // The side on which the function rises, and a bracket [a, c] around the peak.
    let probe = |z: f64| z.clamp(lo, hi);
    let up = ln_f(probe(start + 1e-3));
    let dir = if up > f0 { 1.0 } else { -1.0 };
    let (mut a, mut b, mut fb) = (start, start, f0);
    let mut step = 1.0;
    let c = loop {
        let z = probe(b + dir * step);
        let fz = ln_f(z);
        if !(fz > fb) || z == lo || z == hi {
            break z;
        }
        (a, b, fb) = (b, z, fz);
        step *= 2.0;
    };
    let (mut x0, mut x1) = if a < c { (a, c) } else { (c, a) };
    let (mut f0, mut f1) = (ln_f(x0), ln_f(x1));
    // Golden-section search on [x0, x1].
    const INV_PHI: f64 = 0.618_033_988_749_894_9;
    let mut u = x1 - INV_PHI * (x1 - x0);
    let mut v = x0 + INV_PHI * (x1 - x0);
    let (mut fu, mut fv) = (ln_f(u), ln_f(v));
    for _ in 0..200 {
        let flat = fu.max(fv) - f0.min(f1) < PEAK_FLAT;
        if flat || x1 - x0 <= 1e-9 * (1.0 + x0.abs().max(x1.abs())) {
            break;
        }
        if fu < fv {
            (x0, f0) = (u, fu);
            u = v;
            fu = fv;
            v = x0 + INV_PHI * (x1 - x0);
            fv = ln_f(v);
        } else {
            (x1, f1) = (v, fv);
            v = u;
            fv = fu;
            u = x1 - INV_PHI * (x1 - x0);
            fu = ln_f(u);
        }
    }
    // The best point seen, so that a peak at an end of the domain is kept.
    let candidates = [(b, fb), (u, fu), (v, fv), (x0, f0), (x1, f1)];
    candidates
        .into_iter()
        .filter(|c| c.1.is_finite())
        .max_by(|p, q| p.1.total_cmp(&q.1))
        .map(|c| c.0)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::numeric::normal::{ln_interval, LN_SQRT_2PI};

    /// ln ∫ exp(−(z − m)²/(2s²)) over [lo, hi] = ln(s√(2π)) + ln(Φ((hi−m)/s) − Φ((lo−m)/s)),
    /// closed form.
    fn gaussian(m: f64, s: f64, lo: f64, hi: f64) -> (f64, f64) {
        let got =
            ln_integral_log_concave(|z| -0.5 * ((z - m) / s).powi(2), lo, hi, 0.0, 1e-12).unwrap();
        let exact = s.ln() + LN_SQRT_2PI + ln_interval((lo - m) / s, (hi - m) / s);
        assert!(got.rel_error < 1e-10, "error {}", got.rel_error);
        (got.ln_value, exact)
    }

    #[test]
    fn gaussian_integrals_match_their_closed_form() {
        let inf = f64::INFINITY;
        for (m, s, lo, hi) in [
            (0.0, 1.0, -inf, inf),
            (3.0, 0.1, -inf, inf),
            (50.0, 1e-3, -inf, inf),    // narrow and far from the start
            (-20.0, 4.0, -inf, inf),    // wide
            (0.0, 1.0, 0.5, inf),       // peak outside the domain: the end is the peak
            (0.0, 1.0, -inf, -12.0),    // a far tail, ln value about −75
            (1.0, 0.3, -0.2, 0.9),      // finite both sides
            (2.0, 1.0, 1.9999, 2.0001), // a very short domain
        ] {
            let (got, exact) = gaussian(m, s, lo, hi);
            assert!(
                (got - exact).abs() < 1e-11 * exact.abs().max(1.0),
                "m {m} s {s} [{lo}, {hi}]: {got} vs {exact}"
            );
        }
    }

    #[test]
    fn a_skewed_log_concave_integrand_matches_its_closed_form() {
        // ∫₀^∞ x^(k−1) e^(−x) dx = Γ(k); for k = 4, 6 (closed form 3! = 6, 5! = 120). Log-concave
        // for k ≥ 1 on (0, ∞).
        for (k, gamma) in [(4.0_f64, 6.0_f64), (6.0, 120.0)] {
            let got = ln_integral_log_concave(
                |x: f64| (k - 1.0) * x.ln() - x,
                0.0,
                f64::INFINITY,
                1.0,
                1e-12,
            )
            .unwrap();
            assert!((got.ln_value - gamma.ln()).abs() < 1e-11, "k {k}: {got:?}");
        }
    }

    #[test]
    fn an_integrand_with_no_finite_value_is_refused() {
        assert!(ln_integral_log_concave(|_| f64::NEG_INFINITY, -1.0, 1.0, 0.0, 1e-9).is_none());
        assert!(ln_integral_log_concave(|z| -z * z, 1.0, 1.0, 1.0, 1e-9).is_none());
    }
}
