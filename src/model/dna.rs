//! Ancient-DNA read counts as evidence.
//!
//! # Formula
//! Of n = n_X + n_Y reads mapped to the sex chromosomes, k = n_Y map to Y. Given sex s the Y
//! fraction follows Beta(αₛ, βₛ) (contamination and mismapping give XX individuals a small
//! non-zero fraction), so k is beta-binomial:
//! ln P(k | n, s) = ln C(n, k) + ln B(k + αₛ, n − k + βₛ) − ln B(αₛ, βₛ).
//! The approach follows the Y-ratio reasoning of Skoglund et al. (2013, J Archaeol Sci
//! 40:4477–4482). A count whose z-score, (k − n·mₛ)/sdₛ with the beta-binomial mean and SD, is
//! beyond `atypical_z` under both sexes fits neither (atypical karyotype, contamination): the
//! block is then flagged and not used, never forced to a sex.
//!
//! # Contamination and mix-up
//! With probability ε (`contamination`, default [`DEFAULT_CONTAMINATION`]) a sample's reads
//! are not the individual's own: contamination by another person's DNA, a sample mix-up or
//! a library dominated by mis-mapped reads. The reads then come from someone of either sex
//! with equal probability, so
//! P(k | n, s) = (1 − ε) BB(k; n, αₛ, βₛ) + ε ½ [BB(k; n, α_F, β_F) + BB(k; n, α_M, β_M)].
//! The likelihood ratio is then bounded by what one sample can support, whatever the read
//! count: LR ≤ (2 − ε)/ε (199 at ε = 0.01), and its inverse from below. ε = 0 gives the plain
//! beta-binomial.

use super::evidence::{BlockEvidence, BlockStatus};
use super::spec::RawDnaBlock;
use super::ModelProblem;
use crate::catalogue::{Catalogue, TraitKind};
use crate::data::{Individual, Observation};
use crate::numeric::normal::ln_add_exp;
use statrs::function::beta::ln_beta;
use statrs::function::gamma::ln_gamma;

/// lnΓ(x + a) − lnΓ(x + b) for x ≥ 0 and a, b > 0, without cancellation for large x.
///
/// # Formula
/// Where both arguments are at least 10⁵, the difference of Stirling's series (Abramowitz &
/// Stegun 1964, 6.1.40), with ln(x + c) = ln x + ln1p(c/x):
/// `(a − b) ln x + (x + a − ½) ln1p(a/x) − (x + b − ½) ln1p(b/x) − (a − b)`
/// `  + 1/(12(x+a)) − 1/(12(x+b)) − 1/(360(x+a)³) + 1/(360(x+b)³)`;
/// the next term is below 10⁻²⁷ there. Below that, lnΓ directly (both values are then under
/// 10⁶, so their difference keeps about 10 significant digits of the result).
pub fn ln_gamma_difference(x: f64, a: f64, b: f64) -> f64 {
    let (za, zb) = (x + a, x + b);
    if za.min(zb) < 1e5 || x <= 0.0 {
        return ln_gamma(za) - ln_gamma(zb);
    }
    (a - b) * x.ln() + (za - 0.5) * (a / x).ln_1p() - (zb - 0.5) * (b / x).ln_1p() - (a - b)
        + 1.0 / (12.0 * za)
        - 1.0 / (12.0 * zb)
        - 1.0 / (360.0 * za.powi(3))
        + 1.0 / (360.0 * zb.powi(3))
}

/// ln P(k | n) of the beta-binomial BB(n, α, β), written so that nothing cancels for large
/// counts: [lnΓ(n+1) − lnΓ(n+α+β)] + [lnΓ(k+α) − lnΓ(k+1)] + [lnΓ(n−k+β) − lnΓ(n−k+1)] − ln B(α, β),
/// each bracket by [`ln_gamma_difference`].
pub fn beta_binomial_ln_pmf(a: f64, b: f64, k: u64, n: u64) -> f64 {
    let (k, n) = (k as f64, n as f64);
    ln_gamma_difference(n, 1.0, a + b)
        + ln_gamma_difference(k, a, 1.0)
        + ln_gamma_difference(n - k, b, 1.0)
        - ln_beta(a, b)
}

/// z-score of k under BB(n, α, β): (k − n m) / √(n m (1 − m)(α + β + n)/(α + β + 1)), m = α/(α + β).
pub fn beta_binomial_z(a: f64, b: f64, k: u64, n: u64) -> f64 {
    let (k, n) = (k as f64, n as f64);
    let m = a / (a + b);
    let var = n * m * (1.0 - m) * (a + b + n) / (a + b + 1.0);
    (k - n * m) / var.sqrt()
}

/// The contamination mixture of the module documentation, from each sex's own ln P:
/// ln[(1 − ε) Pₛ + ε ½ (P_F + P_M)] by log-sum-exp; ε = 0 gives them back unchanged.
pub fn with_contamination(own: [f64; 2], eps: f64) -> [f64; 2] {
    if eps == 0.0 {
        return own;
    }
    let other = (0.5 * eps).ln() + ln_add_exp(own[0], own[1]);
    own.map(|l| ln_add_exp((1.0 - eps).ln() + l, other))
}

/// Default ε: the probability that a sample's reads are not the individual's own. A stated
/// assumption of ours (no published rate of whole-sample contamination or mix-up is used
/// here); set `contamination` in the model file to the laboratory's own figure.
pub const DEFAULT_CONTAMINATION: f64 = 0.01;

/// A validated DNA block.
#[derive(Debug, Clone, PartialEq)]
pub struct DnaBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    pub label: String,
    /// Catalogue position of the X count.
    pub x_index: usize,
    /// Catalogue position of the Y count.
    pub y_index: usize,
    /// Trait ids (X, Y).
    pub ids: [String; 2],
    /// The two ids as one list, shared with the evidence of every individual with reads.
    pub ids_used: std::sync::Arc<[String]>,
    /// Beta(α, β) of the Y fraction: female, male.
    pub beta: [(f64, f64); 2],
    /// z beyond which a count fits a sex badly.
    pub atypical_z: f64,
    /// ε: probability that the reads are someone else's (see the module documentation).
    pub contamination: f64,
}

impl DnaBlock {
    pub(crate) fn from_raw(
        raw: &RawDnaBlock,
        catalogue: &Catalogue,
        problems: &mut Vec<ModelProblem>,
    ) -> Option<DnaBlock> {
        let start = problems.len();
        let mut fail = |m: String| {
            problems.push(ModelProblem {
                place: format!("block `{}`", raw.id),
                message: m,
            })
        };
        let mut index = |id: &str| match catalogue.get(id).map(|d| &d.kind) {
            Some(TraitKind::Count) => catalogue.position(id),
            Some(_) => {
                fail(format!("`{id}` is not a read count"));
                None
            }
            None => {
                fail(format!("`{id}` is not a trait of the catalogue"));
                None
            }
        };
        let x = index(&raw.x_reads);
        let y = index(&raw.y_reads);
        for (who, b) in [("female", raw.female), ("male", raw.male)] {
            if !(b.alpha > 0.0 && b.beta > 0.0 && b.alpha.is_finite() && b.beta.is_finite()) {
                fail(format!("{who}: alpha and beta must be positive"));
            }
        }
        let fm = |b: super::spec::RawBeta| b.alpha / (b.alpha + b.beta);
        if fm(raw.female) >= fm(raw.male) {
            fail("the female Y fraction must have a smaller mean than the male".into());
        }
        let z = raw.atypical_z.unwrap_or(4.0);
        if !(z > 0.0) {
            fail("atypical_z must be positive".into());
        }
        let contamination = raw.contamination.unwrap_or(DEFAULT_CONTAMINATION);
        if !(0.0..1.0).contains(&contamination) {
            fail(format!(
                "contamination is a probability from 0 up to (not including) 1, found {contamination}"
            ));
        }
        if problems.len() > start {
            return None;
        }
        Some(DnaBlock {
            id: raw.id.clone(),
            label: raw.label.clone(),
            x_index: x?,
            y_index: y?,
            ids: [raw.x_reads.clone(), raw.y_reads.clone()],
            ids_used: [raw.x_reads.clone(), raw.y_reads.clone()].into(),
            beta: [
                (raw.female.alpha, raw.female.beta),
                (raw.male.alpha, raw.male.beta),
            ],
            atypical_z: z,
            contamination,
        })
    }

    /// ln P(k | n, female) and ln P(k | n, male) with the contamination mixture:
    /// ln[(1 − ε) BBₛ + ε ½ (BB_F + BB_M)], by log-sum-exp of the two beta-binomial terms
    /// (each computed once for both sexes).
    pub fn ln_likelihoods(&self, k: u64, n: u64) -> [f64; 2] {
        with_contamination(
            [self.ln_pmf(0, k, n), self.ln_pmf(1, k, n)],
            self.contamination,
        )
    }

    /// The largest likelihood ratio one sample can give either way: (2 − ε)/ε (infinite at
    /// ε = 0).
    pub fn lr_bound(&self) -> f64 {
        (2.0 - self.contamination) / self.contamination
    }

    /// ln P(k | n, s) for sex index s (0 female, 1 male), written so that nothing cancels for
    /// large counts:
    /// ln P = [lnΓ(n+1) − lnΓ(n+α+β)] + [lnΓ(k+α) − lnΓ(k+1)] + [lnΓ(n−k+β) − lnΓ(n−k+1)]
    ///        − ln B(α, β),
    /// each bracket by [`ln_gamma_difference`]. Expanding ln C(n, k) and the two beta functions
    /// separately loses every digit at 10¹⁷ reads (each term is ~10¹⁹).
    pub fn ln_pmf(&self, s: usize, k: u64, n: u64) -> f64 {
        let (a, b) = self.beta[s];
        beta_binomial_ln_pmf(a, b, k, n)
    }

    /// z-score of k under sex s (beta-binomial mean and SD).
    pub fn z(&self, s: usize, k: u64, n: u64) -> f64 {
        let (a, b) = self.beta[s];
        beta_binomial_z(a, b, k, n)
    }

    /// The block's evidence for one individual (used at any age).
    pub fn evaluate(&self, ind: &Individual) -> BlockEvidence {
        let (Some(Observation::Count { value: nx }), Some(Observation::Count { value: ny })) = (
            ind.observations[self.x_index],
            ind.observations[self.y_index],
        ) else {
            return BlockEvidence::not_used(BlockStatus::NoEvidence, "no read counts");
        };
        let Some(n) = nx.checked_add(ny) else {
            return BlockEvidence::not_used(BlockStatus::NumericalFailure, "read counts too large");
        };
        if n == 0 {
            return BlockEvidence::not_used(BlockStatus::NoEvidence, "no reads on X or Y");
        }
        let (zf, zm) = (self.z(0, ny, n), self.z(1, ny, n));
        let used = self.ids_used.clone();
        if zf.abs() > self.atypical_z && zm.abs() > self.atypical_z {
            return BlockEvidence {
                traits_used: used,
                ..BlockEvidence::not_used(
                    BlockStatus::Atypical,
                    format!(
                        "Y fraction {:.4} fits neither sex (z female {zf:.1}, male {zm:.1}): atypical karyotype or contamination? not used",
                        ny as f64 / n as f64
                    ),
                )
            };
        }
        let [ln_f, ln_m] = self.ln_likelihoods(ny, n);
        let mut e = BlockEvidence::from_likelihoods(used, ln_f, ln_m, 0.0);
        e.note = format!("Y fraction {:.4} of {n} reads", ny as f64 / n as f64).into();
        if self.contamination > 0.0 && e.ln_lr.abs() > self.lr_bound().ln() - 0.01 {
            e.note.to_mut().push_str(&format!(
                "; at the ceiling of {:.0} that a contamination rate of {} allows",
                self.lr_bound(),
                self.contamination
            ));
        }
        e
    }
}
