use super::*;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

fn simulate(n: usize, tau: &[f64], shift: f64, seed: u64) -> Vec<OrdinalScore> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let normal = statrs::distribution::Normal::standard();
    (0..n)
        .map(|i| {
            let male = i % 2 == 1;
            let x: f64 = rng.sample(normal) + if male { shift } else { 0.0 };
            let g = tau.iter().filter(|&&t| x > t).count();
            OrdinalScore {
                male,
                low: g,
                high: g,
            }
        })
        .collect()
}

#[test]
fn gradient_and_hessian_match_finite_differences() {
    let scores = simulate(300, &[-1.0, 0.0, 0.8], 0.9, 3);
    let mut groups: BTreeMap<OrdinalScore, f64> = BTreeMap::new();
    for s in &scores {
        *groups.entry(*s).or_insert(0.0) += 1.0;
    }
    // One range score, to exercise the interval form.
    groups.insert(
        OrdinalScore {
            male: true,
            low: 1,
            high: 2,
        },
        3.0,
    );
    let cases: Vec<ProbitCase> = groups
        .into_iter()
        .map(|(s, n)| ProbitCase {
            low: s.low,
            high: s.high,
            covariates: vec![f64::from(u8::from(s.male)), if s.male { 0.3 } else { -1.2 }],
            weight: n,
        })
        .collect();
    let groups: Vec<&ProbitCase> = cases.iter().collect();
    let theta = DVector::from_vec(vec![-0.9, 0.1, 0.7, 0.8, 0.2]);
    let (g, h) = derivatives(&groups, &theta, 3);
    let eps = 1e-6;
    for i in 0..5 {
        let mut up = theta.clone();
        up[i] += eps;
        let mut dn = theta.clone();
        dn[i] -= eps;
        let fd = (log_likelihood(&groups, &up, 3) - log_likelihood(&groups, &dn, 3)) / (2.0 * eps);
        assert!((fd - g[i]).abs() < 1e-5, "gradient {i}: {fd} vs {}", g[i]);
        let (gu, _) = derivatives(&groups, &up, 3);
        let (gd, _) = derivatives(&groups, &dn, 3);
        for j in 0..5 {
            let fd = (gu[j] - gd[j]) / (2.0 * eps);
            assert!(
                (fd - h[(i, j)]).abs() < 1e-4,
                "hessian {i},{j}: {fd} vs {}",
                h[(i, j)]
            );
        }
    }
}

#[test]
fn recovers_the_simulated_thresholds_and_shift() {
    let tau = [-1.2, -0.3, 0.5, 1.4];
    let fit = fit_cumulative_probit(&simulate(4000, &tau, 1.1, 7), 5).unwrap();
    for (k, t) in tau.iter().enumerate() {
        let z = (fit.thresholds[k] - t) / fit.threshold_se[k];
        assert!(
            z.abs() < 4.0,
            "threshold {k}: {} ± {}",
            fit.thresholds[k],
            fit.threshold_se[k]
        );
    }
    let z = (fit.shift - 1.1) / fit.shift_se;
    assert!(z.abs() < 4.0, "shift {} ± {}", fit.shift, fit.shift_se);
    assert!(fit.shift_se < 0.06);
}

#[test]
fn an_unseen_end_grade_is_an_error() {
    let scores: Vec<_> = simulate(200, &[-1.0, 0.0, 1.0], 0.5, 1)
        .into_iter()
        .filter(|s| s.low != 3)
        .collect();
    assert_eq!(
        fit_cumulative_probit(&scores, 4),
        Err(OrdinalFitError::GradeNeverSeen(3))
    );
}

#[test]
fn one_sex_only_is_an_error() {
    let scores: Vec<_> = simulate(200, &[-1.0, 0.0, 1.0], 0.5, 1)
        .into_iter()
        .filter(|s| !s.male)
        .collect();
    assert_eq!(
        fit_cumulative_probit(&scores, 4),
        Err(OrdinalFitError::OneSexOnly)
    );
}
