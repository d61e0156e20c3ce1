//! Adult mortality by sex: a Gompertz hazard fitted by maximum likelihood to the ages at death
//! as recorded (intervals, open classes, points), per sex, over the joint draws of sex.
//!
//! # Model
//! From the adult start x₀ (the model's minimum age), the hazard of death at age x is
//! h(x) = α e^{β(x − x₀)} (Gompertz 1825), the cumulative hazard
//! H(x) = (α/β)(e^{β(x − x₀)} − 1) and the survivorship S(x) = e^{−H(x)}. An age recorded as a
//! point x contributes ln h(x) − H(x); an interval [a, b) contributes ln(S(a) − S(b)); an open
//! class (`50+`, `adult`) contributes ln S(a) — no closing age is assumed (the interval
//! censoring of palaeodemography; e.g. Wood et al. 2002, from memory). Ages before x₀ are
//! left out; an interval reaching below x₀ starts at x₀.
//!
//! # Over the draws
//! In each joint draw (at most [`MAX_HAZARD_DRAWS`] of them) the individuals of each sex give
//! the maximum-likelihood (ln α, β) by Newton's method, and its covariance from the observed
//! information; one value is drawn from that normal approximation, so the spread over the
//! draws carries both the uncertainty in sex and the sampling of the dead (multiple
//! imputation with an approximate posterior per imputation; Rubin 1987, from memory). Over an
//! age range (default 18–35) the female:male ratio of cumulative hazards,
//! (H_F(r₁) − H_F(r₀)) / (H_M(r₁) − H_M(r₀)), and the probability that it exceeds 1 answer
//! "did women die faster than men in these years?".

use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// Draws used for the hazards: the fits are cheap on grouped ages, but a regional table's
/// 1000 draws of two Newton fits each gain nothing over 400 (a choice of ours: the 2.5% and
/// 97.5% quantiles of 400 draws move by about 1% of the interval's width).
pub const MAX_HAZARD_DRAWS: usize = 400;

/// The age range of the comparison unless the user sets one: the childbearing years of the
/// usual question (common practice).
pub const DEFAULT_HAZARD_AGES: (f64, f64) = (18.0, 35.0);

/// An age at death as the hazard fit reads it, in years: `[low, high)`, `high` = `None` for an
/// open class, `low == high` for a point.
pub type RecordedAge = (f64, Option<f64>);

/// ln α, β of a Gompertz hazard from x₀.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Gompertz {
    /// ln α, α the hazard at x₀ (per year).
    pub ln_alpha: f64,
    /// β, the rate of ageing (per year).
    pub beta: f64,
}

impl Gompertz {
    /// H(t) for t years after x₀: (α/β)(e^{βt} − 1), α t when β is 0.
    pub fn cumulative(&self, t: f64) -> f64 {
        let a = self.ln_alpha.exp();
        if self.beta.abs() < 1e-12 {
            a * t
        } else {
            a * (self.beta * t).exp_m1() / self.beta
        }
    }

    /// h(t) for t years after x₀.
    pub fn hazard(&self, t: f64) -> f64 {
        (self.ln_alpha + self.beta * t).exp()
    }
}

/// Ages after x₀ grouped: (t_low, t_high or None, count).
type Grouped = Vec<(f64, Option<f64>, f64)>;

/// The log-likelihood of grouped ages (module docs).
pub fn log_likelihood(g: &Gompertz, ages: &[(f64, Option<f64>, f64)]) -> f64 {
    ages.iter()
        .map(|&(a, b, n)| {
            let ha = g.cumulative(a);
            n * match b {
                Some(b) if b <= a => g.ln_alpha + g.beta * a - ha,
                // ln(S(a) − S(b)) = −H(a) + ln(1 − e^{−(H(b) − H(a))}), written with expm1.
                Some(b) => -ha + (-(-(g.cumulative(b) - ha)).exp_m1()).ln(),
                None => -ha,
            }
        })
        .sum()
}

/// The maximum-likelihood fit and the covariance of (ln α, β) from the observed information.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fit {
    /// The estimate.
    pub at: Gompertz,
    /// Covariance [[var ln α, cov], [cov, var β]].
    pub cov: [[f64; 2]; 2],
    /// The maximised log-likelihood.
    pub log_likelihood: f64,
}

/// Gradient and Hessian by central differences: steps 1e-6 for the gradient (truncation about
/// 1e-12 times the third derivative, rounding about 1e-16 |f| / 1e-6: both far below the
/// stopping rule) and 1e-4 for the Hessian (the log-likelihood is smooth and cheap on grouped
/// ages).
fn derivatives(f: &dyn Fn(f64, f64) -> f64, x: f64, y: f64) -> ([f64; 2], [[f64; 2]; 2]) {
    let (e, h) = (1e-6, 1e-4);
    let f0 = f(x, y);
    let (fxp, fxm, fyp, fym) = (f(x + h, y), f(x - h, y), f(x, y + h), f(x, y - h));
    let fxy =
        (f(x + h, y + h) - f(x + h, y - h) - f(x - h, y + h) + f(x - h, y - h)) / (4.0 * h * h);
    (
        [
            (f(x + e, y) - f(x - e, y)) / (2.0 * e),
            (f(x, y + e) - f(x, y - e)) / (2.0 * e),
        ],
        [
            [(fxp - 2.0 * f0 + fxm) / (h * h), fxy],
            [fxy, (fyp - 2.0 * f0 + fym) / (h * h)],
        ],
    )
}

/// Fit by Newton's method with step halving from a start near adult human mortality
/// (α = 0.01, β = 0.05); `None` without at least two ages or when no maximum is found (a sex
/// whose every death is in one open class, for instance).
pub fn fit(ages: &[(f64, Option<f64>, f64)]) -> Option<Fit> {
    let n: f64 = ages.iter().map(|a| a.2).sum();
    if n < 2.0 {
        return None;
    }
    let ll = |x: f64, y: f64| {
        log_likelihood(
            &Gompertz {
                ln_alpha: x,
                beta: y,
            },
            ages,
        )
    };
    let (mut x, mut y) = (0.01f64.ln(), 0.05);
    let mut current = ll(x, y);
    for _ in 0..200 {
        let (g, hss) = derivatives(&ll, x, y);
        let det = hss[0][0] * hss[1][1] - hss[0][1] * hss[1][0];
        // Newton's step where the Hessian is negative definite, else a gradient step.
        let (mut dx, mut dy) = if hss[0][0] < 0.0 && det > 0.0 {
            (
                -(hss[1][1] * g[0] - hss[0][1] * g[1]) / det,
                -(-hss[1][0] * g[0] + hss[0][0] * g[1]) / det,
            )
        } else {
            (0.01 * g[0], 0.001 * g[1])
        };
        let mut moved = false;
        for _ in 0..40 {
            let next = ll(x + dx, y + dy);
            if next.is_finite() && next >= current - 1e-12 {
                x += dx;
                y += dy;
                current = next;
                moved = true;
                break;
            }
            dx /= 2.0;
            dy /= 2.0;
        }
        if !moved || (dx.abs() < 1e-10 && dy.abs() < 1e-10) {
            break;
        }
    }
    let (g, hss) = derivatives(&ll, x, y);
    let det = hss[0][0] * hss[1][1] - hss[0][1] * hss[1][0];
    let converged = g[0].abs() < 1e-4 && g[1].abs() < 1e-3 && hss[0][0] < 0.0 && det > 0.0;
    converged.then(|| Fit {
        at: Gompertz {
            ln_alpha: x,
            beta: y,
        },
        cov: [
            [-hss[1][1] / det, hss[0][1] / det],
            [hss[1][0] / det, -hss[0][0] / det],
        ],
        log_likelihood: current,
    })
}

/// A draw from the normal approximation N(estimate, cov) (Cholesky of the 2×2 covariance).
fn draw_near(f: &Fit, rng: &mut ChaCha8Rng) -> Gompertz {
    let z = |rng: &mut ChaCha8Rng| {
        // Box–Muller from two uniforms.
        let (u, v): (f64, f64) = (1.0 - rng.random::<f64>(), rng.random());
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    };
    let l11 = f.cov[0][0].max(0.0).sqrt();
    let l21 = if l11 > 0.0 { f.cov[1][0] / l11 } else { 0.0 };
    let l22 = (f.cov[1][1] - l21 * l21).max(0.0).sqrt();
    let (z1, z2) = (z(rng), z(rng));
    Gompertz {
        ln_alpha: f.at.ln_alpha + l11 * z1,
        beta: f.at.beta + l21 * z1 + l22 * z2,
    }
}

/// The hazard at one age: (age, females' median and 95% interval, males').
pub type HazardAtAge = (f64, (f64, f64, f64), (f64, f64, f64));

/// Mortality by sex over the draws.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct HazardsBySex {
    /// The adult start x₀ (years).
    pub start: f64,
    /// The age range of the comparison.
    pub range: (f64, f64),
    /// Individuals in the tables by sex with an age at or after x₀.
    pub n_with_age: usize,
    /// Draws used; and of them, those where a sex could not be fitted (left out).
    pub draws: usize,
    /// Draws left out because a sex had no maximum-likelihood fit.
    pub draws_failed: usize,
    /// α of females (hazard at x₀ per year): median and 95% interval over the draws.
    pub alpha_female: (f64, f64, f64),
    /// β of females (per year).
    pub beta_female: (f64, f64, f64),
    /// α of males.
    pub alpha_male: (f64, f64, f64),
    /// β of males.
    pub beta_male: (f64, f64, f64),
    /// Female:male ratio of the cumulative hazards over the range: median and 95% interval.
    pub hazard_ratio: (f64, f64, f64),
    /// P(the females' cumulative hazard over the range exceeds the males').
    pub p_female_higher: f64,
    /// The hazard by sex at each whole age from x₀ to 80: (age, female median/lo/hi, male).
    pub curve: Vec<HazardAtAge>,
}

/// Median and 2.5%/97.5% quantiles (type 7) of the finite values.
fn median_interval(v: &[f64]) -> (f64, f64, f64) {
    let mut s: Vec<f64> = v.iter().copied().filter(|x| x.is_finite()).collect();
    if s.is_empty() {
        return (f64::NAN, f64::NAN, f64::NAN);
    }
    s.sort_by(f64::total_cmp);
    let q = |p: f64| {
        let h = p * (s.len() - 1) as f64;
        let (lo, hi) = (h.floor() as usize, h.ceil() as usize);
        s[lo] + (h - lo as f64) * (s[hi] - s[lo])
    };
    (q(0.5), q(0.025), q(0.975))
}

/// Group the ages of one sex (years after x₀) into distinct intervals with counts.
fn grouped(ages: &[Option<RecordedAge>], sexes: &[bool], female: bool, start: f64) -> Grouped {
    let mut g: Grouped = Vec::new();
    let mut index: std::collections::HashMap<(u64, u64), usize> = std::collections::HashMap::new();
    for (a, &s) in ages.iter().zip(sexes) {
        let Some((lo, hi)) = *a else { continue };
        if s != female || hi.is_some_and(|h| h <= start && lo < h) || (hi == Some(lo) && lo < start)
        {
            continue;
        }
        let t0 = (lo - start).max(0.0);
        let t1 = hi.map(|h| if h == lo { t0 } else { h - start });
        let key = (t0.to_bits(), t1.map_or(u64::MAX, f64::to_bits));
        match index.get(&key) {
            Some(&k) => g[k].2 += 1.0,
            None => {
                index.insert(key, g.len());
                g.push((t0, t1, 1.0));
            }
        }
    }
    g
}

/// Mortality by sex over the draws (module docs). `ages[i]` is individual i's age as recorded
/// (`None`: none, or not in the tables by sex); `female[d][i]` its sex in draw d.
pub fn hazards_by_sex(
    ages: &[Option<RecordedAge>],
    female: &[Vec<bool>],
    start: f64,
    range: (f64, f64),
    seed: u64,
) -> HazardsBySex {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x6a2e_d0f1);
    let step = female.len().div_ceil(MAX_HAZARD_DRAWS).max(1);
    let used: Vec<&Vec<bool>> = female.iter().step_by(step).collect();
    let (r0, r1) = ((range.0 - start).max(0.0), (range.1 - start).max(0.0));
    let ages_to = (80.0 - start).max(1.0) as usize;
    let mut params = [Vec::new(), Vec::new(), Vec::new(), Vec::new()];
    let (mut ratio, mut higher, mut failed) = (Vec::new(), 0usize, 0usize);
    let mut curves = vec![(Vec::new(), Vec::new()); ages_to + 1];
    for sexes in &used {
        let fits = [true, false].map(|f| fit(&grouped(ages, sexes, f, start)));
        let [Some(ff), Some(fm)] = fits else {
            failed += 1;
            continue;
        };
        let (gf, gm) = (draw_near(&ff, &mut rng), draw_near(&fm, &mut rng));
        params[0].push(gf.ln_alpha.exp());
        params[1].push(gf.beta);
        params[2].push(gm.ln_alpha.exp());
        params[3].push(gm.beta);
        let hf = gf.cumulative(r1) - gf.cumulative(r0);
        let hm = gm.cumulative(r1) - gm.cumulative(r0);
        ratio.push(hf / hm);
        higher += usize::from(hf > hm);
        for (t, c) in curves.iter_mut().enumerate() {
            c.0.push(gf.hazard(t as f64));
            c.1.push(gm.hazard(t as f64));
        }
    }
    let fitted = used.len() - failed;
    HazardsBySex {
        start,
        range,
        n_with_age: ages
            .iter()
            .flatten()
            .filter(|(lo, hi)| hi.is_none_or(|h| h > start || *lo >= start))
            .count(),
        draws: used.len(),
        draws_failed: failed,
        alpha_female: median_interval(&params[0]),
        beta_female: median_interval(&params[1]),
        alpha_male: median_interval(&params[2]),
        beta_male: median_interval(&params[3]),
        hazard_ratio: median_interval(&ratio),
        p_female_higher: if fitted > 0 {
            higher as f64 / fitted as f64
        } else {
            f64::NAN
        },
        curve: curves
            .iter()
            .enumerate()
            .map(|(t, (f, m))| (start + t as f64, median_interval(f), median_interval(m)))
            .collect(),
    }
}

#[cfg(test)]
#[path = "tests/hazard.rs"]
mod tests;
