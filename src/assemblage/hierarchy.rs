//! Groups (burial zones, phases, sites) whose proportions of females differ, but not without
//! limit.
//!
//! # Model
//! πg ~ Beta(μκ, (1 − μ)κ) for each group g; μ, the proportion female of the population
//! behind all groups, has the chosen prior; κ (how alike the groups are) has a weak prior,
//! log-uniform on [1, 1000]: κ near 1 lets groups be almost of one sex each, κ near 1000 makes
//! them practically share one π. Individual i of group g contributes πg LRᵢ + 1 − πg.
//!
//! # Computation
//! Nested grids (DESIGN §3). Each group's ln-likelihood ℓg(π) = Σᵢ∈g ln(π LRᵢ + 1 − π) is
//! computed once on a grid of π cells covering where it is within e⁻⁶⁰ of its maximum (cells
//! uniform in t, π = sin²(πt/2)). For every (μ, κ) of the hyper-grid the group's marginal
//! mg(μ, κ) = ∫ Beta(π; μκ, (1 − μ)κ) exp ℓg(π) dπ is a sum over cells of the Beta prior's
//! mass in the cell (exact, through the regularised incomplete beta function, where the Beta
//! density is unbounded) times exp ℓg at the cell's midpoint; the cost is
//! O(hyper-grid × groups × cells), independent of the number of individuals.
//! p(μ, κ | D) ∝ p(μ) p(κ) ∏g mg(μ, κ); group and individual posteriors are mixtures over the
//! hyper-grid.

use super::posterior::{locate_region, p_female_on_grid, MixtureSum, PiSummary};
use crate::numeric::normal::ln_add_exp;
use crate::prior::{Prior, PriorShape};
use serde::Serialize;
use statrs::function::beta::{beta_reg, ln_beta};
use std::f64::consts::{FRAC_PI_2, PI};

/// Smallest κ of the hyper-prior (the range [1, 1000] is a stated choice of ours: weak, and
/// wide enough for groups of almost one sex and for groups that share one proportion).
pub const KAPPA_MIN: f64 = 1.0;
/// Largest κ of the hyper-prior.
pub const KAPPA_MAX: f64 = 1000.0;
/// Points of the κ grid (uniform in ln κ).
const KAPPA_POINTS: usize = 32;
/// Cells of the μ grid.
const MU_CELLS: usize = 100;
/// Cells of each group's π grid.
const GROUP_CELLS: usize = 240;
/// Cells of the coarse pass that locates a group's likelihood.
const COARSE_CELLS: usize = 1000;
/// ln distance below the maximum at which a region ends.
const LN_CUTOFF: f64 = 60.0;

fn pi_of(t: f64) -> f64 {
    let s = (FRAC_PI_2 * t).sin();
    s * s
}

fn ln_jacobian(t: f64) -> f64 {
    (FRAC_PI_2 * (PI * t).sin()).ln()
}

fn ln_sum_exp(v: impl IntoIterator<Item = f64> + Clone) -> f64 {
    let m = v.clone().into_iter().fold(f64::NEG_INFINITY, f64::max);
    if m == f64::NEG_INFINITY || m.is_nan() {
        return v.into_iter().fold(f64::NEG_INFINITY, ln_add_exp);
    }
    m + v.into_iter().map(|x| (x - m).exp()).sum::<f64>().ln()
}

/// One group's likelihood on its π grid.
#[derive(Debug, Clone, PartialEq)]
pub struct GroupGrid {
    /// π at cell midpoints.
    pub pi: Vec<f64>,
    /// Cell edges in π.
    pub edges: Vec<f64>,
    /// ℓg at the midpoints.
    pub ln_lik: Vec<f64>,
    /// ln π, ln(1 − π) and ln(cell width in π) at each cell (cached for the hyper-grid loop).
    ln_p: Vec<f64>,
    ln_q: Vec<f64>,
    ln_width: Vec<f64>,
}

impl GroupGrid {
    /// Build the grid from the group's ln LRs (0 for individuals without evidence).
    pub fn new(ln_lrs: &[f64]) -> GroupGrid {
        let data = MixtureSum::new(ln_lrs);
        let ell = |pi: f64| data.ln_sum(pi);
        let (lo, hi) = locate_region(|t| ell(pi_of(t)), COARSE_CELLS, LN_CUTOFF);
        let h = (hi - lo) / GROUP_CELLS as f64;
        let edges: Vec<f64> = (0..=GROUP_CELLS)
            .map(|i| pi_of(lo + i as f64 * h))
            .collect();
        let pi: Vec<f64> = (0..GROUP_CELLS)
            .map(|i| pi_of(lo + (i as f64 + 0.5) * h))
            .collect();
        let ln_lik = pi.iter().map(|&p| ell(p)).collect();
        let ln_p = pi.iter().map(|p| p.ln()).collect();
        let ln_q = pi.iter().map(|p| (1.0 - p).ln()).collect();
        let ln_width = (0..GROUP_CELLS)
            .map(|j| (edges[j + 1] - edges[j]).ln())
            .collect();
        GroupGrid {
            pi,
            edges,
            ln_lik,
            ln_p,
            ln_q,
            ln_width,
        }
    }

    /// ln of the Beta(α, β) prior's mass in each cell.
    ///
    /// Where α, β ≥ ½ the density times the cell width at the midpoint is accurate (the cells
    /// are uniform in t, where the density is then bounded); below ½ the density is unbounded
    /// even in t and exact masses come from the regularised incomplete beta function.
    pub fn ln_prior_mass(&self, alpha: f64, beta: f64) -> Vec<f64> {
        // Away from the unbounded end the midpoint form stays accurate: its relative error
        // per cell is about h² g''/(24 g) ≤ h²/(12 d²) in t, for a cell width h and a
        // distance d from the end (g ∝ t^(2α−1) there); accepted below 1e-6.
        let t_of = |p: f64| p.clamp(0.0, 1.0).sqrt().asin() / FRAC_PI_2;
        let (t_lo, t_hi) = (t_of(self.edges[0]), t_of(self.edges[self.edges.len() - 1]));
        let h = (t_hi - t_lo) / self.pi.len() as f64;
        let smooth_near = |d: f64| d > 0.0 && h * h / (12.0 * d * d) < 1e-6;
        if (alpha >= 0.5 || smooth_near(t_lo)) && (beta >= 0.5 || smooth_near(1.0 - t_hi)) {
            let lb = ln_beta(alpha, beta);
            (0..self.pi.len())
                .map(|j| {
                    (alpha - 1.0) * self.ln_p[j] + (beta - 1.0) * self.ln_q[j] - lb
                        + self.ln_width[j]
                })
                .collect()
        } else {
            // Unbounded density at an end: exact cell masses from the incomplete beta function.
            let cdf: Vec<f64> = self
                .edges
                .iter()
                .map(|&e| {
                    if e <= 0.0 {
                        0.0
                    } else if e >= 1.0 {
                        1.0
                    } else {
                        beta_reg(alpha, beta, e)
                    }
                })
                .collect();
            (0..self.pi.len())
                .map(|j| (cdf[j + 1] - cdf[j]).max(0.0).ln())
                .collect()
        }
    }

    /// ln mg for a Beta(α, β) prior on the group's π.
    pub fn ln_marginal(&self, alpha: f64, beta: f64) -> f64 {
        ln_sum_exp(
            self.ln_prior_mass(alpha, beta)
                .iter()
                .zip(&self.ln_lik)
                .map(|(a, b)| a + b),
        )
    }
}

/// The hyper-grid: μ points with their prior weights, κ points with theirs.
#[derive(Debug, Clone, PartialEq)]
pub struct HyperGrid {
    /// μ values.
    pub mu: Vec<f64>,
    /// ln prior weight of each μ (cell mass).
    pub ln_w_mu: Vec<f64>,
    /// κ values.
    pub kappa: Vec<f64>,
    /// ln prior weight of each κ.
    pub ln_w_kappa: Vec<f64>,
}

impl HyperGrid {
    /// Grids for a prior on μ and the log-uniform prior on κ.
    pub fn new(prior: &Prior) -> HyperGrid {
        let (mu, ln_w_mu) = match prior.shape {
            PriorShape::Fixed { pi } => (vec![pi], vec![0.0]),
            PriorShape::Beta { a, b } => {
                let ln_dens = |t: f64| {
                    let p = pi_of(t);
                    (a - 1.0) * p.ln() + (b - 1.0) * (1.0 - p).ln() - ln_beta(a, b) + ln_jacobian(t)
                };
                let n0 = 2000;
                let coarse: Vec<f64> = (0..n0)
                    .map(|i| ln_dens((i as f64 + 0.5) / n0 as f64))
                    .collect();
                let max = coarse.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                let first = coarse.iter().position(|&v| v > max - 40.0).unwrap_or(0);
                let last = coarse
                    .iter()
                    .rposition(|&v| v > max - 40.0)
                    .unwrap_or(n0 - 1);
                let lo = first.saturating_sub(1) as f64 / n0 as f64;
                let hi = (last + 2).min(n0) as f64 / n0 as f64;
                let h = (hi - lo) / MU_CELLS as f64;
                let ts: Vec<f64> = (0..MU_CELLS).map(|i| lo + (i as f64 + 0.5) * h).collect();
                let lw: Vec<f64> = ts.iter().map(|&t| ln_dens(t) + h.ln()).collect();
                let z = ln_sum_exp(lw.iter().copied());
                (
                    ts.iter().map(|&t| pi_of(t)).collect(),
                    lw.iter().map(|w| w - z).collect(),
                )
            }
        };
        let (l0, l1) = (KAPPA_MIN.ln(), KAPPA_MAX.ln());
        let kappa: Vec<f64> = (0..KAPPA_POINTS)
            .map(|i| (l0 + (i as f64 + 0.5) * (l1 - l0) / KAPPA_POINTS as f64).exp())
            .collect();
        let ln_w_kappa = vec![-(KAPPA_POINTS as f64).ln(); KAPPA_POINTS];
        HyperGrid {
            mu,
            ln_w_mu,
            kappa,
            ln_w_kappa,
        }
    }
}

/// The posterior of one group.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupSummary {
    /// Group name.
    pub group: String,
    /// Individuals in the group.
    pub n: usize,
    /// Individuals with usable evidence.
    pub n_estimable: usize,
    /// Posterior of πg.
    pub pi: PiSummary,
    /// Expected number of females in the group (estimable: Σ P(F); others: E[πg]).
    pub expected_females: f64,
}

/// The fitted hierarchy.
#[derive(Debug, Clone, PartialEq)]
pub struct Hierarchy {
    /// Group names, in order of first appearance.
    pub groups: Vec<String>,
    /// Group index of each individual.
    pub membership: Vec<usize>,
    /// Each group's likelihood grid.
    pub grids: Vec<GroupGrid>,
    /// The hyper-grid.
    pub hyper: HyperGrid,
    /// Posterior mass of each (μ, κ) pair, indexed [μ][κ].
    pub w: Vec<Vec<f64>>,
    /// Posterior cell masses of each group's π, mixed over the hyper-grid.
    pub group_mass: Vec<Vec<f64>>,
    /// ln p(D) under the hierarchy (up to the constant ∏ P(Dᵢ | male)).
    pub ln_evidence: f64,
    /// ln p(D) when every group shares one π = μ (up to the same constant).
    pub ln_evidence_shared: f64,
}

/// What the hierarchy needs of the data, whatever the prior: the groups, each individual's
/// group, each group's likelihood grid, and the data term of the shared-π alternative.
#[derive(Debug, Clone)]
pub struct GroupData {
    /// Group names in order of first appearance.
    pub names: Vec<String>,
    /// Each individual's group index.
    pub membership: Vec<usize>,
    /// Each group's likelihood grid.
    pub grids: Vec<GroupGrid>,
    /// Every individual's data term, for the shared-π alternative.
    pub all: MixtureSum,
}

impl GroupData {
    /// Prepare the groups. `ln_lrs[i]` is 0 for individuals without evidence.
    pub fn new(ln_lrs: &[f64], groups: &[String]) -> GroupData {
        let mut names: Vec<String> = Vec::new();
        let membership: Vec<usize> = groups
            .iter()
            .map(|g| match names.iter().position(|n| n == g) {
                Some(k) => k,
                None => {
                    names.push(g.clone());
                    names.len() - 1
                }
            })
            .collect();
        let grids: Vec<GroupGrid> = (0..names.len())
            .map(|k| {
                let l: Vec<f64> = ln_lrs
                    .iter()
                    .zip(&membership)
                    .filter(|(_, &g)| g == k)
                    .map(|(&x, _)| x)
                    .collect();
                GroupGrid::new(&l)
            })
            .collect();
        GroupData {
            names,
            membership,
            grids,
            all: MixtureSum::new(ln_lrs),
        }
    }
}

impl Hierarchy {
    /// Fit the hierarchy. `ln_lrs[i]` is 0 for individuals without evidence; `groups[i]` is
    /// the individual's group name.
    pub fn fit(ln_lrs: &[f64], groups: &[String], prior: &Prior) -> Hierarchy {
        Hierarchy::fit_on(&GroupData::new(ln_lrs, groups), prior)
    }

    /// Fit the hierarchy on groups prepared once (the groups' likelihood grids do not depend
    /// on the prior, so a sensitivity analysis prepares them once for all its priors).
    pub fn fit_on(data: &GroupData, prior: &Prior) -> Hierarchy {
        let names = data.names.clone();
        let membership = data.membership.clone();
        let grids = data.grids.clone();
        let hyper = HyperGrid::new(prior);
        let (nm, nk) = (hyper.mu.len(), hyper.kappa.len());
        // One pass over the hyper-grid: each group's cell posteriors and marginal for (μ, κ),
        // the joint ln p(μ, κ, D), and the running, rescaled mixture of group posteriors.
        let mut ln_joint = vec![vec![f64::NEG_INFINITY; nk]; nm];
        let mut group_mass: Vec<Vec<f64>> = grids.iter().map(|g| vec![0.0; g.pi.len()]).collect();
        let mut running_max = f64::NEG_INFINITY;
        let mut cells: Vec<Vec<f64>> = grids.iter().map(|g| vec![0.0; g.pi.len()]).collect();
        let mut ln_m = vec![0.0; grids.len()];
        for (i, &mu) in hyper.mu.iter().enumerate() {
            for (j, &kappa) in hyper.kappa.iter().enumerate() {
                let (a, b) = (mu * kappa, (1.0 - mu) * kappa);
                for (k, g) in grids.iter().enumerate() {
                    let lp = g.ln_prior_mass(a, b);
                    for (c, (x, y)) in cells[k].iter_mut().zip(lp.iter().zip(&g.ln_lik)) {
                        *c = x + y;
                    }
                    ln_m[k] = ln_sum_exp(cells[k].iter().copied());
                }
                let lj = hyper.ln_w_mu[i] + hyper.ln_w_kappa[j] + ln_m.iter().sum::<f64>();
                ln_joint[i][j] = lj;
                if !lj.is_finite() {
                    continue;
                }
                if lj > running_max {
                    let scale = (running_max - lj).exp();
                    for m in group_mass.iter_mut().flatten() {
                        *m *= scale;
                    }
                    running_max = lj;
                }
                let wt = (lj - running_max).exp();
                if wt < 1e-16 {
                    // Negligible against the best (μ, κ) seen so far.
                    continue;
                }
                for (k, mass) in group_mass.iter_mut().enumerate() {
                    for (m, c) in mass.iter_mut().zip(&cells[k]) {
                        *m += wt * (c - ln_m[k]).exp();
                    }
                }
            }
        }
        let ln_evidence = ln_sum_exp(ln_joint.iter().flatten().copied());
        let w: Vec<Vec<f64>> = ln_joint
            .iter()
            .map(|row| row.iter().map(|v| (v - ln_evidence).exp()).collect())
            .collect();
        for mass in group_mass.iter_mut() {
            let t: f64 = mass.iter().sum();
            for m in mass.iter_mut() {
                *m /= t;
            }
        }
        // Shared π: every group's π equals μ.
        let all = &data.all;
        let ln_evidence_shared = ln_sum_exp(
            hyper
                .mu
                .iter()
                .zip(&hyper.ln_w_mu)
                .map(|(&mu, &lw)| lw + all.ln_sum(mu)),
        );
        Hierarchy {
            groups: names,
            membership,
            grids,
            hyper,
            w,
            group_mass,
            ln_evidence,
            ln_evidence_shared,
        }
    }

    /// P(F | D) of an individual of group `g` with ln LR `l`.
    pub fn p_female(&self, g: usize, l: f64) -> f64 {
        p_female_on_grid(&self.grids[g].pi, &self.group_mass[g], l)
    }

    /// Summary of πg.
    pub fn group_pi(&self, g: usize) -> PiSummary {
        summarise(&self.grids[g].pi, &self.grids[g].edges, &self.group_mass[g])
    }

    /// Posterior mean and 95% interval of μ.
    pub fn mu_summary(&self) -> (f64, f64, f64) {
        let m: Vec<f64> = self.w.iter().map(|r| r.iter().sum()).collect();
        weighted_summary(&self.hyper.mu, &m)
    }

    /// Posterior median and 95% interval of κ.
    pub fn kappa_summary(&self) -> (f64, f64, f64) {
        let nk = self.hyper.kappa.len();
        let m: Vec<f64> = (0..nk).map(|j| self.w.iter().map(|r| r[j]).sum()).collect();
        let q = |p: f64| {
            let mut acc = 0.0;
            for (k, &x) in m.iter().enumerate() {
                acc += x;
                if acc >= p {
                    return self.hyper.kappa[k];
                }
            }
            self.hyper.kappa[nk - 1]
        };
        (q(0.5), q(0.025), q(0.975))
    }

    /// ln Bayes factor of groups that differ against groups that share one π.
    pub fn ln_bf_groups_differ(&self) -> f64 {
        self.ln_evidence - self.ln_evidence_shared
    }
}

fn weighted_summary(x: &[f64], m: &[f64]) -> (f64, f64, f64) {
    let t: f64 = m.iter().sum();
    let mean = x.iter().zip(m).map(|(a, b)| a * b).sum::<f64>() / t;
    let q = |p: f64| {
        let mut acc = 0.0;
        for (k, &w) in m.iter().enumerate() {
            acc += w / t;
            if acc >= p {
                return x[k];
            }
        }
        x[x.len() - 1]
    };
    (mean, q(0.025), q(0.975))
}

/// Summary of a posterior given by cell masses on cells with the given edges.
pub fn summarise(pi: &[f64], edges: &[f64], mass: &[f64]) -> PiSummary {
    let post = super::posterior::PiPosterior {
        grid: pi.to_vec(),
        mass: mass.to_vec(),
        nodes: pi.to_vec(),
        node_mass: mass.to_vec(),
        edges: edges.to_vec(),
        ln_evidence: f64::NAN,
    };
    post.summary()
}

#[cfg(test)]
#[path = "tests/hierarchy.rs"]
mod tests;
