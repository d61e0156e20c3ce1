//! ln Φ and ln(Φ(b) − Φ(a)) against values computed by scipy (tests/reference/normal_tails.py,
//! scipy 1.16.3 `log_ndtr`), committed in tests/reference/fixtures/normal_tails.csv.

use tessera::numeric::normal::{ln_cdf, ln_interval};

/// Largest relative deviation accepted from scipy's log_ndtr.
const REL_TOL: f64 = 1e-13;

#[test]
fn log_normal_tails_agree_with_scipy() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/fixtures/normal_tails.csv"
    );
    let mut r = csv::Reader::from_path(path).unwrap();
    let mut worst: f64 = 0.0;
    let mut n = 0;
    for rec in r.records() {
        let rec = rec.unwrap();
        let a: f64 = rec[1].parse().unwrap();
        let expected: f64 = rec[3].parse().unwrap();
        let got = match &rec[0] {
            "ln_cdf" => ln_cdf(a),
            "ln_interval" => ln_interval(a, rec[2].parse().unwrap()),
            other => panic!("unknown function {other}"),
        };
        let rel = if expected == 0.0 {
            got.abs()
        } else {
            ((got - expected) / expected).abs()
        };
        assert!(
            rel < REL_TOL,
            "{}({a}): {got} vs scipy {expected} (rel {rel:e})",
            &rec[0]
        );
        worst = worst.max(rel);
        n += 1;
    }
    assert!(n > 100);
    println!("largest relative deviation from scipy over {n} values: {worst:e}");
}
