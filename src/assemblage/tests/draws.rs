//! Unit tests of `assemblage/draws.rs`.

use super::*;
use crate::prior::Prior;

#[test]
fn poisson_binomial_closed_forms() {
    // Equal probabilities give the binomial: P(2 of 4 | 0.3) = 6 · 0.09 · 0.49.
    let d = poisson_binomial(&[0.3; 4]);
    assert!((d[2] - 6.0 * 0.09 * 0.49).abs() < 1e-15);
    assert!((d.iter().sum::<f64>() - 1.0).abs() < 1e-15);
    let d = poisson_binomial(&[1.0, 0.0, 0.5]);
    assert_eq!(d, vec![0.0, 0.5, 0.5, 0.0]);
}

/// Under a fixed π the number of females in the draws follows the Poisson-binomial with
/// P(Fᵢ) = π LRᵢ / (π LRᵢ + 1 − π), computed exactly.
#[test]
fn draws_under_a_fixed_prior_follow_the_poisson_binomial() {
    let l = [2.0, -1.0, 0.3, 0.0, -3.0, 1.5, 0.8, -0.2];
    let prior = Prior::fixed(0.4).unwrap();
    let post = PiPosterior::compute(&l, &prior);
    let n = 40_000;
    let d = Draws::sample(&post, None, &l, n, 3);
    let exact = poisson_binomial(
        &l.iter()
            .map(|&x| p_female_given(0.4, x))
            .collect::<Vec<_>>(),
    );
    let counts = d.n_female();
    let mut worst: f64 = 0.0;
    for (k, &e) in exact.iter().enumerate() {
        let f = counts.iter().filter(|&&c| c == k).count() as f64 / n as f64;
        worst = worst.max((f - e).abs());
    }
    // 40 000 draws: the standard error of a frequency is at most 0.0025.
    assert!(worst < 0.01, "largest difference {worst}");
    let again = Draws::sample(&post, None, &l, 10, 3);
    assert_eq!(again.female[..], d.female[..10]);
}

#[test]
fn a_packed_draw_reads_back_every_sex() {
    // Lengths around the 64-bit word boundary.
    for n in [0usize, 1, 63, 64, 65, 130] {
        let sexes: Vec<bool> = (0..n).map(|i| (i * 7 + i / 3) % 5 < 2).collect();
        let d: SexDraw = sexes.iter().copied().collect();
        assert_eq!(d.len(), n);
        assert_eq!(d.iter().collect::<Vec<_>>(), sexes);
        assert_eq!(d.n_female(), sexes.iter().filter(|&&f| f).count());
        assert!(!d.is_female(n));
        let mut out = vec![true; 3];
        d.unpack_into(&mut out);
        assert_eq!(out, sexes);
    }
}
