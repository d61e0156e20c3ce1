//! Intervals for a proportion.

/// z of a two-sided 95% interval: Φ⁻¹(0.975).
pub const Z95: f64 = 1.959_963_984_540_054;

/// Wilson's score interval for `k` successes in `n` trials (Wilson 1927, JASA 22:209–212):
/// with p̂ = k/n,
///
/// centre = (p̂ + z²/2n) / (1 + z²/n), half-width = z/(1 + z²/n) · √(p̂(1 − p̂)/n + z²/4n²).
///
/// It stays inside [0, 1] and keeps its coverage near 0 and 1, where the Wald interval
/// collapses (Newcombe 1998, Statistics in Medicine 17:857–872, method 3). `None` for n = 0.
pub fn wilson_interval(k: usize, n: usize, z: f64) -> Option<(f64, f64)> {
    if k > n {
        return None;
    }
    wilson_interval_of_share(k as f64 / n.max(1) as f64, n, z)
}

/// As [`wilson_interval`], from the observed share p̂ of `n` trials.
pub fn wilson_interval_of_share(p: f64, n: usize, z: f64) -> Option<(f64, f64)> {
    if n == 0 || !(0.0..=1.0).contains(&p) {
        return None;
    }
    let n = n as f64;
    let z2 = z * z;
    let denom = 1.0 + z2 / n;
    let centre = (p + z2 / (2.0 * n)) / denom;
    let half = z / denom * (p * (1.0 - p) / n + z2 / (4.0 * n * n)).sqrt();
    Some(((centre - half).max(0.0), (centre + half).min(1.0)))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn newcombe_s_worked_examples_are_reproduced() {
        // Newcombe (1998), Table I, method 3 (score interval without continuity correction),
        // four decimals (from memory).
        for (k, n, lo, hi) in [
            (81, 263, 0.2553, 0.3662),
            (15, 148, 0.0624, 0.1605),
            (0, 20, 0.0, 0.1611),
            (1, 29, 0.0061, 0.1718),
        ] {
            let (l, h) = wilson_interval(k, n, Z95).unwrap();
            assert!(
                (l - lo).abs() < 6e-5 && (h - hi).abs() < 6e-5,
                "{k}/{n}: {l:.5} to {h:.5}"
            );
        }
    }

    /// Check values: statsmodels 0.15.0 `proportion_confint(count, n, alpha=0.05,
    /// method="wilson")`, computed for this test.
    #[test]
    fn wilson_interval_equals_statsmodels() {
        let cases = [
            (7, 10, 0.396_778_147_461_145_37, 0.892_208_732_593_698_9),
            (0, 12, 0.0, 0.242_494_006_655_240_96),
            (45, 50, 0.786_397_685_625_203_4, 0.956_524_235_068_109_5),
            (1, 3, 0.061_491_944_720_396_26, 0.792_340_399_197_952_3),
        ];
        for (count, n, lo, hi) in cases {
            let (a, b) = wilson_interval(count, n, Z95).unwrap();
            assert!(
                (a - lo).abs() < 1e-12 && (b - hi).abs() < 1e-12,
                "{count}/{n}: {a} {b}"
            );
        }
    }

    #[test]
    fn closed_forms_at_the_ends() {
        // k = 0: the lower end is 0 and the upper is z²/(n + z²) (closed form).
        let (l, h) = wilson_interval(0, 10, Z95).unwrap();
        assert_eq!(l, 0.0);
        assert!((h - Z95 * Z95 / (10.0 + Z95 * Z95)).abs() < 1e-15);
        // Symmetry: the interval of n − k is the mirror of that of k.
        let (a, b) = wilson_interval(3, 17, Z95).unwrap();
        let (c, d) = wilson_interval(14, 17, Z95).unwrap();
        assert!((a - (1.0 - d)).abs() < 1e-15 && (b - (1.0 - c)).abs() < 1e-15);
        assert_eq!(wilson_interval(0, 0, Z95), None);
    }

    #[test]
    fn z95_is_the_normal_quantile() {
        use statrs::distribution::{ContinuousCDF, Normal};
        let q = Normal::standard().inverse_cdf(0.975);
        assert!((q - Z95).abs() < 1e-12, "{q}");
    }
}
