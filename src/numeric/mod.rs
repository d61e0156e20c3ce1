//! Numerical building blocks: the normal distribution in log space, multivariate normal
//! box probabilities, proportions' intervals and the convergence diagnostics of chains.

pub mod box_rules;
pub mod log_concave;
pub mod mcmc;
pub mod mvn;
pub mod normal;
pub mod proportion;
pub mod quadrature;

pub use mvn::{ln_box_probability, LnProbability, MvnError, QmcSettings};
