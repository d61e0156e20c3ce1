//! Categories on P(female) and the evaluative wording of likelihood ratios.

use serde::{Deserialize, Serialize};

/// Thresholds on P(F). Defaults: ≥ 0.95 female (the 0.95 rule of Bruzek et al. 2017, Am J
/// Phys Anthropol 164:440–449); 0.80–0.95 probable female; 0.20–0.80 indeterminate; 0.05–0.20
/// probable male; ≤ 0.05 male (the intermediate cut-offs are common practice).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Thresholds {
    /// P(F) at or below which an individual is male.
    pub male: f64,
    /// P(F) at or below which (and above `male`) an individual is probable male.
    pub probable_male: f64,
    /// P(F) at or above which (and below `female`) an individual is probable female.
    pub probable_female: f64,
    /// P(F) at or above which an individual is female.
    pub female: f64,
}

impl Default for Thresholds {
    fn default() -> Self {
        Thresholds {
            male: 0.05,
            probable_male: 0.20,
            probable_female: 0.80,
            female: 0.95,
        }
    }
}

impl Thresholds {
    /// Validated thresholds: 0 < male ≤ probable_male < probable_female ≤ female < 1.
    ///
    /// # Errors
    /// A message saying what order is required.
    pub fn new(
        male: f64,
        probable_male: f64,
        probable_female: f64,
        female: f64,
    ) -> Result<Thresholds, String> {
        let t = Thresholds {
            male,
            probable_male,
            probable_female,
            female,
        };
        if 0.0 < male
            && male <= probable_male
            && probable_male < probable_female
            && probable_female <= female
            && female < 1.0
        {
            Ok(t)
        } else {
            Err(format!(
                "thresholds must satisfy 0 < male ≤ probable male < probable female ≤ female < 1; found {male}, {probable_male}, {probable_female}, {female}"
            ))
        }
    }

    /// Parse `male,probable_male,probable_female,female`, e.g. `0.05,0.2,0.8,0.95`.
    ///
    /// # Errors
    /// A message for a malformed list or bad order.
    pub fn parse(s: &str) -> Result<Thresholds, String> {
        let v: Vec<f64> = s
            .split(',')
            .map(|x| x.trim().parse::<f64>())
            .collect::<Result<_, _>>()
            .map_err(|_| format!("`{s}`: expected four numbers, e.g. 0.05,0.2,0.8,0.95"))?;
        if v.len() != 4 {
            return Err(format!(
                "`{s}`: expected four numbers (male, probable male, probable female, female)"
            ));
        }
        Thresholds::new(v[0], v[1], v[2], v[3])
    }

    /// The category of a P(F).
    pub fn categorise(&self, p_female: f64) -> Category {
        if p_female >= self.female {
            Category::Female
        } else if p_female >= self.probable_female {
            Category::ProbableFemale
        } else if p_female <= self.male {
            Category::Male
        } else if p_female <= self.probable_male {
            Category::ProbableMale
        } else {
            Category::Indeterminate
        }
    }
}

/// Where an individual's P(F) falls; `NotEstimable` when there is no usable evidence.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Category {
    /// P(F) ≥ female threshold.
    Female,
    /// Between the probable-female and female thresholds.
    ProbableFemale,
    /// Evidence that does not decide.
    Indeterminate,
    /// Between the male and probable-male thresholds.
    ProbableMale,
    /// P(F) ≤ male threshold.
    Male,
    /// Too young for morphology and no DNA, or no usable evidence.
    NotEstimable,
}

impl Category {
    /// All categories in reporting order.
    pub const ALL: [Category; 6] = [
        Category::Female,
        Category::ProbableFemale,
        Category::Indeterminate,
        Category::ProbableMale,
        Category::Male,
        Category::NotEstimable,
    ];

    /// The word written in outputs.
    pub fn as_str(self) -> &'static str {
        match self {
            Category::Female => "female",
            Category::ProbableFemale => "probable_female",
            Category::Indeterminate => "indeterminate",
            Category::ProbableMale => "probable_male",
            Category::Male => "male",
            Category::NotEstimable => "not_estimable",
        }
    }

    /// The words for a reader.
    pub fn label(self) -> &'static str {
        match self {
            Category::Female => "female",
            Category::ProbableFemale => "probable female",
            Category::Indeterminate => "indeterminate",
            Category::ProbableMale => "probable male",
            Category::Male => "male",
            Category::NotEstimable => "not estimable",
        }
    }
}

/// The likelihood ratio in words, on the verbal scale of the ENFSI Guideline for Evaluative
/// Reporting in Forensic Science (2015): 1–2 no support, 2–10 weak, 10–100 moderate,
/// 100–1,000 moderately strong, 1,000–10,000 strong, 10,000–1,000,000 very strong, above
/// 1,000,000 extremely strong; reciprocals for the other proposition. The cut-points are
/// quoted from memory (the same cut-points appear in university teaching texts on
/// likelihood ratios), not from the guideline's text.
pub fn lr_support(log10_lr: f64) -> String {
    const STRENGTH: [&str; 6] = [
        "weak",
        "moderate",
        "moderately strong",
        "strong",
        "very strong",
        "extremely strong",
    ];
    match support_rank(log10_lr) {
        0 => "no support for either sex".into(),
        rank => {
            let side = if log10_lr > 0.0 { "female" } else { "male" };
            format!("{} support for {side}", STRENGTH[usize::from(rank) - 1])
        }
    }
}

/// Rank of a log10 likelihood ratio on the ENFSI verbal scale of [`lr_support`]: 0 no support,
/// 1 weak, 2 moderate, 3 moderately strong, 4 strong, 5 very strong, 6 extremely strong (the
/// lower edges, log10 of 2, 10, 100, 1 000, 10 000 and 1 000 000).
fn support_rank(log10_lr: f64) -> u8 {
    let m = log10_lr.abs();
    [2f64.log10(), 1.0, 2.0, 3.0, 4.0, 6.0]
        .iter()
        .filter(|&&cut| m >= cut)
        .count() as u8
}

/// Why an individual's category and the words of its likelihood ratio speak with different
/// strength, or `None` when they agree. They can differ for two reasons, which the note names:
/// the prior moved P(female) across a cut-off (the evidence alone, at equal prior odds, gives
/// another category), or the category's cut-off on P(female) and the verbal scale's cut-off on
/// the likelihood ratio do not line up (a firm call at P(female) ≥ 0.95 needs a likelihood
/// ratio of 19 at equal odds, which the ENFSI scale calls moderate support). Strengths are
/// taken to agree when a firm call goes with moderately strong support or more, a probable
/// one with weak or moderate support, and indeterminate with no or weak support.
pub fn category_note(
    thresholds: &Thresholds,
    category: Category,
    log10_lr: f64,
    prior: &str,
) -> Option<String> {
    if category == Category::NotEstimable {
        return None;
    }
    // Written only for the rows that get a note (most rows get none).
    let lr_words = || {
        let lr = 10f64.powf(log10_lr.abs());
        if lr < 1e6 {
            format!("{lr:.0} to 1")
        } else {
            format!("10^{:.1} to 1", log10_lr.abs())
        }
    };
    // The category of the evidence alone, as individuals.csv's category_equal_prior.
    let alone = thresholds.categorise(super::posterior::p_female_given(
        0.5,
        log10_lr * std::f64::consts::LN_10,
    ));
    if alone != category {
        return Some(format!(
            "{} under the {prior} prior; the evidence alone, at equal prior odds, gives {} ({}: {})",
            category.label(),
            alone.label(),
            lr_words(),
            lr_support(log10_lr)
        ));
    }
    let rank = support_rank(log10_lr);
    let agree = match category {
        Category::Female | Category::Male => rank >= 3,
        Category::ProbableFemale | Category::ProbableMale => (1..=2).contains(&rank),
        _ => rank <= 1,
    };
    if agree {
        return None;
    }
    let rule = match category {
        Category::Female => format!("P(female) ≥ {}", thresholds.female),
        Category::ProbableFemale => format!(
            "P(female) from {} to {}",
            thresholds.probable_female, thresholds.female
        ),
        Category::ProbableMale => format!(
            "P(female) from {} to {}",
            thresholds.male, thresholds.probable_male
        ),
        Category::Male => format!("P(female) ≤ {}", thresholds.male),
        _ => format!(
            "P(female) from {} to {}",
            thresholds.probable_male, thresholds.probable_female
        ),
    };
    Some(format!(
        "the category {} means {rule} under the {prior} prior; the likelihood ratio alone, {}, is {} on the ENFSI scale",
        category.label(),
        lr_words(),
        lr_support(log10_lr)
    ))
}

#[cfg(test)]
#[path = "tests/category.rs"]
mod tests;
