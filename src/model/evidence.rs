//! What a block says about one individual: ln L(female), ln L(male), ln LR, and why a block
//! was not used.

use crate::data::Sex;
use crate::numeric::QmcSettings;
use serde::Serialize;
use std::borrow::Cow;
use std::sync::Arc;

/// Whether a block contributed, and if not, why.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum BlockStatus {
    /// The block's evidence entered the likelihood.
    Used,
    /// Nothing of the block was recorded (LR = 1).
    NoEvidence,
    /// A morphological block of an individual below the model's minimum age (LR = 1).
    BelowMinimumAge,
    /// Traits were recorded, but no equation of the block has all its inputs (LR = 1).
    NoUsableEquation,
    /// DNA reads that fit neither sex well (LR = 1, flagged for a person to look at).
    Atypical,
    /// The numerical routine failed for this individual (LR = 1, flagged).
    NumericalFailure,
    /// The same reads are already weighed by another block (the X:autosome ratio beside the
    /// Y fraction of one library; LR = 1).
    CountedElsewhere,
}

impl BlockStatus {
    /// The word written in outputs.
    pub fn as_str(self) -> &'static str {
        match self {
            BlockStatus::Used => "used",
            BlockStatus::NoEvidence => "no_evidence",
            BlockStatus::BelowMinimumAge => "below_minimum_age",
            BlockStatus::NoUsableEquation => "no_usable_equation",
            BlockStatus::Atypical => "atypical",
            BlockStatus::NumericalFailure => "numerical_failure",
            BlockStatus::CountedElsewhere => "counted_by_another_block",
        }
    }
}

/// One block's evidence about one individual.
#[derive(Debug, Clone, Serialize)]
pub struct BlockEvidence {
    /// Used or why not.
    pub status: BlockStatus,
    /// Trait ids that entered the computation. Shared: every individual with the same
    /// observation pattern holds the one list of the pattern cache (a million individuals'
    /// own copies took about 300 MB).
    pub traits_used: Arc<[String]>,
    /// ln P(evidence | female), where the block defines it (not for equations); NaN where
    /// not (read through [`BlockEvidence::ln_l_female`]). A plain number rather than an
    /// `Option` keeps a block's evidence 16 bytes smaller: 80 MB over a million individuals'
    /// five blocks.
    #[serde(serialize_with = "nan_as_none")]
    pub(crate) ln_l_female: f64,
    /// ln P(evidence | male), as `ln_l_female`.
    #[serde(serialize_with = "nan_as_none")]
    pub(crate) ln_l_male: f64,
    /// ln LR(F:M) = ln P(evidence | female) − ln P(evidence | male); 0 when not used.
    pub ln_lr: f64,
    /// Estimated absolute numerical error of `ln_lr`.
    pub error: f64,
    /// A short note (equation used, reason not used); the fixed notes are not copied per
    /// individual.
    pub note: Cow<'static, str>,
}

/// Equal field by field, a likelihood the block does not define (NaN) equal to another such.
impl PartialEq for BlockEvidence {
    fn eq(&self, other: &Self) -> bool {
        self.status == other.status
            && self.traits_used == other.traits_used
            && self.ln_l_female() == other.ln_l_female()
            && self.ln_l_male() == other.ln_l_male()
            && self.ln_lr == other.ln_lr
            && self.error == other.error
            && self.note == other.note
    }
}

/// A likelihood held as NaN where the block defines none, written as none.
fn nan_as_none<S: serde::Serializer>(x: &f64, s: S) -> Result<S::Ok, S::Error> {
    serde::Serialize::serialize(&(!x.is_nan()).then_some(*x), s)
}

impl BlockEvidence {
    /// ln P(evidence | female), where the block defines it (not for equations).
    pub fn ln_l_female(&self) -> Option<f64> {
        (!self.ln_l_female.is_nan()).then_some(self.ln_l_female)
    }

    /// ln P(evidence | male), where the block defines it.
    pub fn ln_l_male(&self) -> Option<f64> {
        (!self.ln_l_male.is_nan()).then_some(self.ln_l_male)
    }

    /// A block that contributes nothing (LR = 1).
    pub fn not_used(status: BlockStatus, note: impl Into<Cow<'static, str>>) -> BlockEvidence {
        BlockEvidence {
            status,
            traits_used: Arc::from([]),
            ln_l_female: f64::NAN,
            ln_l_male: f64::NAN,
            ln_lr: 0.0,
            error: 0.0,
            note: note.into(),
        }
    }

    /// A block with likelihoods under each sex.
    pub fn from_likelihoods(
        traits_used: impl Into<Arc<[String]>>,
        ln_f: f64,
        ln_m: f64,
        error: f64,
    ) -> BlockEvidence {
        if !(ln_f.is_finite() && ln_m.is_finite()) {
            // A box of probability zero under one sex would give an infinite LR: that means
            // the observation is impossible under the model, which a person must look at.
            return BlockEvidence {
                traits_used: traits_used.into(),
                ..BlockEvidence::not_used(
                    BlockStatus::NumericalFailure,
                    "the observations have zero probability under the model for one sex",
                )
            };
        }
        BlockEvidence {
            status: BlockStatus::Used,
            traits_used: traits_used.into(),
            ln_l_female: ln_f,
            ln_l_male: ln_m,
            ln_lr: ln_f - ln_m,
            error,
            note: Cow::Borrowed(""),
        }
    }
}

/// Run-wide settings every block evaluation sees.
#[derive(Debug, Clone, PartialEq)]
pub struct Context {
    /// The run's seed.
    pub seed: u64,
    /// Settings of the randomised integration.
    pub qmc: QmcSettings,
}

impl Context {
    /// A context with default integration settings.
    pub fn new(seed: u64) -> Context {
        Context {
            seed,
            qmc: QmcSettings::default(),
        }
    }

    /// The seed of one random stream, derived from the run seed, the pattern of evidence
    /// (what was observed, not who), the block and the sex — so results do not depend on
    /// row order or thread count, and identical patterns give identical results (which lets
    /// a run compute each pattern once).
    pub fn seed_for(&self, pattern: &str, block: &str, sex: Sex) -> u64 {
        // FNV-1a over the parts, then a SplitMix64 finaliser.
        let mut h: u64 = 0xcbf2_9ce4_8422_2325 ^ self.seed;
        let mut eat = |bytes: &[u8]| {
            for &b in bytes {
                h ^= u64::from(b);
                h = h.wrapping_mul(0x0100_0000_01b3);
            }
            h ^= 0xff;
            h = h.wrapping_mul(0x0100_0000_01b3);
        };
        eat(pattern.as_bytes());
        eat(block.as_bytes());
        eat(match sex {
            Sex::Female => b"F",
            Sex::Male => b"M",
        });
        let mut z = h.wrapping_add(0x9e37_79b9_7f4a_7c15);
        z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
        z ^ (z >> 31)
    }
}
