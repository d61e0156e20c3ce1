//! Making an estimated correlation matrix positive definite.
//!
//! Pairwise estimates (each correlation from its own subset of individuals) need not form a
//! positive-definite matrix. The repair raises every eigenvalue below `floor` to `floor` and
//! rescales the result to unit diagonal (eigenvalue clipping; Rousseeuw & Molenberghs 1993,
//! Comput Stat Data Anal 16:67–76, from memory). A matrix that is already positive definite
//! with all eigenvalues at or above the floor is returned unchanged.

use nalgebra::DMatrix;

/// Smallest eigenvalue kept (a choice of ours: keeps conditional variances away from zero).
pub const EIGENVALUE_FLOOR: f64 = 1e-3;

/// The repaired matrix and the smallest eigenvalue of the input (`None` when untouched).
pub fn make_positive_definite(r: &DMatrix<f64>, floor: f64) -> (DMatrix<f64>, Option<f64>) {
    let n = r.nrows();
    let sym = (r + r.transpose()) * 0.5;
    let eig = sym.clone().symmetric_eigen();
    let smallest = eig
        .eigenvalues
        .iter()
        .copied()
        .fold(f64::INFINITY, f64::min);
    if smallest >= floor {
        return (sym, None);
    }
    let clipped = eig.eigenvalues.map(|l| l.max(floor));
    let v = &eig.eigenvectors;
    let m = v * DMatrix::from_diagonal(&clipped) * v.transpose();
    let d: Vec<f64> = (0..n).map(|i| m[(i, i)].sqrt()).collect();
    let out = DMatrix::from_fn(n, n, |i, j| {
        if i == j {
            1.0
        } else {
            m[(i, j)] / (d[i] * d[j])
        }
    });
    (out, Some(smallest))
}

#[cfg(test)]
#[path = "tests/repair.rs"]
mod tests;
