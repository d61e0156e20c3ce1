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

/// The individuals with an age, in row order, prepared for drawing: one entry each, kept as
/// columns so that a draw runs through them without a branch per entry.
#[derive(Debug, Clone)]
pub struct AgePlan {
    /// Each entry's individual (row index).
    individual: Vec<usize>,
    /// Start of the uniform draw, years.
    lo: Vec<f64>,
    /// Its width (0 for a point).
    width: Vec<f64>,
    /// The highest age the draw may give: just below the end of a closed interval, the
    /// point itself for a point. lo + u (end − lo) is kept below `end` because rounding
    /// would otherwise give `end` itself, an age of the next class, for the few largest u:
    /// an interval recorded as 35–50 stays in the class 35–50 as the classes' half-open
    /// bounds have it.
    top: Vec<f64>,
    /// Whether the entry may give its age to an open class: a point or a closed interval.
    donor: Vec<bool>,
    /// The open classes: (entry, index of its start in `starts`).
    open: Vec<(usize, usize)>,
    /// The distinct starts of the open classes.
    starts: Vec<f64>,
}

/// One draw's ages, in the plan's entry order (row order): each entry's age at death and
/// its sex in the draw.
#[derive(Debug, Clone, Default)]
pub struct DrawnAges {
    /// Age at death drawn, years.
    pub age: Vec<f64>,
    /// Sex in the draw (`true`: female), read once for the draw.
    pub female: Vec<bool>,
}

impl DrawnAges {
    /// (age, female) of every entry, in order.
    pub fn iter(&self) -> impl Iterator<Item = (f64, bool)> + '_ {
        self.age.iter().copied().zip(self.female.iter().copied())
    }
}

impl AgePlan {
    /// The plan of `ages[i]` = (from, to) years, `to` infinite for an open class, `None`
    /// for no age (or not in the tables).
    pub fn new(ages: &[Option<(f64, f64)>]) -> AgePlan {
        let mut plan = AgePlan {
            individual: Vec::new(),
            lo: Vec::new(),
            width: Vec::new(),
            top: Vec::new(),
            donor: Vec::new(),
            open: Vec::new(),
            starts: Vec::new(),
        };
        for (i, a) in ages.iter().enumerate() {
            let Some((lo, hi)) = *a else { continue };
            // An open class is drawn (when no donor exists) up to the closing age; one
            // starting at or above it is a point there.
            let end = if hi.is_finite() {
                hi
            } else {
                OPEN_CLASS_END.max(lo)
            };
            if !hi.is_finite() && end > lo {
                let k = match plan.starts.iter().position(|s| s.to_bits() == lo.to_bits()) {
                    Some(k) => k,
                    None => {
                        plan.starts.push(lo);
                        plan.starts.len() - 1
                    }
                };
                plan.open.push((plan.individual.len(), k));
            }
            plan.individual.push(i);
            plan.lo.push(lo);
            plan.width.push(if end > lo { end - lo } else { 0.0 });
            plan.top.push(if end > lo { next_below(end) } else { lo });
            plan.donor.push(hi.is_finite());
        }
        plan
    }

    /// Individuals with an age.
    pub fn len(&self) -> usize {
        self.individual.len()
    }

    /// Whether no individual has an age.
    pub fn is_empty(&self) -> bool {
        self.individual.is_empty()
    }

    /// Each entry's individual (row index), in entry order.
    pub fn individuals(&self) -> &[usize] {
        &self.individual
    }

    /// One draw's ages into `out`: per entry in row order one uniform number u (a point
    /// draws one too and keeps its age), the age lo + u·width kept below the interval's end;
    /// open classes then take their hot-deck donor's age, chosen with their own u (module
    /// docs). `female(i)` is individual i's sex in the draw.
    pub fn draw<R: Rng>(
        &self,
        female: &impl Fn(usize) -> bool,
        rng: &mut R,
        out: &mut DrawnAges,
        donors: &mut Donors,
    ) {
        out.age.clear();
        out.female.clear();
        donors.u.clear();
        for ((&lo, &width), &top) in self.lo.iter().zip(&self.width).zip(&self.top) {
            let u = rng.random::<f64>();
            // A point: lo + u·0 = lo, and top = lo. No branch: points and intervals mix.
            out.age.push((lo + u * width).min(top));
            if !self.open.is_empty() {
                donors.u.push(u);
            }
        }
        out.female
            .extend(self.individual.iter().map(|&i| female(i)));
        if self.open.is_empty() {
            return;
        }
        // The donors of each (start, sex) in row order, made in one pass: open classes share
        // a few starts (50+, adult from 18), so the draw stays linear in the individuals.
        let n = self.len();
        donors.lists.resize_with(2 * self.starts.len(), Vec::new);
        // Room for every entry, kept from draw to draw: a list is read only below the length
        // this draw counts, all of it written in this draw.
        for l in &mut donors.lists {
            if l.len() < n {
                l.resize(n, 0.0);
            }
        }
        let mut lens = vec![0usize; donors.lists.len()];
        for ((&age, &f), &donor) in out.age.iter().zip(&out.female).zip(&self.donor) {
            let sex = usize::from(f);
            for (s, &start) in self.starts.iter().enumerate() {
                // Written in any case, counted only for a donor at or above the start: no
                // branch on the drawn age.
                let k = 2 * s + sex;
                donors.lists[k][lens[k]] = age;
                lens[k] += usize::from(donor & (age >= start));
            }
        }
        // An open class without a donor keeps its uniform age up to the closing age.
        for &(e, s) in &self.open {
            let k = 2 * s + usize::from(out.female[e]);
            if lens[k] > 0 {
                let u = donors.u[e];
                out.age[e] = donors.lists[k][((u * lens[k] as f64) as usize).min(lens[k] - 1)];
            }
        }
    }
}

/// How many of `starts` (ascending) are at or below `age`, counted without a branch: with
/// contiguous classes (each starting where the one before ends, as [`super::AgeClasses`]
/// parses them) the starts after the first give an age's class, and all the starts give
/// the class counted from 1 with 0 below the first.
pub fn starts_reached(starts: &[f64], age: f64) -> usize {
    starts.iter().map(|&s| usize::from(age >= s)).sum()
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

/// Working memory of [`AgePlan::draw`], kept from draw to draw: every entry's uniform number
/// (when some class is open) and the donors' ages by (start, sex).
#[derive(Debug, Default)]
pub struct Donors {
    u: Vec<f64>,
    lists: Vec<Vec<f64>>,
}

/// `summarise(d, ages, rng)` for every joint draw d, in order, spread over threads: draw d's
/// random stream is stream d of a ChaCha8 generator seeded with `seed` (the same numbers
/// whatever the threads), `ages` holding draw d's ages and the stream left where the ages
/// ended.
pub fn over_draws<T: Send>(
    n_draws: usize,
    seed: u64,
    plan: &AgePlan,
    female: &(impl Fn(usize, usize) -> bool + Sync),
    summarise: impl Fn(usize, &DrawnAges, &mut ChaCha8Rng) -> T + Sync,
) -> Vec<T> {
    (0..n_draws)
        .into_par_iter()
        .map_init(
            || (DrawnAges::default(), Donors::default()),
            |(ages, donors), d| {
                let mut rng = ChaCha8Rng::seed_from_u64(seed);
                rng.set_stream(d as u64);
                plan.draw(&|i| female(d, i), &mut rng, ages, donors);
                summarise(d, ages, &mut rng)
            },
        )
        .collect()
}
