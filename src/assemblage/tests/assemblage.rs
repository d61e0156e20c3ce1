//! Unit tests of `assemblage/mod.rs`.

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
        note: "".into(),
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
    let a = under_prior(&base, None, p, &Thresholds::default()).0;
    let b = under_prior(&more, None, p, &Thresholds::default()).0;
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
    let ra = under_prior(&a, None, p, &Thresholds::default()).0;
    let rb = under_prior(&b, None, p, &Thresholds::default()).0;
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
    let a = analyse(&e, None, &set[0], &set, &Thresholds::default());
    // ln LR 1.5 (LR ≈ 4.5) moves between categories as π moves from 0.1 to 0.9.
    assert!(a.individual_sensitivity[0].prior_sensitive);
    // ln LR 12 (LR ≈ 160 000) stays above 0.9 under every prior of the set.
    let s = a.individual_sensitivity[1];
    assert!(s.p_female_min.unwrap() > 0.9);
    assert_eq!(a.individual_sensitivity[2].p_female_min, None);
    assert_eq!(a.sensitivity.len(), 15);
}

#[test]
fn a_fixed_prior_fixes_every_group_and_is_as_strict_as_without_groups() {
    // Two groups of very different make-up; under fixed:0.3 each individual's P(female) must
    // be the one-population value at π = 0.3 (not the hierarchy's, which would let the
    // groups move away from 0.3), and there is no hierarchy to summarise.
    let l = [4.0, 3.0, 2.5, -0.3, 0.2, -4.0, -3.5, -2.0, 0.4, -0.1];
    let evidence: Vec<_> = l.iter().map(|&x| ev(Some(x))).collect();
    let groups: Vec<String> = (0..l.len())
        .map(|i| {
            if i < 5 {
                "a".to_string()
            } else {
                "b".to_string()
            }
        })
        .collect();
    let fixed = crate::prior::Prior::fixed(0.3).unwrap();
    let t = Thresholds::default();
    let with = under_prior(&evidence, Some(&groups), &fixed, &t).0;
    let without = under_prior(&evidence, None, &fixed, &t).0;
    assert_eq!(with.p_female, without.p_female);
    assert!(with.hyper.is_none());
    assert_eq!(with.groups.len(), 2);
    assert!(with
        .groups
        .iter()
        .all(|g| g.pi.mean == 0.3 && g.pi.lo == 0.3));
    // Under the flat prior the hierarchy is fitted, and the one-population expected count
    // is kept beside the hierarchy's.
    let flat = &shipped_priors().unwrap()[0];
    let h = under_prior(&evidence, Some(&groups), flat, &t).0;
    let one = under_prior(&evidence, None, flat, &t).0;
    assert!(h.hyper.is_some());
    assert_eq!(h.expected_females_one_population, one.expected_females);
    assert_ne!(h.p_female, one.p_female);
}
