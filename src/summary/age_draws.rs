//! Ages at death drawn once per joint draw, for the tables by sex (age by sex, life tables):
//! the recorded ages prepared once ([`AgePlan`]), each draw's ages drawn into buffers reused
//! from draw to draw, and the draws spread over threads with a random stream of their own,
//! so that the result is the same with any number of threads.
//!
//! A closed interval gives a uniform age within it (multiple imputation of interval ages,
//! Rubin 1987; points stay points). An open one (`50+`, `adult` of unknown age), having no
//! upper bound, is not closed at an invented age: it takes the age of an individual of the
//! same sex in this draw whose own closed interval gave an age at or above the open class's
//! start, chosen at random (hot-deck imputation, the distribution of the known ages above
//! that start within the draw's sex; Andridge & Little 2010, from memory). Only where no such
//! individual exists is the class closed at [`OPEN_CLASS_END`] (uniform from its start).

use super::by_sex::OPEN_CLASS_END;
use rand::{Rng, RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rayon::prelude::*;

/// The individuals with an age, in row order, prepared for drawing.
#[derive(Debug, Clone)]
pub struct AgePlan {
    /// (individual, start, end of the uniform draw, kind).
    entries: Vec<(usize, f64, f64, Kind)>,
    /// The distinct starts of the open classes.
    starts: Vec<f64>,
}

/// How an entry's age is drawn.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Kind {
    /// A point or closed interval: uniform within it, and a donor for open classes.
    Closed,
    /// An open class (the index of its start in [`AgePlan::starts`]): from a donor of the
    /// same sex at or above its start.
    Open(usize),
    /// An open class starting at or above [`OPEN_CLASS_END`]: its start (no donor).
    OpenAtEnd,
}

/// One draw's ages: (individual, age, the value `extra` drew right after it), in row order.
pub type DrawnAges = Vec<(usize, f64, f64)>;

impl AgePlan {
    /// The plan of `ages[i]` = (from, to) years, `to` infinite for an open class, `None`
    /// for no age (or not in the tables).
    pub fn new(ages: &[Option<(f64, f64)>]) -> AgePlan {
        let mut starts: Vec<f64> = Vec::new();
        let entries = ages
            .iter()
            .enumerate()
            .filter_map(|(i, a)| {
                let (lo, hi) = (*a)?;
                if hi.is_finite() {
                    return Some((i, lo, hi, Kind::Closed));
                }
                let end = OPEN_CLASS_END.max(lo);
                if end <= lo {
                    // An open class starting at or above the closing age: a point there.
                    return Some((i, lo, end, Kind::OpenAtEnd));
                }
                let k = match starts.iter().position(|s| s.to_bits() == lo.to_bits()) {
                    Some(k) => k,
                    None => {
                        starts.push(lo);
                        starts.len() - 1
                    }
                };
                Some((i, lo, end, Kind::Open(k)))
            })
            .collect();
        AgePlan { entries, starts }
    }

    /// Individuals with an age.
    pub fn len(&self) -> usize {
        self.entries.len()
    }

    /// Whether no individual has an age.
    pub fn is_empty(&self) -> bool {
        self.entries.is_empty()
    }

    /// One draw's ages into `out` (cleared first): per individual in row order a uniform
    /// number for its age, then `extra`; open classes then take their hot-deck donor's age
    /// (module docs). `female(i)` is individual i's sex in the draw.
    pub fn draw<R: Rng>(
        &self,
        female: &impl Fn(usize) -> bool,
        rng: &mut R,
        extra: &mut impl FnMut(&mut R) -> f64,
        out: &mut DrawnAges,
        donors: &mut Donors,
    ) {
        out.clear();
        donors.open.clear();
        for (k, &(i, lo, end, kind)) in self.entries.iter().enumerate() {
            let u = if end > lo { rng.random::<f64>() } else { 0.0 };
            let x = extra(rng);
            if let Kind::Open(_) = kind {
                donors.open.push((k, u));
                out.push((i, f64::NAN, x));
            } else {
                out.push((i, lo + u * (end - lo), x));
            }
        }
        if donors.open.is_empty() {
            return;
        }
        // The donors of each (start, sex) in row order, made in one pass: open classes share
        // a few starts (50+, adult from 18), so the draw stays linear in the individuals.
        donors.lists.resize_with(2 * self.starts.len(), Vec::new);
        for l in &mut donors.lists {
            l.clear();
        }
        for (&(i, _, _, kind), &(_, age, _)) in self.entries.iter().zip(out.iter()) {
            if kind != Kind::Closed {
                continue;
            }
            let sex = usize::from(female(i));
            for (s, &start) in self.starts.iter().enumerate() {
                if age >= start {
                    donors.lists[2 * s + sex].push(age);
                }
            }
        }
        for &(k, u) in &donors.open {
            let (i, lo, end, kind) = self.entries[k];
            let Kind::Open(s) = kind else { continue };
            let list = &donors.lists[2 * s + usize::from(female(i))];
            out[k].1 = if list.is_empty() {
                lo + u * (end - lo)
            } else {
                list[((u * list.len() as f64) as usize).min(list.len() - 1)]
            };
        }
    }
}

/// Working memory of [`AgePlan::draw`], kept from draw to draw: the open classes of the draw
/// with their uniform numbers, and the donors' ages by (start, sex).
#[derive(Debug, Default)]
pub struct Donors {
    open: Vec<(usize, f64)>,
    lists: Vec<Vec<f64>>,
}

/// `summarise(d, ages, rng)` for every joint draw d, in order, spread over threads: draw d's
/// random stream is stream d of a ChaCha8 generator seeded with `seed` (the same numbers
/// whatever the threads). `ages` holds draw d's ages (with `extra` after each) when a plan is
/// given.
pub fn over_draws<T: Send>(
    n_draws: usize,
    seed: u64,
    plan: &AgePlan,
    female: &(impl Fn(usize, usize) -> bool + Sync),
    extra: impl Fn(&mut ChaCha8Rng) -> f64 + Sync,
    summarise: impl Fn(usize, &DrawnAges, &mut ChaCha8Rng) -> T + Sync,
) -> Vec<T> {
    (0..n_draws)
        .into_par_iter()
        .map_init(
            || (DrawnAges::with_capacity(plan.len()), Donors::default()),
            |(ages, donors), d| {
                let mut rng = ChaCha8Rng::seed_from_u64(seed);
                rng.set_stream(d as u64);
                let mut extra = |r: &mut ChaCha8Rng| extra(r);
                plan.draw(&|i| female(d, i), &mut rng, &mut extra, ages, donors);
                summarise(d, ages, &mut rng)
            },
        )
        .collect()
}
