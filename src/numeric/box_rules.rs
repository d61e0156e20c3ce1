//! Deterministic rules for multivariate normal box probabilities in three and more
//! dimensions, each reducing the box to a one-dimensional integral of a log-concave function
//! ([`ln_integral_log_concave`]):
//!
//! - **one-factor covariance** (any dimension): where every covariance off the diagonal is a
//!   product λᵢλⱼ, X = λZ + D^½ε with Z and ε independent standard normals, so
//!   P(a < X < b) = ∫ φ(z) ∏ᵢ [Φ((bᵢ − λᵢz)/√dᵢ) − Φ((aᵢ − λᵢz)/√dᵢ)] dz
//!   (Curnow & Dunnett 1962, Ann Math Stat 33:571–579; Genz & Bretz 2009, *Computation of
//!   Multivariate Normal and t Probabilities*, ch. 2; from memory). The
//!   equicorrelated blocks of the shipped model are of this kind;
//! - **three dimensions**, any covariance: P = ∫ φ(t) P₂(t) dt over the standardised range of
//!   one variable, where P₂(t) is the bivariate normal probability of the other two given it
//!   ([`bvn_rectangle`], Genz 2004).
//!
//! Both integrands are log-concave (Prékopa 1973: a log-concave density integrated over a
//! convex set, as a function of a shift), which the integration relies on.

pub mod fixed_nodes;

use super::log_concave::ln_integral_log_concave;
use super::mvn::{bvn_rectangle, LnProbability};
use super::normal::{ln_interval, LN_SQRT_2PI};
use nalgebra::DMatrix;

/// Relative tolerance of the one-dimensional integrals.
pub const REL_TOL: f64 = 1e-10;

/// Largest departure of a correlation from λᵢλⱼ for a covariance to count as one-factor (the
/// decimals of a model file, such as 0.35, reproduce themselves to about 1e-16).
pub(crate) const ONE_FACTOR_TOL: f64 = 1e-12;

/// Absolute accuracy of [`bvn_rectangle`] (four terms of about 1e-15 each, Genz 2004), taken
/// with a margin.
const BIVARIATE_ACCURACY: f64 = 1e-14;

/// The three-dimensional rule gives way to the randomised one when the bivariate routine's
/// share of the relative error would exceed this.
const LARGEST_BIVARIATE_SHARE: f64 = 1e-7;

/// A covariance of one-factor form, Σ = λλᵀ + diag(d) with every dᵢ > 0.
#[derive(Debug, Clone, PartialEq)]
pub struct OneFactor {
    /// Loadings λᵢ.
    pub loadings: Vec<f64>,
    /// Standard deviations √dᵢ left to each variable alone.
    pub own_sd: Vec<f64>,
}

impl OneFactor {
    /// The one-factor form of `cov`, if it has one (three or more variables).
    ///
    /// With correlations rᵢⱼ = lᵢlⱼ, lᵢ² = rᵢⱼrᵢₖ / rⱼₖ for any j, k other than i with
    /// rⱼₖ ≠ 0; the signs follow the correlations with the first variable of nonzero
    /// loading. Every correlation is then checked against lᵢlⱼ.
    pub fn of(cov: &DMatrix<f64>) -> Option<OneFactor> {
        let n = cov.nrows();
        if n < 3 || cov.ncols() != n {
            return None;
        }
        let sd: Vec<f64> = (0..n).map(|i| cov[(i, i)].sqrt()).collect();
        if sd.iter().any(|s| !(s.is_finite() && *s > 0.0)) {
            return None;
        }
        let r = |i: usize, j: usize| cov[(i, j)] / (sd[i] * sd[j]);
        let mut l = vec![0.0; n];
        for (i, li) in l.iter_mut().enumerate() {
            // The pair (j, k) with the largest |rⱼₖ|, for the most digits.
            let mut best: Option<(usize, usize)> = None;
            for j in (0..n).filter(|&j| j != i) {
                for k in (j + 1..n).filter(|&k| k != i) {
                    if best.is_none_or(|(bj, bk)| r(j, k).abs() > r(bj, bk).abs()) {
                        best = Some((j, k));
                    }
                }
            }
            let (j, k) = best?;
            if r(j, k) == 0.0 {
                // No pair to divide by: only the uncorrelated case is of this form.
                return None;
            }
            let sq = r(i, j) * r(i, k) / r(j, k);
            if !(0.0..1.0).contains(&sq) {
                return None;
            }
            *li = sq.sqrt();
        }
        let first = l.iter().position(|&x| x > 0.0)?;
        for (i, li) in l.iter_mut().enumerate() {
            if i != first && r(first, i) < 0.0 {
                *li = -*li;
            }
        }
        for i in 0..n {
            for j in 0..i {
                if !((r(i, j) - l[i] * l[j]).abs() <= ONE_FACTOR_TOL) {
                    return None;
                }
            }
        }
        Some(OneFactor {
            loadings: l.iter().zip(&sd).map(|(l, s)| l * s).collect(),
            own_sd: l
                .iter()
                .zip(&sd)
                .map(|(l, s)| s * (1.0 - l * l).sqrt())
                .collect(),
        })
    }
}

/// ln P(lower < X < upper) for X ~ N(0, λλᵀ + diag(d)) by the one-factor reduction (see the
/// module). `None` when the integral cannot be formed (an empty box).
pub fn ln_box_one_factor(lower: &[f64], upper: &[f64], f: &OneFactor) -> Option<LnProbability> {
    let ln_f = |z: f64| {
        let mut s = -0.5 * z * z - LN_SQRT_2PI;
        for i in 0..lower.len() {
            let (l, d) = (f.loadings[i], f.own_sd[i]);
            s += ln_interval((lower[i] - l * z) / d, (upper[i] - l * z) / d);
        }
        s
    };
    let inf = f64::INFINITY;
    let got = ln_integral_log_concave(ln_f, -inf, inf, 0.0, REL_TOL)?;
    Some(LnProbability {
        ln_p: got.ln_value,
        error: got.rel_error + ONE_FACTOR_TOL * lower.len() as f64,
    })
}

/// ln P(lower < X < upper) for X ~ N(0, cov) in three dimensions by one-dimensional
/// integration over the most constrained variable of the bivariate probability of the other
/// two (see the module). `None` where the rule would lose accuracy (a conditional covariance
/// that is not positive definite, a box so small that the bivariate routine's absolute
/// accuracy is no longer small against it): the caller then uses the randomised routine.
pub fn ln_box_trivariate(
    lower: &[f64],
    upper: &[f64],
    cov: &DMatrix<f64>,
) -> Option<LnProbability> {
    if lower.len() != 3 || cov.nrows() != 3 {
        return None;
    }
    let sd: Vec<f64> = (0..3).map(|i| cov[(i, i)].sqrt()).collect();
    if sd.iter().any(|s| !(s.is_finite() && *s > 0.0)) {
        return None;
    }
    // The outer variable: the one whose own interval is least likely.
    let k = (0..3)
        .min_by(|&x, &y| {
            let p = |i: usize| ln_interval(lower[i] / sd[i], upper[i] / sd[i]);
            p(x).total_cmp(&p(y))
        })
        .unwrap_or(0);
    let (i, j) = match k {
        0 => (1, 2),
        1 => (0, 2),
        _ => (0, 1),
    };
    // Given t = X_k / sd_k: X_i has mean βᵢt and the pair's covariance is Σ − ββᵀ.
    let beta = [cov[(i, k)] / sd[k], cov[(j, k)] / sd[k]];
    let vi = cov[(i, i)] - beta[0] * beta[0];
    let vj = cov[(j, j)] - beta[1] * beta[1];
    if !(vi > 0.0 && vj > 0.0) {
        return None;
    }
    let (si, sj) = (vi.sqrt(), vj.sqrt());
    let rho = (cov[(i, j)] - beta[0] * beta[1]) / (si * sj);
    if !(rho.abs() < 1.0) {
        return None;
    }
    let pair = |t: f64| {
        bvn_rectangle(
            [(lower[i] - beta[0] * t) / si, (lower[j] - beta[1] * t) / sj],
            [(upper[i] - beta[0] * t) / si, (upper[j] - beta[1] * t) / sj],
            rho,
        )
    };
    let ln_f = |t: f64| -0.5 * t * t - LN_SQRT_2PI + pair(t).ln();
    let (lo, hi) = (lower[k] / sd[k], upper[k] / sd[k]);
    let start = if lo.is_finite() && hi.is_finite() {
        0.5 * (lo + hi)
    } else {
        0.0_f64.clamp(lo, hi)
    };
    let got = ln_integral_log_concave(ln_f, lo, hi, start, REL_TOL)?;
    // An absolute error ε in P₂ moves P by at most ε·P(lo < t < hi): relative to P, that is
    // the bivariate routine's share of the error.
    let bivariate = BIVARIATE_ACCURACY * (ln_interval(lo, hi) - got.ln_value).exp();
    if !(bivariate <= LARGEST_BIVARIATE_SHARE) {
        return None;
    }
    Some(LnProbability {
        ln_p: got.ln_value,
        error: got.rel_error + bivariate,
    })
}

#[cfg(test)]
mod tests;
