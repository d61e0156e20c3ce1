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

use super::posterior::{locate_region, p_female_on_grid, MixtureSum, PiPosterior, PiSummary};
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
/// Cells of the first, coarse hyper-grid over the whole prior: μ (uniform in t), κ (uniform
/// in ln κ).
const COARSE_MU_CELLS: usize = 40;
const COARSE_KAPPA_CELLS: usize = 16;
/// Cells of the refined hyper-grid over where the posterior lives.
const MU_CELLS: usize = 100;
const KAPPA_CELLS: usize = 96;
/// ln distance below the largest hyper-grid cell at which the refined region ends.
const REGION_CUTOFF: f64 = 30.0;
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
        GroupGrid::uniform_in_t(lo, hi, GROUP_CELLS, ell)
    }

    /// `cells` cells uniform in t on [lo, hi] (π = sin²(πt/2)), with `ell` at the midpoints.
    fn uniform_in_t(lo: f64, hi: f64, cells: usize, ell: impl Fn(f64) -> f64) -> GroupGrid {
        let h = (hi - lo) / cells as f64;
        let edges: Vec<f64> = (0..=cells).map(|i| pi_of(lo + i as f64 * h)).collect();
        let pi: Vec<f64> = (0..cells)
            .map(|i| pi_of(lo + (i as f64 + 0.5) * h))
            .collect();
        let ln_lik = pi.iter().map(|&p| ell(p)).collect();
        let ln_p = pi.iter().map(|p| p.ln()).collect();
        let ln_q = pi.iter().map(|p| (1.0 - p).ln()).collect();
        let ln_width = (0..cells).map(|j| (edges[j + 1] - edges[j]).ln()).collect();
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

/// The hyper-grid: μ cells with their prior masses, κ cells (uniform in ln κ) with theirs.
///
/// The masses are the prior's own, not renormalised over the grid: a grid that covers only
/// where the posterior lives (see [`Hierarchy::fit_on`]) still gives ln p(D).
#[derive(Debug, Clone, PartialEq)]
pub struct HyperGrid {
    /// μ at cell midpoints.
    pub mu: Vec<f64>,
    /// μ at cell edges (one more than `mu`; a fixed μ has the two edges equal).
    pub mu_edges: Vec<f64>,
    /// The same edges in t (μ = sin²(πt/2)).
    t_edges: Vec<f64>,
    /// ln prior mass of each μ cell.
    pub ln_w_mu: Vec<f64>,
    /// κ at cell midpoints (in ln κ).
    pub kappa: Vec<f64>,
    /// ln κ at cell edges.
    pub ln_kappa_edges: Vec<f64>,
    /// ln prior mass of each κ cell.
    pub ln_w_kappa: Vec<f64>,
}

impl HyperGrid {
    /// A coarse grid over the whole prior: μ where its prior density in t is within e⁻⁴⁰ of
    /// its maximum, κ over [`KAPPA_MIN`], [`KAPPA_MAX`].
    pub fn new(prior: &Prior) -> HyperGrid {
        let t = match prior.shape {
            PriorShape::Fixed { .. } => (0.0, 1.0),
            PriorShape::Beta { a, b } => {
                let ln_dens = |t: f64| {
                    let p = pi_of(t);
                    (a - 1.0) * p.ln() + (b - 1.0) * (1.0 - p).ln() + ln_jacobian(t)
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
                (
                    first.saturating_sub(1) as f64 / n0 as f64,
                    (last + 2).min(n0) as f64 / n0 as f64,
                )
            }
        };
        HyperGrid::within(
            prior,
            t,
            (KAPPA_MIN.ln(), KAPPA_MAX.ln()),
            (COARSE_MU_CELLS, COARSE_KAPPA_CELLS),
        )
    }

    /// A grid of `cells.0` μ cells uniform in t on `t` and `cells.1` κ cells uniform in ln κ on
    /// `ln_kappa`, with the prior's masses.
    pub fn within(
        prior: &Prior,
        t: (f64, f64),
        ln_kappa: (f64, f64),
        cells: (usize, usize),
    ) -> HyperGrid {
        let (mu, mu_edges, t_edges, ln_w_mu) = match prior.shape {
            PriorShape::Fixed { pi } => (vec![pi], vec![pi, pi], vec![t.0, t.1], vec![0.0]),
            PriorShape::Beta { a, b } => {
                let g = GroupGrid::uniform_in_t(t.0, t.1, cells.0, |_| 0.0);
                let h = (t.1 - t.0) / cells.0 as f64;
                let t_edges = (0..=cells.0).map(|i| t.0 + i as f64 * h).collect();
                let w = g.ln_prior_mass(a, b);
                (g.pi, g.edges, t_edges, w)
            }
        };
        let (l0, l1) = (KAPPA_MIN.ln(), KAPPA_MAX.ln());
        let dk = (ln_kappa.1 - ln_kappa.0) / cells.1 as f64;
        let ln_kappa_edges: Vec<f64> = (0..=cells.1).map(|i| ln_kappa.0 + i as f64 * dk).collect();
        let kappa = (0..cells.1)
            .map(|i| (ln_kappa.0 + (i as f64 + 0.5) * dk).exp())
            .collect();
        let ln_w_kappa = vec![(dk / (l1 - l0)).ln(); cells.1];
        HyperGrid {
            mu,
            mu_edges,
            t_edges,
            ln_w_mu,
            kappa,
            ln_kappa_edges,
            ln_w_kappa,
        }
    }

    /// A finer grid over where the posterior mass `w` ([μ][κ]) on this grid is within e⁻³⁰ of
    /// its largest cell (one cell of margin each side), in each of μ and κ.
    fn refined(&self, prior: &Prior, w: &[Vec<f64>]) -> HyperGrid {
        let m_mu: Vec<f64> = w.iter().map(|r| r.iter().sum()).collect();
        let m_kappa: Vec<f64> = (0..self.kappa.len())
            .map(|j| w.iter().map(|r| r[j]).sum())
            .collect();
        let span = |m: &[f64], edges: &[f64]| {
            let max = m.iter().copied().fold(0.0, f64::max);
            let keep = |v: &f64| *v > max * (-REGION_CUTOFF).exp();
            let first = m.iter().position(keep).unwrap_or(0);
            let last = m.iter().rposition(keep).unwrap_or(m.len() - 1);
            (
                edges[first.saturating_sub(1)],
                edges[(last + 2).min(m.len())],
            )
        };
        let t = match prior.shape {
            PriorShape::Fixed { .. } => (self.t_edges[0], self.t_edges[1]),
            PriorShape::Beta { .. } => span(&m_mu, &self.t_edges),
        };
        HyperGrid::within(
            prior,
            t,
            span(&m_kappa, &self.ln_kappa_edges),
            (MU_CELLS, KAPPA_CELLS),
        )
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
    /// Every individual's ln LR (0 without evidence), for the shared-π alternative.
    pub ln_lrs: Vec<f64>,
}

/// The distinct group names in order of first appearance, and each individual's index into
/// them.
pub fn group_index(groups: &[String]) -> (Vec<String>, Vec<usize>) {
    let mut names: Vec<String> = Vec::new();
    let membership = groups
        .iter()
        .map(|g| match names.iter().position(|n| n == g) {
            Some(k) => k,
            None => {
                names.push(g.clone());
                names.len() - 1
            }
        })
        .collect();
    (names, membership)
}

impl GroupData {
    /// Prepare the groups. `ln_lrs[i]` is 0 for individuals without evidence.
    pub fn new(ln_lrs: &[f64], groups: &[String]) -> GroupData {
        let (names, membership) = group_index(groups);
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
            ln_lrs: ln_lrs.to_vec(),
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
    ///
    /// Two passes: a coarse hyper-grid over the whole prior locates the posterior of (μ, κ),
    /// then a finer grid covers only where it is within e⁻³⁰ of its largest cell, so that a
    /// posterior narrow in μ (a large assemblage) or pushed to one end of κ (a prior far from
    /// the data) is resolved as finely as a broad one.
    pub fn fit_on(data: &GroupData, prior: &Prior) -> Hierarchy {
        // Shared π: every group's π equals μ, the single-population evidence (computed on its
        // own adaptive grid, DESIGN §2).
        let shared = PiPosterior::compute(&data.ln_lrs, prior).ln_evidence;
        Hierarchy::fit_on_sharing(data, prior, shared)
    }

    /// As [`Hierarchy::fit_on`], given the evidence of the shared-π alternative (the
    /// single-population posterior's `ln_evidence` under the same prior, already computed by
    /// the caller).
    pub fn fit_on_sharing(data: &GroupData, prior: &Prior, ln_evidence_shared: f64) -> Hierarchy {
        let coarse = Hierarchy::fit_grid(data, HyperGrid::new(prior));
        let fine = coarse.hyper.refined(prior, &coarse.w);
        let mut h = Hierarchy::fit_grid(data, fine);
        h.ln_evidence_shared = ln_evidence_shared;
        h
    }

    /// The hierarchy on one hyper-grid (its `ln_evidence_shared` is left for the caller).
    fn fit_grid(data: &GroupData, hyper: HyperGrid) -> Hierarchy {
        let names = data.names.clone();
        let membership = data.membership.clone();
        let grids = data.grids.clone();
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
        Hierarchy {
            groups: names,
            membership,
            grids,
            hyper,
            w,
            group_mass,
            ln_evidence,
            ln_evidence_shared: f64::NAN,
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

    /// Posterior of μ, the population's proportion female: mean, median, intervals (linear
    /// within the hyper-grid's cells, as for π).
    pub fn mu(&self) -> PiSummary {
        let m: Vec<f64> = self.w.iter().map(|r| r.iter().sum()).collect();
        summarise(&self.hyper.mu, &self.hyper.mu_edges, &m)
    }

    /// Posterior median and 95% interval of κ (the CDF linear in ln κ within each cell).
    pub fn kappa_summary(&self) -> (f64, f64, f64) {
        let nk = self.hyper.kappa.len();
        let m: Vec<f64> = (0..nk).map(|j| self.w.iter().map(|r| r[j]).sum()).collect();
        let t: f64 = m.iter().sum();
        let edges = &self.hyper.ln_kappa_edges;
        let q = |p: f64| {
            let mut acc = 0.0;
            for (k, &x) in m.iter().enumerate() {
                let x = x / t;
                if acc + x >= p {
                    let frac = if x > 0.0 { (p - acc) / x } else { 0.5 };
                    return (edges[k] + frac * (edges[k + 1] - edges[k])).exp();
                }
                acc += x;
            }
            edges[nk].exp()
        };
        (q(0.5), q(0.025), q(0.975))
    }

    /// ln Bayes factor of groups that differ against groups that share one π.
    pub fn ln_bf_groups_differ(&self) -> f64 {
        self.ln_evidence - self.ln_evidence_shared
    }
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
