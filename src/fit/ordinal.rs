//! Maximum-likelihood cumulative probit for one ordinal trait: sex as the only covariate, or
//! sex and age with a slope per sex ([`fit_probit_regression`]).
//!
//! # Model
//! x = δ·[male] + ε, ε ~ N(0, 1); grade k (index 0 … K−1) is seen when τₖ₋₁ < x ≤ τₖ
//! (τ₋₁ = −∞, τ_{K−1} = +∞). The female latent mean is 0 and δ is the male − female shift, the
//! parametrisation of a cumulative probit regression on a male indicator without intercept
//! (McCullagh 1980, J R Stat Soc B 42:109–142). A recorded range "between grades l and h" has
//! probability Φ(τ_h − μ) − Φ(τ_{l−1} − μ).
//!
//! # Algorithm
//! Newton–Raphson on (τ₀ … τ_{K−2}, δ) (or (τ, β) with covariates) with the analytic gradient and Hessian, halving the
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
    let cases: Vec<ProbitCase> = groups
        .iter()
        .map(|(s, n)| ProbitCase {
            low: s.low,
            high: s.high,
            covariates: vec![if s.male { 1.0 } else { 0.0 }],
            weight: *n,
        })
        .collect();
    Ok(fit_probit_regression(&cases, n_grades)?.sex_fit())
}

/// One score of a cumulative probit regression: the grade-index interval, the covariates x
/// (latent mean x·β) and a weight.
#[derive(Debug, Clone, PartialEq)]
pub struct ProbitCase {
    /// Lowest grade index allowed (0-based).
    pub low: usize,
    /// Highest grade index allowed.
    pub high: usize,
    /// Covariates, one per coefficient; no intercept (the thresholds carry it).
    pub covariates: Vec<f64>,
    /// Count or weight (cases of weight 0 are ignored).
    pub weight: f64,
}

/// A fitted cumulative probit regression.
#[derive(Debug, Clone, PartialEq)]
pub struct ProbitRegression {
    /// Thresholds τ₀ < … < τ_{K−2} (latent mean x·β, SD 1).
    pub thresholds: Vec<f64>,
    /// Standard errors of the thresholds.
    pub threshold_se: Vec<f64>,
    /// β, one per covariate.
    pub coefficients: Vec<f64>,
    /// Standard errors of β.
    pub coefficient_se: Vec<f64>,
    /// Maximised log-likelihood.
    pub log_likelihood: f64,
    /// Newton iterations used.
    pub iterations: usize,
}

impl ProbitRegression {
    /// The fit as the sexes' model reads it: the thresholds, and the first coefficient (on the
    /// male indicator) as the male − female shift.
    pub fn sex_fit(&self) -> OrdinalFit {
        OrdinalFit {
            thresholds: self.thresholds.clone(),
            shift: self.coefficients[0],
            threshold_se: self.threshold_se.clone(),
            shift_se: self.coefficient_se[0],
            log_likelihood: self.log_likelihood,
            iterations: self.iterations,
        }
    }
}

/// Fit x = covariates·β + ε, ε ~ N(0, 1), grade k seen when τₖ₋₁ < x ≤ τₖ (McCullagh 1980),
/// by Newton–Raphson as above. With the covariate [male] this is the model of
/// [`fit_grouped_probit`]; with [male, female·(age − c), male·(age − c)] it gives each sex its
/// own age slope (Agresti 2010, Analysis of Ordinal Categorical Data, ch. 5; from memory).
/// The first covariate must separate the sexes (`OneSexOnly` if it never varies).
///
/// # Errors
/// [`OrdinalFitError`] when a grade is never seen, the first covariate is constant, or the
/// maximum is not finite.
pub fn fit_probit_regression(
    cases: &[ProbitCase],
    n_grades: usize,
) -> Result<ProbitRegression, OrdinalFitError> {
    let cases: Vec<&ProbitCase> = cases
        .iter()
        .filter(|c| c.weight > 0.0 && c.weight.is_finite())
        .collect();
    if n_grades < 2 {
        return Err(OrdinalFitError::GradeNeverSeen(0));
    }
    let Some(q) = cases.first().map(|c| c.covariates.len()) else {
        return Err(OrdinalFitError::OneSexOnly);
    };
    let first = |c: &&ProbitCase| c.covariates.first().copied().unwrap_or(0.0);
    if q == 0 || cases.iter().all(|c| first(c) == first(&cases[0])) {
        return Err(OrdinalFitError::OneSexOnly);
    }
    // Every threshold needs mass on both sides: some score entirely at or below grade k and
    // some entirely above it.
    for k in 0..n_grades.saturating_sub(1) {
        let below = cases.iter().any(|s| s.high <= k);
        let above = cases.iter().any(|s| s.low > k);
        if !below {
            return Err(OrdinalFitError::GradeNeverSeen(k));
        }
        if !above {
            return Err(OrdinalFitError::GradeNeverSeen(k + 1));
        }
    }
    let m = n_grades - 1;
    // Start: thresholds at the pooled cumulative proportions of exact scores, β = 0.
    let mut cum = vec![0.0; n_grades];
    let mut total = 0.0;
    for s in &cases {
        let mid = (s.low + s.high) / 2;
        cum[mid] += s.weight;
        total += s.weight;
    }
    let mut theta = DVector::zeros(m + q);
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
    let mut ll = log_likelihood(&cases, &theta, m);
    let mut iterations = 0;
    loop {
        iterations += 1;
        if iterations > 200 {
            return Err(OrdinalFitError::NoMaximum);
        }
        let (g, h) = derivatives(&cases, &theta, m);
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
                let l = log_likelihood(&cases, &cand, m);
                if l.is_finite() && l >= ll - 1e-12 {
                    theta = cand;
                    let gain = l - ll;
                    ll = l;
                    improved = true;
                    if step.amax() * t < 1e-10 || gain.abs() < 1e-13 {
                        return finish(&cases, theta, m, ll, iterations);
                    }
                    break;
                }
            }
            t *= 0.5;
        }
        if !improved {
            return finish(&cases, theta, m, ll, iterations);
        }
        if theta.amax() > 40.0 {
            return Err(OrdinalFitError::NoMaximum);
        }
    }
}

fn finish(
    cases: &[&ProbitCase],
    theta: DVector<f64>,
    m: usize,
    ll: f64,
    iterations: usize,
) -> Result<ProbitRegression, OrdinalFitError> {
    let (_, h) = derivatives(cases, &theta, m);
    let cov = (-h).try_inverse().ok_or(OrdinalFitError::NoMaximum)?;
    let se = |i: usize| cov[(i, i)].max(0.0).sqrt();
    let q = theta.len() - m;
    Ok(ProbitRegression {
        thresholds: (0..m).map(|k| theta[k]).collect(),
        threshold_se: (0..m).map(se).collect(),
        coefficients: (0..q).map(|j| theta[m + j]).collect(),
        coefficient_se: (0..q).map(|j| se(m + j)).collect(),
        log_likelihood: ll,
        iterations,
    })
}

/// The latent interval (a, b) of a score, before subtracting the mean.
fn bounds(s: &ProbitCase, theta: &DVector<f64>, m: usize) -> (f64, f64) {
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

/// The latent mean x·β of a case.
fn latent_mean(s: &ProbitCase, theta: &DVector<f64>, m: usize) -> f64 {
    s.covariates
        .iter()
        .enumerate()
        .map(|(j, x)| x * theta[m + j])
        .sum()
}

fn log_likelihood(cases: &[&ProbitCase], theta: &DVector<f64>, m: usize) -> f64 {
    cases
        .iter()
        .map(|s| {
            let mu = latent_mean(s, theta, m);
            let (a, b) = bounds(s, theta, m);
            s.weight * ln_interval(a - mu, b - mu)
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

/// Gradient and Hessian of the log-likelihood in (τ, β).
///
/// For one score with ℓ = ln(Φ(b) − Φ(a)) = ln P: ∂ℓ/∂b = φ(b)/P, ∂ℓ/∂a = −φ(a)/P,
/// ∂²ℓ/∂b² = −b φ(b)/P − (∂ℓ/∂b)², ∂²ℓ/∂a² = a φ(a)/P − (∂ℓ/∂a)², ∂²ℓ/∂a∂b = −(∂ℓ/∂a)(∂ℓ/∂b);
/// a and b move one-for-one with their thresholds and by −xⱼ with βⱼ.
fn derivatives(
    cases: &[&ProbitCase],
    theta: &DVector<f64>,
    m: usize,
) -> (DVector<f64>, DMatrix<f64>) {
    let dim = theta.len();
    let mut g = DVector::zeros(dim);
    let mut h = DMatrix::zeros(dim, dim);
    for s in cases {
        let n = s.weight;
        let mu = latent_mean(s, theta, m);
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
        let mut da: Vec<(usize, f64)> = Vec::with_capacity(1 + s.covariates.len());
        let mut db: Vec<(usize, f64)> = Vec::with_capacity(1 + s.covariates.len());
        if s.low > 0 {
            da.push((s.low - 1, 1.0));
        }
        if s.high < m {
            db.push((s.high, 1.0));
        }
        for (j, &x) in s.covariates.iter().enumerate() {
            if x != 0.0 {
                if s.low > 0 {
                    da.push((m + j, -x));
                }
                if s.high < m {
                    db.push((m + j, -x));
                }
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
