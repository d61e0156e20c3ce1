//! Ancient-DNA read counts as evidence: reads on X against reads on the autosomes.
//!
//! # Formula
//! An XX individual carries two X chromosomes per two sets of autosomes, an XY individual
//! one, so the X coverage relative to the autosomal coverage, Rx, is about 1 for XX and 0.5
//! for XY (Mittnik et al. 2016, PLoS ONE 11:e0163019; values below 0.6 read as male there,
//! above 0.8 as female, the latter from memory). Of n = k + m reads on X (k) and the
//! autosomes (m), the expected X share for XX is p_F = `x_share` (X's share of the mappable
//! length of X and the autosomes) and for XY, with half the X dosage,
//! p_M = ½p_F / (½p_F + 1 − p_F) = p_F / (2 − p_F). A sample's own share varies around that
//! (capture, mapping and library differences): it follows Beta(κpₛ, κ(1 − pₛ)) with
//! concentration κ, so k is beta-binomial as in [`super::dna`], with the same contamination
//! mixture (probability ε that the reads are someone else's, of either sex). The ratio of
//! totals Rx = (k/m) / (p_F/(1 − p_F)) is reported beside it (Mittnik et al. average
//! chromosome by chromosome; the likelihood uses the counts, not Rx).
//!
//! A count whose z-score is beyond `atypical_z` under both sexes fits neither and is flagged
//! and not used. Beside a Y-fraction block of the same library the two ratios are not
//! independent (they share the X reads and the library's contamination): by default the
//! X:autosome ratio is used only where the Y fraction is not, and the two are compared; see
//! [`super::Model::evaluate_cached`].

use super::dna::{
    beta_binomial_ln_pmf, beta_binomial_z, with_contamination, DEFAULT_CONTAMINATION,
};
use super::evidence::{BlockEvidence, BlockStatus};
use super::spec::{BesideYRatio, RawDnaXBlock};
use super::ModelProblem;
use crate::catalogue::{Catalogue, TraitKind};
use crate::data::{Individual, Observation};

/// A validated X:autosome block.
#[derive(Debug, Clone, PartialEq)]
pub struct DnaXBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    pub label: String,
    /// Catalogue position of the X count.
    pub x_index: usize,
    /// Catalogue position of the autosomal count.
    pub autosome_index: usize,
    /// Trait ids (X, autosomes).
    pub ids: [String; 2],
    /// The two ids as one list, shared with the evidence of every individual with reads.
    pub ids_used: std::sync::Arc<[String]>,
    /// Expected X share of an XX individual, p_F.
    pub x_share: f64,
    /// Beta(α, β) of the X share: female, male.
    pub beta: [(f64, f64); 2],
    /// z beyond which a count fits a sex badly.
    pub atypical_z: f64,
    /// ε: probability that the reads are someone else's.
    pub contamination: f64,
    /// Whether it counts beside a Y-fraction block.
    pub beside_y_ratio: BesideYRatio,
}

impl DnaXBlock {
    pub(crate) fn from_raw(
        raw: &RawDnaXBlock,
        catalogue: &Catalogue,
        problems: &mut Vec<ModelProblem>,
    ) -> Option<DnaXBlock> {
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
        let autosome = index(&raw.autosome_reads);
        let p = raw.x_share;
        if !(p > 0.0 && p < 0.5) {
            fail(format!(
                "x_share is X's share of the reads on X and the autosomes of an XX individual, above 0 and below 0.5 (about 0.05 for the human genome), found {p}"
            ));
        }
        let k = raw.concentration;
        if !(k > 0.0 && k.is_finite()) {
            fail(format!(
                "concentration must be a positive number, found {k}"
            ));
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
        let male = p / (2.0 - p);
        Some(DnaXBlock {
            id: raw.id.clone(),
            label: raw.label.clone(),
            x_index: x?,
            autosome_index: autosome?,
            ids: [raw.x_reads.clone(), raw.autosome_reads.clone()],
            ids_used: [raw.x_reads.clone(), raw.autosome_reads.clone()].into(),
            x_share: p,
            beta: [(k * p, k * (1.0 - p)), (k * male, k * (1.0 - male))],
            atypical_z: z,
            contamination,
            beside_y_ratio: raw.beside_y_ratio,
        })
    }

    /// Rx = (k/m) / (p_F/(1 − p_F)): X coverage relative to the autosomes, 1 for XX and 0.5
    /// for XY in expectation.
    pub fn rx(&self, x_reads: u64, autosome_reads: u64) -> f64 {
        let p = self.x_share;
        (x_reads as f64 / autosome_reads as f64) / (p / (1.0 - p))
    }

    /// ln P(k | n, female) and ln P(k | n, male), with the contamination mixture.
    pub fn ln_likelihoods(&self, k: u64, n: u64) -> [f64; 2] {
        let own = self.beta.map(|(a, b)| beta_binomial_ln_pmf(a, b, k, n));
        with_contamination(own, self.contamination)
    }

    /// The largest likelihood ratio one sample can give either way: (2 − ε)/ε.
    pub fn lr_bound(&self) -> f64 {
        (2.0 - self.contamination) / self.contamination
    }

    /// The block's evidence for one individual (used at any age).
    pub fn evaluate(&self, ind: &Individual) -> BlockEvidence {
        let (Some(Observation::Count { value: k }), Some(Observation::Count { value: m })) = (
            ind.observations[self.x_index],
            ind.observations[self.autosome_index],
        ) else {
            return BlockEvidence::not_used(
                BlockStatus::NoEvidence,
                "no reads on X and the autosomes",
            );
        };
        let Some(n) = k.checked_add(m) else {
            return BlockEvidence::not_used(BlockStatus::NumericalFailure, "read counts too large");
        };
        if m == 0 {
            return BlockEvidence::not_used(BlockStatus::NoEvidence, "no autosomal reads");
        }
        let rx = self.rx(k, m);
        let z = self.beta.map(|(a, b)| beta_binomial_z(a, b, k, n));
        let used = self.ids_used.clone();
        if z[0].abs() > self.atypical_z && z[1].abs() > self.atypical_z {
            return BlockEvidence {
                traits_used: used,
                ..BlockEvidence::not_used(
                    BlockStatus::Atypical,
                    format!(
                        "Rx {rx:.3} fits neither sex (z female {:.1}, male {:.1}): atypical karyotype or contamination? not used",
                        z[0], z[1]
                    ),
                )
            };
        }
        let [ln_f, ln_m] = self.ln_likelihoods(k, n);
        let mut e = BlockEvidence::from_likelihoods(used, ln_f, ln_m, 0.0);
        e.note = format!("Rx {rx:.3} from {n} reads on X and the autosomes").into();
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

/// |log10 LR| each of the Y fraction and the X:autosome ratio must reach, in opposite
/// directions, for the two to be called in conflict (a choice of ours: "moderate" support each
/// way on the verbal scale).
pub const CONFLICT_LOG10_LR: f64 = 1.0;

/// The rule between a Y-fraction block `y` and an X:autosome block `x` of one individual,
/// applied after both are evaluated:
/// - both used and pointing to different sexes, each with |log10 LR| ≥ [`CONFLICT_LOG10_LR`]:
///   neither is used, both are flagged (an XXY or X0 karyotype, or contamination);
/// - the Y fraction fits neither sex (flagged): the X:autosome ratio of the same reads is not
///   used alone either (an XXY individual has a low Y fraction and an XX-like Rx);
/// - both used, `not-counted`: the X:autosome ratio is not counted again;
/// - otherwise as evaluated (the X:autosome ratio alone where the Y fraction has no reads).
pub fn settle_with_y(y: &mut BlockEvidence, x: &mut BlockEvidence, policy: BesideYRatio) {
    let first = |e: &BlockEvidence| e.note.split(';').next().unwrap_or("").to_string();
    if y.status == BlockStatus::Atypical && x.status == BlockStatus::Used {
        let note = format!(
            "{}; not used alone: the Y fraction of the same reads fits neither sex (an XXY karyotype gives a low Y fraction and an XX-like Rx)",
            first(x)
        );
        *x = BlockEvidence {
            traits_used: x.traits_used.clone(),
            ..BlockEvidence::not_used(BlockStatus::Atypical, note)
        };
        return;
    }
    if y.status != BlockStatus::Used || x.status != BlockStatus::Used {
        return;
    }
    let ln10 = std::f64::consts::LN_10;
    let (ly, lx) = (y.ln_lr / ln10, x.ln_lr / ln10);
    if ly * lx < 0.0 && ly.abs() >= CONFLICT_LOG10_LR && lx.abs() >= CONFLICT_LOG10_LR {
        let side = |l: f64| if l > 0.0 { "female" } else { "male" };
        let why = format!(
            "{} ({}) and {} ({}) point to different sexes: an atypical karyotype (XXY, X0) or contamination? neither used",
            first(y),
            side(ly),
            first(x),
            side(lx)
        );
        for e in [y, x] {
            *e = BlockEvidence {
                traits_used: e.traits_used.clone(),
                ..BlockEvidence::not_used(BlockStatus::Atypical, why.clone())
            };
        }
        return;
    }
    if policy == BesideYRatio::NotCounted {
        let note = format!(
            "{}; agrees with the Y fraction of the same reads, which is used; not counted again",
            x.note
        );
        *x = BlockEvidence {
            traits_used: x.traits_used.clone(),
            ..BlockEvidence::not_used(BlockStatus::CountedElsewhere, note)
        };
    }
}
