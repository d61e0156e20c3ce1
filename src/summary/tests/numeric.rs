//! Unit tests of `summary/numeric.rs`.

use super::*;
use crate::summary::prevalence::no_groups;
use rand::{RngExt, SeedableRng};
use statrs::distribution::{ContinuousCDF, StudentsT};

/// With every sex certain, μ_F has the Normal–inverse-gamma marginal, a Student t with 2αₙ
/// degrees of freedom, centre μₙ and scale √(βₙ/(αₙκₙ)) (Gelman et al. 2013, §3.3, from
/// memory); its quantiles from statrs' Student t (a general-purpose library) against the
/// sampler's.
#[test]
fn certain_sexes_give_the_conjugate_student_t() {
    let female = [158.0, 162.5, 155.0, 160.0, 166.0, 159.5, 161.0, 157.5];
    let male = [171.0, 168.5, 175.0, 169.0, 180.0, 172.5];
    let mut values: Vec<Option<f64>> = female.iter().chain(&male).map(|&v| Some(v)).collect();
    let mut l: Vec<f64> = vec![60.0; female.len()];
    l.extend(vec![-60.0; male.len()]);
    // One without a value: in the sampler, not in the outcome.
    values.push(None);
    l.push(60.0);
    let n = l.len();
    let (est, tab, mem) = (vec![true; n], vec![true; n], vec![0; n]);
    let ev = no_groups(&l, &est, &mem, &tab);
    let r = numeric_by_sex(&ev, "stature", &values, &ChainLength::default_with_seed(4));
    assert_eq!((r.n_recorded, r.n_left_out), (14, 0));
    assert_eq!((r.n_female, r.n_male), (8.0, 6.0));
    // The prior of the module's docs, from the pooled values.
    let all: Vec<f64> = female.iter().chain(&male).copied().collect();
    let mu0 = all.iter().sum::<f64>() / 14.0;
    let var0 = all.iter().map(|y| (y - mu0).powi(2)).sum::<f64>() / 14.0;
    let (k0, a0, b0) = (0.01, 0.5, 0.5 * var0);
    let nf = female.len() as f64;
    let ybar = female.iter().sum::<f64>() / nf;
    let ss: f64 = female.iter().map(|y| (y - ybar).powi(2)).sum();
    let (kn, an) = (k0 + nf, a0 + nf / 2.0);
    let mun = (k0 * mu0 + nf * ybar) / kn;
    let bn = b0 + ss / 2.0 + k0 * nf * (ybar - mu0).powi(2) / (2.0 * kn);
    let t = StudentsT::new(mun, (bn / (an * kn)).sqrt(), 2.0 * an).unwrap();
    let (lo, hi) = (t.inverse_cdf(0.025), t.inverse_cdf(0.975));
    // 4000 draws: the sample's 2.5% quantile is within about 8% of the interval's half-width.
    let half = (hi - lo) / 2.0;
    assert!(
        (r.mean_female.0 - mun).abs() < 0.05 * half,
        "{:?} against {mun}",
        r.mean_female
    );
    assert!(
        (r.mean_female.1 - lo).abs() < 0.12 * half,
        "{:?} against {lo}",
        r.mean_female
    );
    assert!(
        (r.mean_female.2 - hi).abs() < 0.12 * half,
        "{:?} against {hi}",
        r.mean_female
    );
    // The medians of the recorded values by sex, with no uncertainty in sex.
    assert_eq!(r.median_female, (159.75, 159.75, 159.75));
    assert_eq!(r.median_male, (171.75, 171.75, 171.75));
    assert!(r.difference.2 < 0.0 && r.p_female_higher < 0.001);
    assert!(r.convergence_note().is_none(), "{} {}", r.rhat, r.ess);
}

/// 3 000 simulated individuals of uncertain sex (calibrated ln LR ~ N(±1, 2)), statures
/// N(160, 6²) for females and N(172, 7²) for males: the joint posterior recovers the
/// difference of −12; sexes drawn from the skeleton alone and compared after dilute it.
#[test]
fn the_difference_by_sex_is_not_attenuated() {
    let mut rng = ChaCha8Rng::seed_from_u64(20261204);
    let (mut l, mut y) = (Vec::new(), Vec::new());
    let z = Normal::standard();
    for _ in 0..3000 {
        let female = rng.random::<f64>() < 0.5;
        let e: f64 = z.sample(&mut rng);
        l.push(if female { 1.0 } else { -1.0 } + 2f64.sqrt() * e);
        let e2: f64 = z.sample(&mut rng);
        y.push(Some(if female {
            160.0 + 6.0 * e2
        } else {
            172.0 + 7.0 * e2
        }));
    }
    let n = l.len();
    let (est, mem) = (vec![true; n], vec![0; n]);
    let ev = no_groups(&l, &est, &mem, &est);
    let r = numeric_by_sex(&ev, "stature", &y, &ChainLength::default_with_seed(2));
    let (d, lo, hi) = r.difference;
    assert!(
        lo < -12.0 && -12.0 < hi && (-13.5..=-10.5).contains(&d),
        "{d} ({lo} to {hi})"
    );
    assert!(r.rhat < MAX_RHAT, "R-hat {}", r.rhat);
    // Sexes from the skeleton alone (π = ½), the statures compared after.
    let mut diffs = Vec::new();
    for _ in 0..200 {
        let (mut sf, mut nf, mut sm, mut nm) = (0.0, 0.0, 0.0, 0.0);
        for (&li, yi) in l.iter().zip(&y) {
            let v = yi.unwrap_or_default();
            if rng.random::<f64>() < 1.0 / (1.0 + (-li).exp()) {
                sf += v;
                nf += 1.0;
            } else {
                sm += v;
                nm += 1.0;
            }
        }
        diffs.push(sf / nf - sm / nm);
    }
    let naive = diffs.iter().sum::<f64>() / diffs.len() as f64;
    println!(
        "joint posterior {d:.2} ({lo:.2} to {hi:.2}); sexes from the skeleton alone {naive:.2}"
    );
    assert!(naive > -9.0, "the naive estimate {naive} should be diluted");
}
