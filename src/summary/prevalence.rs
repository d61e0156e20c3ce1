//! Prevalence of a 0/1 condition by sex, from the joint posterior of everyone's sex and the
//! two prevalences (data augmentation; Tanner & Wong 1987, *JASA* 82, 528–540; Gibbs
//! sampling after Gelfand & Smith 1990, *JASA* 85, 398–409).
//!
//! # Why not impute sex first and count after
//! Drawing each individual's sex from its skeletal evidence alone and then counting the
//! condition among the drawn females and males treats sex as independent of the condition,
//! so every difference between the sexes is diluted toward zero (an imputation that is not
//! *congenial* with the analysis; Meng 1994, *Statistical Science* 9, 538–558). Here the
//! condition enters the conditional of each sex, so the comparison is not attenuated.
//!
//! # Model
//! For individual i with evidence (ln LRᵢ = ln P(Dᵢ | F)/P(Dᵢ | M)) in group g and condition
//! yᵢ ∈ {0, 1} (or not recorded):
//! sᵢ ~ Bernoulli(π_g); yᵢ | sᵢ ~ Bernoulli(p_F) or Bernoulli(p_M); p_F, p_M ~ Beta(1, 1).
//! Without groups π ~ Beta(a, b) of the run's prior (or fixed); with groups
//! π_g ~ Beta(μκ, (1 − μ)κ) and (μ, κ) on the hierarchy's own hyper-grid (the same prior
//! weights as the posterior of the groups). Individuals without evidence, and subadults,
//! are left out of the outcome (counted beside); those without evidence add nothing to π
//! and are integrated out exactly.
//!
//! # Sweep (each step an exact conditional)
//! 1. sᵢ | ·: logit P(F) = logit π_g + ln LRᵢ + yᵢ ln(p_F/p_M) + (1 − yᵢ) ln((1 − p_F)/(1 − p_M))
//!    (the outcome terms only where yᵢ is recorded and i is in the table);
//! 2. p_F | s, y ~ Beta(1 + a_F, 1 + n_F − a_F), the same for p_M;
//! 3. π | s ~ Beta(a + F, b + M), or π_g | s, μ, κ ~ Beta(μκ + F_g, (1 − μ)κ + M_g);
//! 4. (μ, κ) | π on the grid: weights ∝ prior weight × ∏_g Beta(π_g; μκ, (1 − μ)κ).
//!
//! Chains start from dispersed values, run in parallel (each with its own seeded stream, so
//! the bytes do not depend on the number of threads), and are checked by split-R̂ and the
//! effective sample size (`numeric::mcmc`).

use crate::assemblage::draws::pick;
use crate::assemblage::hierarchy::HyperGrid;
use crate::numeric::mcmc::{ess, split_rhat};
use rand::distr::Distribution;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;
use serde::Serialize;
use statrs::distribution::Beta;
use statrs::function::beta::ln_beta;

/// The prior of the proportion female that the sexes are drawn under.
#[derive(Debug, Clone, Copy)]
pub enum SexRatioPrior<'a> {
    /// π ~ Beta(a, b).
    Beta(f64, f64),
    /// π fixed.
    Fixed(f64),
    /// Groups: π_g ~ Beta(μκ, (1 − μ)κ), (μ, κ) on this grid; `groups` is their number.
    Groups(&'a HyperGrid, usize),
}

/// What the sampler needs of the assemblage: everyone's ln LR, whether it has evidence,
/// its group, whether it belongs in the tables by sex, and the prior of π.
#[derive(Debug, Clone, Copy)]
pub struct SexEvidence<'a> {
    /// ln LR per individual (0 without evidence).
    pub ln_lrs: &'a [f64],
    /// Whether the individual has usable evidence of sex.
    pub estimable: &'a [bool],
    /// Group index per individual (all 0 without groups).
    pub membership: &'a [usize],
    /// Whether the individual is in the tables by sex (estimable and not a subadult).
    pub in_tables: &'a [bool],
    /// The prior of π.
    pub prior: SexRatioPrior<'a>,
}

/// Length of the chains.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ChainLength {
    /// Chains (dispersed starts).
    pub chains: usize,
    /// Sweeps per chain, burn-in included.
    pub iterations: usize,
    /// Sweeps discarded at the start of each chain.
    pub burn_in: usize,
    /// Seed of the first chain (chain c uses `seed + c`, mixed).
    pub seed: u64,
}

impl ChainLength {
    /// 4 chains of 1 500 sweeps with 500 discarded: 4 000 kept draws, enough for an
    /// effective sample size above 400 per quantity on the demo data (our choice; the
    /// threshold of 400 is Vehtari et al. 2021's, from memory).
    pub fn default_with_seed(seed: u64) -> ChainLength {
        ChainLength {
            chains: 4,
            iterations: 1500,
            burn_in: 500,
            seed,
        }
    }

    /// Draws kept per chain.
    pub fn kept(&self) -> usize {
        self.iterations.saturating_sub(self.burn_in)
    }
}

pub use crate::numeric::mcmc::{MAX_RHAT, MIN_ESS};

/// Prevalence of a 0/1 condition by sex.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PrevalenceBySex {
    /// The condition column.
    pub column: String,
    /// Individuals in the tables by sex with the condition recorded (0 or 1).
    pub n_recorded: usize,
    /// Of them, with the condition present.
    pub n_present: usize,
    /// Individuals with the condition recorded but left out of the table: no evidence of sex,
    /// or a subadult.
    pub n_left_out: usize,
    /// Females among the recorded, posterior mean.
    pub n_female: f64,
    /// Males among the recorded, posterior mean.
    pub n_male: f64,
    /// Prevalence among females: posterior mean and 95% equal-tailed interval.
    pub female: (f64, f64, f64),
    /// Prevalence among males.
    pub male: (f64, f64, f64),
    /// Difference female − male: posterior mean and 95% interval (within [−1, 1]).
    pub difference: (f64, f64, f64),
    /// Odds ratio female : male: posterior median and 95% interval.
    pub odds_ratio: (f64, f64, f64),
    /// Posterior probability that the prevalence is higher among females.
    pub p_female_higher: f64,
    /// Largest split-R̂ of p_F, p_M and their difference.
    pub rhat: f64,
    /// Smallest effective sample size of the three.
    pub ess: f64,
    /// Draws kept (chains × (iterations − burn-in)).
    pub draws: usize,
}

impl PrevalenceBySex {
    /// A sentence when the chains did not converge or are too short, `None` otherwise.
    pub fn convergence_note(&self) -> Option<String> {
        (!(self.rhat <= MAX_RHAT && self.ess >= MIN_ESS)).then(|| {
            format!(
                "prevalence of {} by sex: R-hat {:.3}, effective sample size {:.0} (wanted R-hat ≤ {MAX_RHAT} and at least {MIN_ESS:.0}); treat the interval as rough",
                self.column, self.rhat, self.ess
            )
        })
    }
}

/// One chain's kept draws: each quantity the outcome model keeps (p_F and p_M for a
/// condition), and the number of recorded individuals drawn female.
pub(crate) struct Chain {
    pub(crate) kept: Vec<Vec<f64>>,
    pub(crate) n_f: Vec<f64>,
}

/// The outcome's part of the joint model of sex and outcome: the log-likelihood ratio
/// female:male of one recorded value under the current parameters (step 1 of the sweep), and
/// the parameters' draw given the values of the individuals drawn female and male (step 2).
pub(crate) trait OutcomeModel: Sized {
    /// A recorded value.
    type Value: Copy + Sync;
    /// Starting parameters of chain c (dispersed over the chains).
    fn start(&self, c: usize) -> Self;
    /// ln p(y | female, θ) − ln p(y | male, θ).
    fn ln_ratio(&self, y: Self::Value) -> f64;
    /// Draw θ given the values of those drawn female and of those drawn male.
    fn update(&mut self, rng: &mut ChaCha8Rng, female: &[Self::Value], male: &[Self::Value]);
    /// The quantities kept after each sweep, always the same number of them.
    fn kept(&self) -> Vec<f64>;
}

/// The Bernoulli outcome of a 0/1 condition: (p_F, p_M) with Beta(1, 1) priors.
#[derive(Debug, Clone, Copy)]
struct Condition {
    p_f: f64,
    p_m: f64,
}

impl OutcomeModel for Condition {
    type Value = bool;
    fn start(&self, c: usize) -> Self {
        let (_, p_f, p_m) = start(c);
        Condition { p_f, p_m }
    }
    fn ln_ratio(&self, y: bool) -> f64 {
        if y {
            self.p_f.ln() - self.p_m.ln()
        } else {
            (1.0 - self.p_f).ln() - (1.0 - self.p_m).ln()
        }
    }
    fn update(&mut self, rng: &mut ChaCha8Rng, female: &[bool], male: &[bool]) {
        let present = |v: &[bool]| v.iter().filter(|&&y| y).count() as f64;
        let (a_f, a_m) = (present(female), present(male));
        self.p_f = beta_draw(rng, 1.0 + a_f, 1.0 + female.len() as f64 - a_f);
        self.p_m = beta_draw(rng, 1.0 + a_m, 1.0 + male.len() as f64 - a_m);
    }
    fn kept(&self) -> Vec<f64> {
        vec![self.p_f, self.p_m]
    }
}

/// Dispersed starting values of (π or μ, p_F, p_M) for chain c.
pub(crate) fn start(c: usize) -> (f64, f64, f64) {
    const STARTS: [(f64, f64, f64); 4] = [
        (0.2, 0.8, 0.2),
        (0.8, 0.2, 0.8),
        (0.35, 0.35, 0.65),
        (0.65, 0.65, 0.35),
    ];
    STARTS[c % STARTS.len()]
}

pub(crate) fn beta_draw(rng: &mut ChaCha8Rng, a: f64, b: f64) -> f64 {
    match Beta::new(a, b) {
        Ok(d) => d.sample(rng).clamp(1e-12, 1.0 - 1e-12),
        Err(_) => a / (a + b),
    }
}

/// Index drawn with probabilities ∝ exp(ln_w).
fn pick_ln(rng: &mut ChaCha8Rng, ln_w: &[f64]) -> usize {
    let m = ln_w.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let w: Vec<f64> = ln_w.iter().map(|v| (v - m).exp()).collect();
    pick(rng, &w)
}

/// The hyper-grid as (μ, κ, constant part of ln weight) per cell.
fn hyper_cells(h: &HyperGrid, groups: usize) -> Vec<(f64, f64, f64)> {
    let mut cells = Vec::with_capacity(h.mu.len() * h.kappa.len());
    for (mu, wm) in h.mu.iter().zip(&h.ln_w_mu) {
        for (kappa, wk) in h.kappa.iter().zip(&h.ln_w_kappa) {
            let (a, b) = (mu * kappa, (1.0 - mu) * kappa);
            cells.push((*mu, *kappa, wm + wk - groups as f64 * ln_beta(a, b)));
        }
    }
    cells
}

/// One chain of the joint sampler of sex and an outcome (the sweep of the module's docs,
/// step 2 done by the outcome model).
pub(crate) fn run_chain<M: OutcomeModel>(
    ev: &SexEvidence,
    model: &M,
    outcome: &[Option<M::Value>],
    len: &ChainLength,
    c: usize,
) -> Chain {
    let mut rng =
        ChaCha8Rng::seed_from_u64(len.seed ^ 0x9e37_79b9_7f4a_7c15_u64.wrapping_mul(c as u64 + 1));
    let groups = match ev.prior {
        SexRatioPrior::Groups(_, g) => g.max(1),
        _ => 1,
    };
    let cells = match ev.prior {
        SexRatioPrior::Groups(h, g) => hyper_cells(h, g),
        _ => Vec::new(),
    };
    let (s0, _, _) = start(c);
    let mut theta = model.start(c);
    let mut pi = vec![
        match ev.prior {
            SexRatioPrior::Fixed(p) => p,
            _ => s0,
        };
        groups
    ];
    let (mut mu, mut kappa) = (s0, 20.0);
    // Individuals in the sampler: those with evidence; the outcome where it is in the table.
    let members: Vec<(f64, usize, Option<M::Value>)> = (0..ev.ln_lrs.len())
        .filter(|&i| ev.estimable[i])
        .map(|i| {
            let y = if ev.in_tables[i] { outcome[i] } else { None };
            (ev.ln_lrs[i], ev.membership[i].min(groups - 1), y)
        })
        .collect();
    let kept = len.kept();
    let mut chain = Chain {
        kept: vec![Vec::with_capacity(kept); theta.kept().len()],
        n_f: Vec::with_capacity(kept),
    };
    let mut ln_w = vec![0.0; cells.len()];
    let (mut of_females, mut of_males) = (Vec::new(), Vec::new());
    for it in 0..len.iterations {
        // 1. Sexes.
        let logit_pi: Vec<f64> = pi.iter().map(|p| p.ln() - (1.0 - p).ln()).collect();
        let mut females = vec![0usize; groups];
        let mut members_in = vec![0usize; groups];
        of_females.clear();
        of_males.clear();
        for &(l, g, y) in &members {
            let z = logit_pi[g] + l + y.map_or(0.0, |y| theta.ln_ratio(y));
            let female = rng.random::<f64>() * (1.0 + (-z).exp()) < 1.0;
            members_in[g] += 1;
            if female {
                females[g] += 1;
            }
            if let Some(y) = y {
                if female {
                    of_females.push(y);
                } else {
                    of_males.push(y);
                }
            }
        }
        // 2. The outcome's parameters.
        theta.update(&mut rng, &of_females, &of_males);
        // 3–4. Proportion female.
        match ev.prior {
            SexRatioPrior::Fixed(_) => {}
            SexRatioPrior::Beta(a, b) => {
                let f = females[0] as f64;
                pi[0] = beta_draw(&mut rng, a + f, b + members_in[0] as f64 - f);
            }
            SexRatioPrior::Groups(..) => {
                for g in 0..groups {
                    let f = females[g] as f64;
                    let m = (members_in[g] - females[g]) as f64;
                    pi[g] = beta_draw(&mut rng, mu * kappa + f, (1.0 - mu) * kappa + m);
                }
                let s1: f64 = pi.iter().map(|p| p.ln()).sum();
                let s2: f64 = pi.iter().map(|p| (1.0 - p).ln()).sum();
                for (w, &(m, k, c0)) in ln_w.iter_mut().zip(&cells) {
                    *w = c0 + (m * k - 1.0) * s1 + ((1.0 - m) * k - 1.0) * s2;
                }
                let k = pick_ln(&mut rng, &ln_w);
                (mu, kappa) = (cells[k].0, cells[k].1);
            }
        }
        if it >= len.burn_in {
            for (k, v) in theta.kept().into_iter().enumerate() {
                chain.kept[k].push(v);
            }
            chain.n_f.push(of_females.len() as f64);
        }
    }
    chain
}

/// Linear-interpolation quantile of sorted values (Hyndman & Fan 1996's type 7).
fn quantile_sorted(s: &[f64], q: f64) -> f64 {
    if s.is_empty() {
        return f64::NAN;
    }
    let h = q * (s.len() - 1) as f64;
    let (lo, hi) = (h.floor() as usize, h.ceil() as usize);
    s[lo] + (h - lo as f64) * (s[hi] - s[lo])
}

pub(crate) fn summary(v: &[f64], centre_is_median: bool) -> (f64, f64, f64) {
    let mut s = v.to_vec();
    s.sort_by(f64::total_cmp);
    let centre = if centre_is_median {
        quantile_sorted(&s, 0.5)
    } else {
        s.iter().sum::<f64>() / s.len().max(1) as f64
    };
    (
        centre,
        quantile_sorted(&s, 0.025),
        quantile_sorted(&s, 0.975),
    )
}

/// Prevalence by sex of a condition recorded as `Some(true/false)` (None where not recorded),
/// from the joint posterior (see the module documentation).
pub fn prevalence_by_sex(
    ev: &SexEvidence,
    column: &str,
    present: &[Option<bool>],
    len: &ChainLength,
) -> PrevalenceBySex {
    let model = Condition { p_f: 0.5, p_m: 0.5 };
    let chains: Vec<Chain> = (0..len.chains.max(1))
        .into_par_iter()
        .map(|c| run_chain(ev, &model, present, len, c))
        .collect();
    let n_f: f64 = chains.iter().flat_map(|c| &c.n_f).sum();
    let diff: Vec<Vec<f64>> = chains
        .iter()
        .map(|c| {
            c.kept[0]
                .iter()
                .zip(&c.kept[1])
                .map(|(a, b)| a - b)
                .collect()
        })
        .collect();
    let (pf, pm): (Vec<Vec<f64>>, Vec<Vec<f64>>) = chains
        .into_iter()
        .map(|mut c| {
            (
                std::mem::take(&mut c.kept[0]),
                std::mem::take(&mut c.kept[1]),
            )
        })
        .unzip();
    let rhat = [&pf, &pm, &diff]
        .iter()
        .map(|c| split_rhat(c))
        .fold(f64::NEG_INFINITY, f64::max);
    let ess_min = [&pf, &pm, &diff]
        .iter()
        .map(|c| ess(c))
        .fold(f64::INFINITY, f64::min);
    let all = |v: &[Vec<f64>]| v.concat();
    let (f, m, d) = (all(&pf), all(&pm), all(&diff));
    let or: Vec<f64> = f
        .iter()
        .zip(&m)
        .map(|(a, b)| a / (1.0 - a) / (b / (1.0 - b)))
        .collect();
    let recorded_in = |i: usize| ev.in_tables[i] && present[i].is_some();
    let n_recorded = (0..present.len()).filter(|&i| recorded_in(i)).count();
    let n_f = n_f / f.len().max(1) as f64;
    PrevalenceBySex {
        column: column.to_string(),
        n_recorded,
        n_present: (0..present.len())
            .filter(|&i| recorded_in(i) && present[i] == Some(true))
            .count(),
        n_left_out: (0..present.len())
            .filter(|&i| !ev.in_tables[i] && present[i].is_some())
            .count(),
        n_female: n_f,
        n_male: n_recorded as f64 - n_f,
        female: summary(&f, false),
        male: summary(&m, false),
        difference: summary(&d, false),
        odds_ratio: summary(&or, true),
        p_female_higher: d.iter().filter(|&&x| x > 0.0).count() as f64 / d.len().max(1) as f64,
        rhat,
        ess: ess_min,
        draws: f.len(),
    }
}

/// The sampler's view of an assemblage without groups under a flat prior (for tests).
#[cfg(test)]
pub(crate) fn no_groups<'a>(
    ln_lrs: &'a [f64],
    estimable: &'a [bool],
    membership: &'a [usize],
    in_tables: &'a [bool],
) -> SexEvidence<'a> {
    SexEvidence {
        ln_lrs,
        estimable,
        membership,
        in_tables,
        prior: SexRatioPrior::Beta(1.0, 1.0),
    }
}

#[cfg(test)]
#[path = "tests/prevalence.rs"]
mod tests;
