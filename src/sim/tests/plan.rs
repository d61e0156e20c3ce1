//! Unit tests of `sim/plan.rs`.

use super::*;

#[test]
fn larger_excavations_give_narrower_intervals() {
    let m = Model::default_model().unwrap();
    let prior = crate::prior::shipped_priors().unwrap()[0].clone();
    let settings = PlanSettings {
        sizes: vec![20, 160],
        pi: 0.3,
        missing: MissingSpec::fragmentary(),
        prior,
        thresholds: Thresholds::default(),
        replicates: 12,
        seed: 1,
    };
    let rows = plan(&m, &settings).unwrap();
    assert!(rows[1].mean_interval_width < rows[0].mean_interval_width * 0.6);
    assert!(rows[1].p_differs_from_even >= rows[0].p_differs_from_even);
    let s: f64 = rows[0].category_shares.iter().sum();
    assert!((s - 1.0).abs() < 1e-9);
}
