//! Analyses by sex against independent numpy computations, committed in
//! tests/reference/fixtures/: age by sex over the same joint draws (tests/reference/by_sex.py)
//! and the exact posterior of the prevalences by sex for ten individuals
//! (tests/reference/prevalence_by_sex.py: Gauss-Legendre quadrature, exact for its
//! polynomial integrand; numpy 2.3.5).

use std::collections::HashMap;
use tessera::summary::{age_by_sex, prevalence_by_sex, ChainLength, SexEvidence, SexRatioPrior};

fn expected(file: &str) -> HashMap<String, f64> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::Reader::from_path(format!("{dir}{file}")).unwrap();
    r.records()
        .map(|x| {
            let x = x.unwrap();
            (x[0].to_string(), x[1].parse().unwrap())
        })
        .collect()
}

/// Largest absolute deviation accepted (the same arithmetic in another language).
const TOL: f64 = 1e-9;

#[test]
fn age_by_sex_agrees_with_numpy() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::ReaderBuilder::new()
        .has_headers(true)
        .from_path(format!("{dir}by_sex_draws.csv"))
        .unwrap();
    let recs: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    let ages: Vec<Option<(f64, f64)>> = recs[0]
        .iter()
        .skip(1)
        .map(|a| {
            let v: f64 = a.parse().unwrap();
            Some((v, v))
        })
        .collect();
    let draws: Vec<Vec<bool>> = recs[2..]
        .iter()
        .map(|d| d.iter().skip(1).map(|s| s == "F").collect())
        .collect();
    let expected = expected("by_sex_expected.csv");
    let classes =
        tessera::summary::AgeClasses::parse(tessera::summary::DEFAULT_AGE_CLASSES).unwrap();
    let a = age_by_sex(&ages, &draws, &classes, 1);
    let got = [
        ("mean_age_female", a.mean_female.0),
        ("mean_age_female_lo", a.mean_female.1),
        ("mean_age_female_hi", a.mean_female.2),
        ("mean_age_male", a.mean_male.0),
        ("mean_age_male_lo", a.mean_male.1),
        ("mean_age_male_hi", a.mean_male.2),
        ("age_difference", a.difference.0),
        ("age_difference_lo", a.difference.1),
        ("age_difference_hi", a.difference.2),
        ("p_females_die_younger", a.p_females_die_younger),
    ];
    let mut worst: f64 = 0.0;
    for (k, v) in got {
        let e = expected[k];
        assert!((v - e).abs() < TOL, "{k}: {v} vs numpy {e}");
        worst = worst.max((v - e).abs());
    }
    println!(
        "largest deviation from numpy over {} quantities: {worst:.1e}",
        expected.len()
    );
}

/// The Gibbs sampler's posterior means against the exact ones: each within four Monte Carlo
/// standard errors (posterior SD / √ESS, ESS from the chains themselves).
#[test]
fn prevalence_by_sex_agrees_with_the_exact_posterior() {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::Reader::from_path(format!("{dir}prevalence_by_sex.csv")).unwrap();
    let (mut l, mut est, mut tab, mut y) = (vec![], vec![], vec![], vec![]);
    for rec in r.records() {
        let rec = rec.unwrap();
        l.push(rec[0].parse::<f64>().unwrap());
        est.push(&rec[1] == "1");
        tab.push(&rec[2] == "1");
        y.push(match &rec[3] {
            "1" => Some(true),
            "0" => Some(false),
            _ => None,
        });
    }
    let mem = vec![0; l.len()];
    let ev = SexEvidence {
        ln_lrs: &l,
        estimable: &est,
        membership: &mem,
        in_tables: &tab,
        prior: SexRatioPrior::Beta(1.0, 1.0),
    };
    let len = ChainLength {
        chains: 4,
        iterations: 26_000,
        burn_in: 1_000,
        seed: 11,
    };
    let p = prevalence_by_sex(&ev, "condition", &y, &len);
    let e = expected("prevalence_by_sex_expected.csv");
    assert_eq!((p.n_recorded, p.n_left_out), (7, 2));
    for (name, got, sd) in [
        ("mean_p_female", p.female.0, e["sd_p_female"]),
        ("mean_p_male", p.male.0, e["sd_p_male"]),
        ("mean_difference", p.difference.0, e["sd_difference"]),
    ] {
        let mcse = sd / p.ess.sqrt();
        let dev = (got - e[name]).abs();
        println!(
            "{name}: {got:.5} vs exact {:.5} (MC SE {mcse:.1e})",
            e[name]
        );
        assert!(dev < 4.0 * mcse, "{name}: {got} vs exact {}", e[name]);
    }
    // A share of draws: binomial MC error on ESS draws.
    let q = e["p_female_higher"];
    let mcse = (q * (1.0 - q) / p.ess).sqrt();
    assert!(
        (p.p_female_higher - q).abs() < 4.0 * mcse,
        "{} vs {q}",
        p.p_female_higher
    );
}
