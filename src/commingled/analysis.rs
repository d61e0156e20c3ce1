//! Sex by element, MNI by sex and the proportion female of a commingled assemblage.
//!
//! # Method
//! 1. Each element's likelihood ratio L = P(its traits | female) / P(its traits | male) from
//!    the model (traits it does not carry integrated out, as for an individual).
//! 2. Per element type and side (a *unit*: `femur left`), the posterior of the proportion
//!    female π from the unit's elements under the prior (each element of one unit is a
//!    different person, so they are independent draws of the population), on the grid of
//!    [`PiPosterior`]. The unit whose elements carry most information about π — the Fisher
//!    information at π = 1/2, Σᵢ 4 tanh²(ln Lᵢ / 2), blind to which sex the elements favour —
//!    gives the assemblage's π (ties: more elements with evidence, then name order); its name
//!    is reported beside the estimate.
//! 3. Joint draws: π from that posterior (inverse CDF of a uniform), then each element's sex
//!    given π, P(F) = π L / (π L + 1 − π). An `individual` is one sex: in each draw each of its
//!    elements belongs to it with its `association` probability, and the members' ln L are
//!    summed for one draw of their common sex; an element left out that draw has its own.
//! 4. Per draw and unit, the number of female and male elements; per element type, the MNI
//!    of each sex is the largest count over its sides (left, right, side not recorded); over
//!    the assemblage, the largest over the types. Each is summarised over the draws by its
//!    mean, median and 2.5% and 97.5% quantiles.
//!
//! An element's `p_female_own` is exact: its own L under the chosen unit's posterior of π;
//! `p_female` is the share of draws in which it is female (its associations included), with
//! Monte Carlo error √(p(1 − p)/draws).

use super::read::{ElementSide, ElementTable};
use crate::assemblage::draws::{count_summary, order_statistic};
use crate::assemblage::posterior::{p_female_given, PiPosterior, PiSummary};
use crate::assemblage::{Category, Thresholds};
use crate::model::evidence::Context;
use crate::model::Model;
use crate::prior::Prior;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;
use std::collections::BTreeMap;

/// Options of an element analysis.
#[derive(Debug, Clone)]
pub struct ElementOptions {
    /// Joint posterior draws.
    pub draws: usize,
    /// Seed of the draws and of the model's randomised integration.
    pub seed: u64,
    /// Prior on the proportion female.
    pub prior: Prior,
    /// Category thresholds on P(female).
    pub thresholds: Thresholds,
}

/// A count over the draws.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CountSummary {
    /// Mean over the draws.
    pub mean: f64,
    /// Median.
    pub median: f64,
    /// 2.5% quantile.
    pub lo: f64,
    /// 97.5% quantile.
    pub hi: f64,
}

impl CountSummary {
    /// Mean and 95% interval by [`count_summary`], the median by the same order-statistic
    /// rule; all 0 for no draws.
    fn of(mut v: Vec<usize>) -> CountSummary {
        if v.is_empty() {
            return CountSummary {
                mean: 0.0,
                median: 0.0,
                lo: 0.0,
                hi: 0.0,
            };
        }
        let (mean, lo, hi) = count_summary(&v);
        v.sort_unstable();
        CountSummary {
            mean,
            median: order_statistic(&v, 0.5) as f64,
            lo: lo as f64,
            hi: hi as f64,
        }
    }
}

/// One element's result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ElementResult {
    /// Row index in the table.
    pub index: usize,
    /// log10 of its own likelihood ratio (0 without evidence).
    pub log10_lr: f64,
    /// Traits that entered.
    pub n_traits: usize,
    /// Whether any block used its evidence.
    pub estimable: bool,
    /// P(female) from its own evidence, integrated over π.
    pub p_female_own: f64,
    /// Share of the draws in which it is female (with its associations).
    pub p_female: f64,
    /// Category of `p_female`.
    pub category: Category,
}

/// One element type and side.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnitResult {
    /// Element type.
    pub element: String,
    /// Side.
    pub side: ElementSide,
    /// Elements of this type and side.
    pub n_elements: usize,
    /// Of which with evidence of sex.
    pub n_with_evidence: usize,
    /// Fisher information about π at one half, Σ 4 tanh²(ln Lᵢ / 2).
    pub information: f64,
    /// The posterior of π from this unit's elements alone (`None` without evidence).
    pub pi: Option<PiSummary>,
    /// Female elements over the draws.
    pub females: CountSummary,
    /// Male elements over the draws.
    pub males: CountSummary,
}

/// MNI by sex of one element type (or of the assemblage).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MniResult {
    /// Element type (`all elements` for the assemblage).
    pub element: String,
    /// MNI of females over the draws.
    pub females: CountSummary,
    /// MNI of males over the draws.
    pub males: CountSummary,
    /// The MNI of either sex regardless of sex (largest side count of the type).
    pub total: usize,
    /// For the assemblage: the element type that most often sets each sex's MNI.
    pub set_by: Option<[String; 2]>,
}

/// Everything an element analysis found.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CommingledResult {
    /// One per row, in table order.
    pub elements: Vec<ElementResult>,
    /// One per element type and side, in name order.
    pub units: Vec<UnitResult>,
    /// One per element type, then the assemblage's last.
    pub mni: Vec<MniResult>,
    /// The unit whose π is the assemblage's (index into `units`).
    pub chosen: usize,
    /// Its posterior of π.
    pub pi: PiSummary,
    /// Draws made.
    pub draws: usize,
    /// Seed.
    pub seed: u64,
    /// Name of the prior on π.
    pub prior: String,
    /// Individuals named by associations, and the elements of each.
    pub associations: Vec<(String, Vec<usize>)>,
}

/// Why an element analysis cannot be made.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ElementError {
    /// No element carries evidence of sex the model can use.
    #[error("no element carries evidence of sex that the model uses: the table needs trait scores or measurements of the model's blocks")]
    NoEvidence,
    /// Draws outside 1..=1 000 000.
    #[error("give from 1 up to 1000000 draws, found {0}")]
    Draws(usize),
}

/// Analyse an element table: see the module documentation.
///
/// # Errors
/// [`ElementError`] when no element has evidence, or the number of draws is out of range.
pub fn analyse_elements(
    table: &ElementTable,
    model: &Model,
    opts: &ElementOptions,
) -> Result<CommingledResult, ElementError> {
    if opts.draws == 0 || opts.draws > 1_000_000 {
        return Err(ElementError::Draws(opts.draws));
    }
    let ctx = Context::new(opts.seed);
    let evidence: Vec<_> = table
        .rows
        .individuals
        .iter()
        .map(|ind| model.evaluate(ind, &ctx))
        .collect();
    let ln_lr: Vec<f64> = evidence
        .iter()
        .map(|e| if e.estimable { e.ln_lr } else { 0.0 })
        .collect();
    // Units in name order, and each element's unit.
    let mut by_unit: BTreeMap<(String, ElementSide), Vec<usize>> = BTreeMap::new();
    for (i, e) in table.elements.iter().enumerate() {
        by_unit
            .entry((e.element.clone(), e.side))
            .or_default()
            .push(i);
    }
    let keys: Vec<(String, ElementSide)> = by_unit.keys().cloned().collect();
    let members: Vec<Vec<usize>> = by_unit.into_values().collect();
    let mut unit_of = vec![0usize; table.elements.len()];
    for (k, m) in members.iter().enumerate() {
        for &i in m {
            unit_of[i] = k;
        }
    }
    // The ln LRs of each unit's elements with evidence.
    let unit_lrs: Vec<Vec<f64>> = members
        .iter()
        .map(|m| {
            m.iter()
                .filter(|&&i| evidence[i].estimable)
                .map(|&i| ln_lr[i])
                .collect()
        })
        .collect();
    let posts: Vec<Option<PiPosterior>> = unit_lrs
        .iter()
        .map(|lrs| (!lrs.is_empty()).then(|| PiPosterior::compute(lrs, &opts.prior)))
        .collect();
    // The unit whose elements carry most information about π: the Fisher information at
    // π = 1/2, Σ 4 ((Lᵢ − 1)/(Lᵢ + 1))² = Σ 4 tanh²(ln Lᵢ / 2), which is the same for an
    // element and its mirror image (L and 1/L), so the choice does not favour units that
    // happen to hold more women or more men (choosing the narrowest interval would: a Beta
    // posterior narrows towards 0 and 1).
    let information: Vec<f64> = unit_lrs
        .iter()
        .map(|lrs| lrs.iter().map(|l| 4.0 * (0.5 * l).tanh().powi(2)).sum())
        .collect();
    let chosen = (0..keys.len())
        .filter(|&k| posts[k].is_some())
        .max_by(|&a, &b| {
            information[a]
                .total_cmp(&information[b])
                .then(unit_lrs[a].len().cmp(&unit_lrs[b].len()))
                .then(b.cmp(&a))
        })
        .ok_or(ElementError::NoEvidence)?;
    let post = posts[chosen].as_ref().ok_or(ElementError::NoEvidence)?;

    // Associations: individual label -> (element, probability).
    let mut groups: BTreeMap<String, Vec<usize>> = BTreeMap::new();
    for (i, e) in table.elements.iter().enumerate() {
        if let Some(label) = &e.individual {
            groups.entry(label.clone()).or_default().push(i);
        }
    }
    let n = table.elements.len();
    let mut rng = ChaCha8Rng::seed_from_u64(opts.seed);
    let mut female = vec![false; n];
    let mut female_count = vec![0usize; n];
    let mut unit_counts: Vec<[Vec<usize>; 2]> = vec![[Vec::new(), Vec::new()]; keys.len()];
    let types: Vec<String> = {
        let mut t: Vec<String> = keys.iter().map(|k| k.0.clone()).collect();
        t.dedup();
        t
    };
    let mut type_mni: Vec<[Vec<usize>; 2]> = vec![[Vec::new(), Vec::new()]; types.len()];
    let mut overall: [Vec<usize>; 2] = [Vec::new(), Vec::new()];
    let mut set_by = vec![[0usize; 2]; types.len()];
    let unit_type: Vec<usize> = keys
        .iter()
        .map(|k| types.iter().position(|t| *t == k.0).unwrap_or(0))
        .collect();
    let mut done = vec![false; n];
    for _ in 0..opts.draws {
        let pi = post.quantile(rng.random::<f64>()).clamp(1e-12, 1.0 - 1e-12);
        done.fill(false);
        for members in groups.values() {
            let joined: Vec<usize> = members
                .iter()
                .copied()
                .filter(|&i| {
                    let p = table.elements[i].association;
                    p >= 1.0 || rng.random::<f64>() < p
                })
                .collect();
            let l: f64 = joined.iter().map(|&i| ln_lr[i]).sum();
            let is_female = rng.random::<f64>() < p_female_given(pi, l);
            for &i in &joined {
                female[i] = is_female;
                done[i] = true;
            }
        }
        for i in 0..n {
            if !done[i] {
                female[i] = rng.random::<f64>() < p_female_given(pi, ln_lr[i]);
            }
            female_count[i] += usize::from(female[i]);
        }
        let mut counts = vec![[0usize; 2]; keys.len()];
        for i in 0..n {
            counts[unit_of[i]][usize::from(!female[i])] += 1;
        }
        let mut by_type = vec![[0usize; 2]; types.len()];
        for (k, c) in counts.iter().enumerate() {
            for s in 0..2 {
                unit_counts[k][s].push(c[s]);
                let t = &mut by_type[unit_type[k]][s];
                *t = (*t).max(c[s]);
            }
        }
        for s in 0..2 {
            let (best, value) = by_type
                .iter()
                .enumerate()
                .map(|(t, c)| (t, c[s]))
                .fold((0, 0), |acc, x| if x.1 > acc.1 { x } else { acc });
            overall[s].push(value);
            set_by[best][s] += 1;
            for (t, c) in by_type.iter().enumerate() {
                type_mni[t][s].push(c[s]);
            }
        }
    }
    let elements = (0..n)
        .map(|i| {
            let p_female = female_count[i] as f64 / opts.draws as f64;
            ElementResult {
                index: i,
                log10_lr: ln_lr[i] / std::f64::consts::LN_10,
                n_traits: evidence[i].n_traits,
                estimable: evidence[i].estimable,
                p_female_own: post.p_female(ln_lr[i]),
                p_female,
                category: opts.thresholds.categorise(p_female),
            }
        })
        .collect();
    let units = keys
        .iter()
        .enumerate()
        .map(|(k, (element, side))| {
            let [f, m] = std::mem::take(&mut unit_counts[k]);
            UnitResult {
                element: element.clone(),
                side: *side,
                n_elements: members[k].len(),
                n_with_evidence: unit_lrs[k].len(),
                information: information[k],
                pi: posts[k].as_ref().map(PiPosterior::summary),
                females: CountSummary::of(f),
                males: CountSummary::of(m),
            }
        })
        .collect::<Vec<_>>();
    let mut mni: Vec<MniResult> = types
        .iter()
        .enumerate()
        .map(|(t, name)| {
            let [f, m] = std::mem::take(&mut type_mni[t]);
            MniResult {
                element: name.clone(),
                females: CountSummary::of(f),
                males: CountSummary::of(m),
                total: units
                    .iter()
                    .filter(|u| u.element == *name)
                    .map(|u| u.n_elements)
                    .max()
                    .unwrap_or(0),
                set_by: None,
            }
        })
        .collect();
    let most = |s: usize| {
        (0..types.len())
            .max_by_key(|&t| (set_by[t][s], std::cmp::Reverse(t)))
            .map(|t| types[t].clone())
            .unwrap_or_default()
    };
    let [f, m] = overall;
    mni.push(MniResult {
        element: "all elements".into(),
        females: CountSummary::of(f),
        males: CountSummary::of(m),
        total: mni.iter().map(|x| x.total).max().unwrap_or(0),
        set_by: Some([most(0), most(1)]),
    });
    Ok(CommingledResult {
        elements,
        units,
        mni,
        chosen,
        pi: post.summary(),
        draws: opts.draws,
        seed: opts.seed,
        prior: opts.prior.name.clone(),
        associations: groups.into_iter().collect(),
    })
}
