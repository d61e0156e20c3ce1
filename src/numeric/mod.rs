//! Numerical building blocks: the normal distribution in log space and multivariate normal
//! box probabilities.

pub mod mvn;
pub mod normal;
pub mod proportion;

pub use mvn::{ln_box_probability, LnProbability, MvnError, QmcSettings};
