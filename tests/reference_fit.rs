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

/// `fit --from-summary` on published-style count tables (tests/reference/grouped_probit.py,
/// invented tables) against statsmodels' OrderedModel on the same tables expanded to one row
/// per individual: thresholds and shift to 1e-6, as the issue asks; the standard error to 1e-3
/// relative (statsmodels differentiates numerically).
#[test]
fn summary_counts_give_statsmodels_thresholds_on_the_expanded_rows() {
    use tessera::fit::summary::{build_from_summary, SummaryFile, SummarySpec};
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut tables: BTreeMap<String, [Vec<u64>; 2]> = BTreeMap::new();
    let mut r = csv::Reader::from_path(format!("{dir}grouped_probit_tables.csv")).unwrap();
    for row in r.records() {
        let row = row.unwrap();
        let e = tables.entry(row[0].to_string()).or_default();
        e[usize::from(&row[1] == "1")].push(row[3].parse().unwrap());
    }
    let mut yaml = String::from(
        "name: grouped\nsource: {citation: invented tables, sample: none, females: 1, males: 1}\ninclude: []\ntraits:\n",
    );
    let mut blocks = String::from("blocks:\n");
    for (case, [female, male]) in &tables {
        let k = female.len();
        yaml.push_str(&format!(
            "  - {{id: {case}, name: {case}, region: cranium, bilateral: false, kind: ordinal, grades: [1, {k}], definition: d, source: s}}\n"
        ));
        let list = |v: &[u64]| {
            v.iter()
                .map(|x| x.to_string())
                .collect::<Vec<_>>()
                .join(", ")
        };
        // The three-grade case is given as a paper gives shares: rounded, with n.
        let (f, m) = if case.contains("shares") {
            let shares = |v: &[u64]| {
                let n: u64 = v.iter().sum();
                let s = v
                    .iter()
                    .map(|x| format!("{:.3}", *x as f64 / n as f64))
                    .collect::<Vec<_>>()
                    .join(", ");
                format!("{{shares: [{s}], n: {n}}}")
            };
            (shares(female), shares(male))
        } else {
            (
                format!("{{counts: [{}]}}", list(female)),
                format!("{{counts: [{}]}}", list(male)),
            )
        };
        blocks.push_str(&format!(
            "  - id: b_{case}\n    traits:\n      - {{id: {case}, female: {f}, male: {m}}}\n"
        ));
    }
    yaml.push_str(&blocks);
    let spec = SummarySpec::from_yaml(&yaml).unwrap();
    let mut catalogue = tessera::catalogue::Catalogue::standard().unwrap();
    catalogue.extend(spec.traits.clone()).unwrap();
    let file = SummaryFile {
        file: "tables".into(),
        sha256: "0".repeat(64),
        command: "test".into(),
    };
    let built = build_from_summary(&spec, &catalogue, &file).unwrap();
    let mut r = csv::Reader::from_path(format!("{dir}grouped_probit_expected.csv")).unwrap();
    let mut worst: f64 = 0.0;
    let mut checked = 0;
    for row in r.records() {
        let row = row.unwrap();
        let of_case: Vec<_> = built
            .estimates
            .iter()
            .filter(|e| e.trait_id == row[0])
            .collect();
        let expected: f64 = row[2].parse().unwrap();
        let (got, tol) = match &row[1] {
            "shift" => (of_case.last().unwrap().estimate, 1e-6),
            "shift_se" => (of_case.last().unwrap().se, 1e-3 * expected),
            q => {
                let j: usize = q.trim_start_matches("threshold_").parse().unwrap();
                (of_case[j - 1].estimate, 1e-6)
            }
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
    println!("largest difference from statsmodels on the count tables: {worst:.2e}");
}
