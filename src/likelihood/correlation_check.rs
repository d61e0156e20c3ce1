//! How far each individual's P(female) depends on the within-sex correlations of the latent
//! blocks (`analyse --correlation-check 0,0.25,0.5,0.75`): the check a model built from
//! published means and SDs needs, since papers rarely publish correlations and the model then
//! carries an assumed value.
//!
//! # Method
//! For each value r, every latent block of two or more traits is evaluated again with all its
//! within-sex correlations set to r ([`LatentBlock::with_correlation`]); the other blocks are
//! kept. The individual's likelihood ratio becomes
//! ln LR(r) = ln LR − Σ_varied ln LRᵦ + Σ_varied ln LRᵦ(r), and its P(female) is recomputed with
//! the prior odds of the main analysis held fixed:
//! P(r) = 1 / (1 + (1 − P)/P · exp(−(ln LR(r) − ln LR))), with P the main P(female). Holding
//! the prior odds makes the change the likelihood's alone; the assemblage's proportion of
//! females is not estimated again for each r.

use crate::data::Individual;
use crate::model::latent::LatentBlock;
use crate::model::{Block, BlockStatus, Context, EvidenceCache, IndividualEvidence, Model};
use rayon::prelude::*;

/// Most values one check may try (a choice of ours: each costs another evaluation of the
/// varied blocks for every individual).
pub const MAX_VALUES: usize = 9;

/// The correlations to try, as given: `0,0.25,0.5,0.75`.
///
/// # Errors
/// A message naming every value that is not a number from 0 up to (not including) 1, a
/// repeated value, or more than [`MAX_VALUES`].
pub fn parse_values(text: &str) -> Result<Vec<f64>, String> {
    let mut values = Vec::new();
    let mut bad = Vec::new();
    for part in text.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        match part.parse::<f64>() {
            Ok(v) if (0.0..1.0).contains(&v) => {
                if values.contains(&v) {
                    bad.push(format!("`{part}` is given twice"));
                } else {
                    values.push(v);
                }
            }
            _ => bad.push(format!(
                "`{part}` is not a correlation from 0 up to (not including) 1"
            )),
        }
    }
    if values.is_empty() && bad.is_empty() {
        bad.push("give one or more correlations, as 0,0.25,0.5,0.75".into());
    }
    if values.len() > MAX_VALUES {
        bad.push(format!(
            "{} values given; at most {MAX_VALUES}",
            values.len()
        ));
    }
    if bad.is_empty() {
        Ok(values)
    } else {
        Err(bad.join("; "))
    }
}

/// The check's results.
#[derive(Debug, Clone, PartialEq)]
pub struct CorrelationCheck {
    /// The correlations tried, as given.
    pub values: Vec<f64>,
    /// Ids of the blocks whose correlations were varied.
    pub blocks: Vec<String>,
    /// Indices (file order) of the individuals for whom a varied block was used.
    pub individuals: Vec<usize>,
    /// P(female) at each value (outer) for each of those individuals (inner, same order).
    pub p_female: Vec<Vec<f64>>,
}

impl CorrelationCheck {
    /// The largest |P(r) − P| over the values, for each checked individual (same order as
    /// `individuals`), given the main P(female) of every individual.
    pub fn largest_moves(&self, main: &[Option<f64>]) -> Vec<f64> {
        self.individuals
            .iter()
            .enumerate()
            .map(|(k, &i)| {
                let p = main[i].unwrap_or(f64::NAN);
                self.p_female
                    .iter()
                    .map(|v| (v[k] - p).abs())
                    .fold(0.0, f64::max)
            })
            .collect()
    }
}

/// Run the check over `values` for every individual whose evidence used a varied block;
/// `main` holds the main analysis's P(female) by individual. Blocks are evaluated in parallel
/// with one pattern cache per value, seeded as in the main run, so the result does not depend
/// on the number of threads.
pub fn correlation_check(
    model: &Model,
    people: &[Individual],
    evidence: &[IndividualEvidence],
    main: &[Option<f64>],
    values: &[f64],
    ctx: &Context,
) -> CorrelationCheck {
    let varied: Vec<(usize, &LatentBlock)> = model
        .blocks
        .iter()
        .enumerate()
        .filter_map(|(k, b)| match b {
            Block::Latent(l) if l.traits.len() > 1 => Some((k, l)),
            _ => None,
        })
        .collect();
    let individuals: Vec<usize> = evidence
        .iter()
        .enumerate()
        .filter(|(i, e)| {
            main[*i].is_some()
                && varied
                    .iter()
                    .any(|(k, _)| e.blocks[*k].status == BlockStatus::Used)
        })
        .map(|(i, _)| i)
        .collect();
    let p_female = values
        .iter()
        .map(|&r| {
            let blocks: Vec<(usize, LatentBlock)> = varied
                .iter()
                .map(|(k, b)| (*k, b.with_correlation(r)))
                .collect();
            let cache = EvidenceCache::default();
            individuals
                .par_iter()
                .map(|&i| {
                    let (ind, e) = (&people[i], &evidence[i]);
                    let mut delta = 0.0;
                    for (k, b) in &blocks {
                        if e.blocks[*k].status != BlockStatus::Used {
                            continue;
                        }
                        let new = match b.pattern(ind) {
                            Some(key) => cache.get_or_compute((*k, key), || b.evaluate(ind, ctx)),
                            None => b.evaluate(ind, ctx),
                        };
                        delta += new.ln_lr - e.blocks[*k].ln_lr;
                    }
                    let p = main[i].unwrap_or(0.5);
                    with_likelihood_change(p, delta)
                })
                .collect()
        })
        .collect();
    CorrelationCheck {
        values: values.to_vec(),
        blocks: varied.iter().map(|(_, b)| b.id.clone()).collect(),
        individuals,
        p_female,
    }
}

/// P(female) after the log likelihood ratio changes by `delta`, the prior odds held:
/// 1 / (1 + (1 − p)/p · e^(−δ)), computed on the log-odds scale.
pub fn with_likelihood_change(p: f64, delta: f64) -> f64 {
    if p <= 0.0 || p >= 1.0 || delta == 0.0 {
        return p;
    }
    let logit = (p / (1.0 - p)).ln() + delta;
    1.0 / (1.0 + (-logit).exp())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_are_read_and_every_bad_one_named() {
        assert_eq!(parse_values("0, 0.25,0.5").unwrap(), vec![0.0, 0.25, 0.5]);
        let e = parse_values("0,1,-0.2,x,0").unwrap_err();
        for bad in ["`1`", "`-0.2`", "`x`", "`0` is given twice"] {
            assert!(e.contains(bad), "{bad}: {e}");
        }
        assert!(parse_values("").is_err());
    }

    #[test]
    fn the_prior_odds_are_held() {
        // LR × e: odds 1 → e.
        let p = with_likelihood_change(0.5, 1.0);
        assert!((p - 1.0 / (1.0 + (-1.0f64).exp())).abs() < 1e-15);
        assert_eq!(with_likelihood_change(0.3, 0.0), 0.3);
    }

    #[test]
    fn the_main_correlation_gives_the_main_answer_and_independence_moves_it() {
        use crate::data::Observation;
        let model = Model::from_path(std::path::Path::new(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/models/femur-noussios-2019.yaml"
        )))
        .unwrap();
        let head = model.catalogue.position("femur_head_diameter").unwrap();
        let shaft = model
            .catalogue
            .position("femur_midshaft_circumference")
            .unwrap();
        let mut individuals = Vec::new();
        for (h, c) in [(44.0, 88.0), (46.5, 80.0), (42.0, 83.0)] {
            let mut o = vec![None; model.catalogue.len()];
            o[head] = Some(Observation::Measurement { value: h });
            o[shaft] = Some(Observation::Measurement { value: c });
            individuals.push(crate::sim::individual("x".into(), o));
        }
        let ctx = Context::new(1);
        let evidence: Vec<_> = individuals
            .iter()
            .map(|i| model.evaluate(i, &ctx))
            .collect();
        let main: Vec<Option<f64>> = evidence
            .iter()
            .map(|e| Some(1.0 / (1.0 + (-e.ln_lr).exp())))
            .collect();
        let check = correlation_check(&model, &individuals, &evidence, &main, &[0.0, 0.5], &ctx);
        assert_eq!(check.blocks, vec!["femur".to_string()]);
        assert_eq!(check.individuals, vec![0, 1, 2]);
        // At the model's own 0.5, nothing moves.
        for (k, p) in check.p_female[1].iter().enumerate() {
            assert!((p - main[k].unwrap()).abs() < 1e-12);
        }
        // At 0, the two measurements are independent: the LR is the product of the two
        // univariate normal density ratios (closed form).
        let normal_lr = |x: f64, mf: f64, sf: f64, mm: f64, sm: f64| {
            let ln = |m: f64, s: f64| -((x - m) / s).powi(2) / 2.0 - s.ln();
            ln(mf, sf) - ln(mm, sm)
        };
        let Block::Latent(b) = &model.blocks[0] else {
            panic!()
        };
        let sd = |s: usize, j: usize| b.cov[s][(j, j)].sqrt();
        for (k, (h, c)) in [(44.0, 88.0), (46.5, 80.0), (42.0, 83.0)]
            .iter()
            .enumerate()
        {
            let ln_lr = normal_lr(*h, b.mean[0][0], sd(0, 0), b.mean[1][0], sd(1, 0))
                + normal_lr(*c, b.mean[0][1], sd(0, 1), b.mean[1][1], sd(1, 1));
            let expected = 1.0 / (1.0 + (-ln_lr).exp());
            assert!(
                (check.p_female[0][k] - expected).abs() < 1e-12,
                "{} {expected}",
                check.p_female[0][k]
            );
        }
        let moves = check.largest_moves(&main);
        assert!(moves.iter().any(|m| *m > 0.01), "{moves:?}");
    }
}
