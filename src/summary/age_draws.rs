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

/// One individual's age in one draw.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Drawn {
    /// The individual (row index).
    pub i: usize,
    /// Age at death drawn, years.
    pub age: f64,
    /// The value `extra` drew right after the age.
    pub extra: f64,
    /// The individual's sex in the draw (`true`: female), read once for the draw.
    pub female: bool,
}

/// One draw's ages, in row order.
pub type DrawnAges = Vec<Drawn>;

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

    /// For each entry, in the order of the drawn ages, the lowest and highest age a draw can
    /// give it (`None` for an open class, whose age comes from a donor): a summary can find
    /// once the class of an individual whose every possible age falls in one class.
    pub fn ranges(&self) -> Vec<Option<(f64, f64)>> {
        // The largest uniform number drawn: (2⁵³ − 1)/2⁵³ (53 random bits); the age is
        // monotone in it, so this gives the highest age the draw can compute.
        const LARGEST_UNIFORM: f64 = 1.0 - f64::EPSILON / 2.0;
        self.entries
            .iter()
            .map(|&(_, lo, end, kind)| match kind {
                Kind::Open(_) => None,
                _ if end > lo => Some((lo, uniform_in(lo, end, LARGEST_UNIFORM))),
                _ => Some((lo, lo)),
            })
            .collect()
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
            let extra = extra(rng);
            let age = if let Kind::Open(_) = kind {
                donors.open.push((k, u));
                f64::NAN
            } else {
                uniform_in(lo, end, u)
            };
            out.push(Drawn {
                i,
                age,
                extra,
                female: female(i),
            });
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
        for (&(_, _, _, kind), d) in self.entries.iter().zip(out.iter()) {
            if kind != Kind::Closed {
                continue;
            }
            let sex = usize::from(d.female);
            for (s, &start) in self.starts.iter().enumerate() {
                if d.age >= start {
                    donors.lists[2 * s + sex].push(d.age);
                }
            }
        }
        for &(k, u) in &donors.open {
            let (_, lo, end, kind) = self.entries[k];
            let Kind::Open(s) = kind else { continue };
            let list = &donors.lists[2 * s + usize::from(out[k].female)];
            out[k].age = if list.is_empty() {
                uniform_in(lo, end, u)
            } else {
                list[((u * list.len() as f64) as usize).min(list.len() - 1)]
            };
        }
    }
}

/// The age at uniform number `u` ∈ [0, 1) of the interval [lo, end): lo + u (end − lo), kept
/// below `end` (rounding would otherwise give `end` itself, an age of the next class, for
/// the few largest u), so that an interval recorded as 35–50 stays in the class 35–50 as
/// the classes' half-open bounds have it; a point (`end` = `lo`) is `lo`.
fn uniform_in(lo: f64, end: f64, u: f64) -> f64 {
    if end > lo {
        (lo + u * (end - lo)).min(next_below(end))
    } else {
        lo
    }
}

/// The largest double below a positive finite `x` (ages are not negative; `x` itself
/// otherwise).
fn next_below(x: f64) -> f64 {
    if x > 0.0 && x.is_finite() {
        f64::from_bits(x.to_bits() - 1)
    } else {
        x
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
