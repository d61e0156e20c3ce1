//! Blocks taken from another model: a model file may name blocks of a shipped model (or of
//! another model file) and use them as its own, so that a model fitted to a reference
//! collection without DNA can still weigh read counts with the shipped DNA block.
//!
//! ```yaml
//! include:
//!   - model: default          # a shipped model (default), or a file beside this one
//!     blocks: [dna]
//! ```
//!
//! The included blocks come after the model's own, in the order named. An included model may
//! not include others (one level, so there is no cycle). Both provenances are kept: the
//! including model's provenance is followed by each included model's, with its SHA-256.

use super::spec::{RawBlock, RawModel};
use super::{ModelProblem, DEFAULT_MODEL_YAML};
use serde::{Deserialize, Serialize};
use std::path::Path;

/// One `include:` entry as written.
#[derive(Debug, Clone, PartialEq, Eq, Deserialize, Serialize)]
#[serde(deny_unknown_fields)]
pub struct RawInclude {
    /// `default` (the shipped model), or a model file, relative to the including file.
    pub model: String,
    /// Ids of the blocks to take.
    pub blocks: Vec<String>,
}

/// Where included blocks came from.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct IncludedFrom {
    /// The model as named in `include:`.
    pub model: String,
    /// Its name inside the file.
    pub name: String,
    /// SHA-256 of its text.
    pub sha256: String,
    /// The blocks taken.
    pub blocks: Vec<String>,
    /// Its provenance.
    pub provenance: String,
}

/// The text of a model named in `include:`: a shipped model, or a file relative to `base`
/// (the including file's folder; none for a model given as text only).
fn included_text(name: &str, base: Option<&Path>) -> Result<(String, String), String> {
    if name == "default" {
        return Ok((
            "models/default.yaml (embedded)".into(),
            DEFAULT_MODEL_YAML.into(),
        ));
    }
    let Some(base) = base else {
        return Err(format!(
            "`{name}`: only the shipped model `default` can be included by a model that is not read from a file"
        ));
    };
    let path = base.join(name);
    crate::limits::read_settings_text(&path)
        .map(|t| (path.display().to_string(), t))
        .map_err(|e| format!("`{name}`: {e}"))
}

/// Add the blocks (and the trait definitions they may need) that `raw.include` names to
/// `raw`, and say where they came from. Problems (an unknown model or block, an included
/// model that includes others, a block id already used) go to `problems`.
pub(crate) fn resolve(
    raw: &mut RawModel,
    base: Option<&Path>,
    problems: &mut Vec<ModelProblem>,
) -> Vec<IncludedFrom> {
    let mut from = Vec::new();
    for (i, inc) in std::mem::take(&mut raw.include).iter().enumerate() {
        let place = format!("include {} (`{}`)", i + 1, inc.model);
        let mut fail = |message: String| {
            problems.push(ModelProblem {
                place: place.clone(),
                message,
            })
        };
        let (file, text) = match included_text(&inc.model, base) {
            Ok(t) => t,
            Err(m) => {
                fail(m);
                continue;
            }
        };
        if let Err(m) = crate::limits::check_yaml(&text) {
            fail(format!("{file}: {m}"));
            continue;
        }
        let other: RawModel = match serde_yaml::from_str(&text) {
            Ok(m) => m,
            Err(e) => {
                fail(format!("{file}: not a valid model document: {e}"));
                continue;
            }
        };
        if !other.include.is_empty() {
            fail(format!(
                "{file} includes other models itself; include only models that do not (one level)"
            ));
            continue;
        }
        if inc.blocks.is_empty() {
            fail("name the blocks to take (`blocks: [dna]`)".into());
        }
        for id in &inc.blocks {
            let Some(b) = other.blocks.iter().find(|b| b.id() == id) else {
                fail(format!(
                    "no block `{id}` in {file}; its blocks are {}",
                    other
                        .blocks
                        .iter()
                        .map(RawBlock::id)
                        .collect::<Vec<_>>()
                        .join(", ")
                ));
                continue;
            };
            if raw.blocks.iter().any(|o| o.id() == id) {
                fail(format!(
                    "block `{id}` is already a block of this model; block ids must be unique"
                ));
                continue;
            }
            raw.blocks.push(b.clone());
        }
        for t in other.traits {
            if !raw.traits.iter().any(|o| o.id == t.id) {
                raw.traits.push(t);
            }
        }
        from.push(IncludedFrom {
            model: inc.model.clone(),
            name: other.name,
            sha256: crate::data::sha256_hex(text.as_bytes()),
            blocks: inc.blocks.clone(),
            provenance: other.provenance,
        });
    }
    from
}

/// The including model's provenance followed by every included model's.
pub(crate) fn joined_provenance(own: &str, from: &[IncludedFrom]) -> String {
    let mut s = own.trim_end().to_string();
    for f in from {
        s.push_str(&format!(
            "\n\nBlocks {} taken from model `{}` ({}, SHA-256 {}). Its provenance:\n{}",
            f.blocks.join(", "),
            f.name,
            f.model,
            f.sha256,
            f.provenance.trim_end()
        ));
    }
    s
}

#[cfg(test)]
mod tests {
    use crate::model::{Block, Model};

    const OWN: &str = "name: mine\nprovenance: A hand-written test model, values invented.\nblocks:\n  - id: cranium\n    type: latent\n    traits:\n      - {id: glabella, thresholds: [-1.3, -0.45, 0.45, 1.3], mean: {female: -1, male: 1}}\n";

    #[test]
    fn the_shipped_dna_block_is_taken_with_both_provenances() {
        let text = format!("{OWN}include:\n  - model: default\n    blocks: [dna]\n");
        let m = Model::from_yaml("mine.yaml", &text).unwrap();
        assert_eq!(m.blocks.len(), 2);
        assert!(matches!(m.blocks[1], Block::Dna(_)));
        assert!(m.provenance.starts_with("A hand-written test model"));
        assert!(m
            .provenance
            .contains("Blocks dna taken from model `default`"));
        assert!(m.provenance.contains("Skoglund"), "{}", m.provenance);
        assert_eq!(
            m.included[0].sha256,
            crate::data::sha256_hex(super::DEFAULT_MODEL_YAML.as_bytes())
        );
    }

    #[test]
    fn every_include_problem_is_listed() {
        let text = format!(
            "{OWN}include:\n  - model: default\n    blocks: [dna, nosuch, cranium]\n  - model: other.yaml\n    blocks: [dna]\n"
        );
        let e = Model::from_yaml("mine.yaml", &text)
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("no block `nosuch`") && e.contains("cranium, pelvis"),
            "{e}"
        );
        assert!(
            e.contains("block `cranium` is already a block of this model"),
            "{e}"
        );
        assert!(e.contains("only the shipped model `default`"), "{e}");
    }

    #[test]
    fn a_file_beside_the_model_can_be_included_one_level_deep() {
        let dir = tempfile::tempdir().unwrap();
        let dna_only = "name: lab-dna\nprovenance: Our laboratory's Y fractions (invented for a test).\nblocks:\n  - id: reads\n    type: dna\n    female: {alpha: 1, beta: 400}\n    male: {alpha: 90, beta: 910}\n";
        std::fs::write(dir.path().join("lab-dna.yaml"), dna_only).unwrap();
        let path = dir.path().join("mine.yaml");
        std::fs::write(
            &path,
            format!("{OWN}include:\n  - model: lab-dna.yaml\n    blocks: [reads]\n"),
        )
        .unwrap();
        let m = Model::from_path(&path).unwrap();
        assert!(matches!(&m.blocks[1], Block::Dna(d) if d.beta[0] == (1.0, 400.0)));
        // An included model that includes others is refused.
        let nested = format!("{dna_only}include:\n  - model: default\n    blocks: [pelvis]\n");
        std::fs::write(dir.path().join("lab-dna.yaml"), nested).unwrap();
        let e = Model::from_path(&path).unwrap_err().to_string();
        assert!(e.contains("one level"), "{e}");
    }
}
