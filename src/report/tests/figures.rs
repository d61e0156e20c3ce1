//! Unit tests of `report/figures.rs`.

use super::*;

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
        let (a, b) = wilson(count as f64 / n as f64, n);
        assert!(
            (a - lo).abs() < 1e-12 && (b - hi).abs() < 1e-12,
            "{count}/{n}: {a} {b}"
        );
    }
    assert_eq!(wilson(0.3, 0), (0.0, 1.0));
}
