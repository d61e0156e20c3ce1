//! Life tables by sex over the joint draws.
//!
//! In each joint draw every individual in the tables by sex has a sex (from the draw) and an
//! age at death (drawn uniformly within the recorded interval, as for the mean ages; a point
//! stays a point). The deaths per age class of each sex give one abridged life table per draw
//! (the arithmetic of Chiang 1984 and of the palaeodemographic tables after Acsádi &
//! Nemeskéri 1970, both from memory), with the radix 100:
//!
//! - `deaths`: Dₓ, the number of deaths in the class;
//! - `dx` = 100 Dₓ / Σ D, the share of deaths (per cent);
//! - `lx` = 100 − Σ_{j<x} dⱼ, the survivors entering the class (per cent);
//! - `qx` = dₓ / lₓ, the probability of dying within the class for those entering it;
//! - `Lx` = nₓ (lₓ + lₓ₊ₙ) / 2, the years lived in the class (deaths spread evenly within
//!   it, the same assumption as drawing ages uniformly within their interval);
//! - `Tx` = Σ_{j≥x} Lⱼ, and `ex` = Tₓ / lₓ, the mean years still to live on entering the class.
//!
//! Two intervals go with each quantity. The first (`lo`, `hi`) carries the uncertainty in
//! each individual's sex and age: it is the life table of these dead, and with every sex
//! certain and every age a point it shrinks to the plain table of the counts. The second
//! (`population_lo`, `population_hi`) adds the sampling of the dead from the population's
//! deaths: in each draw the individuals are weighted by a Bayesian bootstrap (Rubin 1981,
//! weights Exp(1), from memory; drawn as each cell's sum, Gamma(deaths, 1)), so the
//! interval is about the population's table, on the
//! usual assumptions of palaeodemography (the dead a fair sample of the deaths of a
//! stationary population; Wood et al. 1992 on why they may not be, from memory).
//!
//! The open last class (`50+`) is closed, for its `Lx` only, at the age where open-ended
//! recorded ages are closed ([`OPEN_CLASS_END`], a stated assumption), or at the oldest
//! recorded upper bound if that is older. Each quantity is summarised over the draws by its
//! mean and its 2.5% and 97.5% quantiles. Ages below the first class are left out of every
//! table (counted); a life table of adults by sex starts at an adult age because the skeletal
//! evidence of sex is read in adults only.
//!
//! A closed form checks the arithmetic: with deaths evenly spread within classes, `ex` of
//! the first class equals the mean age at death minus the class's start, Σ dₓ (midₓ − x₀) / 100
//! (tests beside).

use super::age_draws::{over_draws, starts_reached, AgePlan, DrawnAges};
use super::by_sex::{spread, OPEN_CLASS_END};
use crate::assemblage::draws::SexRow;
use serde::Serialize;

/// The age classes of the life tables unless the user sets them: the adult classes of the
/// tables by sex (young adult split at 25, middle adult 35–50, old adult 50+, after the
/// categories of Buikstra & Ubelaker 1994), starting at the usual minimum age of 18.
pub const DEFAULT_LIFE_TABLE_CLASSES: &str = "18-25,25-35,35-50,50+";

/// One age class: from `from` (inclusive) to `to` (exclusive), or open (`to` = `None`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AgeClass {
    /// As written (`25-35`, `50+`).
    pub label: String,
    /// Start in years.
    pub from: f64,
    /// End in years; `None` for the open last class.
    pub to: Option<f64>,
}

/// Contiguous age classes, the last one open.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AgeClasses(pub Vec<AgeClass>);

impl Default for AgeClasses {
    fn default() -> Self {
        // The default specification is valid (a unit test parses it).
        AgeClasses::parse(DEFAULT_LIFE_TABLE_CLASSES).unwrap_or(AgeClasses(Vec::new()))
    }
}

impl AgeClasses {
    /// Read `from-to,from-to,…,from+`: classes in order, each starting where the one before
    /// ends, the last one open (`50+`), every start below [`OPEN_CLASS_END`].
    ///
    /// # Errors
    /// Every problem at once, in one message: a class that cannot be read, an end not after
    /// its start, a gap or an overlap between neighbours, a closed last class or an open
    /// class before the last.
    pub fn parse(text: &str) -> Result<AgeClasses, String> {
        let mut problems = Vec::new();
        let mut classes = Vec::new();
        let parts: Vec<&str> = text.split(',').map(str::trim).collect();
        let n = parts.len();
        for (k, part) in parts.iter().enumerate() {
            let number = |s: &str| {
                s.trim()
                    .parse::<f64>()
                    .ok()
                    .filter(|x| x.is_finite() && *x >= 0.0)
            };
            let class = if let Some(start) = part.strip_suffix('+') {
                number(start).map(|from| (from, None))
            } else if let Some((a, b)) = part.split_once('-') {
                match (number(a), number(b)) {
                    (Some(from), Some(to)) => Some((from, Some(to))),
                    _ => None,
                }
            } else {
                None
            };
            let Some((from, to)) = class else {
                problems.push(format!(
                    "`{part}` is not an age class: write from-to in years (25-35) or an open last class (50+)"
                ));
                continue;
            };
            if let Some(to) = to {
                if to <= from {
                    problems.push(format!("`{part}` ends before it starts"));
                }
                if k + 1 == n {
                    problems.push(format!(
                        "the last class `{part}` is closed: the last class is open (such as {}+), so that every age at death falls in a class",
                        fmt_age(from)
                    ));
                }
            } else {
                if k + 1 < n {
                    problems.push(format!("`{part}` is open but not the last class"));
                }
                if from >= OPEN_CLASS_END {
                    problems.push(format!(
                        "the open class `{part}` starts at or above {OPEN_CLASS_END}, the age at which open-ended recorded ages are closed"
                    ));
                }
            }
            classes.push(AgeClass {
                label: part.to_string(),
                from,
                to,
            });
        }
        for w in classes.windows(2) {
            if let Some(end) = w[0].to {
                if w[1].from > end {
                    problems.push(format!(
                        "a gap between `{}` and `{}`: ages {} to {} fall in no class",
                        w[0].label,
                        w[1].label,
                        fmt_age(end),
                        fmt_age(w[1].from)
                    ));
                } else if w[1].from < end {
                    problems.push(format!(
                        "`{}` and `{}` overlap: each class starts where the one before ends",
                        w[0].label, w[1].label
                    ));
                }
            }
        }
        if problems.is_empty() {
            Ok(AgeClasses(classes))
        } else {
            Err(problems.join("; "))
        }
    }

    /// The index of the class holding `age`, or `None` below the first class.
    pub fn class_of(&self, age: f64) -> Option<usize> {
        let first = self.0.first()?;
        if age < first.from {
            return None;
        }
        Some(
            self.0
                .iter()
                .position(|c| c.to.is_none_or(|t| age < t))
                .unwrap_or(self.0.len() - 1),
        )
    }
}

pub(crate) fn fmt_age(x: f64) -> String {
    crate::report::number::short(x, 1)
}

/// One row of one life table: a class and its quantities (see the module's docs).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LifeTableRow {
    /// Deaths in the class.
    pub deaths: f64,
    /// Share of deaths, per cent.
    pub dx: f64,
    /// Survivors entering the class, per cent.
    pub lx: f64,
    /// Probability of dying in the class for those entering it.
    pub qx: f64,
    /// Years lived in the class, per 100 entering the first.
    pub big_lx: f64,
    /// Years lived from the class on.
    pub tx: f64,
    /// Mean years still to live on entering the class.
    pub ex: f64,
}

/// The life table of one set of deaths per class. `ends[k]` is where class k ends (the open
/// last class closed at the stated age). Quantities that divide by zero survivors are NaN.
pub fn life_table(deaths: &[f64], classes: &AgeClasses, open_end: f64) -> Vec<LifeTableRow> {
    let total: f64 = deaths.iter().sum();
    let n = deaths.len();
    let width = |k: usize| classes.0[k].to.unwrap_or(open_end) - classes.0[k].from;
    let dx: Vec<f64> = deaths.iter().map(|d| 100.0 * d / total).collect();
    let mut lx = vec![0.0; n + 1];
    lx[0] = 100.0;
    for k in 0..n {
        // Clamped at zero: the last survivors' share is 100 minus a sum that may round below.
        lx[k + 1] = (lx[k] - dx[k]).max(0.0);
    }
    lx[n] = 0.0;
    let big_lx: Vec<f64> = (0..n)
        .map(|k| width(k) * (lx[k] + lx[k + 1]) / 2.0)
        .collect();
    let mut tx = vec![0.0; n];
    let mut acc = 0.0;
    for k in (0..n).rev() {
        acc += big_lx[k];
        tx[k] = acc;
    }
    (0..n)
        .map(|k| {
            let alive = lx[k] > 0.0;
            LifeTableRow {
                deaths: deaths[k],
                dx: dx[k],
                lx: lx[k],
                qx: if alive { dx[k] / lx[k] } else { f64::NAN },
                big_lx: big_lx[k],
                tx: tx[k],
                ex: if alive { tx[k] / lx[k] } else { f64::NAN },
            }
        })
        .collect()
}

/// A quantity over the draws: mean and 95% interval (2.5% and 97.5% quantiles).
pub type Spread = (f64, f64, f64);

/// One quantity of a life table over the draws: the mean and 95% interval of the table of
/// these dead (sex and age uncertain), and the 95% interval of the population's table (the
/// Bayesian bootstrap added).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Quantity {
    /// Mean over the draws of the table of these dead.
    pub estimate: f64,
    /// 2.5% quantile over the draws (sex and age uncertain).
    pub lo: f64,
    /// 97.5% quantile over the draws.
    pub hi: f64,
    /// 2.5% quantile of the population's table (the sampling of the dead added).
    pub population_lo: f64,
    /// 97.5% quantile of the population's table.
    pub population_hi: f64,
}

/// One class of a life table summarised over the draws.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LifeTableClass {
    /// The class.
    pub class: AgeClass,
    /// Deaths among these dead: mean and 95% interval over the draws.
    pub deaths: Spread,
    /// dx, per cent.
    pub dx: Quantity,
    /// lx, per cent.
    pub lx: Quantity,
    /// qx.
    pub qx: Quantity,
    /// Lx.
    pub big_lx: Quantity,
    /// Tx.
    pub tx: Quantity,
    /// ex, years.
    pub ex: Quantity,
}

/// The life tables of females, males and both together.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LifeTables {
    /// The classes.
    pub classes: AgeClasses,
    /// Age at which the open last class is closed for its years lived.
    pub open_end: f64,
    /// Individuals in the tables by sex with a recorded age.
    pub n_with_age: usize,
    /// Of them, the mean number per draw whose drawn age fell below the first class.
    pub below_first_class: f64,
    /// Females.
    pub female: Vec<LifeTableClass>,
    /// Males.
    pub male: Vec<LifeTableClass>,
    /// Both sexes.
    pub all: Vec<LifeTableClass>,
}

/// Life tables by sex over the draws. `ages[i]` is individual i's recorded age interval
/// (`None`: no age, or not in the tables by sex); `female[d][i]` its sex in draw d.
pub fn life_tables(
    ages: &[Option<(f64, f64)>],
    female: &[impl SexRow + Sync],
    classes: &AgeClasses,
    seed: u64,
) -> LifeTables {
    let plan = AgePlan::new(ages);
    let tally = LifeTally::new(ages, classes);
    let per_draw = over_draws(
        female.len(),
        seed ^ LIFE_TABLE_SALT,
        &plan,
        &|d, i| female[d].is_female(i),
        |_, drawn, rng| tally.part(drawn, rng),
    );
    tally.finish(per_draw)
}

/// Mixed into the seed of the life tables' draws (a constant of ours).
pub(crate) const LIFE_TABLE_SALT: u64 = 0x11fe_7ab1;

/// The Bayesian bootstrap's weighted deaths of one cell (a sex and a class) in one draw:
/// `n` deaths, each weighted by its own Exp(1), together weigh Gamma(n, 1) — a sum of n
/// independent Exp(1) is Gamma(n, 1), and the weights of different cells are independent
/// (closed form; checked by simulation in the tests beside). One Gamma per cell instead of
/// one exponential per individual: the same distribution at a cost that does not grow with
/// the individuals. Drawn by rand_distr's Gamma (Marsaglia & Tsang 2000); 0 for no death.
pub(crate) fn bootstrap_deaths(n: f64, rng: &mut rand_chacha::ChaCha8Rng) -> f64 {
    use rand_distr::Distribution;
    match rand_distr::Gamma::new(n, 1.0) {
        Ok(g) if n > 0.0 => g.sample(rng),
        _ => 0.0,
    }
}

/// One draw's life tables: per sex (female, male, all) the table of these dead and of the
/// population (`None` for a sex with no death in the draw), and the deaths below the first
/// class.
pub(crate) type LifeDraw = ([Option<(Vec<LifeTableRow>, Vec<LifeTableRow>)>; 3], usize);

/// The life tables' work on the draws: prepared once, a part per draw, the parts summarised.
pub(crate) struct LifeTally<'a> {
    classes: &'a AgeClasses,
    open_end: f64,
    n_with_age: usize,
    /// The classes' starts: an age's class counted from 1 (0 below the first) is how many
    /// it has reached ([`starts_reached`]).
    starts: Vec<f64>,
}

impl<'a> LifeTally<'a> {
    pub(crate) fn new(ages: &[Option<(f64, f64)>], classes: &'a AgeClasses) -> LifeTally<'a> {
        let open_end = ages
            .iter()
            .flatten()
            .map(|&(_, hi)| hi)
            .filter(|hi| hi.is_finite())
            .fold(OPEN_CLASS_END, f64::max);
        LifeTally {
            classes,
            open_end,
            n_with_age: ages.iter().filter(|a| a.is_some()).count(),
            starts: classes.0.iter().map(|c| c.from).collect(),
        }
    }

    /// One draw's tables: its ages' deaths per sex and class, the population's weighted by
    /// the Bayesian bootstrap ([`bootstrap_deaths`], from `rng` after the ages).
    pub(crate) fn part(&self, drawn: &DrawnAges, rng: &mut rand_chacha::ChaCha8Rng) -> LifeDraw {
        let (classes, k) = (self.classes, self.classes.0.len());
        // Per sex (female, male), class counted from 1, 0 below the first: no branch.
        let mut counts = vec![0u32; 2 * (k + 1)];
        for (age, female) in drawn.iter() {
            counts[usize::from(!female) * (k + 1) + starts_reached(&self.starts, age)] += 1;
        }
        let below = (counts[0] + counts[k + 1]) as usize;
        let of = |s: usize| -> Vec<f64> {
            counts[s * (k + 1) + 1..(s + 1) * (k + 1)]
                .iter()
                .map(|&c| f64::from(c))
                .collect()
        };
        let mut deaths = [of(0), of(1), vec![0.0; k]];
        let mut weighted = [vec![0.0; k], vec![0.0; k], vec![0.0; k]];
        for c in 0..k {
            deaths[2][c] = deaths[0][c] + deaths[1][c];
            weighted[0][c] = bootstrap_deaths(deaths[0][c], rng);
            weighted[1][c] = bootstrap_deaths(deaths[1][c], rng);
            weighted[2][c] = weighted[0][c] + weighted[1][c];
        }
        // A sex with no death in a draw has no table there (left out of its summary).
        let tables = [0, 1, 2].map(|s| {
            (deaths[s].iter().sum::<f64>() > 0.0).then(|| {
                (
                    life_table(&deaths[s], classes, self.open_end),
                    life_table(&weighted[s], classes, self.open_end),
                )
            })
        });
        (tables, below)
    }

    /// The tables summarised over the draws' parts (in draw order).
    pub(crate) fn finish(&self, per_draw: Vec<LifeDraw>) -> LifeTables {
        let (classes, k) = (self.classes, self.classes.0.len());
        let n_draws = per_draw.len();
        let mut own: [Vec<Vec<LifeTableRow>>; 3] = [Vec::new(), Vec::new(), Vec::new()];
        let mut population: [Vec<Vec<LifeTableRow>>; 3] = [Vec::new(), Vec::new(), Vec::new()];
        let mut below = 0usize;
        for (tables, b) in per_draw {
            below += b;
            for (s, t) in tables.into_iter().enumerate() {
                if let Some((o, p)) = t {
                    own[s].push(o);
                    population[s].push(p);
                }
            }
        }
        let summarise = |s: usize| -> Vec<LifeTableClass> {
            (0..k)
                .map(|c| {
                    let values = |tables: &[Vec<LifeTableRow>], q: fn(&LifeTableRow) -> f64| {
                        tables.iter().map(|t| q(&t[c])).collect::<Vec<_>>()
                    };
                    let of = |q: fn(&LifeTableRow) -> f64| {
                        let (estimate, lo, hi) = spread(&values(&own[s], q));
                        let (_, population_lo, population_hi) = spread(&values(&population[s], q));
                        Quantity {
                            estimate,
                            lo,
                            hi,
                            population_lo,
                            population_hi,
                        }
                    };
                    LifeTableClass {
                        class: classes.0[c].clone(),
                        deaths: spread(&values(&own[s], |r| r.deaths)),
                        dx: of(|r| r.dx),
                        lx: of(|r| r.lx),
                        qx: of(|r| r.qx),
                        big_lx: of(|r| r.big_lx),
                        tx: of(|r| r.tx),
                        ex: of(|r| r.ex),
                    }
                })
                .collect()
        };
        LifeTables {
            classes: classes.clone(),
            open_end: self.open_end,
            n_with_age: self.n_with_age,
            below_first_class: if n_draws == 0 {
                0.0
            } else {
                below as f64 / n_draws as f64
            },
            female: summarise(0),
            male: summarise(1),
            all: summarise(2),
        }
    }
}

#[cfg(test)]
#[path = "tests/life_table.rs"]
mod tests;
