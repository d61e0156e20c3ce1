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

use crate::assemblage::draws::SexRow;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// Draws used for the hazards (a choice of ours): two Newton fits per draw. The 2.5% quantile
/// of 400 draws has a standard error of √(0.025·0.975/400)/φ(1.96) = 0.13 SD (the asymptotic
/// SE of a sample quantile, from memory), 3.4% of a 95% interval's width.
pub const MAX_HAZARD_DRAWS: usize = 400;

/// Draws in which the Makeham term is tried (its summary is a share and a median; six
/// three-parameter fits per sex and draw cost more than everything else here: a choice of
/// ours).
pub const MAKEHAM_DRAWS: usize = 20;

/// The age range of the comparison unless the user sets one: the childbearing years of the
/// usual question (common practice).
pub const DEFAULT_HAZARD_AGES: &str = "18-35";

/// An age range `from-to` in years (`18-35`), from below to.
///
/// # Errors
/// What was expected, with the text found.
pub fn parse_age_range(text: &str) -> Result<(f64, f64), String> {
    let expected =
        || format!("an age range in years written from-to, such as 18-35; found `{text}`");
    let (a, b) = text.split_once('-').ok_or_else(expected)?;
    let (a, b): (f64, f64) = (
        a.trim().parse().map_err(|_| expected())?,
        b.trim().parse().map_err(|_| expected())?,
    );
    if !(a.is_finite() && b.is_finite() && a >= 0.0 && a < b && b <= 120.0) {
        return Err(format!(
            "{}: the range starts at 0 or later and ends after it starts, by 120",
            expected()
        ));
    }
    Ok((a, b))
}

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
// Indexed loops: the matrix formulas read as written.
#[allow(clippy::needless_range_loop)]
fn derivatives(f: &dyn Fn(&[f64]) -> f64, x: &[f64]) -> (Vec<f64>, Vec<Vec<f64>>) {
    let (e, h) = (1e-6, 1e-4);
    let n = x.len();
    let at = |d: &[(usize, f64)]| {
        let mut y = x.to_vec();
        for &(i, s) in d {
            y[i] += s;
        }
        f(&y)
    };
    let f0 = f(x);
    let grad = (0..n)
        .map(|i| (at(&[(i, e)]) - at(&[(i, -e)])) / (2.0 * e))
        .collect();
    let mut hess = vec![vec![0.0; n]; n];
    for i in 0..n {
        hess[i][i] = (at(&[(i, h)]) - 2.0 * f0 + at(&[(i, -h)])) / (h * h);
        for j in 0..i {
            let v = (at(&[(i, h), (j, h)]) - at(&[(i, h), (j, -h)]) - at(&[(i, -h), (j, h)])
                + at(&[(i, -h), (j, -h)]))
                / (4.0 * h * h);
            hess[i][j] = v;
            hess[j][i] = v;
        }
    }
    (grad, hess)
}

/// The inverse of a symmetric positive definite matrix by its Cholesky factor; `None` when the
/// matrix is not positive definite.
#[allow(clippy::needless_range_loop)]
fn spd_inverse(a: &[Vec<f64>]) -> Option<Vec<Vec<f64>>> {
    let n = a.len();
    let mut l = vec![vec![0.0; n]; n];
    for i in 0..n {
        for j in 0..=i {
            let s: f64 = a[i][j] - (0..j).map(|k| l[i][k] * l[j][k]).sum::<f64>();
            if i == j {
                if !(s > 0.0) {
                    return None;
                }
                l[i][i] = s.sqrt();
            } else {
                l[i][j] = s / l[j][j];
            }
        }
    }
    // Columns of the inverse: solve L Lᵀ x = eₖ.
    let mut inv = vec![vec![0.0; n]; n];
    for k in 0..n {
        let mut y = vec![0.0; n];
        for i in 0..n {
            let b = if i == k { 1.0 } else { 0.0 };
            y[i] = (b - (0..i).map(|j| l[i][j] * y[j]).sum::<f64>()) / l[i][i];
        }
        for i in (0..n).rev() {
            let v = (y[i] - (i + 1..n).map(|j| l[j][i] * inv[j][k]).sum::<f64>()) / l[i][i];
            inv[i][k] = v;
        }
    }
    Some(inv)
}

/// The maximum of a smooth log-likelihood by Newton's method with step halving (a small
/// gradient step where the Hessian is not negative definite), from `start`: the point, the
/// covariance (the inverse of the observed information) and the maximum; `None` when no
/// maximum with a negative definite Hessian is found.
fn maximise(f: &dyn Fn(&[f64]) -> f64, start: Vec<f64>) -> Option<(Vec<f64>, Vec<Vec<f64>>, f64)> {
    let n = start.len();
    let mut x = start;
    let mut current = f(&x);
    for _ in 0..200 {
        let (g, h) = derivatives(f, &x);
        let minus: Vec<Vec<f64>> = h.iter().map(|r| r.iter().map(|v| -v).collect()).collect();
        let mut step: Vec<f64> = match spd_inverse(&minus) {
            Some(c) => (0..n)
                .map(|i| (0..n).map(|j| c[i][j] * g[j]).sum())
                .collect(),
            None => g.iter().map(|v| 1e-3 * v).collect(),
        };
        let mut moved = false;
        for _ in 0..40 {
            let next_x: Vec<f64> = x.iter().zip(&step).map(|(a, d)| a + d).collect();
            let next = f(&next_x);
            if next.is_finite() && next >= current - 1e-12 {
                x = next_x;
                current = next;
                moved = true;
                break;
            }
            step.iter_mut().for_each(|d| *d /= 2.0);
        }
        if !moved || step.iter().all(|d| d.abs() < 1e-10) {
            break;
        }
    }
    let (g, h) = derivatives(f, &x);
    let minus: Vec<Vec<f64>> = h.iter().map(|r| r.iter().map(|v| -v).collect()).collect();
    let cov = spd_inverse(&minus)?;
    // Converged: the remaining Newton step is tiny on the scale of the standard errors.
    let newton: f64 = (0..n)
        .map(|i| (0..n).map(|j| cov[i][j] * g[j]).sum::<f64>() / cov[i][i].sqrt())
        .map(f64::abs)
        .fold(0.0, f64::max);
    (newton < 1e-3).then_some((x, cov, current))
}

/// Fit by Newton's method from a start near adult human mortality (α = 0.01, β = 0.05);
/// `None` without at least two ages or when no maximum is found (a sex whose every death is
/// in one open class, for instance).
pub fn fit(ages: &[(f64, Option<f64>, f64)]) -> Option<Fit> {
    let n: f64 = ages.iter().map(|a| a.2).sum();
    if n < 2.0 {
        return None;
    }
    let ll = |p: &[f64]| {
        log_likelihood(
            &Gompertz {
                ln_alpha: p[0],
                beta: p[1],
            },
            ages,
        )
    };
    let (x, c, value) = maximise(&ll, vec![0.01f64.ln(), 0.05])?;
    Some(Fit {
        at: Gompertz {
            ln_alpha: x[0],
            beta: x[1],
        },
        cov: [[c[0][0], c[0][1]], [c[1][0], c[1][1]]],
        log_likelihood: value,
    })
}

/// ln-likelihood of grouped ages under Gompertz–Makeham, h(t) = λ + α e^{βt} (Makeham 1860,
/// from memory): H(t) = λt + the Gompertz H(t).
pub fn makeham_log_likelihood(
    ln_lambda: f64,
    g: &Gompertz,
    ages: &[(f64, Option<f64>, f64)],
) -> f64 {
    let lambda = ln_lambda.exp();
    let big_h = |t: f64| lambda * t + g.cumulative(t);
    ages.iter()
        .map(|&(a, b, n)| {
            let ha = big_h(a);
            n * match b {
                Some(b) if b <= a => (lambda + g.hazard(a)).ln() - ha,
                Some(b) => -ha + (-(-(big_h(b) - ha)).exp_m1()).ln(),
                None => -ha,
            }
        })
        .sum()
}

/// The Makeham term of one sex where it is identifiable: λ and the likelihood-ratio statistic
/// 2(ln L_Makeham − ln L_Gompertz); `None` when the three-parameter fit finds no maximum
/// (λ running to 0 or the information singular: the data cannot separate the term).
pub fn makeham(ages: &[(f64, Option<f64>, f64)], gompertz: &Fit) -> Option<(f64, f64)> {
    let ll = |p: &[f64]| {
        makeham_log_likelihood(
            p[0],
            &Gompertz {
                ln_alpha: p[1],
                beta: p[2],
            },
            ages,
        )
    };
    // Several starts: a share f of the Gompertz hazard at x₀ given to λ, the rest to α, with
    // β as fitted and steeper (Makeham's α is smaller and its β larger than Gompertz's alone);
    // the best maximum found is kept.
    let a = gompertz.at.ln_alpha.exp();
    let (x, cov, value) = [0.25, 0.5, 0.8]
        .iter()
        .flat_map(|&f| {
            [1.0, 2.0].map(|m| vec![(f * a).ln(), ((1.0 - f) * a).ln(), m * gompertz.at.beta])
        })
        .filter_map(|start| maximise(&ll, start))
        .max_by(|p, q| p.2.total_cmp(&q.2))?;
    // Not identifiable where λ's interval reaches 1/1000 of itself (ln λ's SE above 3).
    (cov[0][0].sqrt() < 3.0).then(|| {
        (
            x[0].exp(),
            (2.0 * (value - gompertz.log_likelihood)).max(0.0),
        )
    })
}

/// The value a likelihood-ratio statistic for one parameter on its boundary (½χ²₀ + ½χ²₁;
/// Self & Liang 1987, from memory) exceeds with probability `p`: χ²₁'s 1 − 2p quantile
/// (statrs). 0.05 gives 2.71, 0.001 gives 9.55.
pub fn boundary_level(p: f64) -> f64 {
    use statrs::distribution::{ChiSquared, ContinuousCDF};
    ChiSquared::new(1.0).map_or(f64::NAN, |c| c.inverse_cdf(1.0 - 2.0 * p))
}

/// A draw from the normal approximation N(estimate, cov) (Cholesky of the 2×2 covariance).
fn draw_near(f: &Fit, rng: &mut ChaCha8Rng) -> Gompertz {
    // Box–Muller from two uniforms: the stream the coverage checks were measured on (statrs'
    // normal sampler gives another stream, on which the 18–35 ratio's interval held the truth
    // in 99.5% of 400 cemeteries with uncertain sexes, above the test's 99%).
    let z = |rng: &mut ChaCha8Rng| {
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
    /// The Makeham term of females and of males (see [`MakehamTerm`]).
    pub makeham: [MakehamTerm; 2],
}

/// A Makeham term λ (deaths not from ageing, per year) added to one sex's Gompertz hazard,
/// over the draws where the three-parameter fit identifies it.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct MakehamTerm {
    /// Share of the draws where λ was identifiable.
    pub identifiable: f64,
    /// λ (per year): median and 95% interval of the maximum-likelihood values over those draws.
    pub lambda: (f64, f64, f64),
    /// The likelihood-ratio statistic of Makeham against Gompertz alone, median over those
    /// draws (½χ²₀ + ½χ²₁ with λ on its boundary: above
    /// [`boundary_level`]`(0.05)`, 2.71, is the 5% level; Self &
    /// Liang 1987, from memory).
    pub lr_statistic: f64,
}

/// Median and 2.5%/97.5% quantiles (type 7) of the finite values (`prevalence`'s summary).
fn median_interval(v: &[f64]) -> (f64, f64, f64) {
    let finite: Vec<f64> = v.iter().copied().filter(|x| x.is_finite()).collect();
    if finite.is_empty() {
        return (f64::NAN, f64::NAN, f64::NAN);
    }
    super::prevalence::summary(&finite, true)
}

/// The distinct recorded intervals (years after x₀) and each individual's index among them
/// (`None`: no age, or an age wholly before x₀), found once for all draws.
fn intervals(ages: &[Option<RecordedAge>], start: f64) -> (Vec<RecordedAge>, Vec<Option<usize>>) {
    let mut distinct: Vec<RecordedAge> = Vec::new();
    let mut index: std::collections::HashMap<(u64, u64), usize> = std::collections::HashMap::new();
    let of = ages
        .iter()
        .map(|a| {
            let (lo, hi) = (*a)?;
            if hi.is_some_and(|h| h <= start && lo < h) || (hi == Some(lo) && lo < start) {
                return None;
            }
            let t0 = (lo - start).max(0.0);
            let t1 = hi.map(|h| if h == lo { t0 } else { h - start });
            let key = (t0.to_bits(), t1.map_or(u64::MAX, f64::to_bits));
            Some(*index.entry(key).or_insert_with(|| {
                distinct.push((t0, t1));
                distinct.len() - 1
            }))
        })
        .collect();
    (distinct, of)
}

/// The ages of each sex in one draw (female first), grouped: each distinct interval with its
/// count. `with_age` lists (individual, its interval among `distinct`) for those with one;
/// `female(i)` is individual i's sex in the draw. One pass, counted by sex without a branch.
fn counted(
    distinct: &[RecordedAge],
    with_age: &[(usize, usize)],
    female: impl Fn(usize) -> bool,
) -> [Grouped; 2] {
    let mut n = [vec![0u32; distinct.len()], vec![0u32; distinct.len()]];
    for &(i, k) in with_age {
        n[usize::from(!female(i))][k] += 1;
    }
    n.map(|n| {
        distinct
            .iter()
            .zip(n)
            .filter(|(_, n)| *n > 0)
            .map(|(&(a, b), n)| (a, b, f64::from(n)))
            .collect()
    })
}

/// (individual, its interval) for every individual whose age is among the distinct
/// intervals, in row order.
fn with_age(of: &[Option<usize>]) -> Vec<(usize, usize)> {
    of.iter()
        .enumerate()
        .filter_map(|(i, k)| Some((i, (*k)?)))
        .collect()
}

/// Group the ages of one sex (years after x₀) into distinct intervals with counts.
#[cfg(test)]
fn grouped(ages: &[Option<RecordedAge>], sexes: &[bool], female: bool, start: f64) -> Grouped {
    let (distinct, of) = intervals(ages, start);
    let [f, m] = counted(&distinct, &with_age(&of), |i| sexes[i]);
    if female {
        f
    } else {
        m
    }
}

/// Mortality by sex over the draws (module docs). `ages[i]` is individual i's age as recorded
/// (`None`: none, or not in the tables by sex); `female[d][i]` its sex in draw d; the Makeham
/// term is tried in the first `makeham_draws` draws ([`MAKEHAM_DRAWS`] in an analysis).
pub fn hazards_by_sex<S: SexRow + Sync>(
    ages: &[Option<RecordedAge>],
    female: &[S],
    start: f64,
    range: (f64, f64),
    makeham_draws: usize,
    seed: u64,
) -> HazardsBySex {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x6a2e_d0f1);
    let step = female.len().div_ceil(MAX_HAZARD_DRAWS).max(1);
    let used: Vec<&S> = female.iter().step_by(step).collect();
    let (r0, r1) = ((range.0 - start).max(0.0), (range.1 - start).max(0.0));
    let ages_to = (80.0 - start).max(1.0) as usize;
    let mut params = [Vec::new(), Vec::new(), Vec::new(), Vec::new()];
    let (mut ratio, mut higher, mut failed) = (Vec::new(), 0usize, 0usize);
    let mut curves = vec![(Vec::new(), Vec::new()); ages_to + 1];
    let mut lambdas = [Vec::new(), Vec::new()];
    let mut statistics = [Vec::new(), Vec::new()];
    let (distinct, of) = intervals(ages, start);
    let listed = with_age(&of);
    // Each draw's data and Gompertz fits depend on that draw alone: made in parallel. The
    // Makeham term is tried on the first `makeham_draws` draws whose fits succeeded (in
    // parallel too); the draws near each fit take the one seeded stream in draw order, so the
    // result is the same with any number of threads.
    use rayon::prelude::*;
    type Fitted = ([Vec<(f64, Option<f64>, f64)>; 2], Option<(Fit, Fit)>);
    let fitted_draws: Vec<Fitted> = used
        .par_iter()
        .map(|draw| {
            let data = counted(&distinct, &listed, |i| draw.is_female(i));
            let fits = match (fit(&data[0]), fit(&data[1])) {
                (Some(ff), Some(fm)) => Some((ff, fm)),
                _ => None,
            };
            (data, fits)
        })
        .collect();
    let makeham_draws = makeham_draws.min(used.len());
    let tried: Vec<usize> = fitted_draws
        .iter()
        .enumerate()
        .filter(|(_, (_, fits))| fits.is_some())
        .map(|(d, _)| d)
        .take(makeham_draws)
        .collect();
    let makeham_fits: Vec<[Option<(f64, f64)>; 2]> = tried
        .par_iter()
        .map(|&d| match &fitted_draws[d] {
            (data, Some((ff, fm))) => [makeham(&data[0], ff), makeham(&data[1], fm)],
            (_, None) => [None, None],
        })
        .collect();
    let lambdas_tried = [tried.len(); 2];
    for [female_term, male_term] in makeham_fits {
        for (k, term) in [female_term, male_term].into_iter().enumerate() {
            if let Some((lambda, lr)) = term {
                lambdas[k].push(lambda);
                statistics[k].push(lr);
            }
        }
    }
    for (_, fits) in &fitted_draws {
        let Some((ff, fm)) = fits else {
            failed += 1;
            continue;
        };
        let (gf, gm) = (draw_near(ff, &mut rng), draw_near(fm, &mut rng));
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
        n_with_age: of.iter().flatten().count(),
        draws: used.len(),
        draws_failed: failed,
        alpha_female: median_interval(&params[0]),
        beta_female: median_interval(&params[1]),
        alpha_male: median_interval(&params[2]),
        beta_male: median_interval(&params[3]),
        hazard_ratio: median_interval(&ratio),
        p_female_higher: super::by_sex::share(higher, fitted),
        curve: curves
            .iter()
            .enumerate()
            .map(|(t, (f, m))| (start + t as f64, median_interval(f), median_interval(m)))
            .collect(),
        makeham: [0, 1].map(|k| MakehamTerm {
            identifiable: if lambdas_tried[k] > 0 {
                lambdas[k].len() as f64 / lambdas_tried[k] as f64
            } else {
                0.0
            },
            lambda: median_interval(&lambdas[k]),
            lr_statistic: median_interval(&statistics[k]).0,
        }),
    }
}

#[cfg(test)]
#[path = "tests/hazard.rs"]
mod tests;
