//! Age at death by sex over joint draws of everyone's sex, and the condition columns read
//! for prevalence by sex (see `prevalence`).

use super::age_draws::{over_draws, starts_reached, AgePlan, Donors, DrawnAges};
use crate::assemblage::draws::SexRow;
use crate::assemblage::Category;
use crate::data::{AgeAtDeath, Assemblage, InputError, Problem, ProblemKind};
use serde::Serialize;

/// Upper end (years) given to open age classes such as `50+` and to `adult`: a stated
/// assumption, since an open class has no recorded upper bound.
pub const OPEN_CLASS_END: f64 = 80.0;

/// The age classes of `by_sex_age.csv` and `category_by_age.csv` unless the user sets them
/// (`--age-classes`): under 18, then the adult classes of the life tables (after the
/// categories of Buikstra & Ubelaker 1994, young adult split at 25).
pub const DEFAULT_AGE_CLASSES: &str = "0-18,18-25,25-35,35-50,50+";

/// The classes as (label, from, to) in years, `to` exclusive (infinite for the open class).
/// A first class from 0 reads "under N".
pub fn class_bounds(classes: &super::AgeClasses) -> Vec<(String, f64, f64)> {
    classes
        .0
        .iter()
        .map(|c| {
            let label = match c.to {
                Some(to) if c.from == 0.0 => format!("under {}", super::life_table::fmt_age(to)),
                _ => c.label.clone(),
            };
            (label, c.from, c.to.unwrap_or(f64::INFINITY))
        })
        .collect()
}

/// The index of the class holding `age` (the first class below its start, the last above).
fn class_index(bounds: &[(String, f64, f64)], age: f64) -> usize {
    bounds
        .iter()
        .position(|(_, from, to)| age >= *from && age < *to)
        .unwrap_or(if bounds.first().is_some_and(|b| age < b.1) {
            0
        } else {
            bounds.len().saturating_sub(1)
        })
}

/// The recorded age as years from `low` to `high`, `high` = `None` for an open class (`50+`,
/// `adult`), `low == high` for a point (`None` when not recorded).
pub fn recorded_age(age: Option<AgeAtDeath>, adult_from: f64) -> Option<(f64, Option<f64>)> {
    match age? {
        AgeAtDeath::Years { low, high } => Some((low, high)),
        AgeAtDeath::Adult => Some((adult_from, None)),
        AgeAtDeath::Subadult => Some((0.0, Some(adult_from))),
    }
}

/// The recorded age as an interval of years, an open class closed at [`OPEN_CLASS_END`] (or at
/// its start, if later) (`None` when not recorded).
pub fn age_interval(age: Option<AgeAtDeath>, adult_from: f64) -> Option<(f64, f64)> {
    recorded_age(age, adult_from).map(|(low, high)| (low, high.unwrap_or(OPEN_CLASS_END.max(low))))
}

/// The recorded age as an interval of years with an open class left open (`to` infinite, as
/// `50+` and `adult`): what the tables by sex impute from ([`draw_ages`]).
pub fn open_interval(age: Option<AgeAtDeath>, adult_from: f64) -> Option<(f64, f64)> {
    recorded_age(age, adult_from).map(|(low, high)| (low, high.unwrap_or(f64::INFINITY)))
}

/// One joint draw's ages at death, indexed by individual: [`AgePlan::draw`] for one draw,
/// whose docs give the imputation of interval ages and open classes.
pub fn draw_ages<R: rand::Rng>(
    ages: &[Option<(f64, f64)>],
    female: &[bool],
    rng: &mut R,
) -> Vec<Option<f64>> {
    let plan = AgePlan::new(ages);
    let mut drawn = DrawnAges::default();
    plan.draw(&|i| female[i], rng, &mut drawn, &mut Donors::default());
    let mut out = vec![None; ages.len()];
    for (&i, &age) in plan.individuals().iter().zip(&drawn.age) {
        out[i] = Some(age);
    }
    out
}

/// The share `k / n` of the draws where something held; NaN when no draw counted.
pub(super) fn share(k: usize, n: usize) -> f64 {
    if n > 0 {
        k as f64 / n as f64
    } else {
        f64::NAN
    }
}

/// Mean, 2.5% and 97.5% quantiles of a sample (its finite values).
pub(super) fn spread(v: &[f64]) -> (f64, f64, f64) {
    let mut s: Vec<f64> = v.iter().copied().filter(|x| x.is_finite()).collect();
    if s.is_empty() {
        return (f64::NAN, f64::NAN, f64::NAN);
    }
    s.sort_by(f64::total_cmp);
    let q = |p: f64| s[((p * (s.len() - 1) as f64).round() as usize).min(s.len() - 1)];
    (s.iter().sum::<f64>() / s.len() as f64, q(0.025), q(0.975))
}

/// Age at death by sex over the draws.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AgeBySex {
    /// Individuals with a recorded age.
    pub n_with_age: usize,
    /// Mean age of females: mean over draws and 95% interval.
    pub mean_female: (f64, f64, f64),
    /// Mean age of males.
    pub mean_male: (f64, f64, f64),
    /// Difference female − male.
    pub difference: (f64, f64, f64),
    /// Share of draws in which the females' mean age is below the males'.
    pub p_females_die_younger: f64,
    /// Per age class: (label, females mean/lo/hi, males mean/lo/hi) counts over draws.
    pub classes: Vec<AgeClassRow>,
}

/// Counts of one age class by sex over the draws.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AgeClassRow {
    /// Class label.
    pub class: String,
    /// Females: mean count and 95% interval.
    pub female: (f64, f64, f64),
    /// Males: mean count and 95% interval.
    pub male: (f64, f64, f64),
}

/// Age at death by sex. In each draw every individual's age is drawn by [`draw_ages`] (uniform
/// within a closed recorded interval; an open one from the same sex's known older ages), and
/// the sexes come from the joint draw. `female[d][i]` is individual i's sex in draw d.
pub fn age_by_sex(
    ages: &[Option<(f64, f64)>],
    female: &[impl SexRow + Sync],
    classes: &super::AgeClasses,
    seed: u64,
) -> AgeBySex {
    let plan = AgePlan::new(ages);
    let tally = AgeTally::new(ages, classes);
    let per_draw = over_draws(
        female.len(),
        seed ^ 0x5eed_a9e5,
        &plan,
        &|d, i| female[d].is_female(i),
        |_, drawn, _| tally.part(drawn),
    );
    tally.finish(per_draw)
}

/// Age at death by sex and the life tables from the same draws of ages (the life tables'
/// stream and bootstrap weights): the two tables then describe the same imputed ages, and
/// the ages are drawn once instead of twice. As [`age_by_sex`] and
/// [`super::life_tables`] otherwise.
pub fn age_and_life_tables(
    ages: &[Option<(f64, f64)>],
    female: &[impl SexRow + Sync],
    age_classes: &super::AgeClasses,
    life_classes: &super::AgeClasses,
    seed: u64,
) -> (AgeBySex, super::LifeTables) {
    use super::life_table::{LifeTally, LIFE_TABLE_SALT};
    let plan = AgePlan::new(ages);
    let age = AgeTally::new(ages, age_classes);
    let life = LifeTally::new(ages, life_classes);
    let per_draw = over_draws(
        female.len(),
        seed ^ LIFE_TABLE_SALT,
        &plan,
        &|d, i| female[d].is_female(i),
        |_, drawn, rng| (age.part(drawn), life.part(drawn, rng)),
    );
    let (age_parts, life_parts): (Vec<_>, Vec<_>) = per_draw.into_iter().unzip();
    (age.finish(age_parts), life.finish(life_parts))
}

/// One draw's ages by sex: the sum and number of ages of females, then of males, and the
/// deaths of each sex by class.
type AgeDraw = (f64, usize, f64, usize, Vec<f64>, Vec<f64>);

/// Age by sex's work on the draws: prepared once, a part per draw, the parts summarised.
struct AgeTally {
    bounds: Vec<(String, f64, f64)>,
    /// The starts of the classes after the first: an age's class is how many of them it
    /// has reached ([`starts_reached`]).
    later_starts: Vec<f64>,
    n_with_age: usize,
}

impl AgeTally {
    fn new(ages: &[Option<(f64, f64)>], classes: &super::AgeClasses) -> AgeTally {
        let bounds = class_bounds(classes);
        AgeTally {
            later_starts: bounds.iter().skip(1).map(|b| b.1).collect(),
            bounds,
            n_with_age: ages.iter().filter(|a| a.is_some()).count(),
        }
    }

    /// One draw's sums and counts (indexed by sex, female first, and the class found by
    /// counting, rather than branching: the sexes and ages of a draw are random, a branch
    /// on them mispredicted often).
    fn part(&self, drawn: &DrawnAges) -> AgeDraw {
        let k = self.bounds.len();
        let mut sum = [0.0; 2];
        let mut counts = vec![0u32; 2 * k];
        for (age, female) in drawn.iter() {
            let s = usize::from(!female);
            sum[s] += age;
            counts[s * k + starts_reached(&self.later_starts, age)] += 1;
        }
        let n = |s: usize| counts[s * k..(s + 1) * k].iter().map(|&c| c as usize).sum();
        let of = |s: usize| {
            counts[s * k..(s + 1) * k]
                .iter()
                .map(|&c| f64::from(c))
                .collect()
        };
        (sum[0], n(0), sum[1], n(1), of(0), of(1))
    }

    /// The table summarised over the draws' parts (in draw order).
    fn finish(&self, per_draw: Vec<AgeDraw>) -> AgeBySex {
        let bounds = &self.bounds;
        let (mut mf, mut mm, mut diff) = (Vec::new(), Vec::new(), Vec::new());
        let mut younger = 0usize;
        let mut counted = 0usize;
        let mut class_counts: Vec<(Vec<f64>, Vec<f64>)> =
            bounds.iter().map(|_| (Vec::new(), Vec::new())).collect();
        for (sf, nf, sm, nm, cf, cm) in per_draw {
            for (k, (a, b)) in class_counts.iter_mut().enumerate() {
                a.push(cf[k]);
                b.push(cm[k]);
            }
            if nf > 0 && nm > 0 {
                let (x, y) = (sf / nf as f64, sm / nm as f64);
                mf.push(x);
                mm.push(y);
                diff.push(x - y);
                counted += 1;
                younger += usize::from(x < y);
            }
        }
        AgeBySex {
            n_with_age: self.n_with_age,
            mean_female: spread(&mf),
            mean_male: spread(&mm),
            difference: spread(&diff),
            p_females_die_younger: share(younger, counted),
            classes: bounds
                .iter()
                .zip(&class_counts)
                .map(|((label, _, _), (a, b))| AgeClassRow {
                    class: label.to_string(),
                    female: spread(a),
                    male: spread(b),
                })
                .collect(),
        }
    }
}

/// A by-sex column's values: a 0/1 condition, or a number (a measurement, a score, a grade).
#[derive(Debug, Clone, PartialEq)]
pub enum OutcomeValues {
    /// Present (`true`) or absent; `None` where not recorded.
    Condition(Vec<Option<bool>>),
    /// A number; `None` where not recorded.
    Numeric(Vec<Option<f64>>),
}

/// A by-sex column as read: its name as written and one value per individual.
pub type OutcomeColumn = (String, OutcomeValues);

/// The words read as present and as absent in a condition column (any case).
const PRESENT: [&str; 4] = ["1", "yes", "present", "true"];
const ABSENT: [&str; 4] = ["0", "no", "absent", "false"];

/// Read a by-sex column (a carried column, never evidence): a 0/1 condition when every
/// recorded cell is `1`/`yes`/`present`/`true` or `0`/`no`/`absent`/`false` (any case), a
/// number otherwise (stature, an activity-marker score, a lesion grade); missing codes give
/// `None`.
///
/// Returns `Ok(None)` when the assemblage has no such carried column (trait columns are
/// evidence and cannot be outcomes), the column name as written and the values otherwise.
///
/// # Errors
/// [`InputError`] listing every cell that is neither a condition's word nor a number (in a
/// column of numbers: every cell that is not a number), nor a missing code.
pub fn outcome_column(a: &Assemblage, column: &str) -> Result<Option<OutcomeColumn>, InputError> {
    let Some(c) = a
        .carried_columns
        .iter()
        .position(|x| x.trim().eq_ignore_ascii_case(column.trim()))
    else {
        return Ok(None);
    };
    let cells: Vec<&str> = a.individuals.iter().map(|i| i.carried[c].trim()).collect();
    let recorded = |cell: &str| !a.settings.is_missing(cell);
    let word = |cell: &str| {
        let l = cell.to_ascii_lowercase();
        if PRESENT.contains(&l.as_str()) {
            Some(true)
        } else if ABSENT.contains(&l.as_str()) {
            Some(false)
        } else {
            None
        }
    };
    // The reader's own rule for numbers (decimal commas where the table allows them).
    let number =
        |cell: &str| crate::data::cell::parse_decimal(cell, a.decimal_comma).map(|(v, _)| v);
    // Numbers beyond 0 and 1 make it a column of numbers; otherwise a condition.
    let numeric = cells
        .iter()
        .any(|cell| recorded(cell) && word(cell).is_none() && number(cell).is_some());
    let mut problems = Vec::new();
    let values = if numeric {
        OutcomeValues::Numeric(read_cells(a, c, &cells, number, "a number (the column's other cells are numbers, such as a stature or a grade), or a missing code", &mut problems))
    } else {
        OutcomeValues::Condition(read_cells(a, c, &cells, word, "1 (present) or 0 (absent) for a condition, a number for a measurement or grade, or a missing code", &mut problems))
    };
    if problems.is_empty() {
        Ok(Some((a.carried_columns[c].clone(), values)))
    } else {
        Err(InputError {
            file: a.file.clone(),
            problems,
            warnings: Vec::new(),
        })
    }
}

/// Every recorded cell of carried column `c` read by `parse` (`None` for missing codes); a
/// cell it cannot read is a problem saying `expected`.
fn read_cells<T>(
    a: &Assemblage,
    c: usize,
    cells: &[&str],
    parse: impl Fn(&str) -> Option<T>,
    expected: &str,
    problems: &mut Vec<Problem>,
) -> Vec<Option<T>> {
    a.individuals
        .iter()
        .zip(cells)
        .map(|(ind, cell)| {
            if a.settings.is_missing(cell) {
                return None;
            }
            let v = parse(cell);
            if v.is_none() {
                problems.push(Problem {
                    file: a.file.clone(),
                    row: Some(ind.row),
                    column: Some(a.carried_columns[c].clone()),
                    value: Some(cell.to_string()),
                    kind: ProblemKind::UnreadableValue,
                    expected: expected.into(),
                });
            }
            v
        })
        .collect()
}

/// Counts of each category by age class (by the recorded interval's midpoint; `unknown` when
/// no age is recorded). Rows in the classes' order, then `adult of unknown age` (only when some
/// individual is recorded as an adult of unknown age: a state of its own, not a class), then
/// `unknown`; columns in [`Category::ALL`] order.
pub fn category_by_age(
    ages: &[Option<(f64, f64)>],
    categories: &[Category],
    classes: &super::AgeClasses,
    adult_unknown: &[bool],
) -> Vec<(String, [usize; 6])> {
    let bounds = class_bounds(classes);
    let mut rows: Vec<(String, [usize; 6])> = bounds
        .iter()
        .map(|(l, _, _)| (l.to_string(), [0; 6]))
        .collect();
    let adults = adult_unknown.iter().any(|a| *a);
    if adults {
        rows.push(("adult of unknown age".into(), [0; 6]));
    }
    rows.push(("unknown".into(), [0; 6]));
    for (i, (a, c)) in ages.iter().zip(categories).enumerate() {
        let k = Category::ALL.iter().position(|x| x == c).unwrap_or(5);
        if adult_unknown.get(i).copied().unwrap_or(false) {
            rows[bounds.len()].1[k] += 1;
            continue;
        }
        let r = match a {
            Some((lo, hi)) => class_index(&bounds, (lo + hi) / 2.0),
            None => bounds.len() + usize::from(adults),
        };
        rows[r].1[k] += 1;
    }
    rows
}

#[cfg(test)]
#[path = "tests/by_sex.rs"]
mod tests;
