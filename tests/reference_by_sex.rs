//! Analyses by sex against an independent numpy computation over the same joint draws
//! (tests/reference/by_sex.py, numpy 2.3.5), committed in tests/reference/fixtures/.

use std::collections::HashMap;
use tessera::summary::{age_by_sex, prevalence_by_sex};

/// Largest absolute deviation accepted (the same arithmetic in another language).
const TOL: f64 = 1e-9;

#[test]
fn prevalence_and_age_by_sex_agree_with_numpy() {
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
    let cond: Vec<Option<bool>> = recs[1]
        .iter()
        .skip(1)
        .map(|c| match c {
            "1" => Some(true),
            "0" => Some(false),
            _ => None,
        })
        .collect();
    let draws: Vec<Vec<bool>> = recs[2..]
        .iter()
        .map(|d| d.iter().skip(1).map(|s| s == "F").collect())
        .collect();
    let mut r = csv::Reader::from_path(format!("{dir}by_sex_expected.csv")).unwrap();
    let expected: HashMap<String, f64> = r
        .records()
        .map(|x| {
            let x = x.unwrap();
            (x[0].to_string(), x[1].parse().unwrap())
        })
        .collect();
    let p = prevalence_by_sex("condition", &cond, &draws);
    let a = age_by_sex(&ages, &draws, 1);
    let got = [
        ("prevalence_female", p.female.0),
        ("prevalence_female_lo", p.female.1),
        ("prevalence_female_hi", p.female.2),
        ("prevalence_male", p.male.0),
        ("prevalence_male_lo", p.male.1),
        ("prevalence_male_hi", p.male.2),
        ("prevalence_difference", p.difference.0),
        ("prevalence_difference_lo", p.difference.1),
        ("prevalence_difference_hi", p.difference.2),
        ("odds_ratio", p.odds_ratio.0),
        ("odds_ratio_lo", p.odds_ratio.1),
        ("odds_ratio_hi", p.odds_ratio.2),
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
