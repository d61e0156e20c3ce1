//! The assemblage stage: the posterior of π, every individual's P(female | all data), the
//! categories, and the same under every prior of a sensitivity set.

pub mod category;
pub mod posterior;

pub use category::{lr_support, Category, Thresholds};
pub use posterior::{PiPosterior, PiSummary};

use crate::model::IndividualEvidence;
use crate::prior::Prior;
use serde::Serialize;

/// The results under one prior.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PriorResult {
    /// The prior.
    pub prior: Prior,
    /// Summary of p(π | D).
    pub pi: PiSummary,
    /// P(F | D) per individual; `None` for individuals without usable evidence.
    pub p_female: Vec<Option<f64>>,
    /// Category per individual.
    pub categories: Vec<Category>,
    /// Individuals in the assemblage.
    pub n_individuals: usize,
    /// Individuals with usable evidence.
    pub n_estimable: usize,
    /// Expected number of females among all individuals: Σ P(F) over the estimable, plus
    /// E[π | D] for each individual without usable evidence.
    pub expected_females: f64,
}

/// Compute the results under one prior.
pub fn under_prior(
    evidence: &[IndividualEvidence],
    prior: &Prior,
    thresholds: &Thresholds,
) -> PriorResult {
    let ln_lrs: Vec<f64> = evidence
        .iter()
        .filter(|e| e.estimable)
        .map(|e| e.ln_lr)
        .collect();
    let post = PiPosterior::compute(&ln_lrs, prior);
    let pi = post.summary();
    let p_female: Vec<Option<f64>> = evidence
        .iter()
        .map(|e| e.estimable.then(|| post.p_female(e.ln_lr)))
        .collect();
    let categories = p_female
        .iter()
        .map(|p| {
            p.map(|p| thresholds.categorise(p))
                .unwrap_or(Category::NotEstimable)
        })
        .collect();
    let n_estimable = ln_lrs.len();
    let expected_females = p_female.iter().map(|p| p.unwrap_or(pi.mean)).sum();
    PriorResult {
        prior: prior.clone(),
        pi,
        p_female,
        categories,
        n_individuals: evidence.len(),
        n_estimable,
        expected_females,
    }
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

/// A complete single-assemblage analysis.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Analysis {
    /// Results under the chosen prior.
    pub main: PriorResult,
    /// Results under every prior of the sensitivity set (in the set's order).
    pub sensitivity: Vec<PriorResult>,
    /// Per individual: range of P(F) and whether the category changes.
    pub individual_sensitivity: Vec<Sensitivity>,
    /// The thresholds used.
    pub thresholds: Thresholds,
}

/// Analyse an assemblage's evidence under a chosen prior and a sensitivity set.
pub fn analyse(
    evidence: &[IndividualEvidence],
    prior: &Prior,
    set: &[Prior],
    thresholds: &Thresholds,
) -> Analysis {
    let main = under_prior(evidence, prior, thresholds);
    let sensitivity: Vec<PriorResult> = set
        .iter()
        .map(|p| under_prior(evidence, p, thresholds))
        .collect();
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
    Analysis {
        main,
        sensitivity,
        individual_sensitivity,
        thresholds: *thresholds,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::IndividualEvidence;
    use crate::prior::shipped_priors;

    fn ev(ln_lr: Option<f64>) -> IndividualEvidence {
        IndividualEvidence {
            blocks: Vec::new(),
            ln_lr: ln_lr.unwrap_or(0.0),
            error: 0.0,
            n_traits: usize::from(ln_lr.is_some()),
            estimable: ln_lr.is_some(),
            note: String::new(),
        }
    }

    #[test]
    fn an_individual_without_evidence_changes_nobody() {
        let base: Vec<_> = [2.0, -3.0, 0.5, 6.0, -1.0]
            .iter()
            .map(|&l| ev(Some(l)))
            .collect();
        let mut more = base.clone();
        more.push(ev(None));
        let p = &shipped_priors().unwrap()[0];
        let a = under_prior(&base, p, &Thresholds::default());
        let b = under_prior(&more, p, &Thresholds::default());
        assert_eq!(a.p_female[..], b.p_female[..5]);
        assert_eq!(a.pi, b.pi);
        assert_eq!(b.categories[5], Category::NotEstimable);
        assert_eq!(b.n_individuals, 6);
        assert_eq!(b.n_estimable, 5);
        assert!((b.expected_females - a.expected_females - a.pi.mean).abs() < 1e-12);
    }

    #[test]
    fn permuting_individuals_permutes_the_answers() {
        let l = [2.0, -3.0, 0.5, 6.0, -1.0];
        let a: Vec<_> = l.iter().map(|&x| ev(Some(x))).collect();
        let b: Vec<_> = l.iter().rev().map(|&x| ev(Some(x))).collect();
        let p = &shipped_priors().unwrap()[1];
        let ra = under_prior(&a, p, &Thresholds::default());
        let rb = under_prior(&b, p, &Thresholds::default());
        let mut rev = rb.p_female.clone();
        rev.reverse();
        for (x, y) in ra.p_female.iter().zip(&rev) {
            assert!((x.unwrap() - y.unwrap()).abs() < 1e-12);
        }
        assert!((ra.pi.mean - rb.pi.mean).abs() < 1e-12);
    }

    #[test]
    fn sensitivity_flags_category_changes() {
        let e = vec![ev(Some(1.5)), ev(Some(12.0)), ev(None)];
        let set = crate::prior::parse_prior_set("shipped,sweep").unwrap();
        let a = analyse(&e, &set[0], &set, &Thresholds::default());
        // ln LR 1.5 (LR ≈ 4.5) moves between categories as π moves from 0.1 to 0.9.
        assert!(a.individual_sensitivity[0].prior_sensitive);
        // ln LR 12 (LR ≈ 160 000) stays above 0.9 under every prior of the set.
        let s = a.individual_sensitivity[1];
        assert!(s.p_female_min.unwrap() > 0.9);
        assert_eq!(a.individual_sensitivity[2].p_female_min, None);
        assert_eq!(a.sensitivity.len(), 15);
    }
}
