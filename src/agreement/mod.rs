//! Observer agreement: two observers' scorings of the same individuals.
//!
//! Ordinal traits: weighted kappa with linear and quadratic disagreement weights (Cohen 1968,
//! Psychological Bulletin 70:213–220), κw = 1 − Σ wᵢⱼ Oᵢⱼ / Σ wᵢⱼ Eᵢⱼ with O the observed and E
//! the chance-expected (product of marginals) proportions, wᵢⱼ = |i − j|/(K − 1) or its square.
//! Measurements: the technical error of measurement TEM = √(Σ d² / 2n) and its relative form
//! (TEM / mean, %), and the intra-class correlation ICC(2,1) for absolute agreement (Shrout &
//! Fleiss 1979, Psychological Bulletin 86:420–428). 95% intervals by a seeded percentile
//! bootstrap over individuals (2000 resamples, a choice of ours).

use crate::catalogue::TraitKind;
use crate::data::{Assemblage, Observation};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// Weighted kappa of paired grades on the scale `lowest..=highest`.
pub fn weighted_kappa(pairs: &[(i32, i32)], lowest: i32, highest: i32, quadratic: bool) -> f64 {
    let k = (highest - lowest + 1) as usize;
    let n = pairs.len() as f64;
    if n == 0.0 || k < 2 {
        return f64::NAN;
    }
    let mut o = vec![vec![0.0; k]; k];
    for &(a, b) in pairs {
        o[(a - lowest) as usize][(b - lowest) as usize] += 1.0 / n;
    }
    let row: Vec<f64> = (0..k).map(|i| o[i].iter().sum()).collect();
    let col: Vec<f64> = (0..k).map(|j| (0..k).map(|i| o[i][j]).sum()).collect();
    let w = |i: usize, j: usize| {
        let d = (i as f64 - j as f64).abs() / (k as f64 - 1.0);
        if quadratic {
            d * d
        } else {
            d
        }
    };
    let (mut num, mut den) = (0.0, 0.0);
    for i in 0..k {
        for j in 0..k {
            num += w(i, j) * o[i][j];
            den += w(i, j) * row[i] * col[j];
        }
    }
    if den == 0.0 {
        return if num == 0.0 { 1.0 } else { f64::NAN };
    }
    1.0 - num / den
}

/// Technical error of measurement √(Σ d² / 2n).
pub fn tem(pairs: &[(f64, f64)]) -> f64 {
    let n = pairs.len() as f64;
    (pairs.iter().map(|(a, b)| (a - b).powi(2)).sum::<f64>() / (2.0 * n)).sqrt()
}

/// ICC(2,1), absolute agreement, two raters (Shrout & Fleiss 1979):
/// (MSR − MSE) / (MSR + MSE + 2(MSC − MSE)/n).
pub fn icc_2_1(pairs: &[(f64, f64)]) -> f64 {
    let n = pairs.len() as f64;
    if n < 2.0 {
        return f64::NAN;
    }
    let grand = pairs.iter().map(|(a, b)| a + b).sum::<f64>() / (2.0 * n);
    let rows: Vec<f64> = pairs.iter().map(|(a, b)| (a + b) / 2.0).collect();
    let ca = pairs.iter().map(|p| p.0).sum::<f64>() / n;
    let cb = pairs.iter().map(|p| p.1).sum::<f64>() / n;
    let ssr = 2.0 * rows.iter().map(|r| (r - grand).powi(2)).sum::<f64>();
    let ssc = n * ((ca - grand).powi(2) + (cb - grand).powi(2));
    let sst: f64 = pairs
        .iter()
        .map(|(a, b)| (a - grand).powi(2) + (b - grand).powi(2))
        .sum();
    let sse = sst - ssr - ssc;
    let (msr, msc, mse) = (ssr / (n - 1.0), ssc, sse / (n - 1.0));
    (msr - mse) / (msr + mse + 2.0 * (msc - mse) / n)
}

/// A statistic with its 95% bootstrap interval.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WithInterval {
    /// The estimate.
    pub value: f64,
    /// Lower end of the 95% interval.
    pub lo: f64,
    /// Upper end of the 95% interval.
    pub hi: f64,
}

impl WithInterval {
    fn new(value: f64, (lo, hi): (f64, f64)) -> Self {
        WithInterval { value, lo, hi }
    }
}

/// What agreement on one trait is measured by, by the trait's kind.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum AgreementMeasures {
    /// A graded trait.
    Grades {
        /// Linear-weighted kappa (Cohen 1968).
        kappa_linear: WithInterval,
        /// Quadratic-weighted kappa (Cohen 1968).
        kappa_quadratic: WithInterval,
        /// Share of pairs with the same grade.
        exact_agreement: f64,
        /// Pairs left out because one observer gave a grade range.
        ranges_left_out: usize,
        /// Pairs a kappa on this scale needs ([`kappa_pairs_needed`]).
        pairs_needed: usize,
        /// The polychoric correlation r of the two observers' scores (thresholds from each
        /// observer's own marginal shares) and the observer-error SD as a share of the scored
        /// latent SD, √(1 − r) (see [`observer_error`]).
        observer_error: Option<(f64, f64)>,
    },
    /// A measurement.
    Measurements {
        /// Technical error of measurement, in the trait's unit.
        tem: WithInterval,
        /// Intraclass correlation ICC(2,1) (Shrout & Fleiss 1979).
        icc: WithInterval,
        /// TEM in % of the mean of the measurements.
        relative_tem: f64,
    },
}

/// Agreement on one trait.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraitAgreement {
    /// Trait id.
    pub trait_id: String,
    /// Pairs with both observers recording an exact value.
    pub n: usize,
    /// The measures of agreement.
    pub measures: AgreementMeasures,
}

impl TraitAgreement {
    /// The pairs a kappa would need, when this trait has fewer ([`kappa_pairs_needed`]).
    pub fn too_few_pairs(&self) -> Option<usize> {
        match self.measures {
            AgreementMeasures::Grades { pairs_needed, .. } if self.n < pairs_needed => {
                Some(pairs_needed)
            }
            _ => None,
        }
    }

    /// `ordinal` or `metric`, as the catalogue names the kinds.
    pub fn kind(&self) -> &'static str {
        match self.measures {
            AgreementMeasures::Grades { .. } => "ordinal",
            AgreementMeasures::Measurements { .. } => "metric",
        }
    }
}

/// The latent noise of scoring, from two observers' scores of the same individuals.
///
/// # Model
/// Each observer records x + e with x the individual's latent trait value and e ~ N(0, σ²)
/// independent noise of the same size for both observers; the polychoric correlation of the
/// two scorings (Olsson 1979; thresholds from each observer's cumulative marginal shares) is
/// then r = V / (V + σ²), V the variance of x, and √(1 − r) = σ / √(V + σ²) is the share of
/// the scored latent SD that is observer noise. `None` with fewer than 10 pairs or r ≤ 0.
pub fn observer_error(pairs: &[(i32, i32)], lowest: i32, highest: i32) -> Option<(f64, f64)> {
    use crate::fit::correlation::{estimate, Margin, PairCase, Value};
    use crate::numeric::normal::inverse_cdf_fast;
    if pairs.len() < 10 {
        return None;
    }
    let k = (highest - lowest + 1) as usize;
    let n = pairs.len() as f64;
    let margin = |pick: fn(&(i32, i32)) -> i32| {
        let mut counts = vec![0.0; k];
        for p in pairs {
            counts[(pick(p) - lowest) as usize] += 1.0;
        }
        let mut acc = 0.0;
        let thresholds: Vec<f64> = counts[..k - 1]
            .iter()
            .map(|c| {
                acc += c;
                // Shares of 0 or 1 (grades nobody used at an end) kept just inside (0, 1).
                inverse_cdf_fast((acc / n).clamp(0.5 / n, 1.0 - 0.5 / n))
            })
            .collect();
        Margin::Ordinal {
            thresholds,
            mean: [0.0, 0.0],
        }
    };
    let (ma, mb) = (margin(|p| p.0), margin(|p| p.1));
    let cases: Vec<PairCase> = pairs
        .iter()
        .map(|&(x, y)| {
            let (gx, gy) = ((x - lowest) as usize, (y - lowest) as usize);
            PairCase {
                sex: 0,
                first: Value::Grade(gx, gx),
                second: Value::Grade(gy, gy),
                shift: [0.0; 2],
            }
        })
        .collect();
    let r = estimate(&ma, &mb, &cases).rho;
    (r > 0.0).then(|| (r, (1.0 - r).sqrt()))
}

/// The fewest pairs for which a weighted kappa's large-sample interval holds on a scale of
/// `grades` grades: 2k² (Cicchetti 1981, Applied Psychological Measurement 5:101–104, from
/// memory), 50 pairs for five grades. Fewer pairs still give a kappa, with an interval too
/// unstable to rely on.
pub fn kappa_pairs_needed(lowest: i32, highest: i32) -> usize {
    let k = (highest - lowest + 1).max(1) as usize;
    2 * k * k
}

/// One disagreement between the observers.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Disagreement {
    /// Individual.
    pub id: String,
    /// Trait.
    pub trait_id: String,
    /// Observer A's value.
    pub a: String,
    /// Observer B's value.
    pub b: String,
}

/// The comparison of two scorings.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Agreement {
    /// Individuals in both files.
    pub n_common: usize,
    /// Ids only in A.
    pub only_a: Vec<String>,
    /// Ids only in B.
    pub only_b: Vec<String>,
    /// Per trait scored by both.
    pub traits: Vec<TraitAgreement>,
    /// Every disagreement (grades differing, or measurements differing by more than 2 TEM —
    /// the factor 2 is a choice of ours, not a published rule).
    pub disagreements: Vec<Disagreement>,
}

fn bootstrap<T: Copy>(
    pairs: &[T],
    stat: impl Fn(&[T]) -> f64,
    reps: usize,
    seed: u64,
) -> (f64, f64) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let n = pairs.len();
    let mut v: Vec<f64> = (0..reps)
        .map(|_| {
            let s: Vec<T> = (0..n)
                .map(|_| pairs[(rng.random::<f64>() * n as f64) as usize % n])
                .collect();
            stat(&s)
        })
        .filter(|x| x.is_finite())
        .collect();
    if v.is_empty() {
        return (f64::NAN, f64::NAN);
    }
    v.sort_by(f64::total_cmp);
    let q = |p: f64| v[((p * (v.len() - 1) as f64).round() as usize).min(v.len() - 1)];
    (q(0.025), q(0.975))
}

/// The two tables and the individuals in both, matched by id.
struct Pairing<'a> {
    a: &'a Assemblage,
    b: &'a Assemblage,
    /// (row in `a`, row in `b`) of each individual in both.
    common: &'a [(usize, usize)],
    seed: u64,
}

impl Pairing<'_> {
    /// Agreement on a graded trait: weighted kappas (Cohen 1968) with bootstrap intervals,
    /// exact agreement and the latent observer error; pairs where either observer gave a
    /// range are left out and counted. `None` when no individual has both grades.
    fn ordinal(
        &self,
        t: usize,
        trait_id: &str,
        lowest: i32,
        highest: i32,
        disagreements: &mut Vec<Disagreement>,
    ) -> Option<TraitAgreement> {
        let mut pairs = Vec::new();
        let mut ranges = 0;
        for &(i, j) in self.common {
            if let (
                Some(Observation::Grade { low: x, high: x2 }),
                Some(Observation::Grade { low: y, high: y2 }),
            ) = (
                self.a.individuals[i].observations[t],
                self.b.individuals[j].observations[t],
            ) {
                if x == x2 && y == y2 {
                    pairs.push((x, y));
                    if x != y {
                        disagreements.push(Disagreement {
                            id: self.a.individuals[i].id.clone(),
                            trait_id: trait_id.to_string(),
                            a: x.to_string(),
                            b: y.to_string(),
                        });
                    }
                } else {
                    ranges += 1;
                }
            }
        }
        if pairs.is_empty() {
            return None;
        }
        let (lo, hi) = (lowest, highest);
        let lin = weighted_kappa(&pairs, lo, hi, false);
        let quad = weighted_kappa(&pairs, lo, hi, true);
        let bl = bootstrap(
            &pairs,
            |p| weighted_kappa(p, lo, hi, false),
            2000,
            self.seed ^ t as u64,
        );
        let bq = bootstrap(
            &pairs,
            |p| weighted_kappa(p, lo, hi, true),
            2000,
            self.seed ^ (t as u64 + 1000),
        );
        Some(TraitAgreement {
            trait_id: trait_id.to_string(),
            n: pairs.len(),
            measures: AgreementMeasures::Grades {
                kappa_linear: WithInterval::new(lin, bl),
                kappa_quadratic: WithInterval::new(quad, bq),
                exact_agreement: pairs.iter().filter(|(x, y)| x == y).count() as f64
                    / pairs.len() as f64,
                ranges_left_out: ranges,
                pairs_needed: kappa_pairs_needed(lo, hi),
                observer_error: observer_error(&pairs, lo, hi),
            },
        })
    }

    /// Agreement on a measurement: technical error of measurement and ICC(2,1) (Shrout &
    /// Fleiss 1979) with bootstrap intervals, and the relative TEM; pairs more than 2 TEM apart
    /// are listed. `None` when no individual has both measurements.
    fn metric(
        &self,
        t: usize,
        trait_id: &str,
        disagreements: &mut Vec<Disagreement>,
    ) -> Option<TraitAgreement> {
        let mut pairs = Vec::new();
        let mut ids = Vec::new();
        for &(i, j) in self.common {
            if let (
                Some(Observation::Measurement { value: x }),
                Some(Observation::Measurement { value: y }),
            ) = (
                self.a.individuals[i].observations[t],
                self.b.individuals[j].observations[t],
            ) {
                pairs.push((x, y));
                ids.push(self.a.individuals[i].id.clone());
            }
        }
        if pairs.is_empty() {
            return None;
        }
        let e = tem(&pairs);
        for ((x, y), id) in pairs.iter().zip(&ids) {
            if (x - y).abs() > 2.0 * e && e > 0.0 {
                disagreements.push(Disagreement {
                    id: id.clone(),
                    trait_id: trait_id.to_string(),
                    a: x.to_string(),
                    b: y.to_string(),
                });
            }
        }
        let mean = pairs.iter().map(|(x, y)| x + y).sum::<f64>() / (2.0 * pairs.len() as f64);
        let bt = bootstrap(&pairs, tem, 2000, self.seed ^ t as u64);
        let bi = bootstrap(&pairs, icc_2_1, 2000, self.seed ^ (t as u64 + 1000));
        Some(TraitAgreement {
            trait_id: trait_id.to_string(),
            n: pairs.len(),
            measures: AgreementMeasures::Measurements {
                tem: WithInterval::new(e, bt),
                icc: WithInterval::new(icc_2_1(&pairs), bi),
                relative_tem: 100.0 * e / mean,
            },
        })
    }
}

/// Compare two observers' scorings (read with the same catalogue).
pub fn compare(a: &Assemblage, b: &Assemblage, seed: u64) -> Agreement {
    let cat = &a.catalogue;
    let find = |x: &Assemblage, id: &str| x.individuals.iter().position(|i| i.id == id);
    let common: Vec<(usize, usize)> = a
        .individuals
        .iter()
        .enumerate()
        .filter_map(|(i, ind)| find(b, &ind.id).map(|j| (i, j)))
        .collect();
    let only_a = a
        .individuals
        .iter()
        .filter(|i| find(b, &i.id).is_none())
        .map(|i| i.id.clone())
        .collect();
    let only_b = b
        .individuals
        .iter()
        .filter(|i| find(a, &i.id).is_none())
        .map(|i| i.id.clone())
        .collect();
    let pairing = Pairing {
        a,
        b,
        common: &common,
        seed,
    };
    let mut traits = Vec::new();
    let mut disagreements = Vec::new();
    for (t, def) in cat.traits().iter().enumerate() {
        if !(a.trait_columns[t] && b.trait_columns[t]) {
            continue;
        }
        match &def.kind {
            TraitKind::Ordinal { lowest, highest } => {
                traits.extend(pairing.ordinal(t, &def.id, *lowest, *highest, &mut disagreements))
            }
            TraitKind::Metric { .. } => {
                traits.extend(pairing.metric(t, &def.id, &mut disagreements))
            }
            TraitKind::Count => {}
        }
    }
    Agreement {
        n_common: common.len(),
        only_a,
        only_b,
        traits,
        disagreements,
    }
}

#[cfg(test)]
#[path = "tests/agreement.rs"]
mod tests;
