//! Observer agreement against scikit-learn 1.7.2 (`cohen_kappa_score`, linear and quadratic
//! weights) and numpy (TEM, ICC(2,1) by Shrout & Fleiss 1979): tests/reference/agreement.py.

use std::collections::HashMap;
use tessera::agreement::{icc_2_1, tem, weighted_kappa};

/// Largest absolute deviation accepted.
const TOL: f64 = 1e-12;

#[test]
fn kappa_tem_and_icc_agree_with_the_reference_libraries() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::Reader::from_path(format!("{dir}agreement_pairs.csv")).unwrap();
    let (mut g, mut m) = (Vec::new(), Vec::new());
    for rec in r.records() {
        let rec = rec.unwrap();
        g.push((
            rec[0].parse::<i32>().unwrap(),
            rec[1].parse::<i32>().unwrap(),
        ));
        m.push((
            rec[2].parse::<f64>().unwrap(),
            rec[3].parse::<f64>().unwrap(),
        ));
    }
    let mut r = csv::Reader::from_path(format!("{dir}agreement_expected.csv")).unwrap();
    let e: HashMap<String, f64> = r
        .records()
        .map(|x| {
            let x = x.unwrap();
            (x[0].to_string(), x[1].parse().unwrap())
        })
        .collect();
    let got = [
        ("kappa_linear", weighted_kappa(&g, 1, 5, false)),
        ("kappa_quadratic", weighted_kappa(&g, 1, 5, true)),
        ("tem", tem(&m)),
        ("icc_2_1", icc_2_1(&m)),
    ];
    for (k, v) in got {
        assert!((v - e[k]).abs() < TOL, "{k}: {v} vs reference {}", e[k]);
        println!("{k}: tessera {v:.15} reference {:.15}", e[k]);
    }
}
