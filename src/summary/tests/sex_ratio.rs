//! Unit tests of `summary/sex_ratio.rs`.

use super::*;
use crate::prior::PriorShape;
use statrs::distribution::{Beta, ContinuousCDF};
use statrs::function::beta::ln_beta;

fn beta_prior(a: f64, b: f64) -> Prior {
    Prior {
        name: "test".into(),
        description: String::new(),
        provenance: String::new(),
        shape: PriorShape::Beta { a, b },
        sha256: String::new(),
    }
}

#[test]
fn certain_sexes_give_the_beta_binomial_closed_forms() {
    // With every sex certain (ln LR ±35), the posterior of π is Beta(a + F, b + M), and the
    // Bayes factor of π = π_R against the Beta(a, b) prior is
    // π_R^F (1 − π_R)^M B(a, b) / B(a + F, b + M). Checked against statrs' Beta distribution
    // and ln B (a general-purpose library).
    for (f, m, a, b, reference) in [
        (8usize, 24usize, 1.0, 1.0, 105.0),
        (20, 20, 1.0, 1.0, 105.0),
        (3, 30, 2.0, 3.0, 100.0),
        (15, 5, 1.0, 1.0, 250.0),
    ] {
        let mut l = vec![35.0; f];
        l.extend(vec![-35.0; m]);
        let prior = beta_prior(a, b);
        let t = sex_ratio_test(
            None,
            &l,
            &PiPosterior::compute(&l, &prior),
            f + m,
            reference,
        );
        let pi_r = 100.0 / (100.0 + reference);
        let (ff, mm) = (f as f64, m as f64);
        let ln_bf =
            ff * pi_r.ln() + mm * (1.0 - pi_r).ln() + ln_beta(a, b) - ln_beta(a + ff, b + mm);
        assert!(
            (t.ln_bf_reference - ln_bf).abs() < 1e-3,
            "{f} {m}: {} against {ln_bf}",
            t.ln_bf_reference
        );
        let post = Beta::new(a + ff, b + mm).unwrap();
        assert!(
            (t.p_more_males - post.cdf(pi_r)).abs() < 1e-3,
            "{f} {m}: {}",
            t.p_more_males
        );
        let median = 100.0 * (1.0 - post.inverse_cdf(0.5)) / post.inverse_cdf(0.5);
        assert!(
            (t.median / median - 1.0).abs() < 2e-3,
            "{f} {m}: {} against {median}",
            t.median
        );
        let lo = {
            let p = post.inverse_cdf(0.975);
            100.0 * (1.0 - p) / p
        };
        assert!(
            (t.lo / lo - 1.0).abs() < 2e-3,
            "{f} {m}: {} against {lo}",
            t.lo
        );
        assert!(t.lo < t.median && t.median < t.hi);
    }
}

#[test]
fn groups_are_tested_on_their_own_and_a_fixed_prior_gives_nothing() {
    // A deposit of 20 boys and 4 girls beside 10 and 10: the deposit's ratio is well above the
    // birth ratio, the other's is not; individuals without evidence (ln LR 0) add nothing.
    let mut l = vec![-30.0; 20];
    l.extend(vec![30.0; 4]);
    l.extend(vec![-30.0; 10]);
    l.extend(vec![30.0; 10]);
    l.push(0.0);
    let groups: Vec<Option<&str>> = (0..l.len())
        .map(|i| Some(if i < 24 { "deposit" } else { "yard" }))
        .collect();
    let mut estimable = vec![true; l.len()];
    estimable[44] = false;
    let flat = beta_prior(1.0, 1.0);
    let t = sex_ratio_tests(
        &l,
        &PiPosterior::compute(&l, &flat),
        &estimable,
        &groups,
        &flat,
        105.0,
    );
    assert_eq!(t.len(), 3);
    assert_eq!(
        (t[1].group.as_deref(), t[1].n, t[1].n_estimable),
        (Some("deposit"), 24, 24)
    );
    assert_eq!(
        (t[2].group.as_deref(), t[2].n, t[2].n_estimable),
        (Some("yard"), 21, 20)
    );
    assert!(
        t[1].p_more_males > 0.99 && t[1].ln_bf_reference < 0.0,
        "{:?}",
        t[1]
    );
    assert!(
        t[2].p_more_males < 0.6 && t[2].ln_bf_reference > 0.0,
        "{:?}",
        t[2]
    );
    let fixed = Prior::fixed(0.5).unwrap();
    let post = PiPosterior::compute(&l, &fixed);
    assert!(sex_ratio_tests(&l, &post, &estimable, &groups, &fixed, 105.0).is_empty());
}
