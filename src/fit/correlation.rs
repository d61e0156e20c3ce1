//! Within-sex correlations of one pair of traits, given the fitted margins (the two-step
//! estimators): polychoric for two ordinal traits (Olsson 1979, Psychometrika 44:443–460),
//! polyserial for an ordinal trait and a measurement (Olsson, Drasgow & Dorans 1982,
//! Psychometrika 47:337–347; reference details from memory), Pearson for two measurements. Each uses the individuals who have
//! both traits recorded (pairwise), so a missing cell costs only the pairs it belongs to.
//!
//! With one correlation shared by the sexes the likelihoods of the two sexes are added, each
//! with its own margins (the sexes differ in means, and for measurements possibly in SD).

use crate::numeric::mvn::bvn_rectangle;
use crate::numeric::normal::ln_interval;

/// The fitted margin of one trait.
#[derive(Debug, Clone, PartialEq)]
pub enum Margin {
    /// Ordinal: thresholds and per-sex latent means (female, male); within-sex SD 1.
    Ordinal {
        /// Thresholds τ₀ < … < τ_{K−2}.
        thresholds: Vec<f64>,
        /// Latent mean (female, male).
        mean: [f64; 2],
    },
    /// Metric: per-sex means and SDs (female, male).
    Metric {
        /// Mean (female, male).
        mean: [f64; 2],
        /// SD (female, male).
        sd: [f64; 2],
    },
}

/// One recorded value of a trait.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Value {
    /// Grade indices `[low, high]` (0-based).
    Grade(usize, usize),
    /// A measurement.
    Measure(f64),
}

/// One individual's pair of values, with sex (0 female, 1 male).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PairCase {
    /// 0 female, 1 male.
    pub sex: usize,
    /// Value of the first trait.
    pub first: Value,
    /// Value of the second trait.
    pub second: Value,
    /// How far this individual's mean of each trait lies from its sex's mean in the margin
    /// (the age effect, β (age − centre); 0 without one), in the trait's own scale.
    pub shift: [f64; 2],
}

/// An estimated correlation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CorrelationEstimate {
    /// The estimate.
    pub rho: f64,
    /// Standard error (observed information of the pairwise likelihood; Fisher's large-sample
    /// form (1 − r²)/√n for Pearson).
    pub se: f64,
    /// Cases used.
    pub n: usize,
    /// `polychoric`, `polyserial` or `pearson`.
    pub method: &'static str,
}

fn latent_bounds(th: &[f64], low: usize, high: usize, mean: f64) -> (f64, f64) {
    let a = if low == 0 {
        f64::NEG_INFINITY
    } else {
        th[low - 1] - mean
    };
    let b = if high >= th.len() {
        f64::INFINITY
    } else {
        th[high] - mean
    };
    (a, b)
}

/// Estimate the correlation of a pair from the cases given (already restricted to the sexes
/// that share it).
pub fn estimate(first: &Margin, second: &Margin, cases: &[PairCase]) -> CorrelationEstimate {
    let n = cases.len();
    match (first, second) {
        (Margin::Metric { mean: m1, sd: s1 }, Margin::Metric { mean: m2, sd: s2 }) => {
            let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
            for c in cases {
                if let (Value::Measure(x), Value::Measure(y)) = (c.first, c.second) {
                    let zx = (x - m1[c.sex] - c.shift[0]) / s1[c.sex];
                    let zy = (y - m2[c.sex] - c.shift[1]) / s2[c.sex];
                    sxy += zx * zy;
                    sxx += zx * zx;
                    syy += zy * zy;
                }
            }
            let rho = if sxx > 0.0 && syy > 0.0 {
                (sxy / (sxx * syy).sqrt()).clamp(-1.0, 1.0)
            } else {
                0.0
            };
            CorrelationEstimate {
                rho,
                se: (1.0 - rho * rho) / (n.max(1) as f64).sqrt(),
                n,
                method: "pearson",
            }
        }
        _ => {
            let method = match (first, second) {
                (Margin::Ordinal { .. }, Margin::Ordinal { .. }) => "polychoric",
                _ => "polyserial",
            };
            let ll = |rho: f64| pair_log_likelihood(first, second, cases, rho);
            let rho = maximise(&ll);
            let h = 1e-4;
            let (lo, hi) = ((rho - h).max(-0.9999), (rho + h).min(0.9999));
            let mid = 0.5 * (lo + hi);
            let d2 = (ll(hi) - 2.0 * ll(mid) + ll(lo)) / (0.25 * (hi - lo) * (hi - lo));
            let se = if d2 < 0.0 {
                (-1.0 / d2).sqrt()
            } else {
                f64::NAN
            };
            CorrelationEstimate { rho, se, n, method }
        }
    }
}

/// Log-likelihood of the pair's cases at correlation ρ (terms that do not depend on ρ left out).
pub fn pair_log_likelihood(first: &Margin, second: &Margin, cases: &[PairCase], rho: f64) -> f64 {
    let mut total = 0.0;
    for c in cases {
        total += match (first, second, c.first, c.second) {
            (
                Margin::Ordinal {
                    thresholds: t1,
                    mean: m1,
                },
                Margin::Ordinal {
                    thresholds: t2,
                    mean: m2,
                },
                Value::Grade(l1, h1),
                Value::Grade(l2, h2),
            ) => {
                let (a1, b1) = latent_bounds(t1, l1, h1, m1[c.sex] + c.shift[0]);
                let (a2, b2) = latent_bounds(t2, l2, h2, m2[c.sex] + c.shift[1]);
                bvn_rectangle([a1, a2], [b1, b2], rho).max(1e-300).ln()
            }
            (
                Margin::Ordinal { thresholds, mean },
                Margin::Metric { mean: mm, sd },
                Value::Grade(l, h),
                Value::Measure(x),
            ) => {
                let z = (x - mm[c.sex] - c.shift[1]) / sd[c.sex];
                let (a, b) = latent_bounds(thresholds, l, h, mean[c.sex] + c.shift[0]);
                polyserial_term(a, b, z, rho)
            }
            (
                Margin::Metric { mean: mm, sd },
                Margin::Ordinal { thresholds, mean },
                Value::Measure(x),
                Value::Grade(l, h),
            ) => {
                let z = (x - mm[c.sex] - c.shift[0]) / sd[c.sex];
                let (a, b) = latent_bounds(thresholds, l, h, mean[c.sex] + c.shift[1]);
                polyserial_term(a, b, z, rho)
            }
            _ => 0.0,
        };
    }
    total
}

/// ln P(a < x ≤ b | z) for a latent x correlated ρ with a standardised measurement z.
fn polyserial_term(a: f64, b: f64, z: f64, rho: f64) -> f64 {
    let s = (1.0 - rho * rho).sqrt();
    ln_interval((a - rho * z) / s, (b - rho * z) / s).max(-700.0)
}

/// Maximise a function of ρ on (−0.999, 0.999) by golden-section search on z = atanh ρ.
fn maximise(f: &dyn Fn(f64) -> f64) -> f64 {
    let g = 0.5 * (5f64.sqrt() - 1.0);
    let (mut a, mut b) = (-3.8f64, 3.8f64);
    let mut c = b - g * (b - a);
    let mut d = a + g * (b - a);
    let (mut fc, mut fd) = (f(c.tanh()), f(d.tanh()));
    for _ in 0..90 {
        if fc >= fd {
            b = d;
            d = c;
            fd = fc;
            c = b - g * (b - a);
            fc = f(c.tanh());
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + g * (b - a);
            fd = f(d.tanh());
        }
        if b - a < 1e-12 {
            break;
        }
    }
    (0.5 * (a + b)).tanh()
}

#[cfg(test)]
#[path = "tests/correlation.rs"]
mod tests;
