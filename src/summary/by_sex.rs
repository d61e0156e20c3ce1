//! Age at death by sex over joint draws of everyone's sex, and the condition columns read
//! for prevalence by sex (see `prevalence`).

use crate::assemblage::Category;
use crate::data::{AgeAtDeath, Assemblage, InputError, Problem, ProblemKind};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde::Serialize;

/// Upper end (years) given to open age classes such as `50+` and to `adult`: a stated
/// assumption, since an open class has no recorded upper bound.
pub const OPEN_CLASS_END: f64 = 80.0;

/// Age classes of the tables: (label, from, to) in years, `to` exclusive.
pub const AGE_CLASSES: [(&str, f64, f64); 5] = [
    ("under 18", 0.0, 18.0),
    ("18-25", 18.0, 25.0),
    ("25-35", 25.0, 35.0),
    ("35-50", 35.0, 50.0),
    ("50+", 50.0, f64::INFINITY),
];

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

/// Age at death by sex. In each draw every individual's age is drawn uniformly within its
/// recorded interval (multiple imputation of interval-recorded ages; points stay points), and
/// the sexes come from the joint draw. `female[d][i]` is individual i's sex in draw d.
pub fn age_by_sex(ages: &[Option<(f64, f64)>], female: &[Vec<bool>], seed: u64) -> AgeBySex {
    let mut rng = ChaCha8Rng::seed_from_u64(seed ^ 0x5eed_a9e5);
    let (mut mf, mut mm, mut diff) = (Vec::new(), Vec::new(), Vec::new());
    let mut younger = 0usize;
    let mut counted = 0usize;
    let mut class_counts: Vec<(Vec<f64>, Vec<f64>)> = AGE_CLASSES
        .iter()
        .map(|_| (Vec::new(), Vec::new()))
        .collect();
    for sexes in female {
        let (mut sf, mut nf, mut sm, mut nm) = (0.0, 0usize, 0.0, 0usize);
        let mut cf = vec![0.0; AGE_CLASSES.len()];
        let mut cm = vec![0.0; AGE_CLASSES.len()];
        for (a, &f) in ages.iter().zip(sexes) {
            let Some((lo, hi)) = *a else { continue };
            let age = if hi > lo {
                lo + rng.random::<f64>() * (hi - lo)
            } else {
                lo
            };
            let k = AGE_CLASSES
                .iter()
                .position(|(_, from, to)| age >= *from && age < *to)
                .unwrap_or(AGE_CLASSES.len() - 1);
            if f {
                sf += age;
                nf += 1;
                cf[k] += 1.0;
            } else {
                sm += age;
                nm += 1;
                cm[k] += 1.0;
            }
        }
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
        n_with_age: ages.iter().filter(|a| a.is_some()).count(),
        mean_female: spread(&mf),
        mean_male: spread(&mm),
        difference: spread(&diff),
        p_females_die_younger: if counted > 0 {
            younger as f64 / counted as f64
        } else {
            f64::NAN
        },
        classes: AGE_CLASSES
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
/// no age is recorded). Rows in [`AGE_CLASSES`] order then `unknown`; columns in
/// [`Category::ALL`] order.
pub fn category_by_age(
    ages: &[Option<(f64, f64)>],
    categories: &[Category],
) -> Vec<(String, [usize; 6])> {
    let mut rows: Vec<(String, [usize; 6])> = AGE_CLASSES
        .iter()
        .map(|(l, _, _)| (l.to_string(), [0; 6]))
        .collect();
    rows.push(("unknown".into(), [0; 6]));
    for (a, c) in ages.iter().zip(categories) {
        let k = Category::ALL.iter().position(|x| x == c).unwrap_or(5);
        let r = match a {
            Some((lo, hi)) => {
                let mid = (lo + hi) / 2.0;
                AGE_CLASSES
                    .iter()
                    .position(|(_, from, to)| mid >= *from && mid < *to)
                    .unwrap_or(AGE_CLASSES.len() - 1)
            }
            None => AGE_CLASSES.len(),
        };
        rows[r].1[k] += 1;
    }
    rows
}

#[cfg(test)]
#[path = "tests/by_sex.rs"]
mod tests;
