//! Unit tests of `report/figures.rs`.

use super::*;

/// The figure's bars use the library's Wilson interval (checked against statsmodels in
/// numeric/proportion.rs); with no individual in a bin, the bar spans 0 to 1.
#[test]
fn an_empty_bin_has_a_bar_from_0_to_1() {
    assert_eq!(wilson(0.3, 0), (0.0, 1.0));
    let (a, b) = wilson(0.7, 10);
    assert!(
        (a - 0.396_778_147_461_145_37).abs() < 1e-12 && (b - 0.892_208_732_593_698_9).abs() < 1e-12
    );
}
