//! Metric recalibration: the assemblage's own measurements correct the reference sample's
//! per-sex means.
//!
//! # Model
//! For each latent block whose traits are all measurements, the target population's sex
//! means are μₛ ~ N(μₛ,ref, diag(shift² σₛ²)) — `shift` in units of the reference within-sex
//! SD (default 1) — with the reference within-sex covariance Σₛ kept. Every other block
//! (ordinal traits, equations, DNA) keeps its reference likelihood and anchors each
//! individual's sex, so the labels cannot switch. π ~ the chosen Beta prior (or is fixed).
//!
//! # Computation
//! Gibbs sampling with data augmentation (Tanner & Wong 1987): (1) each individual's sex from
//! π and its likelihood under the current means; (2) its missing measurements from the
//! conditional normal given the observed ones and its sex; (3) each sex's mean vector from
//! its conjugate normal posterior; (4) π from Beta(a + n_F, b + n_M). Several chains from
//! dispersed starts, each seeded; split-R̂ and effective sample size (Gelman et al. 2013,
//! *Bayesian Data Analysis*, 3rd ed., §11.4–11.5) for every parameter.

use super::posterior::p_female_given;
use crate::data::Observation;
use crate::model::latent::LatentKind;
use crate::model::{Block, IndividualEvidence, Model};
use crate::numeric::mcmc::{ess, split_rhat, MAX_RHAT, MIN_ESS};
use crate::prior::{Prior, PriorShape};
use nalgebra::{DMatrix, DVector};
use rand::distr::Distribution;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;
use statrs::distribution::{Beta, Normal};

/// Settings of the recalibration.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RecalibrationSettings {
    /// Prior SD of a mean's shift, in reference within-sex SDs (default 1: a choice of ours;
    /// shifts of a full SD between populations are reported in the literature on moving
    /// measurement standards, common practice).
    pub shift: f64,
    /// Chains (default 4).
    pub chains: usize,
    /// Iterations per chain, burn-in included (default 2000).
    pub iterations: usize,
    /// Burn-in iterations discarded (default 500).
    pub burn_in: usize,
    /// R̂ above which a parameter is flagged (default 1.01, the threshold recommended by
    /// Vehtari et al. 2021, Bayesian Analysis 16:667–718; from memory).
    pub max_rhat: f64,
    /// Effective sample size below which a parameter is flagged (default 400, after Vehtari
    /// et al. 2021; from memory).
    pub min_ess: f64,
    /// Seed.
    pub seed: u64,
}

impl Default for RecalibrationSettings {
    fn default() -> Self {
        RecalibrationSettings {
            shift: 1.0,
            chains: 4,
            iterations: 2000,
            burn_in: 500,
            max_rhat: MAX_RHAT,
            min_ess: MIN_ESS,
            seed: 1,
        }
    }
}

/// One recalibrated mean.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RecalibratedMean {
    /// Trait id.
    pub trait_id: String,
    /// `F` or `M`.
    pub sex: &'static str,
    /// Reference mean.
    pub reference: f64,
    /// Posterior mean of the target mean.
    pub mean: f64,
    /// 2.5% quantile.
    pub lo: f64,
    /// 97.5% quantile.
    pub hi: f64,
    /// (mean − reference) / reference within-sex SD.
    pub shift_sd: f64,
    /// Split-R̂.
    pub rhat: f64,
    /// Effective sample size.
    pub ess: f64,
}

/// Posterior predictive check of one measurement against the reference model.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitCheck {
    /// Trait id.
    pub trait_id: String,
    /// Measurements.
    pub n: usize,
    /// Share outside the reference model's central 99% predictive range.
    pub share_outside: f64,
    /// Whether the share is beyond what chance allows (0.01 + 3 binomial SEs; the 3 is a
    /// choice of ours).
    pub flagged: bool,
}

/// The result of a recalibration.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct Recalibration {
    /// Recalibrated means, by trait then sex.
    pub means: Vec<RecalibratedMean>,
    /// P(F) per individual under the recalibrated model (`None` without evidence).
    pub p_female: Vec<Option<f64>>,
    /// Split-R̂ and ESS of π.
    pub pi_rhat: f64,
    /// ESS of π.
    pub pi_ess: f64,
    /// Posterior mean of π.
    pub pi_mean: f64,
    /// Parameters failing the thresholds, in words.
    pub warnings: Vec<String>,
    /// Predictive checks per measurement.
    pub checks: Vec<FitCheck>,
    /// The settings it ran with (for the methods text).
    pub settings: RecalibrationSettings,
}

/// A metric-only block prepared for sampling.
struct MetricBlock {
    /// Index of the block in the model.
    block: usize,
    ids: Vec<String>,
    mu_ref: [DVector<f64>; 2],
    cov: [DMatrix<f64>; 2],
    /// Prior variances of the means (shift² σ²).
    prior_var: [DVector<f64>; 2],
    /// Per individual: observed values (None where missing); empty when nothing observed.
    y: Vec<Vec<Option<f64>>>,
    /// Within-sex precision matrices (fixed while sampling).
    prec: [Option<DMatrix<f64>>; 2],
    /// Per individual: the observed part's factorisation, computed once (the covariance
    /// does not change during sampling).
    prepared: Vec<Option<Prepared>>,
}

/// An individual's observed measurements of a block with, per sex, the inverse Cholesky
/// factor and log-determinant of their covariance, and what data augmentation of the missing
/// ones needs: the regression of the missing on the observed (Σₘₒ Σₒₒ⁻¹) and the Cholesky
/// factor of the conditional covariance. All fixed while sampling, so computed once.
struct Prepared {
    idx: Vec<usize>,
    vals: DVector<f64>,
    l_inv: [DMatrix<f64>; 2],
    ln_det: [f64; 2],
    mis: Vec<usize>,
    gain: [DMatrix<f64>; 2],
    cond_l: [Option<DMatrix<f64>>; 2],
}

impl Prepared {
    fn new(y: &[Option<f64>], cov: &[DMatrix<f64>; 2]) -> Option<Prepared> {
        let idx: Vec<usize> = (0..y.len()).filter(|&j| y[j].is_some()).collect();
        if idx.is_empty() {
            return None;
        }
        let k = idx.len();
        let mut l_inv = [DMatrix::zeros(0, 0), DMatrix::zeros(0, 0)];
        let mut ln_det = [0.0; 2];
        for s in 0..2 {
            let m = DMatrix::from_fn(k, k, |i, j| cov[s][(idx[i], idx[j])]);
            let ch = m.cholesky()?;
            ln_det[s] = 2.0 * ch.l().diagonal().iter().map(|d| d.ln()).sum::<f64>();
            l_inv[s] = ch.l().try_inverse()?;
        }
        let mis: Vec<usize> = (0..y.len()).filter(|&j| y[j].is_none()).collect();
        let mut gain = [DMatrix::zeros(0, 0), DMatrix::zeros(0, 0)];
        let mut cond_l = [None, None];
        if !mis.is_empty() {
            for s in 0..2 {
                let sub = |r: &[usize], c: &[usize]| {
                    DMatrix::from_fn(r.len(), c.len(), |i, j| cov[s][(r[i], c[j])])
                };
                let (s_oo, s_mo, s_mm) = (sub(&idx, &idx), sub(&mis, &idx), sub(&mis, &mis));
                let inv = s_oo.try_inverse()?;
                let cc = &s_mm - &s_mo * &inv * s_mo.transpose();
                let cc = (&cc + cc.transpose()) * 0.5;
                gain[s] = &s_mo * inv;
                cond_l[s] = cc.cholesky().map(|c| c.l());
            }
        }
        Some(Prepared {
            vals: DVector::from_iterator(k, idx.iter().filter_map(|&j| y[j])),
            idx,
            l_inv,
            ln_det,
            mis,
            gain,
            cond_l,
        })
    }

    /// The full measurement vector for sex s: observed values, and the missing ones drawn
    /// from their normal distribution conditional on the observed (data augmentation).
    fn augment(
        &self,
        s: usize,
        mu: &DVector<f64>,
        std: &Normal,
        rng: &mut ChaCha8Rng,
    ) -> DVector<f64> {
        let p = self.idx.len() + self.mis.len();
        let mut full = DVector::from_element(p, 0.0);
        for (i, &j) in self.idx.iter().enumerate() {
            full[j] = self.vals[i];
        }
        if self.mis.is_empty() {
            return full;
        }
        let r = DVector::from_iterator(
            self.idx.len(),
            self.idx
                .iter()
                .enumerate()
                .map(|(i, &j)| self.vals[i] - mu[j]),
        );
        let cm = DVector::from_iterator(self.mis.len(), self.mis.iter().map(|&j| mu[j]))
            + &self.gain[s] * r;
        let draw = match &self.cond_l[s] {
            Some(l) => cm + l * DVector::from_fn(self.mis.len(), |_, _| std.sample(rng)),
            None => cm,
        };
        for (k, &j) in self.mis.iter().enumerate() {
            full[j] = draw[k];
        }
        full
    }

    /// ln N(y_obs; μ_obs, Σ_obs) for sex s.
    fn ln_density(&self, s: usize, mu: &DVector<f64>) -> f64 {
        let k = self.idx.len();
        let r = DVector::from_iterator(
            k,
            self.idx
                .iter()
                .enumerate()
                .map(|(i, &j)| self.vals[i] - mu[j]),
        );
        let z = &self.l_inv[s] * r;
        -0.5 * (z.dot(&z) + self.ln_det[s] + k as f64 * (2.0 * std::f64::consts::PI).ln())
    }
}

/// Recalibrate the metric-only blocks of a model on an assemblage.
///
/// `evidence` is the reference evaluation (its non-metric blocks anchor the sexes).
pub fn recalibrate(
    model: &Model,
    individuals: &[crate::data::Individual],
    evidence: &[IndividualEvidence],
    prior: &Prior,
    settings: &RecalibrationSettings,
    progress: &dyn crate::progress::Progress,
) -> Recalibration {
    let blocks = metric_blocks(model, individuals, settings);
    // Fixed part of each individual's ln LR: every block except the recalibrated ones.
    let fixed: Vec<f64> = evidence
        .iter()
        .map(|e| {
            e.blocks
                .iter()
                .enumerate()
                .filter(|(k, b)| {
                    b.status == crate::model::BlockStatus::Used
                        && !blocks.iter().any(|mb| mb.block == *k)
                })
                .map(|(_, b)| b.ln_lr)
                .sum()
        })
        .collect();
    let active: Vec<bool> = evidence.iter().map(|e| e.estimable).collect();
    let chains: Vec<ChainOut> = {
        use rayon::prelude::*;
        (0..settings.chains)
            .into_par_iter()
            .map(|c| run_chain(&blocks, &fixed, &active, prior, settings, c, progress))
            .collect()
    };
    let mut warnings = Vec::new();
    let means = summarise_means(&blocks, &chains, settings, &mut warnings);
    let pi_traces: Vec<Vec<f64>> = chains.iter().map(|c| c.pi.clone()).collect();
    let (pi_rhat, pi_ess) = (split_rhat(&pi_traces), ess(&pi_traces));
    let fixed_pi = matches!(prior.shape, PriorShape::Fixed { .. });
    if !fixed_pi && (!(pi_rhat <= settings.max_rhat) || !(pi_ess >= settings.min_ess)) {
        warnings.push(format!(
            "proportion female: R-hat {pi_rhat:.3}, effective sample size {pi_ess:.0}"
        ));
    }
    let kept: f64 = chains.iter().map(|c| c.kept as f64).sum();
    let p_female = (0..individuals.len())
        .map(|i| active[i].then(|| chains.iter().map(|c| c.pf_sum[i]).sum::<f64>() / kept))
        .collect();
    let pi_mean = pi_traces.iter().flatten().sum::<f64>()
        / pi_traces.iter().map(Vec::len).sum::<usize>().max(1) as f64;
    let checks = predictive_checks(&blocks, pi_mean);
    Recalibration {
        means,
        p_female,
        pi_rhat,
        pi_ess,
        pi_mean,
        warnings,
        checks,
        settings: *settings,
    }
}

/// The model's blocks made only of measurements, prepared for sampling: each individual's
/// recorded values, the reference means and covariances, and the prior variance of a shift
/// (`settings.shift` reference SDs).
fn metric_blocks(
    model: &Model,
    individuals: &[crate::data::Individual],
    settings: &RecalibrationSettings,
) -> Vec<MetricBlock> {
    let mut blocks: Vec<MetricBlock> = Vec::new();
    for (k, b) in model.blocks.iter().enumerate() {
        let Block::Latent(lb) = b else { continue };
        if !lb.traits.iter().all(|t| t.kind == LatentKind::Metric) {
            continue;
        }
        let cat: Vec<usize> = lb.traits.iter().map(|t| t.catalogue_index).collect();
        let y: Vec<Vec<Option<f64>>> = individuals
            .iter()
            .map(|ind| {
                let v: Vec<Option<f64>> = cat
                    .iter()
                    .map(|&c| match ind.observations[c] {
                        Some(Observation::Measurement { value }) => Some(value),
                        _ => None,
                    })
                    .collect();
                if v.iter().any(Option::is_some) {
                    v
                } else {
                    Vec::new()
                }
            })
            .collect();
        let p = cat.len();
        let sd = |s: usize| DVector::from_iterator(p, (0..p).map(|j| lb.cov[s][(j, j)].sqrt()));
        let covs = [lb.cov[0].clone(), lb.cov[1].clone()];
        let prepared = y
            .iter()
            .map(|v: &Vec<Option<f64>>| {
                if v.is_empty() {
                    None
                } else {
                    Prepared::new(v, &covs)
                }
            })
            .collect();
        blocks.push(MetricBlock {
            prepared,
            prec: [covs[0].clone().try_inverse(), covs[1].clone().try_inverse()],
            block: k,
            ids: lb.traits.iter().map(|t| t.id.clone()).collect(),
            mu_ref: [lb.mean[0].clone(), lb.mean[1].clone()],
            cov: [lb.cov[0].clone(), lb.cov[1].clone()],
            prior_var: [
                sd(0).map(|x| (settings.shift * x).powi(2)),
                sd(1).map(|x| (settings.shift * x).powi(2)),
            ],
            y,
        });
    }
    blocks
}

/// Every recalibrated mean's posterior summary (mean, 95% interval, shift in reference SDs)
/// with split-R̂ (Gelman et al. 2013, BDA3 §11.4) and ESS (Geyer 1992) over the chains; a
/// warning per mean that fails the thresholds.
fn summarise_means(
    blocks: &[MetricBlock],
    chains: &[ChainOut],
    settings: &RecalibrationSettings,
    warnings: &mut Vec<String>,
) -> Vec<RecalibratedMean> {
    let mut means = Vec::new();
    let mut p = 0;
    for mb in blocks {
        for s in 0..2 {
            for (j, id) in mb.ids.iter().enumerate() {
                let traces: Vec<Vec<f64>> = chains.iter().map(|ch| ch.params[p].clone()).collect();
                p += 1;
                let mut all: Vec<f64> = traces.iter().flatten().copied().collect();
                all.sort_by(f64::total_cmp);
                let q = |x: f64| {
                    all[((x * (all.len() - 1) as f64).round() as usize).min(all.len() - 1)]
                };
                let mean = all.iter().sum::<f64>() / all.len() as f64;
                let (rhat, e) = (split_rhat(&traces), ess(&traces));
                let sex = if s == 0 { "F" } else { "M" };
                if !(rhat <= settings.max_rhat) || !(e >= settings.min_ess) {
                    warnings.push(format!("{id} ({sex}): R-hat {rhat:.3}, effective sample size {e:.0} — run longer (more iterations) before relying on it"));
                }
                let sd = mb.cov[s][(j, j)].sqrt();
                means.push(RecalibratedMean {
                    trait_id: id.clone(),
                    sex,
                    reference: mb.mu_ref[s][j],
                    mean,
                    lo: q(0.025),
                    hi: q(0.975),
                    shift_sd: (mean - mb.mu_ref[s][j]) / sd,
                    rhat,
                    ess: e,
                });
            }
        }
    }
    means
}

/// Predictive check of each measurement against the reference model: the share of values
/// outside the central 99% range of the reference mixture at the posterior mean of π, flagged
/// above 1% plus three binomial SEs.
fn predictive_checks(blocks: &[MetricBlock], pi_mean: f64) -> Vec<FitCheck> {
    let mut checks = Vec::new();
    for mb in blocks {
        for (j, id) in mb.ids.iter().enumerate() {
            let vals: Vec<f64> =
                mb.y.iter()
                    .filter_map(|v| v.get(j).copied().flatten())
                    .collect();
            if vals.is_empty() {
                continue;
            }
            let (lo, hi) = mixture_range(pi_mean.clamp(0.01, 0.99), mb, j);
            let out = vals.iter().filter(|&&v| v < lo || v > hi).count() as f64 / vals.len() as f64;
            let limit = 0.01 + 3.0 * (0.01 * 0.99 / vals.len() as f64).sqrt();
            checks.push(FitCheck {
                trait_id: id.clone(),
                n: vals.len(),
                share_outside: out,
                flagged: out > limit,
            });
        }
    }
    checks
}

/// The central 99% range of the reference predictive mixture π N(μF, σF²) + (1 − π) N(μM, σM²).
fn mixture_range(pi: f64, mb: &MetricBlock, j: usize) -> (f64, f64) {
    let n = |s: usize| Normal::new(mb.mu_ref[s][j], mb.cov[s][(j, j)].sqrt()).ok();
    let (Some(f), Some(m)) = (n(0), n(1)) else {
        return (f64::NEG_INFINITY, f64::INFINITY);
    };
    use statrs::distribution::ContinuousCDF;
    let cdf = |x: f64| pi * f.cdf(x) + (1.0 - pi) * m.cdf(x);
    let solve = |target: f64| {
        let (mut a, mut b) = (
            f.inverse_cdf(1e-6).min(m.inverse_cdf(1e-6)),
            f.inverse_cdf(1.0 - 1e-6).max(m.inverse_cdf(1.0 - 1e-6)),
        );
        for _ in 0..100 {
            let c = 0.5 * (a + b);
            if cdf(c) < target {
                a = c;
            } else {
                b = c;
            }
        }
        0.5 * (a + b)
    };
    (solve(0.005), solve(0.995))
}

struct ChainOut {
    /// Traces of every mean parameter (block, sex, trait order).
    params: Vec<Vec<f64>>,
    pi: Vec<f64>,
    /// Σ over kept iterations of P(F | current parameters) per individual (Rao–Blackwell).
    pf_sum: Vec<f64>,
    kept: usize,
}

/// One chain of the recalibration's Gibbs sampler: each iteration draws every individual's
/// sex given the means and π, the missing measurements (data augmentation) and each sex's
/// means given the sexes, then π.
///
/// Seven arguments: the sampler's fixed inputs (the blocks, every individual's fixed ln LR
/// and whether it has evidence), the prior, the settings, which chain (its seed) and the
/// progress listener. They are shared read-only by the chains run in parallel; a struct would
/// only rename them.
fn run_chain(
    blocks: &[MetricBlock],
    fixed: &[f64],
    active: &[bool],
    prior: &Prior,
    st: &RecalibrationSettings,
    chain: usize,
    progress: &dyn crate::progress::Progress,
) -> ChainOut {
    let mut rng = ChaCha8Rng::seed_from_u64(
        st.seed
            .wrapping_mul(0x9e37_79b9)
            .wrapping_add(chain as u64 * 7919 + 1),
    );
    let std = Normal::standard();
    let n = fixed.len();
    // Dispersed starts: each mean displaced by up to ±2 prior SDs.
    let mut mu: Vec<[DVector<f64>; 2]> = blocks
        .iter()
        .map(|mb| {
            let mut m = [mb.mu_ref[0].clone(), mb.mu_ref[1].clone()];
            for (s, ms) in m.iter_mut().enumerate() {
                for j in 0..ms.len() {
                    ms[j] += (rng.random::<f64>() * 4.0 - 2.0) * mb.prior_var[s][j].sqrt();
                }
            }
            m
        })
        .collect();
    let (mut pi, fixed_pi, (a, b)) = match prior.shape {
        PriorShape::Fixed { pi } => (pi, true, (1.0, 1.0)),
        PriorShape::Beta { a, b } => (0.2 + 0.6 * rng.random::<f64>(), false, (a, b)),
    };
    let n_params: usize = blocks.iter().map(|b| 2 * b.ids.len()).sum();
    let mut out = ChainOut {
        params: vec![Vec::new(); n_params],
        pi: Vec::new(),
        pf_sum: vec![0.0; n],
        kept: 0,
    };
    let mut sex = vec![false; n];
    for it in 0..st.iterations {
        if it % 50 == 49 {
            progress.advance(50);
        }
        // 1. Sexes given means and π (observed measurements only: missing ones integrate out).
        for i in 0..n {
            if !active[i] {
                continue;
            }
            let mut l = fixed[i];
            for (mb, m) in blocks.iter().zip(&mu) {
                if let Some(p) = &mb.prepared[i] {
                    l += p.ln_density(0, &m[0]) - p.ln_density(1, &m[1]);
                }
            }
            let pf = p_female_given(pi.clamp(1e-12, 1.0 - 1e-12), l);
            sex[i] = rng.random::<f64>() < pf;
            if it >= st.burn_in {
                out.pf_sum[i] += pf;
            }
        }
        // 2–3. Missing measurements by data augmentation, then each sex's means.
        for (mb, m) in blocks.iter().zip(mu.iter_mut()) {
            let p = mb.ids.len();
            #[allow(clippy::needless_range_loop)] // s indexes the reference arrays of the block too
            for s in 0..2 {
                let Some(prec) = &mb.prec[s] else {
                    continue;
                };
                let mut sum = DVector::zeros(p);
                let mut count = 0.0;
                for i in 0..n {
                    let Some(prep) = &mb.prepared[i] else {
                        continue;
                    };
                    if !active[i] || sex[i] != (s == 0) {
                        continue;
                    }
                    let full = prep.augment(s, &m[s], &std, &mut rng);
                    sum += full;
                    count += 1.0;
                }
                let prior_prec = DMatrix::from_diagonal(&mb.prior_var[s].map(|v| 1.0 / v));
                let post_prec = &prior_prec + prec * count;
                let Some(post_cov) = post_prec.clone().try_inverse() else {
                    continue;
                };
                let post_mean = &post_cov * (&prior_prec * &mb.mu_ref[s] + prec * &sum);
                let Some(ch) = post_cov.cholesky() else {
                    continue;
                };
                let z = DVector::from_fn(p, |_, _| std.sample(&mut rng));
                m[s] = post_mean + ch.l() * z;
            }
        }
        // 4. π.
        if !fixed_pi {
            let nf = (0..n).filter(|&i| active[i] && sex[i]).count() as f64;
            let nm = (0..n).filter(|&i| active[i] && !sex[i]).count() as f64;
            if let Ok(d) = Beta::new(a + nf, b + nm) {
                pi = d.sample(&mut rng);
            }
        }
        if it >= st.burn_in {
            let mut k = 0;
            for m in &mu {
                for ms in m.iter() {
                    for j in 0..ms.len() {
                        out.params[k].push(ms[j]);
                        k += 1;
                    }
                }
            }
            out.pi.push(pi);
            out.kept += 1;
        }
    }
    out
}
