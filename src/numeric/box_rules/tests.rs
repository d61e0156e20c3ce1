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
