//! Reading, validating and summarising input tables.
//!
//! One row per individual; the first row names the columns. `id` is required and unique;
//! `group`, `age` and `known_sex` are optional columns with a fixed meaning; trait columns are
//! named by trait ids (bilateral traits also as `<id>_l` / `<id>_r`); every other column is
//! carried through to the outputs unchanged. Every problem of a file is collected and reported
//! at once, before anything is computed.

pub mod age;
pub mod cell;
pub mod columns;
pub mod completeness;
pub mod observations;
pub mod problem;
pub mod profile;
pub mod reader;
pub mod settings;
pub mod source;

pub use age::{parse_age_map, AgeAtDeath, Maturity, Sex, ADULT_AGE_YEARS};
pub use cell::Observation;
pub use completeness::Completeness;
pub use observations::Observations;
pub use problem::{Problem, ProblemKind, Warning, WarningKind};
pub use profile::ColumnProfile;
pub use reader::{
    header_of_bytes, read_assemblage, read_assemblage_bytes, read_assemblage_text, sha256_hex,
    Assemblage, Individual, InputError, SideUsed,
};
pub use settings::{ReadSettings, ScaleMap, SidePolicy, SideTolerance};
pub use source::TableFormat;
