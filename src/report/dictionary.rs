//! The data dictionary written beside every folder of outputs (`columns.md`): for each CSV
//! file of the run, each of its columns with its meaning, unit and range. The columns are read
//! from the files' own header rows, so the dictionary lists exactly what was written; the
//! descriptions come from one table here ([`COLUMNS`]). A column that the table does not
//! describe is an input column carried through unchanged.

use crate::output::OutputSet;
use std::fmt::Write as _;

/// One described column: file, column name (a trailing `*` matches a prefix, as in
/// `log10_lr_*`), meaning, unit, range.
type Entry = (
    &'static str,
    &'static str,
    &'static str,
    &'static str,
    &'static str,
);

/// A probability, a share, a count, a log10 ratio: the ranges written most often.
const P: &str = "0 to 1";
const SHARE: &str = "0 to 1";
const COUNT: &str = "whole number ≥ 0";
const ANY: &str = "any real number";

/// Every column tessera writes, by file.
pub const COLUMNS: &[Entry] = &[
    // individuals.csv
    ("individuals.csv", "id", "the individual's id, from the input", "", "text"),
    ("individuals.csv", "group", "group (burial zone, phase, site) from the input's group column; empty without groups", "", "text"),
    ("individuals.csv", "status", "`estimated`, or `not_estimable` when no usable evidence survives (or a subadult without DNA)", "", "estimated | not_estimable"),
    ("individuals.csv", "n_traits", "traits used as evidence", "traits", COUNT),
    ("individuals.csv", "log10_lr", "log10 likelihood ratio female:male of all the evidence (positive favours female)", "log10", ANY),
    ("individuals.csv", "lr_support", "the likelihood ratio in words, on the verbal scale of the ENFSI guideline (2015)", "", "no support … extremely strong support for female/male"),
    ("individuals.csv", "p_female", "posterior probability of female under the chosen prior, with the proportion female learnt from the assemblage (4 decimals with groups, 6 without; two significant digits in scientific form below that)", "probability", P),
    ("individuals.csv", "p_male", "1 − p_female", "probability", P),
    ("individuals.csv", "category", "category of p_female by the cut-offs in run.json (default 0.05 / 0.2 / 0.8 / 0.95)", "", "female | probable_female | indeterminate | probable_male | male | not_estimable"),
    ("individuals.csv", "p_female_min", "lowest P(female) under the priors of the sensitivity set", "probability", P),
    ("individuals.csv", "p_female_max", "highest P(female) under the priors of the sensitivity set", "probability", P),
    ("individuals.csv", "prior_sensitive", "whether the category changes under some prior of the sensitivity set", "", "true | false"),
    ("individuals.csv", "p_female_equal_prior", "P(female) from the evidence alone, at equal prior odds: LR / (1 + LR)", "probability", P),
    ("individuals.csv", "category_equal_prior", "category of p_female_equal_prior", "", "as category"),
    ("individuals.csv", "category_note", "why category and lr_support speak with different strength (the prior moved the category, or the two scales' cut-offs differ); empty when they agree", "", "text"),
    ("individuals.csv", "age", "age at death as recorded (years, a range, an open class, adult or subadult)", "years", "as recorded"),
    ("individuals.csv", "flags", "what a person should look at, separated by `;`: dna_atypical, numerical_failure, integration_error, sides_disagree, below_minimum_age, prior_sensitive", "", "text"),
    ("individuals.csv", "dna_reads", "reads mapped to the X and Y chromosomes (where the model has a DNA block and both counts are recorded)", "reads", COUNT),
    ("individuals.csv", "y_fraction", "share of those reads mapped to Y", "share", SHARE),
    ("individuals.csv", "rx", "X:autosome ratio Rx: X reads per autosomal read over the model's expectation for XX (about 1 for XX, 0.5 for XY; Mittnik et al. 2016); where the model has a dna_x block", "", "0 or more"),
    ("individuals.csv", "log10_lr_*", "log10 likelihood ratio female:male of this block (body region) alone; empty where the block was not used", "log10", ANY),
    // assemblage.csv
    ("assemblage.csv", "prior", "the prior on the proportion female (the chosen prior first, then the sensitivity set)", "", "a prior's name"),
    ("assemblage.csv", "model", "`one population` (one proportion for the assemblage) or `groups` (the hierarchy: the pi_* columns then describe μ, the proportion of the population behind the groups)", "", "one population | groups"),
    ("assemblage.csv", "pi_mean", "posterior mean of the proportion female", "proportion", P),
    ("assemblage.csv", "pi_median", "posterior median of the proportion female", "proportion", P),
    ("assemblage.csv", "pi_lo", "2.5% posterior quantile of the proportion female", "proportion", P),
    ("assemblage.csv", "pi_hi", "97.5% posterior quantile of the proportion female", "proportion", P),
    ("assemblage.csv", "n_individuals", "individuals in the input", "individuals", COUNT),
    ("assemblage.csv", "n_estimable", "individuals with usable evidence", "individuals", COUNT),
    ("assemblage.csv", "expected_females", "expected number of females: the sum of every individual's P(female)", "individuals", "0 to n_individuals"),
    ("assemblage.csv", "pi_hdi_lo", "lower end of the 95% highest-density interval of the proportion female", "proportion", P),
    ("assemblage.csv", "pi_hdi_hi", "upper end of that interval", "proportion", P),
    ("assemblage.csv", "p_pi_below_half", "posterior probability of fewer females than males in the population", "probability", P),
    ("assemblage.csv", "sex_ratio_median", "males per 100 females in the population: posterior median", "males per 100 females", "above 0"),
    ("assemblage.csv", "sex_ratio_lo", "2.5% quantile of that ratio", "males per 100 females", "above 0"),
    ("assemblage.csv", "sex_ratio_hi", "97.5% quantile of that ratio", "males per 100 females", "above 0"),
    ("assemblage.csv", "log10_bf_one_sex", "log10 Bayes factor of a community of one sex against a mixed one (negative: the data favour a mixed community)", "log10", ANY),
    ("assemblage.csv", "n_female_mean", "number of females among the individuals, mean over the joint draws (on the chosen prior's row only)", "individuals", "0 to n_individuals"),
    ("assemblage.csv", "n_female_lo", "2.5% quantile of that number over the draws", "individuals", COUNT),
    ("assemblage.csv", "n_female_hi", "97.5% quantile of that number over the draws", "individuals", COUNT),
    ("assemblage.csv", "n_male_mean", "number of males, mean over the joint draws", "individuals", "0 to n_individuals"),
    ("assemblage.csv", "n_male_lo", "2.5% quantile of that number", "individuals", COUNT),
    ("assemblage.csv", "n_male_hi", "97.5% quantile of that number", "individuals", COUNT),
    ("assemblage.csv", "kappa_median", "how alike the groups' proportions are (the concentration κ of their Beta distribution around μ; larger is more alike): posterior median, on `groups` rows", "", "above 0"),
    ("assemblage.csv", "kappa_lo", "2.5% quantile of κ", "", "above 0"),
    ("assemblage.csv", "kappa_hi", "97.5% quantile of κ", "", "above 0"),
    ("assemblage.csv", "log10_bf_groups_differ", "log10 Bayes factor of groups that differ against groups that share one proportion", "log10", ANY),
    // sensitivity.csv
    ("sensitivity.csv", "id", "the individual's id", "", "text"),
    ("sensitivity.csv", "prior", "a prior of the sensitivity set", "", "a prior's name"),
    ("sensitivity.csv", "p_female", "P(female) under that prior", "probability", P),
    ("sensitivity.csv", "category", "its category", "", "as in individuals.csv"),
    // groups.csv
    ("groups.csv", "group", "the group, in file order", "", "text"),
    ("groups.csv", "n", "individuals in the group", "individuals", COUNT),
    ("groups.csv", "pi_mean", "posterior mean of the group's proportion female (hierarchical model)", "proportion", P),
    ("groups.csv", "pi_lo", "2.5% quantile of it", "proportion", P),
    ("groups.csv", "pi_hi", "97.5% quantile of it", "proportion", P),
    ("groups.csv", "expected_females", "sum of the group's P(female)", "individuals", "0 to n"),
    ("groups.csv", "n_estimable", "of the group, individuals with usable evidence", "individuals", COUNT),
    ("groups.csv", "pi_median", "posterior median of the group's proportion female", "proportion", P),
    // draws.csv, assemblage_draws.csv
    ("draws.csv", "draw", "the joint posterior draw", "", "1 to the number of draws"),
    ("draws.csv", "id", "the individual's id", "", "text"),
    ("draws.csv", "sex", "the individual's sex in that draw", "", "F | M"),
    ("assemblage_draws.csv", "draw", "the joint posterior draw (same numbering as draws.csv)", "", "1 to the number of draws"),
    ("assemblage_draws.csv", "mu", "proportion female of the population (μ with groups, else π)", "proportion", P),
    ("assemblage_draws.csv", "kappa", "concentration of the groups' proportions around μ (empty without groups)", "", "above 0"),
    ("assemblage_draws.csv", "pi_*", "that group's proportion female in the draw", "proportion", P),
    ("assemblage_draws.csv", "n_female", "females among the individuals in the draw", "individuals", COUNT),
    ("assemblage_draws.csv", "n_male", "males among the individuals in the draw", "individuals", COUNT),
    ("assemblage_draws.csv", "sex_ratio", "males per 100 females among the individuals in the draw", "males per 100 females", "0 or above; empty with no female"),
    // by_sex_numeric.csv
    ("by_sex_numeric.csv", "outcome", "the numeric column named by --by-sex (a measurement, a score, a grade), as written in the input", "", "text"),
    ("by_sex_numeric.csv", "n_recorded", "individuals in the tables by sex with a value", "individuals", COUNT),
    ("by_sex_numeric.csv", "n_left_out", "individuals with a value but without evidence of sex, or subadults", "individuals", COUNT),
    ("by_sex_numeric.csv", "n_female", "individuals with a value drawn female, posterior mean", "individuals", "≥ 0"),
    ("by_sex_numeric.csv", "n_male", "individuals with a value drawn male, posterior mean", "individuals", "≥ 0"),
    ("by_sex_numeric.csv", "quantity", "mean_female, mean_male (the means of the normal distribution in each sex), difference_female_minus_male, sd_female, sd_male, median_female, median_male (medians of the values among those drawn female, male), p_female_higher (P(mean female > mean male)), rhat and effective_draws (the chains' convergence)", "", "text"),
    ("by_sex_numeric.csv", "estimate", "posterior mean (the probability for p_female_higher; the statistic for rhat and effective_draws)", "the outcome's unit, or as the quantity says", ANY),
    ("by_sex_numeric.csv", "lo", "2.5% posterior quantile; empty for p_female_higher, rhat and effective_draws", "as estimate", ANY),
    ("by_sex_numeric.csv", "hi", "97.5% posterior quantile; empty as lo", "as estimate", ANY),
    // hazards.csv
    ("hazards.csv", "quantity", "alpha_female, alpha_male (the Gompertz hazard at the adult start, per year); beta_female, beta_male (its rate of increase, per year); hazard_ratio_female_male (females' cumulative hazard over the age range divided by the males'); p_female_higher (P(that ratio > 1)); makeham_identifiable_*, makeham_lambda_*, makeham_lr_statistic_* (a Makeham term λ added to the hazard, tried in the first draws: the share of them where it was identifiable, λ per year, and the likelihood-ratio statistic against Gompertz alone); hazard_female, hazard_male (the hazard at the age in `age`, per year)", "", "text"),
    ("hazards.csv", "age", "the age range of the comparison (from-to), or the age of a hazard; empty for the parameters", "years", "text"),
    ("hazards.csv", "estimate", "median over the joint draws (the probability for p_female_higher)", "as the quantity says", ANY),
    ("hazards.csv", "lo", "2.5% quantile over the draws; empty for p_female_higher", "as estimate", ANY),
    ("hazards.csv", "hi", "97.5% quantile over the draws; empty for p_female_higher", "as estimate", ANY),
    // sex_ratio.csv
    ("sex_ratio.csv", "group", "`all` for the whole assemblage, else the group (each taken on its own)", "", "text"),
    ("sex_ratio.csv", "n", "individuals", "individuals", COUNT),
    ("sex_ratio.csv", "n_estimable", "individuals with usable evidence of sex (DNA alone counts)", "individuals", COUNT),
    ("sex_ratio.csv", "reference_ratio", "the reference sex ratio (--reference-ratio; 105, the usual ratio at birth, unless set)", "males per 100 females", "> 0"),
    ("sex_ratio.csv", "sex_ratio_median", "posterior median of the population's sex ratio under the chosen prior", "males per 100 females", "≥ 0"),
    ("sex_ratio.csv", "sex_ratio_lo", "2.5% posterior quantile", "males per 100 females", "≥ 0"),
    ("sex_ratio.csv", "sex_ratio_hi", "97.5% posterior quantile", "males per 100 females", "≥ 0"),
    ("sex_ratio.csv", "p_more_males_than_reference", "posterior probability that the ratio is above the reference", "probability", P),
    ("sex_ratio.csv", "log10_bf_reference", "log10 Bayes factor of \"the ratio is the reference\" against \"any ratio, as the prior allows\" (positive favours the reference)", "log10", ANY),
    // life_table.csv
    ("life_table.csv", "sex", "whose life table: female, male, or all (both sexes of the tables by sex)", "", "female | male | all"),
    ("life_table.csv", "age_class", "age class as set by --life-table-classes (the last one open)", "", "text"),
    ("life_table.csv", "age_from", "start of the class", "years", "≥ 0"),
    ("life_table.csv", "age_to", "end of the class (not included); empty for the open last class", "years", "> age_from"),
    ("life_table.csv", "quantity", "deaths (number in the class); dx (share of deaths, per cent); lx (survivors entering the class, per cent); qx (probability of dying in the class on entering it); Lx (years lived in the class per 100 entering the first); Tx (years lived from the class on); ex (mean years still to live on entering the class)", "", "deaths | dx | lx | qx | Lx | Tx | ex"),
    ("life_table.csv", "estimate", "mean over the joint draws of sex and of age within its recorded interval: the table of these dead (ex of the open last class follows from closing it at the age in report.md)", "as the quantity says", "≥ 0"),
    ("life_table.csv", "lo", "2.5% quantile over the draws: these dead, sex and age uncertain", "as estimate", "≥ 0"),
    ("life_table.csv", "hi", "97.5% quantile over the draws: these dead", "as estimate", "≥ 0"),
    ("life_table.csv", "population_lo", "2.5% quantile of the population's table, the sampling of the dead added (Bayesian bootstrap); empty for deaths", "as estimate", "≥ 0"),
    ("life_table.csv", "population_hi", "97.5% quantile of the population's table; empty for deaths", "as estimate", "≥ 0"),
    // by_sex_age.csv, by_sex_prevalence.csv, category_by_age.csv
    ("by_sex_age.csv", "quantity", "what the row gives: mean_age_female, mean_age_male, difference_female_minus_male (years); p_females_die_younger (a probability, estimate only); females_aged_CLASS and males_aged_CLASS (numbers of individuals)", "", "text"),
    ("by_sex_age.csv", "estimate", "mean over the joint draws (the probability for p_females_die_younger)", "years, probability or individuals, as the quantity says", ANY),
    ("by_sex_age.csv", "lo", "2.5% quantile over the draws", "as estimate", ANY),
    ("by_sex_age.csv", "hi", "97.5% quantile over the draws", "as estimate", ANY),
    ("by_sex_prevalence.csv", "condition", "the 0/1 column given with --by-sex", "", "text"),
    ("by_sex_prevalence.csv", "n_recorded", "individuals in the tables by sex with the condition recorded", "individuals", COUNT),
    ("by_sex_prevalence.csv", "n_present", "of them, with the condition present", "individuals", COUNT),
    ("by_sex_prevalence.csv", "n_left_out", "recorded but left out (no evidence of sex, or subadult)", "individuals", COUNT),
    ("by_sex_prevalence.csv", "n_female", "females among the recorded, posterior mean", "individuals", "0 to n_recorded"),
    ("by_sex_prevalence.csv", "n_male", "males among the recorded, posterior mean", "individuals", "0 to n_recorded"),
    ("by_sex_prevalence.csv", "prevalence_female", "prevalence among females, posterior mean (joint posterior of sexes and prevalences)", "proportion", P),
    ("by_sex_prevalence.csv", "female_lo", "2.5% quantile of it", "proportion", P),
    ("by_sex_prevalence.csv", "female_hi", "97.5% quantile of it", "proportion", P),
    ("by_sex_prevalence.csv", "prevalence_male", "prevalence among males, posterior mean", "proportion", P),
    ("by_sex_prevalence.csv", "male_lo", "2.5% quantile of it", "proportion", P),
    ("by_sex_prevalence.csv", "male_hi", "97.5% quantile of it", "proportion", P),
    ("by_sex_prevalence.csv", "difference", "prevalence female − male, posterior mean", "difference of proportions", "−1 to 1"),
    ("by_sex_prevalence.csv", "difference_lo", "2.5% quantile of it", "difference of proportions", "−1 to 1"),
    ("by_sex_prevalence.csv", "difference_hi", "97.5% quantile of it", "difference of proportions", "−1 to 1"),
    ("by_sex_prevalence.csv", "p_female_higher", "posterior probability that the prevalence is higher among females", "probability", P),
    ("by_sex_prevalence.csv", "odds_ratio_median", "odds ratio female : male, posterior median", "ratio", "above 0"),
    ("by_sex_prevalence.csv", "odds_ratio_lo", "2.5% quantile of it", "ratio", "above 0"),
    ("by_sex_prevalence.csv", "odds_ratio_hi", "97.5% quantile of it", "ratio", "above 0"),
    ("by_sex_prevalence.csv", "rhat", "largest split-R̂ of the chains (converged at ≤ 1.01)", "", "about 1"),
    ("by_sex_prevalence.csv", "effective_draws", "smallest effective sample size of the chains (enough at ≥ 400)", "draws", COUNT),
    ("category_by_age.csv", "age_class", "age class at death (`--age-classes`), by the midpoint of the recorded interval; `adult of unknown age` for adults recorded without an age; `unknown` without any age", "years", "text"),
    ("category_by_age.csv", "female", "individuals of the class in this category (under the chosen prior)", "individuals", COUNT),
    ("category_by_age.csv", "probable_female", "as female, for this category", "individuals", COUNT),
    ("category_by_age.csv", "indeterminate", "as female, for this category", "individuals", COUNT),
    ("category_by_age.csv", "probable_male", "as female, for this category", "individuals", COUNT),
    ("category_by_age.csv", "male", "as female, for this category", "individuals", COUNT),
    ("category_by_age.csv", "not_estimable", "as female, for this category", "individuals", COUNT),
    // correlation check
    ("correlation_check.csv", "id", "the individual (only those whose evidence used a latent block of two or more traits)", "", "text"),
    ("correlation_check.csv", "correlation", "the within-sex correlation put in place of the model's in every such block", "", "0 to 1"),
    ("correlation_check.csv", "p_female", "posterior probability of female with that correlation, the main analysis's prior odds held", "", P),
    ("correlation_check.csv", "p_female_main", "posterior probability of female in the main analysis (the model's correlations)", "", P),
    ("correlation_check.csv", "change", "p_female − p_female_main", "probability", "−1 to 1"),
    ("correlation_check.csv", "category", "category of p_female under the run's cut-offs", "", "female | probable_female | indeterminate | probable_male | male"),
    ("correlation_check.csv", "category_main", "category in the main analysis", "", "female | probable_female | indeterminate | probable_male | male"),
    ("correlation_check.csv", "category_changed", "whether the category differs from the main analysis's", "", "true | false"),
    // recalibration
    ("recalibration.csv", "trait", "the measurement", "", "a trait id"),
    ("recalibration.csv", "sex", "the sex whose mean it is", "", "F | M"),
    ("recalibration.csv", "reference_mean", "the model's (reference sample's) mean", "the trait's unit", ANY),
    ("recalibration.csv", "recalibrated_mean", "posterior mean of this assemblage's mean", "the trait's unit", ANY),
    ("recalibration.csv", "lo", "2.5% quantile of it", "the trait's unit", ANY),
    ("recalibration.csv", "hi", "97.5% quantile of it", "the trait's unit", ANY),
    ("recalibration.csv", "shift_sd", "(recalibrated − reference mean) / reference within-sex SD", "reference SDs", ANY),
    ("recalibration.csv", "rhat", "split-R̂ of the chains (converged at ≤ 1.01)", "", "about 1"),
    ("recalibration.csv", "ess", "effective sample size (enough at ≥ 400)", "draws", COUNT),
    ("recalibration_check.csv", "trait", "the measurement", "", "a trait id"),
    ("recalibration_check.csv", "n", "individuals with it recorded", "individuals", COUNT),
    ("recalibration_check.csv", "share_outside_99", "share of those measurements outside the reference model's central 99% predictive range", "share", SHARE),
    ("recalibration_check.csv", "flagged", "whether that share is beyond 1% plus three binomial standard errors", "", "true | false"),
    ("recalibrated_individuals.csv", "id", "the individual's id", "", "text"),
    ("recalibrated_individuals.csv", "p_female_reference", "P(female) with the model's reference means (as individuals.csv)", "probability", P),
    ("recalibrated_individuals.csv", "p_female_recalibrated", "P(female) with the recalibrated means", "probability", P),
    ("recalibrated_individuals.csv", "category_reference", "category of p_female_reference", "", "as in individuals.csv"),
    ("recalibrated_individuals.csv", "category_recalibrated", "category of p_female_recalibrated", "", "as in individuals.csv"),
    ("recalibrated_individuals.csv", "category_changed", "whether the two categories differ", "", "true | false"),
    // validate
    ("predictions.csv", "id", "the documented individual's id", "", "text"),
    ("predictions.csv", "known_sex", "documented sex", "", "female | male"),
    ("predictions.csv", "fold", "the cross-validation fold it was held out in", "", COUNT),
    ("predictions.csv", "log10_lr", "log10 likelihood ratio from a model that did not see it", "log10", ANY),
    ("predictions.csv", "p_female", "P(female) at the validation's prior", "probability", P),
    ("predictions.csv", "category", "its category", "", "as in individuals.csv"),
    ("predictions.csv", "n_traits", "traits used", "traits", COUNT),
    ("predictions.csv", "correct", "whether P(female) is on the documented sex's side of ½", "", "yes | no"),
    ("reliability.csv", "p_female_from", "lower edge of the bin of predicted P(female)", "probability", P),
    ("reliability.csv", "p_female_to", "upper edge of the bin", "probability", P),
    ("reliability.csv", "n", "individuals in the bin", "individuals", COUNT),
    ("reliability.csv", "mean_p_female", "mean predicted P(female) in the bin", "probability", P),
    ("reliability.csv", "share_female", "share documented female in the bin", "share", SHARE),
    ("scores*.csv", "subset", "which individuals the row scores (`all`, …)", "", "text"),
    ("scores*.csv", "age_class", "age class at death (midpoint of the recorded interval)", "years", "text"),
    ("scores*.csv", "block", "the block (body region) whose evidence alone is scored", "", "a block id"),
    ("scores*.csv", "traits_used", "number of traits the individuals had", "traits", COUNT),
    ("scores*.csv", "category", "the category of the calls", "", "as in individuals.csv"),
    ("scores*.csv", "n", "individuals scored", "individuals", COUNT),
    ("scores*.csv", "n_female", "of them, documented female", "individuals", COUNT),
    ("scores*.csv", "n_male", "of them, documented male", "individuals", COUNT),
    ("scores*.csv", "accuracy", "share correct at P(female) = ½ (ties wrong)", "share", SHARE),
    ("scores*.csv", "accuracy_female", "share of the documented females correct", "share", SHARE),
    ("scores*.csv", "accuracy_male", "share of the documented males correct", "share", SHARE),
    ("scores*.csv", "sex_bias", "accuracy_female − accuracy_male", "difference of shares", "−1 to 1"),
    ("scores*.csv", "share_indeterminate", "share between the probable-male and probable-female cut-offs", "share", SHARE),
    ("scores*.csv", "accuracy_determinate", "share correct among those not indeterminate", "share", SHARE),
    ("scores*.csv", "brier", "Brier score: mean of (P(female) − documented female)² (0 perfect, 0.25 a coin)", "", "0 to 1"),
    ("scores*.csv", "log_loss", "mean of −ln P(documented sex)", "nats", "0 or above"),
    ("scores*.csv", "accuracy_lo", "lower end of the 95% Wilson interval of accuracy", "share", SHARE),
    ("scores*.csv", "accuracy_hi", "upper end of that interval", "share", SHARE),
    ("scores*.csv", "share_female", "of the calls of this category, the share documented female", "share", SHARE),
    ("scores*.csv", "share_female_lo", "lower end of its 95% Wilson interval", "share", SHARE),
    ("scores*.csv", "share_female_hi", "upper end of its 95% Wilson interval", "share", SHARE),
    // agreement
    ("agreement.csv", "trait", "the trait scored by both observers", "", "a trait id"),
    ("agreement.csv", "kind", "`ordinal` (grades) or `metric` (measurements)", "", "ordinal | metric"),
    ("agreement.csv", "pairs", "individuals with an exact value from both observers", "individuals", COUNT),
    ("agreement.csv", "ranges_left_out", "pairs left out because an observer gave a range of grades", "individuals", COUNT),
    ("agreement.csv", "statistic", "kappa_linear, kappa_quadratic (weighted kappas, Cohen 1968), exact_agreement (share), polychoric_r, observer_error_sd_share (share of the latent SD that is scoring noise); tem (technical error of measurement, in the trait's unit), icc_2_1 (Shrout & Fleiss 1979), relative_tem_percent", "", "text"),
    ("agreement.csv", "estimate", "the statistic's value", "as the statistic says", ANY),
    ("agreement.csv", "lo", "2.5% bootstrap quantile, where there is an interval", "as estimate", ANY),
    ("agreement.csv", "hi", "97.5% bootstrap quantile", "as estimate", ANY),
    ("agreement.csv", "note", "on kappa rows, when the pairs are fewer than a kappa needs (2k² for k grades)", "", "text"),
    ("disagreements.csv", "id", "the individual's id", "", "text"),
    ("disagreements.csv", "trait", "the trait", "", "a trait id"),
    ("disagreements.csv", "first", "the first observer's value", "grade or the trait's unit", "as recorded"),
    ("disagreements.csv", "second", "the second observer's value", "grade or the trait's unit", "as recorded"),
];

/// Whether a dictionary file pattern (`scores*.csv`) matches a file name.
fn file_matches(pattern: &str, file: &str) -> bool {
    match pattern.split_once('*') {
        Some((head, tail)) => file.starts_with(head) && file.ends_with(tail),
        None => pattern == file,
    }
}

/// The entry describing `column` of `file`: an exact name first, then a prefix (`log10_lr_*`).
pub fn describe(file: &str, column: &str) -> Option<&'static Entry> {
    let of_file = || COLUMNS.iter().filter(|e| file_matches(e.0, file));
    of_file().find(|e| e.1 == column).or_else(|| {
        of_file().find(|e| {
            e.1.strip_suffix('*')
                .is_some_and(|prefix| column.starts_with(prefix))
        })
    })
}

/// The header row of a CSV file's bytes (empty when it cannot be read).
pub fn header_of(bytes: &[u8]) -> Vec<String> {
    let mut r = csv::ReaderBuilder::new()
        .has_headers(false)
        .from_reader(bytes);
    r.records()
        .next()
        .and_then(Result::ok)
        .map(|rec| rec.iter().map(String::from).collect())
        .unwrap_or_default()
}

/// `columns.md` for the CSV files of `files`: every column of every file with its meaning,
/// unit and range. `carried` names the input columns carried through unchanged.
pub fn columns_md(files: &OutputSet, carried: &[String]) -> String {
    let tables: Vec<(String, Vec<String>)> = files
        .files
        .iter()
        .filter(|f| f.name.ends_with(".csv"))
        .map(|f| (f.name.clone(), header_of(&f.bytes)))
        .collect();
    columns_md_of(&tables, carried)
}

/// `columns.md` from each CSV file's name and header row (as [`header_of`] reads it), for a
/// renderer that does not keep the files.
pub fn columns_md_of(tables: &[(String, Vec<String>)], carried: &[String]) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "# Columns of the files in this folder\n");
    let _ = writeln!(s, "What every column of every table means, its unit and its range. Numbers use a full stop for decimals and an ASCII minus; an empty cell is a value that does not apply or could not be computed. Probabilities and intervals are posterior (Bayesian) unless said otherwise; \"95% interval\" is the 2.5% to 97.5% quantiles.\n");
    for (name, columns) in tables {
        let _ = writeln!(s, "## {name}\n");
        let _ = writeln!(s, "| column | meaning | unit | range |\n|---|---|---|---|");
        for col in columns {
            let (meaning, unit, range) = match describe(name, col) {
                Some(e) => (e.2.to_string(), e.3, e.4),
                None if carried.contains(col) => (
                    "a column of the input, carried through unchanged (never evidence)".into(),
                    "",
                    "as recorded",
                ),
                None => ("(not described)".into(), "", ""),
            };
            let _ = writeln!(
                s,
                "| `{}` | {} | {} | {} |",
                col.replace('|', "\\|"),
                meaning.replace('|', "\\|"),
                unit,
                range.replace('|', "\\|")
            );
        }
        let _ = writeln!(s);
    }
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn patterns_match_prefixes_and_file_families() {
        assert!(file_matches("scores*.csv", "scores_by_age.csv"));
        assert!(!file_matches("scores*.csv", "predictions.csv"));
        assert_eq!(
            describe("individuals.csv", "log10_lr_pelvis").map(|e| e.1),
            Some("log10_lr_*")
        );
        assert_eq!(
            describe("individuals.csv", "log10_lr").map(|e| e.1),
            Some("log10_lr")
        );
        assert!(describe("individuals.csv", "zone").is_none());
    }

    #[test]
    fn every_column_of_a_written_table_is_described() {
        let mut files = OutputSet::default();
        files.push("groups.csv", b"group,n,pi_mean\nearly,3,0.5\n".to_vec());
        files.push("individuals.csv", b"id,zone,mystery\nA,north,1\n".to_vec());
        let md = columns_md(&files, &["zone".to_string()]);
        assert!(md.contains("| `pi_mean` | posterior mean of the group's proportion female"));
        assert!(md.contains("| `zone` | a column of the input, carried through unchanged"));
        assert!(md.contains("| `mystery` | (not described)"));
    }

    #[test]
    fn no_column_is_described_twice() {
        for (i, a) in COLUMNS.iter().enumerate() {
            assert!(
                COLUMNS[i + 1..].iter().all(|b| (b.0, b.1) != (a.0, a.1)),
                "{} {} twice",
                a.0,
                a.1
            );
        }
    }
}
