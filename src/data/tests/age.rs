//! Unit tests of `data/age.rs`.

use super::*;

fn years(low: f64, high: Option<f64>) -> AgeAtDeath {
    AgeAtDeath::Years { low, high }
}

#[test]
fn ages_as_recorded() {
    assert_eq!(parse_age("34", false), Ok(years(34.0, Some(34.0))));
    assert_eq!(parse_age("25-35", false), Ok(years(25.0, Some(35.0))));
    assert_eq!(parse_age("25 – 35", false), Ok(years(25.0, Some(35.0))));
    assert_eq!(parse_age("25 to 35", false), Ok(years(25.0, Some(35.0))));
    assert_eq!(parse_age("50+", false), Ok(years(50.0, None)));
    assert_eq!(parse_age("17,5", true), Ok(years(17.5, Some(17.5))));
    assert_eq!(parse_age("Adult", false), Ok(AgeAtDeath::Adult));
    assert_eq!(parse_age("SUBADULT", false), Ok(AgeAtDeath::Subadult));
    assert!(parse_age("35-25", false)
        .unwrap_err()
        .contains("low to high"));
    assert!(parse_age("130", false).is_err());
    assert!(parse_age("old", false).is_err());
    assert!(parse_age("-3", false).is_err());
}

#[test]
fn maturity_against_the_minimum_age() {
    let m = |a: AgeAtDeath| a.maturity(ADULT_AGE_YEARS);
    assert_eq!(m(years(18.0, Some(18.0))), Maturity::Adult);
    assert_eq!(m(years(12.0, Some(15.0))), Maturity::Subadult);
    assert_eq!(m(years(15.0, Some(25.0))), Maturity::Unknown);
    assert_eq!(m(years(15.0, None)), Maturity::Unknown);
    assert_eq!(m(AgeAtDeath::Adult), Maturity::Adult);
}

#[test]
fn known_sex_words() {
    assert_eq!(parse_known_sex(" Female "), Some(Sex::Female));
    assert_eq!(parse_known_sex("m"), Some(Sex::Male));
    assert_eq!(parse_known_sex("PF"), None);
}
