//! The grid posterior of π against direct numerical integration by scipy
//! (tests/reference/pi_posterior.py: scipy 1.16.3 `integrate.quad`, `optimize.brentq`),
//! committed in tests/reference/fixtures/pi_posterior.csv.

use tessera::assemblage::PiPosterior;
use tessera::prior::Prior;

/// Largest absolute deviation accepted for means, quantiles and probabilities.
const TOL: f64 = 1e-6;

#[test]
fn grid_posterior_agrees_with_scipy_quadrature() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/reference/fixtures/pi_posterior.csv"
    );
    let mut r = csv::Reader::from_path(path).unwrap();
    let mut worst: f64 = 0.0;
    let mut n = 0;
    for rec in r.records() {
        let rec = rec.unwrap();
        let (a, b): (f64, f64) = (rec[1].parse().unwrap(), rec[2].parse().unwrap());
        let l: Vec<f64> = rec[3].split(';').map(|x| x.parse().unwrap()).collect();
        let prior = Prior::from_yaml(
            "t",
            &format!("name: t\nprovenance: reference case from scipy\nbeta: {{a: {a}, b: {b}}}\n"),
        )
        .unwrap();
        let post = PiPosterior::compute(&l, &prior);
        let s = post.summary();
        let expected: f64 = rec[5].parse().unwrap();
        let got = match &rec[4] {
            "mean" => s.mean,
            "median" => s.median,
            "q025" => s.lo,
            "q975" => s.hi,
            "p_below_half" => s.p_below_half,
            q => {
                let i: usize = q.strip_prefix("p_female_").unwrap().parse().unwrap();
                post.p_female(l[i])
            }
        };
        let d = (got - expected).abs();
        assert!(
            d < TOL,
            "case {} {}: {got} vs scipy {expected}",
            &rec[0],
            &rec[4]
        );
        worst = worst.max(d);
        n += 1;
    }
    println!("largest deviation from scipy over {n} quantities: {worst:.2e}");
}
