//! The trait catalogue: every trait an input column may name, as data.
//!
//! The catalogue is a YAML document (`models/traits.yaml`, embedded in the binary) that maps
//! onto [`RawCatalogue`]; [`Catalogue::from_raw`] validates it into the types the rest of the
//! engine uses. Model files carry a `traits:` list of the same form to add traits of their own.

mod raw;

pub use raw::{RawCatalogue, RawTrait};

use serde::Serialize;
use std::collections::HashMap;
use std::fmt;

/// The shipped catalogue, embedded at build time.
pub const DEFAULT_CATALOGUE_YAML: &str = include_str!("../../models/traits.yaml");

/// Column names with a fixed meaning that no trait may take.
pub const RESERVED_COLUMNS: &[&str] = &["id", "group", "age", "known_sex"];

/// The body region (or evidence source) a trait belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Region {
    /// Skull and mandible.
    Cranium,
    /// Os coxae.
    Pelvis,
    /// Long bones and the rest of the postcranial skeleton.
    Postcranial,
    /// Teeth.
    Dental,
    /// Ancient-DNA read counts.
    Dna,
}

impl Region {
    /// All regions in reporting order.
    pub const ALL: [Region; 5] = [
        Region::Cranium,
        Region::Pelvis,
        Region::Postcranial,
        Region::Dental,
        Region::Dna,
    ];

    /// The lower-case word used in files.
    pub fn as_str(self) -> &'static str {
        match self {
            Region::Cranium => "cranium",
            Region::Pelvis => "pelvis",
            Region::Postcranial => "postcranial",
            Region::Dental => "dental",
            Region::Dna => "dna",
        }
    }

    /// Whether evidence from this region is morphological (age-limited) rather than genetic.
    pub fn is_morphological(self) -> bool {
        !matches!(self, Region::Dna)
    }

    fn parse(word: &str) -> Option<Region> {
        Region::ALL.into_iter().find(|r| r.as_str() == word)
    }
}

impl fmt::Display for Region {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// What kind of value a trait records.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
pub enum TraitKind {
    /// An ordinal score on the integer scale `lowest..=highest`.
    Ordinal {
        /// Lowest grade of the scale.
        lowest: i32,
        /// Highest grade of the scale.
        highest: i32,
    },
    /// A measurement with a unit and a plausible range used to catch typing and unit errors.
    Metric {
        /// Unit of measurement (e.g. `mm`).
        unit: String,
        /// Smallest plausible value.
        low: f64,
        /// Largest plausible value.
        high: f64,
    },
    /// A non-negative count (sequencing reads).
    Count,
}

impl TraitKind {
    /// Number of grades of an ordinal scale; `None` for other kinds.
    pub fn n_grades(&self) -> Option<usize> {
        match self {
            TraitKind::Ordinal { lowest, highest } => Some((highest - lowest + 1) as usize),
            _ => None,
        }
    }
}

/// One validated trait definition.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraitDef {
    /// Column name in input tables.
    pub id: String,
    /// The trait's name in the trade.
    pub name: String,
    /// Body region.
    pub region: Region,
    /// Scored on each side (`<id>_l`, `<id>_r` columns allowed).
    pub bilateral: bool,
    /// What is recorded.
    #[serde(flatten)]
    pub kind: TraitKind,
    /// One-line definition.
    pub definition: String,
    /// Published standard for scoring or measuring.
    pub source: String,
}

/// A problem in a catalogue document.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum CatalogueError {
    /// The YAML could not be parsed into the schema.
    #[error("trait catalogue is not valid YAML for the schema: {0}")]
    Yaml(String),
    /// A trait entry is invalid.
    #[error("trait `{id}`: {reason}")]
    InvalidTrait {
        /// The trait id as written.
        id: String,
        /// What is wrong.
        reason: String,
    },
    /// Two entries share an id.
    #[error("trait `{0}` is defined twice")]
    DuplicateTrait(String),
}

/// The validated set of traits, in a fixed order (the order of the document).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Catalogue {
    traits: Vec<TraitDef>,
    #[serde(skip)]
    index: HashMap<String, usize>,
}

impl Catalogue {
    /// The shipped catalogue (`models/traits.yaml`, embedded).
    ///
    /// # Errors
    /// Never for a released build (a unit test loads it); typed so that no panic is reachable.
    pub fn standard() -> Result<Catalogue, CatalogueError> {
        Catalogue::from_yaml(DEFAULT_CATALOGUE_YAML)
    }

    /// Parse and validate a catalogue document.
    ///
    /// # Errors
    /// [`CatalogueError`] when the YAML does not fit the schema or an entry is invalid.
    pub fn from_yaml(text: &str) -> Result<Catalogue, CatalogueError> {
        let raw: RawCatalogue =
            serde_yaml::from_str(text).map_err(|e| CatalogueError::Yaml(e.to_string()))?;
        Catalogue::from_raw(raw)
    }

    /// Validate a raw catalogue.
    ///
    /// Rules: ids are lower-case `[a-z0-9_]`, start with a letter, do not end in `_l`/`_r`
    /// and are not reserved column names; ordinal scales have at least two grades; metric
    /// ranges are finite with `0 < low < high`.
    ///
    /// # Errors
    /// [`CatalogueError`] naming the first invalid entry.
    pub fn from_raw(raw: RawCatalogue) -> Result<Catalogue, CatalogueError> {
        let mut cat = Catalogue {
            traits: Vec::new(),
            index: HashMap::new(),
        };
        for t in raw.traits {
            cat.push(t)?;
        }
        Ok(cat)
    }

    /// Add the traits of another raw list (e.g. a model's own `traits:`).
    ///
    /// # Errors
    /// [`CatalogueError`] when an entry is invalid or its id already exists.
    pub fn extend(&mut self, more: Vec<RawTrait>) -> Result<(), CatalogueError> {
        for t in more {
            self.push(t)?;
        }
        Ok(())
    }

    fn push(&mut self, t: RawTrait) -> Result<(), CatalogueError> {
        let def = t.validate()?;
        if self.index.contains_key(&def.id) {
            return Err(CatalogueError::DuplicateTrait(def.id));
        }
        self.index.insert(def.id.clone(), self.traits.len());
        self.traits.push(def);
        Ok(())
    }

    /// All traits in catalogue order.
    pub fn traits(&self) -> &[TraitDef] {
        &self.traits
    }

    /// Number of traits.
    pub fn len(&self) -> usize {
        self.traits.len()
    }

    /// Whether the catalogue is empty.
    pub fn is_empty(&self) -> bool {
        self.traits.is_empty()
    }

    /// Look a trait up by id.
    pub fn get(&self, id: &str) -> Option<&TraitDef> {
        self.index.get(id).map(|&i| &self.traits[i])
    }

    /// Position of a trait in catalogue order.
    pub fn position(&self, id: &str) -> Option<usize> {
        self.index.get(id).copied()
    }
}

pub(crate) fn valid_id(id: &str) -> Result<(), String> {
    let mut chars = id.chars();
    match chars.next() {
        Some(c) if c.is_ascii_lowercase() => {}
        _ => return Err("an id starts with a lower-case letter".into()),
    }
    if !id
        .chars()
        .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_')
    {
        return Err("an id uses only a-z, 0-9 and _".into());
    }
    if id.ends_with("_l") || id.ends_with("_r") {
        return Err("an id may not end in _l or _r (those mark sides)".into());
    }
    if RESERVED_COLUMNS.contains(&id) {
        return Err(format!("`{id}` is a reserved column name"));
    }
    Ok(())
}

pub(crate) fn parse_region(word: &str) -> Option<Region> {
    Region::parse(word)
}

#[cfg(test)]
#[path = "tests/catalogue.rs"]
mod tests;
