//! Unit tests of `assemblage/hierarchy.rs`.

use super::*;

fn flat() -> Prior {
    crate::prior::shipped_priors().unwrap()[0].clone()
}

#[test]
fn group_marginal_matches_the_single_assemblage_evidence() {
    // For one group with κ fixed, m(μ, κ) is the evidence of a Beta(μκ, (1−μ)κ) prior:
    // compare with the single-assemblage grid's normalising constant via P(F) identities.
    let l = [2.0, -1.0, 0.5, 3.0];
    let g = GroupGrid::new(&l);
    // Beta(1, 1): m = ∫ ∏(π LR + 1 − π) dπ; by brute force with 200 000 midpoints.
    let n = 200_000;
    let brute: f64 = (0..n)
        .map(|i| {
            let p = (i as f64 + 0.5) / n as f64;
            l.iter().map(|&x| p * x.exp() + 1.0 - p).product::<f64>()
        })
        .sum::<f64>()
        / n as f64;
    assert!((g.ln_marginal(1.0, 1.0) - brute.ln()).abs() < 1e-6);
    // A U-shaped Beta(0.3, 0.4): exact cell masses.
    let brute: f64 = {
        use statrs::distribution::{Beta, ContinuousCDF};
        let b = Beta::new(0.3, 0.4).unwrap();
        let n = 200_000;
        (0..n)
            .map(|i| {
                let (x0, x1) = (i as f64 / n as f64, (i + 1) as f64 / n as f64);
                let p = (x0 + x1) / 2.0;
                (b.cdf(x1) - b.cdf(x0)) * l.iter().map(|&x| p * x.exp() + 1.0 - p).product::<f64>()
            })
            .sum()
    };
    assert!(
        (g.ln_marginal(0.3, 0.4) - brute.ln()).abs() < 1e-4,
        "{} vs {}",
        g.ln_marginal(0.3, 0.4),
        brute.ln()
    );
}

#[test]
fn small_groups_shrink_toward_the_whole() {
    // Two big groups near 0.5 and one small group of three clear females.
    let mut l = Vec::new();
    let mut g = Vec::new();
    for k in 0..60 {
        l.push(if k % 2 == 0 { 8.0 } else { -8.0 });
        g.push(if k < 30 {
            "a".to_string()
        } else {
            "b".to_string()
        });
    }
    for _ in 0..3 {
        l.push(8.0);
        g.push("c".to_string());
    }
    let h = Hierarchy::fit(&l, &g, &flat());
    let c = h.group_pi(2);
    // Alone, three females under a flat prior give mean 4/5 = 0.8; the hierarchy pulls it
    // toward 0.5.
    assert!(c.mean < 0.8 && c.mean > 0.5, "{}", c.mean);
    assert!(
        h.ln_bf_groups_differ() < 0.0,
        "groups alike: evidence favours sharing"
    );
}

#[test]
fn different_groups_are_told_apart() {
    let mut l = Vec::new();
    let mut g = Vec::new();
    for k in 0..80 {
        let female = if k < 40 { k % 10 < 9 } else { k % 10 < 1 };
        l.push(if female { 9.0 } else { -9.0 });
        g.push(if k < 40 {
            "x".to_string()
        } else {
            "y".to_string()
        });
    }
    let h = Hierarchy::fit(&l, &g, &flat());
    assert!(h.group_pi(0).mean > 0.75 && h.group_pi(1).mean < 0.25);
    assert!(h.ln_bf_groups_differ() > 5.0, "{}", h.ln_bf_groups_differ());
}

#[test]
fn midpoint_prior_masses_away_from_the_ends_equal_the_exact_ones() {
    // A large group: its grid lies well inside (0, 1), so even Beta priors with α, β < ½ use
    // the midpoint form; it must equal the exact incomplete-beta masses.
    let l: Vec<f64> = (0..3000)
        .map(|i| ((i * 31 % 19) as f64 - 9.0) * 0.6)
        .collect();
    let g = GroupGrid::new(&l);
    for (a, b) in [(0.2, 0.3), (0.05, 0.9), (0.45, 0.02)] {
        let fast = g.ln_prior_mass(a, b);
        let exact: Vec<f64> = (0..g.pi.len())
            .map(|j| (beta_reg(a, b, g.edges[j + 1]) - beta_reg(a, b, g.edges[j])).ln())
            .collect();
        let mut largest: f64 = 0.0;
        for (u, v) in fast.iter().zip(&exact) {
            assert!((u - v).abs() < 1e-6, "α {a} β {b}: {u} vs {v}");
            largest = largest.max((u - v).abs());
        }
        // The midpoint form was taken (it is not bit-equal to the exact masses).
        assert!(largest > 0.0, "α {a} β {b}: the exact form was used");
    }
}
