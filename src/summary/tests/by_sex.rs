//! Unit tests of `summary/by_sex.rs`.

use super::*;
use rand::SeedableRng;
use rand_chacha::ChaCha8Rng;

/// With every sex certain (P(F) 0 or 1) age by sex equals the plain means and counts.
#[test]
fn certain_sexes_give_plain_counts() {
    let sexes = vec![true, true, false, false, false];
    let draws = vec![sexes.clone(); 50];
    let ages = [
        Some((30.0, 30.0)),
        Some((40.0, 40.0)),
        Some((20.0, 20.0)),
        Some((60.0, 60.0)),
        None,
    ];
    let classes = crate::summary::AgeClasses::parse(DEFAULT_AGE_CLASSES).unwrap();
    let a = age_by_sex(&ages, &draws, &classes, 1);
    assert_eq!(a.mean_female.0, 35.0);
    assert_eq!(a.mean_male.0, 40.0);
    assert_eq!(a.p_females_die_younger, 1.0);
    assert_eq!(a.classes[2].female.0, 1.0); // 25-35: the female aged 30
}

#[test]
fn categories_by_age_class() {
    let classes = crate::summary::AgeClasses::parse(DEFAULT_AGE_CLASSES).unwrap();
    let rows = category_by_age(
        &[Some((20.0, 30.0)), None, Some((50.0, 80.0))],
        &[Category::Female, Category::Male, Category::NotEstimable],
        &classes,
        &[false; 3],
    );
    assert_eq!(rows[0].0, "under 18");
    assert_eq!(rows[2].1[0], 1);
    assert_eq!(rows[5].1[4], 1);
    assert_eq!(rows[4].1[5], 1);
    // A laboratory's own classes: the trade's young, middle and old adult (Buikstra &
    // Ubelaker 1994), under 20 first.
    let own = crate::summary::AgeClasses::parse("0-20,20-35,35-50,50+").unwrap();
    let rows = category_by_age(
        &[Some((20.0, 30.0)), Some((10.0, 12.0)), Some((50.0, 80.0))],
        &[Category::Female, Category::Male, Category::NotEstimable],
        &own,
        &[false; 3],
    );
    let labels: Vec<&str> = rows.iter().map(|r| r.0.as_str()).collect();
    assert_eq!(labels, ["under 20", "20-35", "35-50", "50+", "unknown"]);
    assert_eq!(rows[0].1[4], 1);
    assert_eq!(rows[1].1[0], 1);
    assert_eq!(rows[3].1[5], 1);
    // An adult of unknown age is a state of its own, not spread over the classes.
    let rows = category_by_age(
        &[Some((18.0, 80.0)), None],
        &[Category::Female, Category::Male],
        &own,
        &[true, false],
    );
    assert_eq!(rows[4].0, "adult of unknown age");
    assert_eq!(rows[4].1[0], 1);
    assert_eq!(rows[5].1[4], 1);
}

/// Open classes are not closed at an invented age where the draw has older known ages of the
/// same sex: they take one of those (hot-deck); without any, the old closure at 80 stays.
#[test]
fn open_classes_take_known_older_ages_of_the_same_sex() {
    let ages = [
        Some((60.0, 60.0)),          // female, known
        Some((70.0, 70.0)),          // female, known
        Some((30.0, 30.0)),          // female, known, younger than 50
        Some((50.0, f64::INFINITY)), // female, 50+
        Some((18.0, f64::INFINITY)), // female, adult of unknown age
        Some((50.0, f64::INFINITY)), // male, 50+: no male donor
    ];
    let female = [true, true, true, true, true, false];
    let mut rng = ChaCha8Rng::seed_from_u64(9);
    let mut from_donors = [0usize; 2];
    for _ in 0..400 {
        let d = draw_ages(&ages, &female, &mut rng);
        let a = |i: usize| d[i].unwrap();
        assert!(a(3) == 60.0 || a(3) == 70.0, "{}", a(3));
        assert!([60.0, 70.0, 30.0].contains(&a(4)), "{}", a(4));
        assert!((50.0..=80.0).contains(&a(5)));
        from_donors[0] += usize::from(a(4) == 30.0);
        from_donors[1] += usize::from(a(5) != 60.0 && a(5) != 70.0);
    }
    // Each donor equally likely: the 30-year-old about a third of the time.
    assert!((100..170).contains(&from_donors[0]), "{from_donors:?}");
    assert_eq!(from_donors[1], 400);
}

/// A drawn age stays within its recorded interval and below the interval's end (to within
/// rounding of it), a point stays a point, open classes take their donors' ages, and an
/// interval inside one class keeps its class whatever the draw.
#[test]
fn the_plan_bounds_every_drawn_age() {
    use super::super::age_draws::{AgePlan, Donors, DrawnAges};
    let ages = [
        Some((35.0, 50.0)),
        Some((40.0, 40.0)),
        Some((50.0, f64::INFINITY)),
        None,
        Some((18.0, 25.0)),
    ];
    let plan = AgePlan::new(&ages);
    assert_eq!(plan.individuals(), &[0, 1, 2, 4]);
    let classes = super::super::AgeClasses::parse(DEFAULT_AGE_CLASSES).unwrap();
    let bounds = class_bounds(&classes);
    let mut rng = ChaCha8Rng::seed_from_u64(5);
    let (mut out, mut donors) = (DrawnAges::default(), Donors::default());
    let mut highest: f64 = 0.0;
    for _ in 0..2000 {
        plan.draw(&|i| i % 2 == 0, &mut rng, &mut out, &mut donors);
        let a = &out.age;
        assert!((35.0..50.0).contains(&a[0]), "{}", a[0]);
        assert_eq!(class_index(&bounds, a[0]), 3);
        assert_eq!(a[1], 40.0);
        // The only female donor at or above 50 is none: entry 0 (35-50) is below; so the
        // open class keeps its own uniform age from 50 to the closing age.
        assert!((50.0..OPEN_CLASS_END).contains(&a[2]), "{}", a[2]);
        assert!((18.0..25.0).contains(&a[3]));
        highest = highest.max(a[0]);
    }
    assert!(highest > 49.9, "{highest}");
    // The largest uniform number a generator can give: 35 + u·15 rounds to 50 itself, an
    // age of the next class; the draw keeps it below.
    let u = (1.0 - f64::EPSILON / 2.0) * 15.0_f64;
    assert_eq!(35.0 + u, 50.0, "the case the bound is for");
    plan.draw(&|_| true, &mut Largest, &mut out, &mut donors);
    assert!(
        out.age[0] < 50.0 && out.age[0] > 50.0 - 1e-13,
        "{}",
        out.age[0]
    );
    assert_eq!(class_index(&bounds, out.age[0]), 3);
    assert!(out.age[3] < 25.0);
}

/// A generator giving only its largest numbers (every bit set).
struct Largest;

impl rand::TryRng for Largest {
    type Error = std::convert::Infallible;
    fn try_next_u32(&mut self) -> Result<u32, Self::Error> {
        Ok(u32::MAX)
    }
    fn try_next_u64(&mut self) -> Result<u64, Self::Error> {
        Ok(u64::MAX)
    }
    fn try_fill_bytes(&mut self, dst: &mut [u8]) -> Result<(), Self::Error> {
        dst.fill(u8::MAX);
        Ok(())
    }
}
