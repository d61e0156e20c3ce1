//! Evidence models: blocks of traits, independent given sex, each giving ln L(female) and
//! ln L(male) for an individual's surviving evidence.
//!
//! A model file (`models/*.yaml`, schema in [`spec`]) is read into [`spec::RawModel`] and
//! validated once into a [`Model`]; every problem of the file is reported together.

pub mod dna;
pub mod dna_x;
pub mod equation;
pub mod evidence;
pub mod include;
pub mod latent;
pub mod spec;

pub use dna::DnaBlock;
pub use dna_x::DnaXBlock;
pub use equation::{Equation, EquationBlock};
pub use evidence::{BlockEvidence, BlockStatus, Context};
pub use latent::LatentBlock;

use crate::catalogue::{Catalogue, CatalogueError};
use crate::data::{Individual, Maturity, ADULT_AGE_YEARS};
use serde::Serialize;
use spec::{RawBlock, RawModel};
use std::fmt;

/// The default model, embedded in the binary (`models/default.yaml`).
pub const DEFAULT_MODEL_YAML: &str = include_str!("../../models/default.yaml");

/// One problem in a model file.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ModelProblem {
    /// Where: block and trait or equation.
    pub place: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl fmt::Display for ModelProblem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.place.is_empty() {
            write!(f, "{}", self.message)
        } else {
            write!(f, "{}: {}", self.place, self.message)
        }
    }
}

/// A model file that cannot be used: every problem found.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("model {file}: {}", problems.iter().map(|p| p.to_string()).collect::<Vec<_>>().join("; "))]
pub struct ModelError {
    /// The file (or `embedded default`).
    pub file: String,
    /// Every problem.
    pub problems: Vec<ModelProblem>,
}

/// One validated evidence block.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// Ordinal and metric traits through one latent normal per sex.
    Latent(LatentBlock),
    /// Published logistic equations.
    Equations(EquationBlock),
    /// DNA read counts: the Y fraction.
    Dna(DnaBlock),
    /// DNA read counts: X against the autosomes.
    DnaX(DnaXBlock),
}

impl Block {
    /// Block id.
    pub fn id(&self) -> &str {
        match self {
            Block::Latent(b) => &b.id,
            Block::Equations(b) => &b.id,
            Block::Dna(b) => &b.id,
            Block::DnaX(b) => &b.id,
        }
    }

    /// Block type word.
    pub fn kind(&self) -> &'static str {
        match self {
            Block::Latent(_) => "latent",
            Block::Equations(_) => "equations",
            Block::Dna(_) => "dna",
            Block::DnaX(_) => "dna_x",
        }
    }

    /// Whether the block's evidence is morphological (not used below the minimum age).
    pub fn is_morphological(&self) -> bool {
        !matches!(self, Block::Dna(_) | Block::DnaX(_))
    }

    /// The catalogue ids of the traits the block reads.
    pub fn trait_ids(&self) -> Vec<String> {
        match self {
            Block::Latent(b) => b.traits.iter().map(|t| t.id.clone()).collect(),
            Block::Equations(b) => {
                let mut v: Vec<String> = b
                    .equations
                    .iter()
                    .flat_map(|e| e.inputs.iter().cloned())
                    .collect();
                v.sort();
                v.dedup();
                v
            }
            Block::Dna(b) => b.ids.to_vec(),
            Block::DnaX(b) => b.ids.to_vec(),
        }
    }
}

/// A validated evidence model.
#[derive(Debug, Clone, PartialEq)]
pub struct Model {
    /// Short name.
    pub name: String,
    /// What it is for.
    pub description: String,
    /// Sources and caveats.
    pub provenance: String,
    /// Years below which morphological blocks are not used.
    pub minimum_age: f64,
    /// The catalogue: the standard traits plus the model's own.
    pub catalogue: Catalogue,
    /// Blocks in file order.
    pub blocks: Vec<Block>,
    /// The reference collection a fitted model was fitted to (`None` for a model written from
    /// published values).
    pub fitted_to: Option<spec::FitOrigin>,
    /// The publication whose summary statistics a model was built from (`None` for a model
    /// fitted to raw data or written by hand).
    pub built_from: Option<spec::SummaryOrigin>,
    /// SHA-256 of the model text.
    pub sha256: String,
    /// Models whose blocks this one includes.
    pub included: Vec<include::IncludedFrom>,
}

/// Latent-block evidence already computed in a run, by block and observation pattern. It can
/// be shared between threads: a pattern's result does not depend on who computes it first,
/// because its random streams are seeded from the pattern.
#[derive(Debug, Default)]
pub struct EvidenceCache {
    map: std::sync::Mutex<std::collections::HashMap<(usize, String), BlockEvidence>>,
}

impl EvidenceCache {
    /// Patterns held.
    pub fn len(&self) -> usize {
        self.map.lock().map(|m| m.len()).unwrap_or(0)
    }

    /// Whether empty.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    pub(crate) fn get_or_compute(
        &self,
        key: (usize, String),
        f: impl FnOnce() -> BlockEvidence,
    ) -> BlockEvidence {
        if let Ok(m) = self.map.lock() {
            if let Some(e) = m.get(&key) {
                return e.clone();
            }
        }
        let e = f();
        if let Ok(mut m) = self.map.lock() {
            m.insert(key, e.clone());
        }
        e
    }
}

/// Everything the model says about one individual.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct IndividualEvidence {
    /// One entry per block, in model order.
    pub blocks: Vec<BlockEvidence>,
    /// Σ ln LR over blocks.
    pub ln_lr: f64,
    /// Σ numerical error over blocks.
    pub error: f64,
    /// Traits that entered the computation.
    pub n_traits: usize,
    /// Whether any block contributed.
    pub estimable: bool,
    /// Age note (unknown age, below the minimum age); fixed texts, not copied per individual.
    pub note: std::borrow::Cow<'static, str>,
}

impl Model {
    /// The embedded default model.
    ///
    /// # Errors
    /// Never in a released build (a unit test loads it); typed for safety.
    pub fn default_model() -> Result<Model, ModelError> {
        Model::from_yaml("embedded default model", DEFAULT_MODEL_YAML)
    }

    /// Load a model file.
    ///
    /// # Errors
    /// [`ModelError`] listing every problem; unreadable files give one problem.
    pub fn from_path(path: &std::path::Path) -> Result<Model, ModelError> {
        let name = path.display().to_string();
        let text = crate::limits::read_settings_text(path).map_err(|e| ModelError {
            file: name.clone(),
            problems: vec![ModelProblem {
                place: String::new(),
                message: e.to_string(),
            }],
        })?;
        Model::from_yaml_in(&name, &text, path.parent())
    }

    /// Parse and validate a model document.
    ///
    /// # Errors
    /// [`ModelError`] listing every problem found.
    pub fn from_yaml(file: &str, text: &str) -> Result<Model, ModelError> {
        Model::from_yaml_in(file, text, None)
    }

    /// Parse and validate a model document whose `include:` files are relative to `base`.
    ///
    /// # Errors
    /// [`ModelError`] listing every problem found.
    pub fn from_yaml_in(
        file: &str,
        text: &str,
        base: Option<&std::path::Path>,
    ) -> Result<Model, ModelError> {
        let fail = |problems| ModelError {
            file: file.to_string(),
            problems,
        };
        crate::limits::check_yaml(text).map_err(|message| {
            fail(vec![ModelProblem {
                place: String::new(),
                message,
            }])
        })?;
        let mut raw: RawModel = serde_yaml::from_str(text).map_err(|e| {
            fail(vec![ModelProblem {
                place: String::new(),
                message: format!("not a valid model document: {e}"),
            }])
        })?;
        let mut problems = Vec::new();
        let included = include::resolve(&mut raw, base, &mut problems);
        let mut catalogue = Catalogue::standard().map_err(|e| {
            fail(vec![ModelProblem {
                place: "trait catalogue".into(),
                message: e.to_string(),
            }])
        })?;
        if let Err(e) = catalogue.extend(raw.traits.clone()) {
            let place = match &e {
                CatalogueError::InvalidTrait { id, .. } => format!("trait `{id}`"),
                _ => "traits".into(),
            };
            problems.push(ModelProblem {
                place,
                message: e.to_string(),
            });
        }
        if raw.provenance.trim().len() < 20 {
            problems.push(ModelProblem {
                place: "provenance".into(),
                message: "say where every parameter comes from, what is from memory and what is illustrative".into(),
            });
        }
        let minimum_age = raw.minimum_age.unwrap_or(ADULT_AGE_YEARS);
        if !(minimum_age.is_finite() && (0.0..=100.0).contains(&minimum_age)) {
            problems.push(ModelProblem {
                place: "minimum_age".into(),
                message: format!("years from 0 to 100, found {minimum_age}"),
            });
        }
        if raw.blocks.is_empty() {
            problems.push(ModelProblem {
                place: "blocks".into(),
                message: "a model needs at least one block".into(),
            });
        }
        let mut blocks = Vec::new();
        for (i, b) in raw.blocks.iter().enumerate() {
            let id = b.id();
            if let Err(m) = crate::catalogue::valid_id(id) {
                problems.push(ModelProblem {
                    place: format!("block {}", i + 1),
                    message: format!("block id `{id}`: {m}"),
                });
            }
            if raw.blocks[..i].iter().any(|o| o.id() == id) {
                problems.push(ModelProblem {
                    place: format!("block `{id}`"),
                    message: "block ids must be unique".into(),
                });
            }
            let block = match b {
                RawBlock::Latent(x) => {
                    LatentBlock::from_raw(x, &catalogue, &mut problems).map(Block::Latent)
                }
                RawBlock::Equations(x) => {
                    EquationBlock::from_raw(x, &catalogue, &mut problems).map(Block::Equations)
                }
                RawBlock::DnaX(x) => {
                    DnaXBlock::from_raw(x, &catalogue, &mut problems).map(Block::DnaX)
                }
                RawBlock::Dna(x) => {
                    DnaBlock::from_raw(x, &catalogue, &mut problems).map(Block::Dna)
                }
            };
            blocks.extend(block);
        }
        // Blocks are independent given sex: a trait may serve one block only. The one
        // exception is the X read count shared by a Y-fraction and an X:autosome block, which
        // `settle_dna` never lets count twice unless the model says so.
        for (i, a) in blocks.iter().enumerate() {
            for b in &blocks[i + 1..] {
                if matches!(
                    (a, b),
                    (Block::Dna(_), Block::DnaX(_)) | (Block::DnaX(_), Block::Dna(_))
                ) {
                    continue;
                }
                for t in a.trait_ids() {
                    if b.trait_ids().contains(&t) {
                        problems.push(ModelProblem {
                            place: format!("blocks `{}` and `{}`", a.id(), b.id()),
                            message: format!("trait `{t}` is in both; blocks are independent given sex, so its evidence would count twice"),
                        });
                    }
                }
            }
        }
        if !problems.is_empty() {
            return Err(fail(problems));
        }
        Ok(Model {
            name: raw.name,
            description: raw.description,
            provenance: include::joined_provenance(&raw.provenance, &included),
            minimum_age,
            catalogue,
            blocks,
            fitted_to: raw.fitted_to,
            built_from: raw.built_from,
            sha256: crate::data::sha256_hex(text.as_bytes()),
            included,
        })
    }

    /// Whether the individual's recorded age is below the model's minimum age (its
    /// morphological evidence is then not used).
    pub fn is_subadult(&self, ind: &Individual) -> bool {
        ind.age.map(|g| g.maturity(self.minimum_age)) == Some(Maturity::Subadult)
    }

    /// The same model with another minimum age for its morphological blocks (years, 0 to 100).
    ///
    /// # Errors
    /// A message when the age is not a number of years from 0 to 100.
    pub fn with_minimum_age(mut self, years: f64) -> Result<Model, String> {
        if !(years.is_finite() && (0.0..=100.0).contains(&years)) {
            return Err(format!("expected years from 0 to 100, found {years}"));
        }
        self.minimum_age = years;
        Ok(self)
    }

    /// How many individuals have a morphological score or measurement recorded but are
    /// certainly below the minimum age (a point age or a whole range below it, or "subadult"):
    /// their morphology is not used, only DNA. The rule: morphology is used unless the age at
    /// death is certainly below the minimum; a range reaching it (15–20 with 18) is used.
    pub fn scored_below_minimum_age(&self, a: &crate::data::Assemblage) -> usize {
        let morphological: std::collections::HashSet<String> = self
            .blocks
            .iter()
            .filter(|b| b.is_morphological())
            .flat_map(Block::trait_ids)
            .collect();
        let traits = self.catalogue.traits();
        a.individuals
            .iter()
            .filter(|ind| {
                self.is_subadult(ind)
                    && ind.observations.iter().enumerate().any(|(k, o)| {
                        o.is_some() && traits.get(k).is_some_and(|t| morphological.contains(&t.id))
                    })
            })
            .count()
    }

    /// Evidence that is recorded but that this model will not use: one message per catalogue
    /// trait that holds a value for at least one individual of `a` and that no block of the
    /// model reads (read counts under a fitted model without a DNA block, a catalogued trait
    /// the model leaves out). Nothing recorded may be dropped without a word.
    pub fn unused_evidence(&self, a: &crate::data::Assemblage) -> Vec<String> {
        let used: std::collections::HashSet<String> =
            self.blocks.iter().flat_map(Block::trait_ids).collect();
        let traits = self.catalogue.traits();
        // One pass over each individual's recorded traits (not one over everybody per trait of
        // the catalogue: most catalogue traits have no column).
        let mut recorded = vec![0usize; traits.len()];
        for ind in &a.individuals {
            for (k, _) in ind.observations.recorded() {
                if let Some(n) = recorded.get_mut(k) {
                    *n += 1;
                }
            }
        }
        (0..traits.len())
            .filter(|&k| !used.contains(&traits[k].id))
            .filter_map(|k| {
                let n = recorded[k];
                (n > 0).then(|| {
                    format!(
                        "`{}` is recorded for {n} individual{} but the model `{}` has no block that uses it: that evidence is left out (use a model with a block for it{})",
                        traits[k].id,
                        if n == 1 { "" } else { "s" },
                        self.name,
                        if traits[k].id.starts_with("dna_") {
                            ": copy the `dna` block of models/default.yaml into the model file"
                        } else {
                            ""
                        }
                    )
                })
            })
            .collect()
    }

    /// The rule between each X:autosome block and the model's Y-fraction blocks
    /// ([`dna_x::settle_with_y`]): the two ratios of one library are not counted as
    /// independent unless the model says so, and are flagged where they disagree.
    fn settle_dna(&self, blocks: &mut [BlockEvidence]) {
        for (kx, bx) in self.blocks.iter().enumerate() {
            let Block::DnaX(x) = bx else { continue };
            for (ky, by) in self.blocks.iter().enumerate() {
                if !matches!(by, Block::Dna(_)) {
                    continue;
                }
                let (lo, hi) = (kx.min(ky), kx.max(ky));
                let (first, second) = blocks.split_at_mut(hi);
                let (a, b) = (&mut first[lo], &mut second[0]);
                let (y, xe) = if ky < kx { (a, b) } else { (b, a) };
                dna_x::settle_with_y(y, xe, x.beside_y_ratio);
            }
        }
    }

    /// Evaluate every block for one individual. Morphological blocks are not used below the
    /// minimum age; DNA is used at any age.
    pub fn evaluate(&self, ind: &Individual, ctx: &Context) -> IndividualEvidence {
        self.evaluate_cached(ind, ctx, &EvidenceCache::default())
    }

    /// As [`Model::evaluate`], computing each latent block's evidence pattern once per cache.
    /// The results are the same as without the cache: a pattern's random streams are seeded
    /// from the pattern itself.
    pub fn evaluate_cached(
        &self,
        ind: &Individual,
        ctx: &Context,
        cache: &EvidenceCache,
    ) -> IndividualEvidence {
        let maturity = ind
            .age
            .map(|a| a.maturity(self.minimum_age))
            .unwrap_or(Maturity::Unknown);
        let mut blocks = Vec::with_capacity(self.blocks.len());
        for (k, b) in self.blocks.iter().enumerate() {
            let mut e = match b {
                Block::Latent(x) => match x.pattern(ind) {
                    Some(key) => cache.get_or_compute((k, key), || x.evaluate(ind, ctx)),
                    None => x.evaluate(ind, ctx),
                },
                Block::Equations(x) => x.evaluate(ind),
                Block::Dna(x) => x.evaluate(ind),
                Block::DnaX(x) => x.evaluate(ind),
            };
            if b.is_morphological()
                && maturity == Maturity::Subadult
                && e.status != BlockStatus::NoEvidence
            {
                e = BlockEvidence {
                    traits_used: std::sync::Arc::from([]),
                    ..BlockEvidence::not_used(
                        BlockStatus::BelowMinimumAge,
                        format!(
                            "below the model's minimum age ({} years) for morphological evidence",
                            self.minimum_age
                        ),
                    )
                };
            }
            blocks.push(e);
        }
        self.settle_dna(&mut blocks);
        let used = blocks.iter().filter(|b| b.status == BlockStatus::Used);
        let ln_lr = used.clone().map(|b| b.ln_lr).sum();
        let error = used.clone().map(|b| b.error).sum();
        let n_traits = used.clone().map(|b| b.traits_used.len()).sum();
        let estimable = used.count() > 0;
        let note = match maturity {
            Maturity::Subadult => "subadult: DNA only".into(),
            Maturity::Unknown if ind.age.is_some() => {
                "age range straddles the minimum age: treated as adult".into()
            }
            Maturity::Unknown => "age not recorded: treated as adult".into(),
            Maturity::Adult => "".into(),
        };
        IndividualEvidence {
            blocks,
            ln_lr,
            error,
            n_traits,
            estimable,
            note,
        }
    }
}

#[cfg(test)]
mod tests;
