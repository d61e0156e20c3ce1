use super::*;
use crate::numeric::mvn::{genz_sov, QmcSettings};

fn equicorrelated(n: usize, rho: f64) -> DMatrix<f64> {
    DMatrix::from_fn(n, n, |i, j| if i == j { 1.0 } else { rho })
}

#[test]
fn one_factor_form_is_recognised_and_only_where_it_holds() {
    // Equicorrelated, as the shipped blocks: λᵢ = √ρ, dᵢ = 1 − ρ.
    let f = OneFactor::of(&equicorrelated(5, 0.35)).unwrap();
    for (l, d) in f.loadings.iter().zip(&f.own_sd) {
        assert!((l - 0.35f64.sqrt()).abs() < 1e-15);
        assert!((d - 0.65f64.sqrt()).abs() < 1e-15);
    }
    // Mixed signs and unequal variances: Σ = λλᵀ + diag(d) rebuilt.
    let lambda = [0.9, -0.4, 1.3, 0.2];
    let d = [0.5, 1.0, 0.3, 2.0];
    let cov = DMatrix::from_fn(4, 4, |i, j| {
        lambda[i] * lambda[j] + if i == j { d[i] } else { 0.0 }
    });
    let f = OneFactor::of(&cov).unwrap();
    for i in 0..4 {
        assert!(
            (f.loadings[i] - lambda[i]).abs() < 1e-12,
            "{:?}",
            f.loadings
        );
        assert!((f.own_sd[i] - d[i].sqrt()).abs() < 1e-12);
    }
    // Negative equicorrelation and a general matrix are not of this form.
    assert!(OneFactor::of(&equicorrelated(4, -0.2)).is_none());
    let general = DMatrix::from_row_slice(3, 3, &[1.0, 0.5, 0.1, 0.5, 1.0, 0.3, 0.1, 0.3, 1.0]);
    assert!(OneFactor::of(&general).is_none());
    // Nor is a matrix two variables of which are perfectly correlated (dᵢ would be 0).
    assert!(OneFactor::of(&equicorrelated(3, 1.0)).is_none());
}

#[test]
fn the_two_rules_agree_where_both_apply() {
    // A three-dimensional equicorrelated box is open to both rules: two different
    // reductions, one value.
    let inf = f64::INFINITY;
    let cov = equicorrelated(3, 0.45);
    let f = OneFactor::of(&cov).unwrap();
    for (a, b) in [
        ([-inf, -0.4, 0.4], [-1.2, 0.4, 1.2]),
        ([1.2, 1.2, -inf], [inf, inf, -1.2]),
        ([-0.5, -2.0, 0.1], [0.5, 3.0, 0.2]),
    ] {
        let x = ln_box_one_factor(&a, &b, &f).unwrap();
        let y = ln_box_trivariate(&a, &b, &cov).unwrap();
        assert!(
            (x.ln_p - y.ln_p).abs() < 1e-10,
            "{a:?} {b:?}: {x:?} vs {y:?}"
        );
        assert!(x.error < 1e-9 && y.error < 1e-9);
    }
}

#[test]
fn the_rules_agree_with_the_randomised_routine_within_its_error() {
    let inf = f64::INFINITY;
    let q = QmcSettings {
        rel_error: 1e-5,
        max_points: 1 << 20,
        ..QmcSettings::default()
    };
    let cov = equicorrelated(5, 0.35);
    let f = OneFactor::of(&cov).unwrap();
    let (a, b) = (
        [-inf, -1.3, -0.45, 0.45, -inf],
        [-1.3, -0.45, 0.45, 1.3, inf],
    );
    let x = ln_box_one_factor(&a, &b, &f).unwrap();
    let g = genz_sov(&a, &b, &cov, 3, &q).unwrap();
    assert!((x.ln_p - g.ln_p).abs() <= g.error, "{x:?} vs {g:?}");
    let cov = DMatrix::from_row_slice(3, 3, &[2.0, 0.6, -0.3, 0.6, 1.0, 0.4, -0.3, 0.4, 0.5]);
    let (a, b) = ([-1.0, -inf, 0.0], [0.5, 0.2, inf]);
    let y = ln_box_trivariate(&a, &b, &cov).unwrap();
    let g = genz_sov(&a, &b, &cov, 4, &q).unwrap();
    assert!((y.ln_p - g.ln_p).abs() <= g.error, "{y:?} vs {g:?}");
}

#[test]
fn an_empty_box_is_left_to_the_caller() {
    let cov = equicorrelated(3, 0.3);
    let f = OneFactor::of(&cov).unwrap();
    assert!(ln_box_one_factor(&[0.0, 1.0, 0.0], &[1.0, 1.0, 1.0], &f).is_none());
}

/// Every box of grades a five-trait block at ρ = 0.35 and a four-trait block at ρ = 0.45 can
/// give (thresholds of the shipped model, each trait's grade or a range of two grades, means
/// ±0.9 for either sex), with some traits missing: the fixed nodes take each one (no fall-back)
/// and agree with the adaptive rule within the two rules' stated tolerances.
#[test]
fn the_fixed_nodes_agree_with_the_adaptive_rule_on_the_blocks_grades() {
    use super::fixed_nodes::ln_box_one_factor_on_nodes;
    use rand::{RngExt, SeedableRng};
    let inf = f64::INFINITY;
    let cuts = [-inf, -1.3, -0.45, 0.45, 1.3, inf];
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(17);
    let mut taken = 0;
    for (n, rho) in [(5, 0.35), (4, 0.45), (3, 0.35)] {
        let f = OneFactor::of(&equicorrelated(n, rho)).unwrap();
        for _ in 0..300 {
            let mean = if rng.random::<bool>() { 0.9 } else { -0.9 };
            let (mut a, mut b) = (Vec::new(), Vec::new());
            for _ in 0..n {
                let g = rng.random_range(0..5usize);
                let top = (g + 1 + usize::from(rng.random::<f64>() < 0.2)).min(5);
                a.push(cuts[g] - mean);
                b.push(cuts[top] - mean);
            }
            let fixed = ln_box_one_factor_on_nodes(&a, &b, &f)
                .unwrap_or_else(|| panic!("fell back on {a:?} {b:?}"));
            let adaptive = ln_box_one_factor(&a, &b, &f).unwrap();
            assert!(
                (fixed.ln_p - adaptive.ln_p).abs() < 3e-10,
                "{a:?} {b:?}: {fixed:?} vs {adaptive:?}"
            );
            assert!(fixed.error < 1e-9);
            taken += 1;
        }
    }
    assert_eq!(taken, 900);
}

/// Where the integrand is too narrow for the fixed panels (twelve traits correlated 0.98)
/// or lies beyond their reach (a box far in the tail), the fixed nodes decline and the
/// adaptive rule answers.
#[test]
fn the_fixed_nodes_decline_what_they_cannot_resolve() {
    use super::fixed_nodes::ln_box_one_factor_on_nodes;
    let inf = f64::INFINITY;
    let f = OneFactor::of(&equicorrelated(12, 0.98)).unwrap();
    let (a, b) = (vec![-0.1; 12], vec![0.1; 12]);
    assert!(ln_box_one_factor_on_nodes(&a, &b, &f).is_none());
    assert!(ln_box_one_factor(&a, &b, &f).is_some());
    let f = OneFactor::of(&equicorrelated(3, 0.5)).unwrap();
    let (a, b) = (vec![9.0; 3], vec![inf; 3]);
    assert!(ln_box_one_factor_on_nodes(&a, &b, &f).is_none());
    assert!(ln_box_one_factor(&a, &b, &f).is_some());
}
