//! Gauss–Legendre and Gauss–Kronrod quadrature on a finite interval.

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

/// Nodes and weights of the 15-point Kronrod extension of the 7-point Gauss–Legendre rule on
/// [−1, 1], the non-negative half: (node, Kronrod weight, Gauss weight or 0 where the node is
/// Kronrod's only). Piessens, de Doncker-Kapenga, Überhuber & Kahaner (1983, *QUADPACK*,
/// routine QK15); from memory, checked in the tests: the Kronrod rule integrates polynomials
/// up to degree 22 exactly, the embedded Gauss rule up to degree 13.
/// The published digits are kept, beyond what an f64 holds.
#[allow(clippy::excessive_precision)]
pub const GK15: [(f64, f64, f64); 8] = [
    (0.0, 0.209_482_141_084_727_828, 0.417_959_183_673_469_388),
    (0.207_784_955_007_898_468, 0.204_432_940_075_298_892, 0.0),
    (
        0.405_845_151_377_397_167,
        0.190_350_578_064_785_410,
        0.381_830_050_505_118_945,
    ),
    (0.586_087_235_467_691_130, 0.169_004_726_639_267_903, 0.0),
    (
        0.741_531_185_599_394_440,
        0.140_653_259_715_525_919,
        0.279_705_391_489_276_668,
    ),
    (0.864_864_423_359_769_073, 0.104_790_010_322_250_184, 0.0),
    (
        0.949_107_912_342_758_525,
        0.063_092_092_629_978_553,
        0.129_484_966_168_869_693,
    ),
    (0.991_455_371_120_812_639, 0.022_935_322_010_529_225, 0.0),
];

/// ∫ₗₒʰⁱ f by the 15-point Gauss–Kronrod rule: (the Kronrod value, its error estimate).
///
/// # Error estimate
/// QUADPACK's (Piessens et al. 1983, QK15): with I_K and I_G the Kronrod and Gauss values and
/// A = ∫ |f − I_K/(hi − lo)| by the Kronrod rule, err = A · min(1, (200 |I_K − I_G| / A)^1.5).
/// The plain difference |I_K − I_G| measures the 7-point rule's error, far larger than the
/// 15-point rule's for a smooth integrand; the published scaling tracks the latter. It is
/// never taken below 50 ε ∫|f| (rounding).
pub fn gauss_kronrod_15(f: &mut impl FnMut(f64) -> f64, lo: f64, hi: f64) -> (f64, f64) {
    let (c, h) = (0.5 * (lo + hi), 0.5 * (hi - lo));
    let mut values = [(0.0, 0.0); 8];
    for (v, &(x, _, _)) in values.iter_mut().zip(&GK15) {
        *v = if x == 0.0 {
            (f(c), 0.0)
        } else {
            (f(c - h * x), f(c + h * x))
        };
    }
    kronrod_15_of(&values, h)
}

/// [`gauss_kronrod_15`] on values already taken: `values[m]` = (f(c − h xₘ), f(c + h xₘ))
/// at the nodes xₘ of [`GK15`] (the centre's second entry unused), `h` the half-width.
pub fn kronrod_15_of(values: &[(f64, f64); 8], h: f64) -> (f64, f64) {
    let (mut kronrod, mut gauss) = (0.0, 0.0);
    for (y, &(x, wk, wg)) in values.iter().zip(&GK15) {
        let sum = if x == 0.0 { y.0 } else { y.0 + y.1 };
        kronrod += wk * sum;
        gauss += wg * sum;
    }
    let mean = 0.5 * kronrod;
    let spread: f64 = values
        .iter()
        .zip(&GK15)
        .map(|(&(y0, y1), &(x, wk, _))| {
            if x == 0.0 {
                wk * (y0 - mean).abs()
            } else {
                wk * ((y0 - mean).abs() + (y1 - mean).abs())
            }
        })
        .sum::<f64>()
        * h.abs();
    let diff = (h * (kronrod - gauss)).abs();
    let error = if spread > 0.0 && diff > 0.0 {
        spread * (200.0 * diff / spread).powf(1.5).min(1.0)
    } else {
        diff
    };
    // Never below what rounding allows (QK15's floor: 50 ε ∫|f|).
    let magnitude: f64 = values
        .iter()
        .zip(&GK15)
        .map(|(&(y0, y1), &(x, wk, _))| {
            if x == 0.0 {
                wk * y0.abs()
            } else {
                wk * (y0.abs() + y1.abs())
            }
        })
        .sum::<f64>()
        * h.abs();
    (h * kronrod, error.max(50.0 * f64::EPSILON * magnitude))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_kronrod_pair_integrates_polynomials_to_their_degrees() {
        // ∫ₐᵇ tⁿ dt = (bⁿ⁺¹ − aⁿ⁺¹)/(n + 1), closed form. The Kronrod rule is exact to
        // degree 22; the Gauss rule inside it to degree 13, so the error estimate (built on
        // their difference) vanishes up to degree 13 and not at 14.
        let (a, b) = (-0.7_f64, 1.3_f64);
        for n in 0..=22 {
            let mut f = |t: f64| t.powi(n);
            let (got, diff) = gauss_kronrod_15(&mut f, a, b);
            let exact = (b.powi(n + 1) - a.powi(n + 1)) / f64::from(n + 1);
            assert!(
                (got - exact).abs() < 1e-13 * exact.abs().max(1.0),
                "n {n}: {got} vs {exact}"
            );
            if n <= 13 {
                assert!(
                    diff < 1e-13 * exact.abs().max(1.0),
                    "n {n}: Gauss part off by {diff}"
                );
            }
        }
        let mut f = |t: f64| t.powi(14);
        assert!(gauss_kronrod_15(&mut f, -1.0, 1.0).1 > 1e-6);
        let mut f = |t: f64| t.powi(24);
        let (got, _) = gauss_kronrod_15(&mut f, -1.0, 1.0);
        assert!(
            (got - 2.0 / 25.0).abs() > 1e-9,
            "degree 24 is beyond the rule"
        );
    }

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
