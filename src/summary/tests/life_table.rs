//! Unit tests of `summary/life_table.rs`.

use super::*;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

fn classes() -> AgeClasses {
    AgeClasses::parse(DEFAULT_LIFE_TABLE_CLASSES).unwrap()
}

#[test]
fn a_table_worked_by_hand() {
    // Deaths 2, 1, 0, 1 in 18-25, 25-35, 35-50, 50+ (closed at 80). Worked by hand from the
    // definitions (module docs): dx 50, 25, 0, 25; lx 100, 50, 25, 25; Lx 7(100+50)/2 = 525,
    // 10(50+25)/2 = 375, 15(25+25)/2 = 375, 30(25+0)/2 = 375; Tx 1650, 1125, 750, 375;
    // ex = Tx / lx = 16.5, 22.5, 30, 15; qx 0.5, 0.5, 0, 1.
    let t = life_table(&[2.0, 1.0, 0.0, 1.0], &classes(), 80.0);
    let got: Vec<[f64; 6]> = t
        .iter()
        .map(|r| [r.dx, r.lx, r.qx, r.big_lx, r.tx, r.ex])
        .collect();
    let want = [
        [50.0, 100.0, 0.5, 525.0, 1650.0, 16.5],
        [25.0, 50.0, 0.5, 375.0, 1125.0, 22.5],
        [0.0, 25.0, 0.0, 375.0, 750.0, 30.0],
        [25.0, 25.0, 1.0, 375.0, 375.0, 15.0],
    ];
    for (g, w) in got.iter().zip(&want) {
        for (x, y) in g.iter().zip(w) {
            assert!((x - y).abs() < 1e-12, "{g:?} against {w:?}");
        }
    }
}

#[test]
fn life_expectancy_is_the_mean_remaining_age_under_even_deaths() {
    // Closed form: with deaths spread evenly within classes, the mean years still to live on
    // entering class k is Σ_{j≥k} dⱼ (midⱼ − xₖ) / lₖ. Checked on seeded random deaths.
    let c = AgeClasses::parse("15-20,20-30,30-40,40-50,50-60,60+").unwrap();
    let mut rng = ChaCha8Rng::seed_from_u64(3);
    for _ in 0..50 {
        let deaths: Vec<f64> = (0..6)
            .map(|_| f64::from(rng.random_range(0..20u32)))
            .collect();
        if deaths.iter().sum::<f64>() == 0.0 {
            continue;
        }
        let t = life_table(&deaths, &c, 85.0);
        for k in 0..6 {
            if t[k].lx <= 1e-9 {
                continue;
            }
            let x = c.0[k].from;
            let remaining: f64 = (k..6)
                .map(|j| {
                    let mid = (c.0[j].from + c.0[j].to.unwrap_or(85.0)) / 2.0;
                    t[j].dx * (mid - x)
                })
                .sum::<f64>()
                / t[k].lx;
            assert!((t[k].ex - remaining).abs() < 1e-9, "{deaths:?} class {k}");
        }
    }
}

#[test]
fn certain_sexes_and_point_ages_give_the_plain_counts() {
    // Every P(female) 0 or 1 (the same sexes in every draw) and ages recorded as points:
    // each quantity is one number, with no spread, and the deaths are the plain counts.
    let ages = vec![
        Some((20.0, 20.0)),
        Some((30.0, 30.0)),
        Some((60.0, 60.0)),
        Some((22.0, 22.0)),
        Some((40.0, 40.0)),
        Some((10.0, 10.0)),
        None,
    ];
    let sexes = vec![true, true, true, false, false, true, false];
    let draws = vec![sexes; 40];
    let t = life_tables(&ages, &draws, &classes(), 9);
    let deaths = |v: &[LifeTableClass]| -> Vec<Spread> { v.iter().map(|c| c.deaths).collect() };
    assert_eq!(
        deaths(&t.female),
        vec![
            (1.0, 1.0, 1.0),
            (1.0, 1.0, 1.0),
            (0.0, 0.0, 0.0),
            (1.0, 1.0, 1.0)
        ]
    );
    assert_eq!(
        deaths(&t.male),
        vec![
            (1.0, 1.0, 1.0),
            (0.0, 0.0, 0.0),
            (1.0, 1.0, 1.0),
            (0.0, 0.0, 0.0)
        ]
    );
    assert_eq!(t.below_first_class, 1.0);
    assert_eq!(t.n_with_age, 6);
    let plain = life_table(&[1.0, 1.0, 0.0, 1.0], &classes(), 80.0);
    let near = |a: Quantity, b: f64| {
        (a.estimate - b).abs() < 1e-9 && (a.lo - b).abs() < 1e-9 && (a.hi - b).abs() < 1e-9
    };
    for (s, p) in t.female.iter().zip(&plain) {
        assert!(
            near(s.ex, p.ex) && near(s.lx, p.lx) && near(s.dx, p.dx),
            "{s:?} {p:?}"
        );
    }
}

#[test]
fn class_specifications_that_leave_ages_out_are_refused_with_every_problem() {
    assert_eq!(classes().0.len(), 4);
    assert_eq!(classes().class_of(17.9), None);
    assert_eq!(classes().class_of(25.0), Some(1));
    assert_eq!(classes().class_of(99.0), Some(3));
    let gap = AgeClasses::parse("18-25,30-40,40+").unwrap_err();
    assert!(
        gap.contains("a gap between `18-25` and `30-40`: ages 25 to 30 fall in no class"),
        "{gap}"
    );
    let overlap = AgeClasses::parse("18-30,25-40,40+").unwrap_err();
    assert!(overlap.contains("`18-30` and `25-40` overlap"), "{overlap}");
    let closed = AgeClasses::parse("18-25,25-35").unwrap_err();
    assert!(
        closed.contains("the last class `25-35` is closed"),
        "{closed}"
    );
    // Several problems in one message.
    let many = AgeClasses::parse("18+,x-3,35-30,90+").unwrap_err();
    for part in [
        "`18+` is open but not the last class",
        "`x-3` is not an age class",
        "`35-30` ends before it starts",
        "the open class `90+` starts at or above 80",
    ] {
        assert!(many.contains(part), "{many}");
    }
}

/// One simulated cemetery per replicate: `n` deaths of a population whose females and males
/// die in the four default classes with known shares (ages even within each class, the open
/// class closed at 80, as the tables assume), each individual's P(female) from `p_of`, the
/// draws taking each sex with that probability. Returns the share of replicates whose
/// population interval holds the population's value, for females' e18, q25-35 and e35-50.
fn coverage(replicates: usize, n: usize, p_of: fn(&mut ChaCha8Rng, bool) -> f64) -> [f64; 3] {
    let c = classes();
    let shares = [[0.25, 0.30, 0.30, 0.15], [0.10, 0.25, 0.35, 0.30]];
    let truth: Vec<Vec<LifeTableRow>> = shares
        .iter()
        .map(|s| life_table(&s.map(|x| x * 100.0), &c, 80.0))
        .collect();
    let bounds = [(18.0, 25.0), (25.0, 35.0), (35.0, 50.0), (50.0, 80.0)];
    let mut rng = ChaCha8Rng::seed_from_u64(2024);
    let mut held = [0usize; 3];
    for _ in 0..replicates {
        let mut ages = Vec::with_capacity(n);
        let mut p = Vec::with_capacity(n);
        for _ in 0..n {
            let female = rng.random::<f64>() < 0.5;
            let s = &shares[usize::from(!female)];
            let u: f64 = rng.random();
            let mut k = 0;
            let mut acc = s[0];
            while u >= acc && k < 3 {
                k += 1;
                acc += s[k];
            }
            let (a, b) = bounds[k];
            let age = a + rng.random::<f64>() * (b - a);
            ages.push(Some((age, age)));
            p.push(p_of(&mut rng, female));
        }
        let draws: Vec<Vec<bool>> = (0..200)
            .map(|_| p.iter().map(|&q| rng.random::<f64>() < q).collect())
            .collect();
        let t = life_tables(&ages, &draws, &c, rng.random());
        let inside = |q: Quantity, x: f64| q.population_lo <= x && x <= q.population_hi;
        held[0] += usize::from(inside(t.female[0].ex, truth[0][0].ex));
        held[1] += usize::from(inside(t.female[1].qx, truth[0][1].qx));
        held[2] += usize::from(inside(t.female[2].ex, truth[0][2].ex));
    }
    held.map(|h| h as f64 / replicates as f64)
}

#[test]
fn population_intervals_cover_the_generating_table() {
    // Sexes certain: only the sampling of the dead is uncertain. 100 cemeteries of 300.
    let cov = coverage(100, 300, |_, female| f64::from(u8::from(female)));
    eprintln!("coverage of e18, q25-35, e35-50 (females): {cov:?}");
    for c in cov {
        assert!((0.88..=1.0).contains(&c), "coverage {cov:?}");
    }
}

/// P(female) calibrated: the truth is drawn with the probability the draws use, 0.7 to 0.99
/// towards the true sex.
fn calibrated(rng: &mut ChaCha8Rng, female: bool) -> f64 {
    let p = 0.7 + 0.29 * rng.random::<f64>();
    if female {
        p
    } else {
        1.0 - p
    }
}

#[test]
fn population_intervals_cover_the_generating_table_with_uncertain_sexes() {
    let cov = coverage(200, 300, calibrated);
    eprintln!("coverage of e18, q25-35, e35-50 (females): {cov:?}");
    for c in cov {
        assert!((0.88..=1.0).contains(&c), "coverage {cov:?}");
    }
}

#[test]
#[ignore = "heavy: 2000 simulated cemeteries; cargo test --release -- --ignored population_intervals"]
fn population_intervals_cover_the_generating_table_in_2000_cemeteries() {
    let cov = coverage(2000, 300, calibrated);
    eprintln!("coverage of e18, q25-35, e35-50 (females): {cov:?}");
    for c in cov {
        assert!((0.90..=0.99).contains(&c), "coverage {cov:?}");
    }
}

#[test]
fn a_cells_bootstrap_weight_is_the_sum_of_its_deaths_exponential_weights() {
    // Closed form: a sum of n independent Exp(1) is Gamma(n, 1). The cell's weight is drawn
    // as that Gamma; its empirical distribution is checked against the Gamma CDF (statrs)
    // and against sums of n exponentials drawn one by one, at a few points, each within 4.5
    // standard errors of a proportion over 20000 draws.
    use statrs::distribution::{ContinuousCDF, Gamma};
    let mut rng = ChaCha8Rng::seed_from_u64(11);
    assert_eq!(bootstrap_deaths(0.0, &mut rng), 0.0);
    let draws = 20_000;
    for n in [1.0, 3.0, 40.0] {
        let cells: Vec<f64> = (0..draws).map(|_| bootstrap_deaths(n, &mut rng)).collect();
        let sums: Vec<f64> = (0..draws)
            .map(|_| {
                (0..n as usize)
                    .map(|_| -(1.0 - rng.random::<f64>()).ln())
                    .sum()
            })
            .collect();
        let gamma = Gamma::new(n, 1.0).unwrap();
        for q in [0.1, 0.5, 0.9] {
            let x = gamma.inverse_cdf(q);
            let share = |v: &[f64]| v.iter().filter(|&&w| w <= x).count() as f64 / draws as f64;
            let se = (q * (1.0 - q) / draws as f64).sqrt();
            for v in [&cells, &sums] {
                assert!(
                    (share(v) - q).abs() < 4.5 * se,
                    "n {n}, quantile {q}: {} against {q}",
                    share(v)
                );
            }
        }
    }
}

#[test]
fn the_population_interval_of_a_share_of_deaths_is_the_beta_closed_form() {
    // Closed form: with every sex certain and every age a point, a class holding d of the N
    // deaths has a bootstrap share W_c / ΣW ~ Beta(d, N − d) (cell weights Gamma(d, 1) and
    // Gamma(N − d, 1)), so the population interval of dx is 100 × its 2.5% and 97.5%
    // quantiles (statrs' Beta). 20 000 draws: the order statistics' Monte Carlo error is about
    // 0.15 percentage points; 0.6 allowed.
    use statrs::distribution::{Beta, ContinuousCDF};
    let mut ages = vec![Some((20.0, 20.0)); 5];
    ages.extend(vec![Some((30.0, 30.0)); 11]);
    ages.extend(vec![Some((40.0, 40.0)); 9]);
    ages.extend(vec![Some((60.0, 60.0)); 7]);
    let draws = vec![vec![true; 32]; 20_000];
    let t = life_tables(&ages, &draws, &classes(), 5);
    for (c, d) in [(0, 5.0), (1, 11.0), (3, 7.0)] {
        let b = Beta::new(d, 32.0 - d).unwrap();
        let (lo, hi) = (100.0 * b.inverse_cdf(0.025), 100.0 * b.inverse_cdf(0.975));
        let got = t.female[c].dx;
        assert!(
            (got.population_lo - lo).abs() < 0.6 && (got.population_hi - hi).abs() < 0.6,
            "class {c}: {:?} against {lo:.3}..{hi:.3}",
            (got.population_lo, got.population_hi)
        );
        assert_eq!(
            (got.estimate, got.lo, got.hi),
            (100.0 * d / 32.0, 100.0 * d / 32.0, 100.0 * d / 32.0)
        );
    }
}
