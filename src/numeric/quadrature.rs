//! Gauss–Legendre quadrature on a finite interval.

/// Nodes and weights of the 8-point Gauss–Legendre rule on [−1, 1], the positive half
/// (Abramowitz & Stegun 1964, Table 25.4; from memory, checked in the tests against exact
/// integrals of polynomials up to degree 15).
pub const GL8: [(f64, f64); 4] = [
    (0.183_434_642_495_649_8, 0.362_683_783_378_362),
    (0.525_532_409_916_329, 0.313_706_645_877_887_3),
    (0.796_666_477_413_626_7, 0.222_381_034_453_374_5),
    (0.960_289_856_497_536_3, 0.101_228_536_290_376_3),
];

/// The 8-point rule on [lo, hi]: nodes in increasing order with weights summing to hi − lo.
pub fn gauss_legendre_8(lo: f64, hi: f64) -> [(f64, f64); 8] {
    let (c, h) = (0.5 * (lo + hi), 0.5 * (hi - lo));
    let mut out = [(0.0, 0.0); 8];
    for (k, &(x, w)) in GL8.iter().enumerate() {
        out[3 - k] = (c - h * x, h * w);
        out[4 + k] = (c + h * x, h * w);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_rule_integrates_polynomials_up_to_degree_15_exactly() {
        // ∫ₐᵇ tⁿ dt = (bⁿ⁺¹ − aⁿ⁺¹)/(n + 1), closed form.
        let (a, b) = (18.0_f64 / 50.0, 90.0_f64 / 50.0);
        for n in 0..=15 {
            let got: f64 = gauss_legendre_8(a, b)
                .iter()
                .map(|(t, w)| w * t.powi(n))
                .sum();
            let exact = (b.powi(n + 1) - a.powi(n + 1)) / f64::from(n + 1);
            assert!((got - exact).abs() < 1e-12 * exact.abs().max(1.0), "n {n}");
        }
        // Degree 16 is not integrated exactly: the rule is no wider than it claims.
        let got: f64 = gauss_legendre_8(-1.0, 1.0)
            .iter()
            .map(|(t, w)| w * t.powi(16))
            .sum();
        assert!((got - 2.0 / 17.0).abs() > 1e-8);
    }
}
