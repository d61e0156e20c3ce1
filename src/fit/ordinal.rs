//! Maximum-likelihood cumulative probit for one ordinal trait with sex as the only covariate.
//!
//! # Model
//! x = δ·[male] + ε, ε ~ N(0, 1); grade k (index 0 … K−1) is seen when τₖ₋₁ < x ≤ τₖ
//! (τ₋₁ = −∞, τ_{K−1} = +∞). The female latent mean is 0 and δ is the male − female shift, the
//! parametrisation of a cumulative probit regression on a male indicator without intercept
//! (McCullagh 1980, J R Stat Soc B 42:109–142). A recorded range "between grades l and h" has
//! probability Φ(τ_h − μ) − Φ(τ_{l−1} − μ).
//!
//! # Algorithm
//! Newton–Raphson on (τ₀ … τ_{K−2}, δ) with the analytic gradient and Hessian, halving the
//! step until the log-likelihood rises and the thresholds stay ordered; the log-likelihood is
//! concave in these parameters for the probit link (Pratt 1981, J Am Stat Assoc 76:103–106;
//! reference details here and above from memory),
//! so Newton converges from the start at the pooled cumulative proportions. Standard errors
//! from the inverse observed information.

use crate::numeric::normal::{inverse_cdf_fast, ln_interval, LN_SQRT_2PI};
use nalgebra::{DMatrix, DVector};
use std::collections::BTreeMap;

/// One observation: sex and the grade-index interval `[low, high]` it allows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct OrdinalScore {
    /// Whether the individual is male.
    pub male: bool,
    /// Lowest grade index allowed (0-based).
    pub low: usize,
    /// Highest grade index allowed.
    pub high: usize,
}

/// A fitted cumulative probit.
#[derive(Debug, Clone, PartialEq)]
pub struct OrdinalFit {
    /// Thresholds τ₀ < … < τ_{K−2} (female latent mean 0, within-sex SD 1).
    pub thresholds: Vec<f64>,
    /// δ = male − female latent mean.
    pub shift: f64,
    /// Standard errors of the thresholds.
    pub threshold_se: Vec<f64>,
    /// Standard error of δ.
    pub shift_se: f64,
    /// Maximised log-likelihood.
    pub log_likelihood: f64,
    /// Newton iterations used.
    pub iterations: usize,
}

/// Why a cumulative probit cannot be fitted.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum OrdinalFitError {
    /// A grade at the end of the scale, or between others, is never observed exactly, so a
    /// threshold has no finite estimate.
    #[error("grade index {0} is never recorded, so the thresholds around it cannot be estimated")]
    GradeNeverSeen(usize),
    /// Only one sex has observations.
    #[error("scores of both sexes are needed to estimate the difference between them")]
    OneSexOnly,
    /// Newton did not converge (separation: one sex always at one end of the scale).
    #[error(
        "the likelihood has no finite maximum (the sexes are perfectly separated on this trait)"
    )]
    NoMaximum,
}

/// Fit the cumulative probit of `scores` on a scale of `n_grades` grades.
///
/// # Errors
/// [`OrdinalFitError`] when a grade is never seen, one sex is absent, or the maximum is not
/// finite.
pub fn fit_cumulative_probit(
    scores: &[OrdinalScore],
    n_grades: usize,
) -> Result<OrdinalFit, OrdinalFitError> {
    let mut counts: BTreeMap<OrdinalScore, f64> = BTreeMap::new();
    for s in scores {
        *counts.entry(*s).or_insert(0.0) += 1.0;
    }
    let groups: Vec<(OrdinalScore, f64)> = counts.into_iter().collect();
    fit_grouped_probit(&groups, n_grades)
}

/// Fit the cumulative probit to grouped scores: each distinct score with its count (or any
/// positive weight, e.g. a published share times the sample size). The log-likelihood is
/// Σ nᵢ ln P(scoreᵢ), so a table of counts by sex and grade gives exactly the estimates of the
/// same scores listed one row per individual. Groups of weight 0 are ignored.
///
/// # Errors
/// As [`fit_cumulative_probit`].
pub fn fit_grouped_probit(
    groups: &[(OrdinalScore, f64)],
    n_grades: usize,
) -> Result<OrdinalFit, OrdinalFitError> {
    let groups: Vec<(OrdinalScore, f64)> = groups
        .iter()
        .copied()
        .filter(|(_, n)| *n > 0.0 && n.is_finite())
        .collect();
    if n_grades < 2 {
        return Err(OrdinalFitError::GradeNeverSeen(0));
    }
    if !groups.iter().any(|(s, _)| s.male) || !groups.iter().any(|(s, _)| !s.male) {
        return Err(OrdinalFitError::OneSexOnly);
    }
    // Every threshold needs mass on both sides: some score entirely at or below grade k and
    // some entirely above it.
    for k in 0..n_grades.saturating_sub(1) {
        let below = groups.iter().any(|(s, _)| s.high <= k);
        let above = groups.iter().any(|(s, _)| s.low > k);
        if !below {
            return Err(OrdinalFitError::GradeNeverSeen(k));
        }
        if !above {
            return Err(OrdinalFitError::GradeNeverSeen(k + 1));
        }
    }
    let m = n_grades - 1;
    // Start: thresholds at the pooled cumulative proportions of exact scores.
    let mut cum = vec![0.0; n_grades];
    let mut total = 0.0;
    for (s, n) in &groups {
        let mid = (s.low + s.high) / 2;
        cum[mid] += n;
        total += n;
    }
    let mut theta = DVector::zeros(m + 1);
    let mut acc = 0.0;
    for k in 0..m {
        acc += cum[k];
        let p = ((acc + 0.5) / (total + 1.0)).clamp(1e-4, 1.0 - 1e-4);
        theta[k] = inverse_cdf_fast(p);
    }
    for k in 1..m {
        if theta[k] <= theta[k - 1] {
            theta[k] = theta[k - 1] + 0.1;
        }
    }
    let mut ll = log_likelihood(&groups, &theta, m);
    let mut iterations = 0;
    loop {
        iterations += 1;
        if iterations > 200 {
            return Err(OrdinalFitError::NoMaximum);
        }
        let (g, h) = derivatives(&groups, &theta, m);
        let neg_h = -h;
        let Some(chol) = neg_h.clone().cholesky() else {
            return Err(OrdinalFitError::NoMaximum);
        };
        let step = chol.solve(&g);
        let mut t = 1.0;
        let mut improved = false;
        for _ in 0..60 {
            let cand = &theta + &step * t;
            let ordered = (1..m).all(|k| cand[k] > cand[k - 1]);
            if ordered {
                let l = log_likelihood(&groups, &cand, m);
                if l.is_finite() && l >= ll - 1e-12 {
                    theta = cand;
                    let gain = l - ll;
                    ll = l;
                    improved = true;
                    if step.amax() * t < 1e-10 || gain.abs() < 1e-13 {
                        return finish(&groups, theta, m, ll, iterations);
                    }
                    break;
                }
            }
            t *= 0.5;
        }
        if !improved {
            return finish(&groups, theta, m, ll, iterations);
        }
        if theta.amax() > 40.0 {
            return Err(OrdinalFitError::NoMaximum);
        }
    }
}

fn finish(
    groups: &[(OrdinalScore, f64)],
    theta: DVector<f64>,
    m: usize,
    ll: f64,
    iterations: usize,
) -> Result<OrdinalFit, OrdinalFitError> {
    let (_, h) = derivatives(groups, &theta, m);
    let cov = (-h).try_inverse().ok_or(OrdinalFitError::NoMaximum)?;
    let se = |i: usize| cov[(i, i)].max(0.0).sqrt();
    Ok(OrdinalFit {
        thresholds: (0..m).map(|k| theta[k]).collect(),
        shift: theta[m],
        threshold_se: (0..m).map(se).collect(),
        shift_se: se(m),
        log_likelihood: ll,
        iterations,
    })
}

/// The latent interval (a, b) of a score, before subtracting the mean.
fn bounds(s: &OrdinalScore, theta: &DVector<f64>, m: usize) -> (f64, f64) {
    let a = if s.low == 0 {
        f64::NEG_INFINITY
    } else {
        theta[s.low - 1]
    };
    let b = if s.high >= m {
        f64::INFINITY
    } else {
        theta[s.high]
    };
    (a, b)
}

fn log_likelihood(groups: &[(OrdinalScore, f64)], theta: &DVector<f64>, m: usize) -> f64 {
    groups
        .iter()
        .map(|(s, n)| {
            let mu = if s.male { theta[m] } else { 0.0 };
            let (a, b) = bounds(s, theta, m);
            n * ln_interval(a - mu, b - mu)
        })
        .sum()
}

/// φ(x)/P in log space; 0 at infinite x.
fn ratio(x: f64, ln_p: f64) -> f64 {
    if x.is_infinite() {
        0.0
    } else {
        (-0.5 * x * x - LN_SQRT_2PI - ln_p).exp()
    }
}

/// Gradient and Hessian of the log-likelihood in (τ, δ).
///
/// For one score with ℓ = ln(Φ(b) − Φ(a)) = ln P: ∂ℓ/∂b = φ(b)/P, ∂ℓ/∂a = −φ(a)/P,
/// ∂²ℓ/∂b² = −b φ(b)/P − (∂ℓ/∂b)², ∂²ℓ/∂a² = a φ(a)/P − (∂ℓ/∂a)², ∂²ℓ/∂a∂b = −(∂ℓ/∂a)(∂ℓ/∂b);
/// a and b move one-for-one with their thresholds and by −1 with δ for males.
fn derivatives(
    groups: &[(OrdinalScore, f64)],
    theta: &DVector<f64>,
    m: usize,
) -> (DVector<f64>, DMatrix<f64>) {
    let mut g = DVector::zeros(m + 1);
    let mut h = DMatrix::zeros(m + 1, m + 1);
    for (s, n) in groups {
        let mu = if s.male { theta[m] } else { 0.0 };
        let (a0, b0) = bounds(s, theta, m);
        let (a, b) = (a0 - mu, b0 - mu);
        let ln_p = ln_interval(a, b);
        let rb = ratio(b, ln_p);
        let ra = ratio(a, ln_p);
        let ga = -ra;
        let gb = rb;
        let haa = if a.is_infinite() { 0.0 } else { a * ra } - ga * ga;
        let hbb = if b.is_infinite() { 0.0 } else { -b * rb } - gb * gb;
        let hab = -ga * gb;
        // Parameter index and coefficient of a and of b: (index, d/dθ).
        let mut da: Vec<(usize, f64)> = Vec::with_capacity(2);
        let mut db: Vec<(usize, f64)> = Vec::with_capacity(2);
        if s.low > 0 {
            da.push((s.low - 1, 1.0));
        }
        if s.high < m {
            db.push((s.high, 1.0));
        }
        if s.male {
            if s.low > 0 {
                da.push((m, -1.0));
            }
            if s.high < m {
                db.push((m, -1.0));
            }
        }
        for &(i, ci) in &da {
            g[i] += n * ga * ci;
        }
        for &(i, ci) in &db {
            g[i] += n * gb * ci;
        }
        for &(i, ci) in &da {
            for &(j, cj) in &da {
                h[(i, j)] += n * haa * ci * cj;
            }
            for &(j, cj) in &db {
                h[(i, j)] += n * hab * ci * cj;
                h[(j, i)] += n * hab * ci * cj;
            }
        }
        for &(i, ci) in &db {
            for &(j, cj) in &db {
                h[(i, j)] += n * hbb * ci * cj;
            }
        }
    }
    (g, h)
}

#[cfg(test)]
#[path = "tests/ordinal.rs"]
mod tests;
