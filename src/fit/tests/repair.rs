use super::*;

#[test]
fn an_indefinite_matrix_becomes_positive_definite_with_unit_diagonal() {
    // Pairwise correlations that no joint distribution can have.
    let r = DMatrix::from_row_slice(3, 3, &[1.0, 0.9, -0.9, 0.9, 1.0, 0.9, -0.9, 0.9, 1.0]);
    let (fixed, smallest) = make_positive_definite(&r, EIGENVALUE_FLOOR);
    assert!(smallest.is_some_and(|s| s < 0.0));
    assert!(fixed.clone().cholesky().is_some());
    for i in 0..3 {
        assert!((fixed[(i, i)] - 1.0).abs() < 1e-12);
    }
    let min = fixed.symmetric_eigen().eigenvalues.min();
    assert!(min > 0.0, "{min}");
}

#[test]
fn a_positive_definite_matrix_is_unchanged() {
    let r = DMatrix::from_row_slice(2, 2, &[1.0, 0.4, 0.4, 1.0]);
    let (fixed, smallest) = make_positive_definite(&r, EIGENVALUE_FLOOR);
    assert_eq!(smallest, None);
    assert_eq!(fixed, r);
}
