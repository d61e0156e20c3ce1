//! Analyses by sex over the joint draws, so that the uncertainty in every individual's sex
//! is carried into age at death, prevalence of conditions (from the joint posterior of sex
//! and prevalence, so that the comparison is not diluted), and the tables of a publication.
//!
//! Outcome columns (age, conditions) are never evidence of sex: using them would make the
//! comparison circular (a grave good or a lesion read as "male" would then "show" that males
//! have it).

pub mod age_draws;
pub mod by_sex;
pub mod hazard;
pub mod life_table;
pub mod numeric;
pub mod prevalence;
pub mod sex_ratio;

pub use by_sex::{
    age_and_life_tables, age_by_sex, category_by_age, outcome_column, AgeBySex, AgeClassRow,
    OutcomeColumn, OutcomeValues, DEFAULT_AGE_CLASSES, OPEN_CLASS_END,
};
pub use hazard::{hazards_by_sex, HazardsBySex, DEFAULT_HAZARD_AGES};
pub use life_table::{life_tables, AgeClasses, LifeTables, DEFAULT_LIFE_TABLE_CLASSES};
pub use numeric::{numeric_by_sex, NumericBySex};
pub use prevalence::{prevalence_by_sex, ChainLength, PrevalenceBySex, SexEvidence, SexRatioPrior};
pub use sex_ratio::{sex_ratio_tests, SexRatioTest, DEFAULT_REFERENCE_RATIO};
