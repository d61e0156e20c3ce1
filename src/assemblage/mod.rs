//! The assemblage stage: the posterior of π, every individual's P(female | all data), the
//! categories, and the same under every prior of a sensitivity set.

pub mod category;
pub mod draws;
pub mod gibbs;
pub mod hierarchy;
pub mod posterior;
pub mod recalibration;

pub use category::{category_note, lr_support, Category, Thresholds};
pub use posterior::{PiPosterior, PiSummary};

use crate::model::IndividualEvidence;
use crate::prior::Prior;
use serde::Serialize;

/// Hyper-parameters of the group hierarchy (under one prior).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HyperSummary {
    /// Posterior of μ, the proportion female of the population behind the groups.
    pub mu: PiSummary,
    /// Posterior median of κ (how alike the groups are).
    pub kappa_median: f64,
    /// 2.5% quantile of κ.
    pub kappa_lo: f64,
    /// 97.5% quantile of κ.
    pub kappa_hi: f64,
    /// ln Bayes factor: groups that differ against groups that share one π.
    pub ln_bf_groups_differ: f64,
}

/// The results under one prior.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PriorResult {
    /// The prior.
    pub prior: Prior,
    /// Summary of p(π | D) for the assemblage as one population.
    pub pi: PiSummary,
    /// P(F | D) per individual (under the hierarchy when there are groups); `None` for
    /// individuals without usable evidence.
    pub p_female: Vec<Option<f64>>,
    /// Category per individual.
    pub categories: Vec<Category>,
    /// Individuals in the assemblage.
    pub n_individuals: usize,
    /// Individuals with usable evidence.
    pub n_estimable: usize,
    /// Expected number of females among all individuals: Σ P(F) over the estimable, plus
    /// E[π | D] (of the individual's group, with groups) for each one without usable evidence.
    pub expected_females: f64,
    /// The same under the model of one population (equal to `expected_females` without
    /// groups): Σ P(F | one π) over the estimable plus E[π | D] for each of the others.
    pub expected_females_one_population: f64,
    /// ln Bayes factor: a community of one sex against a mixed one.
    pub ln_bf_one_sex: f64,
    /// Per group, with groups (under a fixed prior every group's π is the fixed value).
    pub groups: Vec<hierarchy::GroupSummary>,
    /// The hierarchy's hyper-parameters, with groups and a prior that is not fixed.
    pub hyper: Option<HyperSummary>,
}

/// The fitted posteriors behind a [`PriorResult`], kept for drawing.
#[derive(Debug, Clone, PartialEq)]
pub struct PosteriorFit {
    /// The single-population posterior of π.
    pub posterior: PiPosterior,
    /// The group hierarchy, with groups.
    pub hierarchy: Option<hierarchy::Hierarchy>,
    /// ln LR per individual (0 without usable evidence).
    pub ln_lrs: Vec<f64>,
}

/// Compute the results under one prior; `groups` gives each individual's group (use `None`,
/// or fewer than two distinct groups, for one population).
pub fn under_prior(
    evidence: &[IndividualEvidence],
    groups: Option<&[String]>,
    prior: &Prior,
    thresholds: &Thresholds,
) -> (PriorResult, PosteriorFit) {
    under_prior_on(
        evidence,
        &Prepared::new(evidence, groups),
        prior,
        thresholds,
    )
}

/// What the results under every prior share, prepared once: each individual's ln LR, the
/// data side of the posterior of π ([`posterior::PiData`]) and, with two or more groups,
/// the groups' likelihood grids ([`hierarchy::GroupData`]).
#[derive(Debug)]
pub struct Prepared {
    /// ln LR per individual (0 without usable evidence).
    ln_lrs: Vec<f64>,
    /// The posterior of π's data terms, from the ln LRs of the individuals with usable
    /// evidence.
    pi: posterior::PiData,
    /// The groups (two or more distinct, one name per individual).
    groups: Option<hierarchy::GroupData>,
}

impl Prepared {
    /// Prepare the evidence and groups (`None`, or fewer than two distinct groups, for one
    /// population; a list of another length than the evidence is not used).
    pub fn new(evidence: &[IndividualEvidence], groups: Option<&[String]>) -> Prepared {
        let ln_lrs: Vec<f64> = evidence
            .iter()
            .map(|e| if e.estimable { e.ln_lr } else { 0.0 })
            .collect();
        let informative: Vec<f64> = evidence
            .iter()
            .filter(|e| e.estimable)
            .map(|e| e.ln_lr)
            .collect();
        let groups = groups
            .filter(|g| g.len() == evidence.len() && hierarchy::group_index(g).0.len() >= 2)
            .map(|g| hierarchy::GroupData::new(&ln_lrs, g));
        Prepared {
            pi: posterior::PiData::new(&informative),
            ln_lrs,
            groups,
        }
    }
}

/// As [`under_prior`], with the evidence and groups already prepared (`prepared`, built from
/// the same evidence) so that several priors share them.
///
/// About 120 lines: one branch per case of the model (one population, or groups under the
/// hierarchy), each a short sequence of summaries of the same posterior.
pub fn under_prior_on(
    evidence: &[IndividualEvidence],
    prepared: &Prepared,
    prior: &Prior,
    thresholds: &Thresholds,
) -> (PriorResult, PosteriorFit) {
    let informative = prepared.pi.ln_lrs();
    let post = PiPosterior::compute_on(&prepared.pi, prior, true);
    let pi = post.summary();
    // Groups (two or more distinct): names and membership.
    let layout: Option<(&[String], &[usize])> = prepared
        .groups
        .as_ref()
        .map(|d| (d.names.as_slice(), d.membership.as_slice()));
    // A fixed prior fixes the proportion of every group (the groups are not let to differ
    // around a fixed μ), so a fixed-π row of the sensitivity analysis asks the same question
    // with groups as without: what if the proportion female were exactly this, everywhere?
    let hier = match (&prepared.groups, prior.shape) {
        (Some(d), crate::prior::PriorShape::Beta { .. }) => Some(
            hierarchy::Hierarchy::fit_on_sharing(d, prior, post.ln_evidence),
        ),
        _ => None,
    };
    let p_one: Vec<Option<f64>> = evidence
        .iter()
        .map(|e| e.estimable.then(|| post.p_female(e.ln_lr)))
        .collect();
    let p_female: Vec<Option<f64>> = match &hier {
        None => p_one.clone(),
        Some(h) => evidence
            .iter()
            .enumerate()
            .map(|(i, e)| e.estimable.then(|| h.p_female(h.membership[i], e.ln_lr)))
            .collect(),
    };
    let categories = p_female
        .iter()
        .map(|p| {
            p.map(|p| thresholds.categorise(p))
                .unwrap_or(Category::NotEstimable)
        })
        .collect();
    let group_pis: Vec<PiSummary> = match (&layout, &hier) {
        (_, Some(h)) => (0..h.groups.len()).map(|g| h.group_pi(g)).collect(),
        (Some((names, _)), None) => vec![pi; names.len()],
        _ => Vec::new(),
    };
    let fill = |i: usize| match &layout {
        Some((_, m)) => group_pis[m[i]].mean,
        None => pi.mean,
    };
    let expected_females = p_female
        .iter()
        .enumerate()
        .map(|(i, p)| p.unwrap_or_else(|| fill(i)))
        .sum();
    let expected_females_one_population = p_one.iter().map(|p| p.unwrap_or(pi.mean)).sum();
    let group_summaries = match &layout {
        None => Vec::new(),
        Some((names, membership)) => (0..names.len())
            .map(|g| {
                let members: Vec<usize> = (0..evidence.len())
                    .filter(|&i| membership[i] == g)
                    .collect();
                hierarchy::GroupSummary {
                    group: names[g].clone(),
                    n: members.len(),
                    n_estimable: members.iter().filter(|&&i| evidence[i].estimable).count(),
                    pi: group_pis[g],
                    expected_females: members
                        .iter()
                        .map(|&i| p_female[i].unwrap_or(group_pis[g].mean))
                        .sum(),
                }
            })
            .collect(),
    };
    let hyper = hier.as_ref().map(|h| {
        let (kappa_median, kappa_lo, kappa_hi) = h.kappa_summary();
        HyperSummary {
            mu: h.mu(),
            kappa_median,
            kappa_lo,
            kappa_hi,
            ln_bf_groups_differ: h.ln_bf_groups_differ(),
        }
    });
    let result = PriorResult {
        prior: prior.clone(),
        pi,
        p_female,
        categories,
        n_individuals: evidence.len(),
        n_estimable: informative.len(),
        expected_females,
        expected_females_one_population,
        ln_bf_one_sex: post.ln_bf_one_sex(informative),
        groups: group_summaries,
        hyper,
    };
    (
        result,
        PosteriorFit {
            posterior: post,
            hierarchy: hier,
            ln_lrs: prepared.ln_lrs.clone(),
        },
    )
}

/// How much one individual's answer depends on the prior.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Sensitivity {
    /// Least P(F) over the chosen prior and the sensitivity set.
    pub p_female_min: Option<f64>,
    /// Greatest P(F).
    pub p_female_max: Option<f64>,
    /// Whether the category under some prior of the set differs from the chosen prior's.
    pub prior_sensitive: bool,
}

/// The results of one analysis under the chosen prior and every prior of the sensitivity set.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PriorSetResults {
    /// Results under the chosen prior.
    pub main: PriorResult,
    /// Results under every prior of the sensitivity set (in the set's order).
    pub sensitivity: Vec<PriorResult>,
    /// Per individual: range of P(F) and whether the category changes.
    pub individual_sensitivity: Vec<Sensitivity>,
    /// The thresholds used.
    pub thresholds: Thresholds,
    /// The fitted posteriors under the chosen prior (for joint draws).
    #[serde(skip)]
    pub fitted: PosteriorFit,
    /// The posterior of π under each prior of the sensitivity set (for the figures), aligned
    /// with `sensitivity`.
    #[serde(skip)]
    pub posteriors: Vec<PiPosterior>,
}

impl PriorSetResults {
    /// Every P(female) and every π summary is finite: the check made before any result is
    /// classified or written (validated inputs make this hold; a failure is a defect to report).
    ///
    /// # Errors
    /// Which individual and which prior gave a value that is not a number.
    pub fn check_finite(&self, ids: &[String]) -> Result<(), String> {
        for r in self.results() {
            for (i, p) in r.p_female.iter().enumerate() {
                if let Some(p) = p {
                    if !p.is_finite() {
                        return Err(format!(
                            "P(female) of `{}` under the prior `{}` is not a number ({p}); no result was written — please report this with the input and options",
                            ids.get(i).map(String::as_str).unwrap_or("?"),
                            r.prior.name
                        ));
                    }
                }
            }
        }
        Ok(())
    }

    /// The results under the chosen prior, then under each prior of the sensitivity set that
    /// is not the chosen one (the order of every table and figure of priors).
    pub fn results(&self) -> impl Iterator<Item = &PriorResult> {
        std::iter::once(&self.main).chain(
            self.sensitivity
                .iter()
                .filter(move |r| r.prior.name != self.main.prior.name),
        )
    }
}

/// Analyse an assemblage's evidence under a chosen prior and a sensitivity set, with groups
/// when given.
pub fn analyse(
    evidence: &[IndividualEvidence],
    groups: Option<&[String]>,
    prior: &Prior,
    set: &[Prior],
    thresholds: &Thresholds,
) -> PriorSetResults {
    // The data terms of π's posterior and the groups' likelihood grids do not depend on the
    // prior: prepared once for all.
    let prepared = Prepared::new(evidence, groups);
    // Priors are independent: computed in parallel, the chosen prior with the set (so that
    // no thread waits while it is computed alone), collected in order, so the result does not
    // depend on the number of threads. A prior of the set that is the chosen prior itself
    // (the same text) is computed once: its result is the chosen prior's.
    let is_main = |p: &Prior| p == prior;
    let jobs: Vec<&Prior> = std::iter::once(prior)
        .chain(set.iter().filter(|p| !is_main(p)))
        .collect();
    type Done = (PriorResult, Option<PosteriorFit>, Option<PiPosterior>);
    let done: Vec<Done> = {
        use rayon::prelude::*;
        jobs.par_iter()
            .enumerate()
            .map(|(k, p)| {
                let (r, f) = under_prior_on(evidence, &prepared, p, thresholds);
                // Only the chosen prior's whole fit is kept (the draws come from it); the
                // others keep their posterior of π.
                if k == 0 {
                    (r, Some(f), None)
                } else {
                    (r, None, Some(f.posterior))
                }
            })
            .collect()
    };
    // Each job's result in order (the fall-backs recompute, and are never taken: one job per
    // prior, the chosen prior first).
    let mut done = done.into_iter();
    let (main, fitted) = match done.next() {
        Some((r, Some(f), _)) => (r, f),
        _ => under_prior_on(evidence, &prepared, prior, thresholds),
    };
    let (sensitivity, posteriors): (Vec<PriorResult>, Vec<PiPosterior>) = set
        .iter()
        .map(|p| {
            if is_main(p) {
                return (main.clone(), fitted.posterior.clone());
            }
            match done.next() {
                Some((r, _, Some(post))) => (r, post),
                _ => {
                    let (r, f) = under_prior_on(evidence, &prepared, p, thresholds);
                    (r, f.posterior)
                }
            }
        })
        .unzip();
    let individual_sensitivity = (0..evidence.len())
        .map(|i| {
            let all = std::iter::once(&main).chain(&sensitivity);
            let ps: Vec<f64> = all.clone().filter_map(|r| r.p_female[i]).collect();
            Sensitivity {
                p_female_min: ps.iter().copied().reduce(f64::min),
                p_female_max: ps.iter().copied().reduce(f64::max),
                prior_sensitive: all.clone().any(|r| r.categories[i] != main.categories[i]),
            }
        })
        .collect();
    PriorSetResults {
        main,
        sensitivity,
        individual_sensitivity,
        thresholds: *thresholds,
        fitted,
        posteriors,
    }
}

#[cfg(test)]
#[path = "tests/assemblage.rs"]
mod tests;
