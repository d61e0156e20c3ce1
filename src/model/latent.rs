//! The latent-trait block: ordinal scores and measurements joined by one within-sex normal.
//!
//! # Model
//! The multivariate cumulative probit of Konigsberg & Hens (1998, Am J Phys Anthropol
//! 107:97–112), extended with measurements. Each trait j has a latent value xⱼ; given sex s,
//! x ~ N(μₛ, Σₛ) with Σₛ = Dₛ Rₛ Dₛ (R the within-sex correlation, D the SDs: 1 for ordinal
//! latents, the measurement SD for metric traits). An ordinal trait with grades 1..K is seen as
//! grade k when τₖ₋₁ < xⱼ ≤ τₖ (τ₀ = −∞, τ_K = +∞); a measurement is seen directly.
//!
//! For one individual, with metric observations y (set m) and ordinal boxes (set o):
//! ln L(s) = ln N(y; μₛ,ₘ, Σₛ,ₘₘ) + ln P(x_o ∈ box | y), where x_o | y is normal with mean
//! μₛ,ₒ + Σₛ,ₒₘ Σₛ,ₘₘ⁻¹ (y − μₛ,ₘ) and covariance Σₛ,ₒₒ − Σₛ,ₒₘ Σₛ,ₘₘ⁻¹ Σₛ,ₘₒ (Schur
//! complement). Traits not observed are dropped from vectors and matrices, which integrates
//! them out exactly.
//!
//! # Observer error
//! A trait may carry an observer error SD σₑ: the trait as recorded is xⱼ + eⱼ with
//! eⱼ ~ N(0, σₑ²) independent of x and of the other traits' errors (classical measurement
//! error; Fuller 1987, from memory). Its variance in Σₛ becomes Σₛ,ⱼⱼ + σₑ², its covariances
//! stay, so its correlations with the other traits are attenuated by 1/√(1 + σₑ²/Σₛ,ⱼⱼ); the
//! thresholds stay where they are on the error-free scale. For an ordinal trait the recorded
//! grade is then less certain evidence of x, and the likelihood ratio moves towards 1.
//!
//! # Age as a covariate
//! A block may let its means change with age at death t: μₛ(t) = μₛ + βₛ (t′ − c), with c the
//! block's centre age, βₛ each trait's slope per year for sex s, and t′ = t clamped to the
//! ages the reference sample covered, [t_lo, t_hi] (the slope is never extrapolated). Older
//! women's crania are more robust, for instance (Walker 2008, Am J Phys Anthropol
//! 136:39–50, from memory). The covariances do not change with age. An individual whose age
//! is recorded as an interval [a, b] (a class, `40±5`; an open class `50+` is [50, t_hi];
//! no age, or "adult" only, is [t_lo, t_hi]) has the likelihood averaged over the interval,
//! age taken as uniform on it:
//! L(s) = (1/(b − a)) ∫ₐᵇ L(s | t) dt,
//! by 8-point Gauss–Legendre quadrature ([`crate::numeric::quadrature`]); a point age is one
//! evaluation.

use super::evidence::{BlockEvidence, BlockStatus, Context};
use super::spec::{RawLatentBlock, RawLatentTrait};
use super::ModelProblem;
use crate::catalogue::{Catalogue, TraitKind};
use crate::data::{AgeAtDeath, Individual, Observation, Sex};
use crate::numeric::quadrature::gauss_legendre_8;
use crate::numeric::{ln_box_probability, QmcSettings};
use nalgebra::{DMatrix, DVector};

/// How a trait of the block is observed.
#[derive(Debug, Clone, PartialEq)]
pub enum LatentKind {
    /// Ordinal: thresholds τ₁ < … < τ_{K−1}; the scale's lowest grade.
    Ordinal {
        /// Thresholds on the latent scale.
        thresholds: Vec<f64>,
        /// The lowest grade of the scale (grade `lowest` is the first interval).
        lowest: i32,
    },
    /// A measurement.
    Metric,
}

impl LatentKind {
    /// The latent interval (τ below the lowest grade allowed, τ above the highest) of a score
    /// "between grades `low` and `high`"; `None` for a metric trait or a grade off the scale.
    pub fn bounds(&self, low: i32, high: i32) -> Option<(f64, f64)> {
        let LatentKind::Ordinal { thresholds, lowest } = self else {
            return None;
        };
        let lo = usize::try_from(low - lowest).ok()?;
        let hi = usize::try_from(high - lowest).ok()?;
        if hi > thresholds.len() || lo > hi {
            return None;
        }
        let lower = if lo == 0 {
            f64::NEG_INFINITY
        } else {
            thresholds[lo - 1]
        };
        let upper = thresholds.get(hi).copied().unwrap_or(f64::INFINITY);
        Some((lower, upper))
    }
}

/// One trait of a latent block.
#[derive(Debug, Clone, PartialEq)]
pub struct LatentTrait {
    /// Catalogue id.
    pub id: String,
    /// Position in the catalogue (and in `Individual::observations`).
    pub catalogue_index: usize,
    /// Ordinal or metric.
    pub kind: LatentKind,
}

/// A validated latent-trait block.
#[derive(Debug, Clone, PartialEq)]
pub struct LatentBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    pub label: String,
    /// Traits in matrix order.
    pub traits: Vec<LatentTrait>,
    /// Means per sex (female, male).
    pub mean: [DVector<f64>; 2],
    /// Covariance per sex (female, male), observer error included.
    pub cov: [DMatrix<f64>; 2],
    /// Each trait's observer error variance σₑ² (0 where none is given), already added to the
    /// diagonal of `cov`.
    pub observer_error_var: DVector<f64>,
    /// How the means change with age at death, where the block says so.
    pub age: Option<AgeEffect>,
}

/// The age covariate of a latent block: μₛ(t) = μₛ + βₛ (clamp(t, lowest, highest) − centre).
#[derive(Debug, Clone, PartialEq)]
pub struct AgeEffect {
    /// Years at which `LatentBlock::mean` holds.
    pub centre: f64,
    /// Youngest age of the reference sample.
    pub lowest: f64,
    /// Oldest age of the reference sample.
    pub highest: f64,
    /// Change of each trait's mean per year, per sex (female, male).
    pub slope: [DVector<f64>; 2],
}

impl AgeEffect {
    /// The interval of ages (years, within the reference's) an individual's record allows:
    /// the recorded interval clamped to [lowest, highest]; an open class runs to `highest`;
    /// no age, "adult" or "subadult" is the whole reference range.
    pub fn interval(&self, age: Option<&AgeAtDeath>) -> (f64, f64) {
        let clamp = |t: f64| t.clamp(self.lowest, self.highest);
        match age {
            Some(AgeAtDeath::Years { low, high }) => {
                (clamp(*low), clamp(high.unwrap_or(self.highest)))
            }
            _ => (self.lowest, self.highest),
        }
    }

    /// Ages and weights (summing to 1) over which an interval's likelihood is averaged: one
    /// point for a point age, else the 8-point Gauss–Legendre rule.
    pub fn nodes(&self, (lo, hi): (f64, f64)) -> Vec<(f64, f64)> {
        if hi - lo < 1e-9 {
            return vec![(lo, 1.0)];
        }
        gauss_legendre_8(lo, hi)
            .iter()
            .map(|&(t, w)| (t, w / (hi - lo)))
            .collect()
    }
}

/// An ordinal trait of a latent block: `thresholds` on the latent scale, one fewer than the
/// `k` grades, finite and strictly increasing; no `sd` (the latent SD is 1).
fn ordinal_kind(
    t: &RawLatentTrait,
    lowest: i32,
    k: usize,
    place: &str,
    fail: &mut dyn FnMut(&str, String),
) -> Option<LatentKind> {
    let Some(th) = &t.thresholds else {
        fail(
            place,
            format!(
                "an ordinal trait needs `thresholds` ({} values for {k} grades)",
                k - 1
            ),
        );
        return None;
    };
    if th.len() + 1 != k {
        fail(
            place,
            format!(
                "{} thresholds given; the scale has {k} grades, so {} are needed",
                th.len(),
                k - 1
            ),
        );
    }
    if th.iter().any(|x| !x.is_finite()) || th.windows(2).any(|w| w[0] >= w[1]) {
        fail(
            place,
            format!("thresholds must be finite and strictly increasing, found {th:?}"),
        );
    }
    if t.sd.is_some() {
        fail(
            place,
            "an ordinal latent has SD 1 by construction; remove `sd`".into(),
        );
    }
    Some(LatentKind::Ordinal {
        thresholds: th.clone(),
        lowest,
    })
}

/// A measurement of a latent block: positive finite SDs per sex and no thresholds.
fn metric_sds(
    t: &RawLatentTrait,
    place: &str,
    fail: &mut dyn FnMut(&str, String),
) -> Option<(f64, f64)> {
    let sds = match t.sd {
        Some(sd)
            if sd.female > 0.0 && sd.male > 0.0 && sd.female.is_finite() && sd.male.is_finite() =>
        {
            Some((sd.female, sd.male))
        }
        Some(sd) => {
            fail(
                place,
                format!(
                    "SDs must be positive, found female {} male {}",
                    sd.female, sd.male
                ),
            );
            None
        }
        None => {
            fail(place, "a metric trait needs `sd: {female, male}`".into());
            None
        }
    };
    if t.thresholds.is_some() {
        fail(place, "a metric trait has no thresholds".into());
    }
    sds
}

impl LatentBlock {
    /// Validate a raw block against the catalogue. Every problem is pushed to `problems`.
    pub(crate) fn from_raw(
        raw: &RawLatentBlock,
        catalogue: &Catalogue,
        problems: &mut Vec<ModelProblem>,
    ) -> Option<LatentBlock> {
        let start = problems.len();
        let mut fail = |what: &str, msg: String| {
            problems.push(ModelProblem {
                place: format!("block `{}`{what}", raw.id),
                message: msg,
            })
        };
        let p = raw.traits.len();
        if p == 0 {
            fail("", "a latent block needs at least one trait".into());
        }
        let mut traits = Vec::with_capacity(p);
        let mut mean_f = DVector::zeros(p);
        let mut mean_m = DVector::zeros(p);
        let mut sd_f = DVector::from_element(p, 1.0);
        let mut sd_m = DVector::from_element(p, 1.0);
        let mut error_var = DVector::zeros(p);
        let mut slope = [DVector::zeros(p), DVector::zeros(p)];
        for (j, t) in raw.traits.iter().enumerate() {
            let place = format!(", trait `{}`", t.id);
            if raw.traits[..j].iter().any(|u| u.id == t.id) {
                fail(&place, "listed twice in the block".into());
                continue;
            }
            let Some(index) = catalogue.position(&t.id) else {
                fail(&place, "not a trait of the catalogue".into());
                continue;
            };
            if !(t.mean.female.is_finite() && t.mean.male.is_finite()) {
                fail(&place, "means must be finite numbers".into());
            }
            match t.observer_error_sd {
                Some(e) if e.is_finite() && e >= 0.0 => error_var[j] = e * e,
                Some(e) => fail(
                    &place,
                    format!("observer_error_sd must be 0 or more, found {e}"),
                ),
                None => {}
            }
            match (t.age_slope, raw.age) {
                (Some(b), Some(_)) if b.female.is_finite() && b.male.is_finite() => {
                    slope[0][j] = b.female;
                    slope[1][j] = b.male;
                }
                (Some(_), Some(_)) => fail(&place, "age_slope must be finite numbers".into()),
                (Some(_), None) => fail(
                    &place,
                    "an age_slope needs the block's `age: {centre, lowest, highest}`".into(),
                ),
                (None, _) => {}
            }
            mean_f[j] = t.mean.female;
            mean_m[j] = t.mean.male;
            let kind = match &catalogue.traits()[index].kind {
                TraitKind::Ordinal { lowest, .. } => {
                    let k = catalogue.traits()[index].kind.n_grades().unwrap_or(0);
                    let Some(kind) = ordinal_kind(t, *lowest, k, &place, &mut fail) else {
                        continue;
                    };
                    kind
                }
                TraitKind::Metric { .. } => {
                    if let Some((f, m)) = metric_sds(t, &place, &mut fail) {
                        sd_f[j] = f;
                        sd_m[j] = m;
                    }
                    LatentKind::Metric
                }
                TraitKind::Count => {
                    fail(&place, "read counts belong in a dna block".into());
                    continue;
                }
            };
            traits.push(LatentTrait {
                id: t.id.clone(),
                catalogue_index: index,
                kind,
            });
        }
        let corr = |m: &Option<Vec<Vec<f64>>>, which: &str, fail: &mut dyn FnMut(&str, String)| {
            let Some(rows) = m else {
                return DMatrix::identity(p, p);
            };
            if rows.len() != p || rows.iter().any(|r| r.len() != p) {
                fail(
                    "",
                    format!("{which} must be {p}×{p}, one row and column per trait in order"),
                );
                return DMatrix::identity(p, p);
            }
            let r = DMatrix::from_fn(p, p, |i, j| rows[i][j]);
            check_correlation(&r, which, fail);
            r
        };
        let (r_f, r_m) = match (
            &raw.correlation,
            &raw.correlation_female,
            &raw.correlation_male,
        ) {
            (c, None, None) => {
                let r = corr(c, "correlation", &mut fail);
                (r.clone(), r)
            }
            (None, f @ Some(_), m @ Some(_)) => (
                corr(f, "correlation_female", &mut fail),
                corr(m, "correlation_male", &mut fail),
            ),
            _ => {
                fail("", "give either `correlation`, or both `correlation_female` and `correlation_male`".into());
                (DMatrix::identity(p, p), DMatrix::identity(p, p))
            }
        };
        if let Some(a) = raw.age {
            let ok = [a.centre, a.lowest, a.highest]
                .iter()
                .all(|x| x.is_finite() && (0.0..=crate::data::age::MAX_AGE_YEARS).contains(x));
            if !(ok && a.lowest < a.highest && (a.lowest..=a.highest).contains(&a.centre)) {
                fail(
                    ", age",
                    format!(
                        "lowest < highest with the centre between them, years from 0 to {}; found centre {}, lowest {}, highest {}",
                        crate::data::age::MAX_AGE_YEARS, a.centre, a.lowest, a.highest
                    ),
                );
            }
        }
        if problems.len() > start || traits.len() != p {
            return None;
        }
        // Observer error: the trait as recorded is x + e, e ~ N(0, σₑ²) independent of x and
        // of the other traits' errors, so its variance gains σₑ² and its covariances are
        // unchanged (its correlations are attenuated by 1/√(1 + σₑ²/σ²)).
        let error = |i: usize, j: usize| if i == j { error_var[i] } else { 0.0 };
        let cov_f = DMatrix::from_fn(p, p, |i, j| sd_f[i] * r_f[(i, j)] * sd_f[j] + error(i, j));
        let cov_m = DMatrix::from_fn(p, p, |i, j| sd_m[i] * r_m[(i, j)] * sd_m[j] + error(i, j));
        Some(LatentBlock {
            id: raw.id.clone(),
            label: raw.label.clone(),
            traits,
            mean: [mean_f, mean_m],
            cov: [cov_f, cov_m],
            observer_error_var: error_var,
            age: raw.age.map(|a| AgeEffect {
                centre: a.centre,
                lowest: a.lowest,
                highest: a.highest,
                slope,
            }),
        })
    }

    /// The same block with every within-sex correlation between two different traits set to
    /// `r` (the SDs, means, thresholds and observer errors kept): Σ′ᵢⱼ = σᵢ σⱼ r for i ≠ j,
    /// with σᵢ² = Σᵢᵢ − σₑ,ᵢ², the trait's own SD before its observer error. For 0 ≤ r < 1 the
    /// matrix stays positive definite.
    pub fn with_correlation(&self, r: f64) -> LatentBlock {
        let mut out = self.clone();
        for (s, cov) in out.cov.iter_mut().enumerate() {
            let p = cov.nrows();
            let sd: Vec<f64> = (0..p)
                .map(|i| {
                    (self.cov[s][(i, i)] - self.observer_error_var[i])
                        .max(0.0)
                        .sqrt()
                })
                .collect();
            for i in 0..p {
                for j in 0..p {
                    if i != j {
                        cov[(i, j)] = sd[i] * sd[j] * r;
                    }
                }
            }
        }
        out
    }

    /// A key naming exactly what this individual has observed in the block (traits and
    /// grades): equal keys give equal evidence. `None` when nothing is observed, and when a
    /// measurement is: continuous values practically never repeat, so keeping their results
    /// would only cost memory (about 1 KB per individual).
    pub fn pattern(&self, ind: &Individual) -> Option<String> {
        let mut key = String::new();
        for (j, t) in self.traits.iter().enumerate() {
            match ind.observations[t.catalogue_index] {
                Some(Observation::Measurement { .. }) => return None,
                Some(Observation::Grade { low, high }) => {
                    key.push_str(&format!("o{j}:{low}-{high};"))
                }
                _ => {}
            }
        }
        if key.is_empty() {
            return None;
        }
        if let Some(a) = &self.age {
            key.push_str(&age_key(a.interval(ind.age.as_ref())));
        }
        Some(key)
    }

    /// The latent means of sex `s` (0 female, 1 male) at age `t` (years; the block's means
    /// where it has no age effect).
    pub fn mean_at(&self, s: usize, t: f64) -> DVector<f64> {
        match &self.age {
            None => self.mean[s].clone(),
            Some(a) => &self.mean[s] + &a.slope[s] * (t.clamp(a.lowest, a.highest) - a.centre),
        }
    }

    /// ln L(female), ln L(male) of one individual's observations of this block.
    pub fn evaluate(&self, ind: &Individual, ctx: &Context) -> BlockEvidence {
        let mut metric: Vec<(usize, f64)> = Vec::new();
        let mut ordinal: Vec<(usize, f64, f64)> = Vec::new();
        let mut used = Vec::new();
        for (j, t) in self.traits.iter().enumerate() {
            let Some(obs) = ind.observations[t.catalogue_index] else {
                continue;
            };
            match (&t.kind, obs) {
                (LatentKind::Metric, Observation::Measurement { value }) => metric.push((j, value)),
                (kind @ LatentKind::Ordinal { .. }, Observation::Grade { low, high }) => {
                    let Some((lower, upper)) = kind.bounds(low, high) else {
                        continue;
                    };
                    ordinal.push((j, lower, upper));
                }
                _ => continue,
            }
            used.push(t.id.clone());
        }
        if used.is_empty() {
            return BlockEvidence::not_used(
                BlockStatus::NoEvidence,
                "no trait of this block recorded",
            );
        }
        let mut pattern = pattern_key(&metric, &ordinal);
        let interval = self.age.as_ref().map(|a| a.interval(ind.age.as_ref()));
        if let Some(i) = interval {
            pattern.push_str(&age_key(i));
        }
        let mut ln_l = [0.0; 2];
        let mut error = 0.0;
        for (s, sex) in [Sex::Female, Sex::Male].into_iter().enumerate() {
            let seed = ctx.seed_for(&pattern, &self.id, sex);
            let result = match (&self.age, interval) {
                (Some(a), Some(i)) => {
                    self.ln_likelihood_over_age(s, a.nodes(i), &metric, &ordinal, seed, &ctx.qmc)
                }
                _ => self.ln_likelihood(s, &self.mean[s], &metric, &ordinal, seed, &ctx.qmc),
            };
            match result {
                Ok((l, e)) => {
                    ln_l[s] = l;
                    error += e;
                }
                Err(msg) => return BlockEvidence::not_used(BlockStatus::NumericalFailure, msg),
            }
        }
        BlockEvidence::from_likelihoods(used, ln_l[0], ln_l[1], error)
    }

    /// ln Σₖ wₖ L(s | tₖ) over the age nodes, summed in log space; the error is the nodes'
    /// errors weighted by their share of the sum (a bound on the error of the logarithm of a
    /// sum of terms each known to that relative error).
    fn ln_likelihood_over_age(
        &self,
        s: usize,
        nodes: Vec<(f64, f64)>,
        metric: &[(usize, f64)],
        ordinal: &[(usize, f64, f64)],
        seed: u64,
        qmc: &QmcSettings,
    ) -> Result<(f64, f64), String> {
        let mut terms = Vec::with_capacity(nodes.len());
        for (t, w) in nodes {
            let (l, e) = self.ln_likelihood(s, &self.mean_at(s, t), metric, ordinal, seed, qmc)?;
            terms.push((w.ln() + l, e));
        }
        let top = terms.iter().map(|x| x.0).fold(f64::NEG_INFINITY, f64::max);
        if !top.is_finite() {
            return Ok((top, 0.0));
        }
        let shares: Vec<f64> = terms.iter().map(|x| (x.0 - top).exp()).collect();
        let total: f64 = shares.iter().sum();
        let error = terms
            .iter()
            .zip(&shares)
            .map(|(x, w)| x.1 * w / total)
            .sum();
        Ok((top + total.ln(), error))
    }

    fn ln_likelihood(
        &self,
        s: usize,
        mu: &DVector<f64>,
        metric: &[(usize, f64)],
        ordinal: &[(usize, f64, f64)],
        seed: u64,
        qmc: &QmcSettings,
    ) -> Result<(f64, f64), String> {
        let cov = &self.cov[s];
        let m: Vec<usize> = metric.iter().map(|x| x.0).collect();
        let o: Vec<usize> = ordinal.iter().map(|x| x.0).collect();
        let sub = |rows: &[usize], cols: &[usize]| {
            DMatrix::from_fn(rows.len(), cols.len(), |i, j| cov[(rows[i], cols[j])])
        };
        let mut ln_l = 0.0;
        let mut cond_mean: Vec<f64> = o.iter().map(|&j| mu[j]).collect();
        let mut cond_cov = sub(&o, &o);
        if !m.is_empty() {
            let s_mm = sub(&m, &m);
            let chol = s_mm
                .cholesky()
                .ok_or("measurement covariance is not positive definite")?;
            let resid = DVector::from_iterator(m.len(), metric.iter().map(|&(j, y)| y - mu[j]));
            let solved = chol.solve(&resid);
            let quad = resid.dot(&solved);
            let ln_det: f64 = 2.0 * chol.l().diagonal().iter().map(|d| d.ln()).sum::<f64>();
            ln_l += -0.5 * (quad + ln_det + m.len() as f64 * (2.0 * std::f64::consts::PI).ln());
            if !o.is_empty() {
                let s_om = sub(&o, &m);
                let shift = &s_om * &solved;
                for (i, c) in cond_mean.iter_mut().enumerate() {
                    *c += shift[i];
                }
                let s_mo = s_om.transpose();
                cond_cov -= &s_om * chol.solve(&s_mo);
                // Keep the conditional covariance exactly symmetric.
                cond_cov = (&cond_cov + cond_cov.transpose()) * 0.5;
            }
        }
        let mut error = 0.0;
        if !o.is_empty() {
            let lower: Vec<f64> = ordinal
                .iter()
                .zip(&cond_mean)
                .map(|(b, c)| b.1 - c)
                .collect();
            let upper: Vec<f64> = ordinal
                .iter()
                .zip(&cond_mean)
                .map(|(b, c)| b.2 - c)
                .collect();
            let p = ln_box_probability(&lower, &upper, &cond_cov, seed, qmc)
                .map_err(|e| e.to_string())?;
            ln_l += p.ln_p;
            error = p.error;
        }
        Ok((ln_l, error))
    }
}

/// The part of a pattern key that names an age interval (bit-exact).
fn age_key((lo, hi): (f64, f64)) -> String {
    format!("a{:x}-{:x};", lo.to_bits(), hi.to_bits())
}

fn pattern_key(metric: &[(usize, f64)], ordinal: &[(usize, f64, f64)]) -> String {
    let mut key = String::new();
    for (j, y) in metric {
        key.push_str(&format!("m{j}:{:x};", y.to_bits()));
    }
    for (j, lo, hi) in ordinal {
        key.push_str(&format!("o{j}:{:x}-{:x};", lo.to_bits(), hi.to_bits()));
    }
    key
}

/// Symmetric, unit diagonal, entries in [−1, 1], positive definite.
fn check_correlation(r: &DMatrix<f64>, which: &str, fail: &mut dyn FnMut(&str, String)) {
    let p = r.nrows();
    for i in 0..p {
        if (r[(i, i)] - 1.0).abs() > 1e-12 {
            fail(
                "",
                format!(
                    "{which}: the diagonal must be 1 (row {} has {})",
                    i + 1,
                    r[(i, i)]
                ),
            );
            return;
        }
        for j in 0..p {
            if !r[(i, j)].is_finite() || r[(i, j)].abs() > 1.0 {
                fail(
                    "",
                    format!(
                        "{which}: entries lie in [−1, 1] (row {}, column {} has {})",
                        i + 1,
                        j + 1,
                        r[(i, j)]
                    ),
                );
                return;
            }
            if (r[(i, j)] - r[(j, i)]).abs() > 1e-9 {
                fail(
                    "",
                    format!(
                        "{which}: the matrix must be symmetric (rows {} and {} differ)",
                        i + 1,
                        j + 1
                    ),
                );
                return;
            }
        }
    }
    let eig = r.clone().symmetric_eigenvalues();
    let min = eig.iter().copied().fold(f64::INFINITY, f64::min);
    if !(min > 1e-10) {
        fail(
            "",
            format!(
                "{which}: the matrix must be positive definite (smallest eigenvalue {min:.3e})"
            ),
        );
    }
}
