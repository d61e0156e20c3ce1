//! The cumulative probit of `tessera fit` against statsmodels' OrderedModel (probit link, male
//! indicator, no intercept) on the same data: tests/reference/ordered_probit.py, statsmodels
//! 0.15.0, committed in tests/reference/fixtures/ordered_probit_*.csv.

use std::collections::BTreeMap;
use tessera::fit::ordinal::{fit_cumulative_probit, OrdinalScore};

const TOL: f64 = 1e-4;

#[test]
fn thresholds_and_shift_equal_statsmodels_ordered_probit() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut cases: BTreeMap<String, (usize, Vec<OrdinalScore>)> = BTreeMap::new();
    let mut r = csv::Reader::from_path(format!("{dir}ordered_probit_data.csv")).unwrap();
    for row in r.records() {
        let row = row.unwrap();
        let k: usize = row[1].parse().unwrap();
        let g: usize = row[3].parse().unwrap();
        let e = cases.entry(row[0].to_string()).or_insert((k, Vec::new()));
        e.1.push(OrdinalScore {
            male: &row[2] == "1",
            low: g - 1,
            high: g - 1,
        });
    }
    let mut r = csv::Reader::from_path(format!("{dir}ordered_probit_expected.csv")).unwrap();
    let mut worst: f64 = 0.0;
    let mut checked = 0;
    for row in r.records() {
        let row = row.unwrap();
        let (k, scores) = &cases[&row[0]];
        let fit = fit_cumulative_probit(scores, *k).unwrap();
        let expected: f64 = row[2].parse().unwrap();
        let got = match &row[1] {
            "shift" => fit.shift,
            "shift_se" => fit.shift_se,
            q => fit.thresholds[q.trim_start_matches("threshold_").parse::<usize>().unwrap() - 1],
        };
        // statsmodels' standard errors come from a numerical Hessian: relative 1e-3.
        let tol = if &row[1] == "shift_se" {
            1e-3 * expected
        } else {
            TOL
        };
        let d = (got - expected).abs();
        assert!(
            d < tol,
            "{} {}: tessera {got} statsmodels {expected}",
            &row[0],
            &row[1]
        );
        if &row[1] != "shift_se" {
            worst = worst.max(d);
        }
        checked += 1;
    }
    assert_eq!(checked, 15);
    println!("largest difference from statsmodels (thresholds and shift): {worst:.2e}");
}
