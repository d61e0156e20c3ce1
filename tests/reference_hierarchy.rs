//! The group hierarchy against its exact posterior for 21 invented individuals in three
//! groups (tests/reference/hierarchy.py: each group's likelihood is a polynomial in πg, so its
//! Beta marginal is exact through the Beta moments; μ by a Gauss-Legendre rule exact for the
//! polynomial integrand, ln κ by a composite Gauss-Legendre rule; mpmath 1.3.0 at 24 digits),
//! under the flat prior on μ and under a Beta(2, 18) prior far from the data.

use std::collections::HashMap;
use tessera::assemblage::hierarchy::Hierarchy;
use tessera::prior::{Prior, PriorShape};

fn read(file: &str) -> Vec<csv::StringRecord> {
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/tests/reference/fixtures/");
    let mut r = csv::Reader::from_path(format!("{dir}{file}")).unwrap();
    r.records().map(|x| x.unwrap()).collect()
}

fn prior(name: &str) -> Prior {
    let (a, b) = match name {
        "flat" => (1.0, 1.0),
        _ => (2.0, 18.0),
    };
    Prior {
        name: name.into(),
        shape: PriorShape::Beta { a, b },
        ..tessera::prior::shipped_priors().unwrap()[0].clone()
    }
}

/// Worst deviation per kind of quantity, printed and checked against what the grids promise.
#[test]
fn hierarchy_summaries_agree_with_the_exact_posterior() {
    let people = read("hierarchy.csv");
    let groups: Vec<String> = people.iter().map(|r| r[0].to_string()).collect();
    let ln_lrs: Vec<f64> = people.iter().map(|r| r[1].parse().unwrap()).collect();
    let mut expected: HashMap<(String, String), f64> = HashMap::new();
    for r in read("hierarchy_expected.csv") {
        expected.insert((r[0].into(), r[1].into()), r[2].parse().unwrap());
    }
    for name in ["flat", "far"] {
        let h = Hierarchy::fit(&ln_lrs, &groups, &prior(name));
        let e = |q: &str| expected[&(name.to_string(), q.to_string())];
        let mu = h.mu();
        let (k50, k025, k975) = h.kappa_summary();
        let mut worst: HashMap<&str, f64> = HashMap::new();
        let mut note = |kind: &'static str, got: f64, want: f64| {
            let d = (got - want).abs();
            let w = worst.entry(kind).or_insert(0.0);
            *w = w.max(d);
        };
        note("ln evidence", h.ln_evidence, e("ln_evidence"));
        note("ln BF", h.ln_bf_groups_differ(), e("ln_bf_groups_differ"));
        note("mu mean", mu.mean, e("mu_mean"));
        for (got, q) in [
            (mu.lo, "mu_q025"),
            (mu.median, "mu_q500"),
            (mu.hi, "mu_q975"),
        ] {
            note("mu quantile", got, e(q));
        }
        for (got, q) in [
            (k025, "kappa_q025"),
            (k50, "kappa_q500"),
            (k975, "kappa_q975"),
        ] {
            // Relative, on the ln scale of the grid.
            note("ln kappa quantile", got.ln(), e(q).ln());
        }
        for (g, name_g) in h.groups.iter().enumerate() {
            note(
                "group mean",
                h.group_pi(g).mean,
                e(&format!("pi_mean_{name_g}")),
            );
        }
        for (i, &l) in ln_lrs.iter().enumerate() {
            let p = h.p_female(h.membership[i], l);
            note("P(female)", p, e(&format!("p_female_{i}")));
        }
        println!("{name}: {worst:?}");
        // What the grids promise (the printed digits follow from these): integrals by the
        // midpoint rule on 100 × 48 cells, quantiles linear within a cell.
        let limits = [
            ("ln evidence", 1e-3),
            ("ln BF", 1e-3),
            ("mu mean", 2e-4),
            ("mu quantile", 5e-4),
            ("ln kappa quantile", 0.01),
            ("group mean", 2e-4),
            ("P(female)", 2e-4),
        ];
        for (kind, limit) in limits {
            assert!(
                worst[kind] < limit,
                "{name} {kind}: {} ≥ {limit}",
                worst[kind]
            );
        }
    }
}
