//! The sex ratio of the population behind the assemblage, and behind each group, against a
//! stated reference ratio: so that "the infants of this deposit are mostly boys" or "this
//! burial ground held one sex" is a number with an interval.
//!
//! For the assemblage and for each group on its own (no borrowing between groups: the
//! question is what this deposit alone says), π, the proportion female, has the posterior
//! p(π | D) ∝ p(π) ∏ᵢ (π LRᵢ + 1 − π) of the one-population model under the chosen prior, and
//! the sex ratio is 100 (1 − π) / π males per 100 females. Against a reference ratio R
//! (π_R = 100 / (100 + R)):
//!
//! - P(ratio > R | D) = P(π < π_R | D), the probability of more males than the reference;
//! - the Bayes factor of "the population's ratio is R" against "any ratio, as the prior
//!   says" (Kass & Raftery 1995, from memory), exactly
//!   BF = ∏ᵢ (π_R LRᵢ + 1 − π_R) / ∫ p(π) ∏ᵢ (π LRᵢ + 1 − π) dπ.
//!
//! Individuals sexed by DNA alone (perinates, children) count here like any other: their LR
//! comes from their reads. Individuals without usable evidence contribute nothing.

use crate::assemblage::posterior::{ln_mixture, PiPosterior};
use crate::prior::Prior;
use serde::Serialize;

/// The reference ratio unless the user sets one: 105 males per 100 females, the usual sex
/// ratio at birth (common practice).
pub const DEFAULT_REFERENCE_RATIO: f64 = 105.0;

/// The sex ratio of one population (the assemblage, or one group) against the reference.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SexRatioTest {
    /// `None` for the whole assemblage, else the group.
    pub group: Option<String>,
    /// Individuals.
    pub n: usize,
    /// Individuals with usable evidence of sex.
    pub n_estimable: usize,
    /// The reference, males per 100 females.
    pub reference: f64,
    /// Posterior median of the sex ratio (males per 100 females).
    pub median: f64,
    /// 2.5% quantile.
    pub lo: f64,
    /// 97.5% quantile.
    pub hi: f64,
    /// P(ratio > reference | data).
    pub p_more_males: f64,
    /// ln Bayes factor of the reference ratio against the prior's ratio.
    pub ln_bf_reference: f64,
}

/// Males per 100 females for a proportion female π.
fn ratio_of(pi: f64) -> f64 {
    100.0 * (1.0 - pi) / pi
}

/// The test for one set of ln LRs (0 for individuals without usable evidence), whose
/// posterior of π under the prior is `post`.
pub fn sex_ratio_test(
    group: Option<String>,
    ln_lrs: &[f64],
    post: &PiPosterior,
    n_estimable: usize,
    reference: f64,
) -> SexRatioTest {
    let pi_r = 100.0 / (100.0 + reference);
    let (lp, lq) = (pi_r.ln(), (1.0 - pi_r).ln());
    let ln_at_reference: f64 = ln_lrs
        .iter()
        .filter(|l| l.is_finite())
        .map(|&l| ln_mixture(lp, lq, l))
        .sum();
    SexRatioTest {
        group,
        n: ln_lrs.len(),
        n_estimable,
        reference,
        median: ratio_of(post.quantile(0.5)),
        lo: ratio_of(post.quantile(0.975)),
        hi: ratio_of(post.quantile(0.025)),
        p_more_males: post.cdf(pi_r),
        ln_bf_reference: ln_at_reference - post.ln_evidence,
    }
}

/// The assemblage's test, then one per group in order of first appearance. `posterior` is
/// the assemblage's posterior of π under `prior` (the analysis's own, not computed again);
/// `groups[i]` is individual i's group; `estimable[i]` whether it has usable evidence.
/// Nothing for a fixed prior (π is then given, not learnt).
pub fn sex_ratio_tests(
    ln_lrs: &[f64],
    posterior: &PiPosterior,
    estimable: &[bool],
    groups: &[Option<&str>],
    prior: &Prior,
    reference: f64,
) -> Vec<SexRatioTest> {
    if prior.is_fixed() {
        return Vec::new();
    }
    let all_estimable = estimable.iter().filter(|&&e| e).count();
    let mut out = vec![sex_ratio_test(
        None,
        ln_lrs,
        posterior,
        all_estimable,
        reference,
    )];
    // Each group's members, in one pass, groups in order of first appearance.
    let mut members: Vec<(&str, Vec<f64>, usize)> = Vec::new();
    for ((g, &l), &e) in groups.iter().zip(ln_lrs).zip(estimable) {
        let Some(g) = g else { continue };
        let k = match members.iter().position(|m| m.0 == *g) {
            Some(k) => k,
            None => {
                members.push((g, Vec::new(), 0));
                members.len() - 1
            }
        };
        members[k].1.push(l);
        members[k].2 += usize::from(e);
    }
    for (name, l, n_estimable) in members {
        let post = PiPosterior::compute(&l, prior);
        out.push(sex_ratio_test(
            Some(name.to_string()),
            &l,
            &post,
            n_estimable,
            reference,
        ));
    }
    out
}

#[cfg(test)]
#[path = "tests/sex_ratio.rs"]
mod tests;
