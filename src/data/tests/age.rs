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

#[test]
fn the_trade_s_ways_of_writing_an_age() {
    assert_eq!(parse_age("40±5", false), Ok(years(35.0, Some(45.0))));
    assert_eq!(parse_age("40 +/- 5", false), Ok(years(35.0, Some(45.0))));
    assert_eq!(parse_age("3±5", false), Ok(years(0.0, Some(8.0))));
    assert_eq!(parse_age("17,5±2,5", true), Ok(years(15.0, Some(20.0))));
    // Buikstra & Ubelaker (1994): young adult 20–35, middle 35–50, old 50+ (open).
    assert_eq!(parse_age("Young adult", false), Ok(years(20.0, Some(35.0))));
    assert_eq!(
        parse_age("middle  adult", false),
        Ok(years(35.0, Some(50.0)))
    );
    assert_eq!(parse_age("old adult", false), Ok(years(50.0, None)));
    assert_eq!(
        parse_age("adult, age unknown", false),
        Ok(AgeAtDeath::Adult)
    );
    assert_eq!(
        parse_age("Adult (age unknown)", false),
        Ok(AgeAtDeath::Adult)
    );
    assert!(parse_age("40±x", false).is_err());
    assert!(parse_age("elderly", false)
        .unwrap_err()
        .contains("young / middle / old adult"));
}

#[test]
fn a_laboratory_s_own_age_words() {
    let map =
        parse_age_map("Adultus: 20-40\nmaturus: 40-60\nsenilis: 60+\n\"adult?\": adult\n").unwrap();
    assert_eq!(map["adultus"], years(20.0, Some(40.0)));
    assert_eq!(map["senilis"], years(60.0, None));
    assert_eq!(map["adult?"], AgeAtDeath::Adult);
    let e = parse_age_map("adultus: 40-20\ninfans: [0, 6]\n").unwrap_err();
    assert!(e.contains("`adultus`") && e.contains("`infans`"), "{e}");
}
