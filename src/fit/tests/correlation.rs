use super::*;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Bivariate normal pairs with correlation ρ, second variable shifted by 1 for males.
fn pairs(n: usize, rho: f64, seed: u64) -> Vec<(usize, f64, f64)> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let normal = statrs::distribution::Normal::standard();
    (0..n)
        .map(|i| {
            let sex = i % 2;
            let u: f64 = rng.sample(normal);
            let v: f64 = rng.sample(normal);
            let x = u + sex as f64 * 0.8;
            let y = rho * u + (1.0 - rho * rho).sqrt() * v + sex as f64;
            (sex, x, y)
        })
        .collect()
}

fn grade(x: f64, th: &[f64]) -> Value {
    let g = th.iter().filter(|&&t| x > t).count();
    Value::Grade(g, g)
}

#[test]
fn polychoric_polyserial_and_pearson_recover_rho() {
    let th = vec![-0.8, 0.1, 0.9];
    let ord1 = Margin::Ordinal {
        thresholds: th.clone(),
        mean: [0.0, 0.8],
    };
    let ord2 = Margin::Ordinal {
        thresholds: th.clone(),
        mean: [0.0, 1.0],
    };
    let met1 = Margin::Metric {
        mean: [0.0, 0.8],
        sd: [1.0, 1.0],
    };
    let met2 = Margin::Metric {
        mean: [0.0, 1.0],
        sd: [1.0, 1.0],
    };
    let data = pairs(3000, 0.45, 11);
    let poly: Vec<PairCase> = data
        .iter()
        .map(|&(sex, x, y)| PairCase {
            sex,
            first: grade(x, &th),
            second: grade(y, &th),
            shift: [0.0; 2],
        })
        .collect();
    let serial: Vec<PairCase> = data
        .iter()
        .map(|&(sex, x, y)| PairCase {
            sex,
            first: grade(x, &th),
            second: Value::Measure(y),
            shift: [0.0; 2],
        })
        .collect();
    let pearson: Vec<PairCase> = data
        .iter()
        .map(|&(sex, x, y)| PairCase {
            sex,
            first: Value::Measure(x),
            second: Value::Measure(y),
            shift: [0.0; 2],
        })
        .collect();
    for (name, e) in [
        ("polychoric", estimate(&ord1, &ord2, &poly)),
        ("polyserial", estimate(&ord1, &met2, &serial)),
        ("pearson", estimate(&met1, &met2, &pearson)),
    ] {
        assert_eq!(e.method, name);
        let z = (e.rho - 0.45) / e.se;
        assert!(z.abs() < 4.0, "{name}: {} ± {}", e.rho, e.se);
        assert!(e.se < 0.04, "{name}: se {}", e.se);
    }
    // The polychoric loses information to grading: its SE exceeds Pearson's.
    assert!(estimate(&ord1, &ord2, &poly).se > estimate(&met1, &met2, &pearson).se);
}

#[test]
fn golden_section_finds_the_maximum_of_a_parabola() {
    let r = maximise(&|x: f64| -(x - 0.3) * (x - 0.3));
    assert!((r - 0.3).abs() < 1e-8, "{r}");
}
