//! Unit tests of `sim/calibration.rs`.

use super::*;

#[test]
fn posteriors_are_calibrated_light() {
    let m = Model::default_model().unwrap();
    let prior = crate::prior::shipped_priors().unwrap()[0].clone();
    let c = calibrate(&m, &MissingSpec::fragmentary(), &prior, 20, 100, 3).unwrap();
    // About 1 800 individuals: the sampling noise of the ECE alone is about 0.02.
    assert!(c.ece < 0.05, "{}", c.to_text());
    assert_eq!(c.bins.iter().map(|b| b.n).sum::<usize>(), c.n);
}

#[test]
#[ignore = "heavy: 20 000 simulated individuals; run with --release --ignored --nocapture"]
fn posteriors_are_calibrated_heavy() {
    let m = Model::default_model().unwrap();
    let prior = crate::prior::shipped_priors().unwrap()[0].clone();
    let c = calibrate(&m, &MissingSpec::fragmentary(), &prior, 240, 100, 30).unwrap();
    println!("{}", c.to_text());
    assert!(c.n >= 20_000);
    assert!(c.ece <= 0.02, "{}", c.to_text());
}
