//! Commingled and element-level remains: a table whose rows are skeletal elements (a
//! cranium, a left femur, a right os coxae), not individuals.
//!
//! Each element gets a sex posterior from its own traits and measurements (the model's blocks
//! evaluated on what the element carries), and per element type and side the number of
//! elements of each sex over joint posterior draws — the minimum number of individuals (MNI)
//! by sex, with its uncertainty. The assemblage's proportion female is estimated from one
//! element type and side only, the one whose elements carry most information about it:
//! within one type and side every element is a different person, whereas counting
//! several types would count people more than once. Elements the excavation associates with
//! one individual (`individual`, with an `association` probability) share one sex in every
//! draw in which they belong together.
//!
//! MNI as the larger of the left and right counts of an element type (White 1953, from
//! memory; common practice), here by sex and in every draw.

pub mod analysis;
pub mod read;

pub use analysis::{
    analyse_elements, CommingledResult, CountSummary, ElementError, ElementOptions, ElementResult,
    MniResult, UnitResult,
};
pub use read::{read_elements, ElementRecord, ElementSide, ElementTable};
