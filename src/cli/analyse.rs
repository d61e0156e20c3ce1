//! `tessera analyse INPUT --out DIR`: posteriors for every individual and for the
//! assemblage's proportion of females, with the prior sensitivity analysis.

use super::input::{GroupArgs, InputArgs};
use crate::output::FolderWriter;
use crate::pipeline::{render_each, AnalysisOptions, ModelChoice};
use crate::report::analysis::terminal_summary;
use crate::Error;
use std::path::{Path, PathBuf};
/// Arguments of `tessera analyse`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The input table.
    pub file: PathBuf,
    /// Folder for the results (created if absent).
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
    /// Model file (default: the embedded default model).
    #[arg(long, value_name = "FILE")]
    pub model: Option<PathBuf>,
    /// The prior on the proportion female: a shipped name (flat, birth-ratio, even-fixed,
    /// mostly-female, mostly-male, military), fixed:VALUE, or a prior file.
    #[arg(long, value_name = "PRIOR", default_value = "flat")]
    pub prior: String,
    /// Priors for the sensitivity analysis, comma-separated: names, fixed:VALUE, files,
    /// `shipped` (all shipped priors), `sweep` (fixed 0.1 … 0.9).
    #[arg(long, value_name = "SET", default_value = "shipped,sweep")]
    pub priors: String,
    /// Cut-offs on P(female): male, probable male, probable female, female.
    #[arg(long, value_name = "M,PM,PF,F", default_value = "0.05,0.2,0.8,0.95")]
    pub thresholds: String,
    /// Write N joint posterior draws (draws.csv, assemblage_draws.csv). Without it, 1000
    /// draws are still made for the intervals of the numbers of females and males.
    #[arg(long, value_name = "N")]
    pub draws: Option<usize>,
    /// A column to compare between the sexes, repeatable: a 0/1 condition (a lesion: its
    /// prevalence) or a number (stature, an activity-marker score, a lesion grade: its mean and
    /// median). Such columns are never evidence of sex.
    #[arg(long = "by-sex", value_name = "COLUMN")]
    pub by_sex: Vec<String>,
    /// Let the assemblage correct the reference means of the measurements (Gibbs sampling;
    /// writes recalibration.csv, recalibration_check.csv and recalibrated_individuals.csv).
    #[arg(long)]
    pub recalibrate: bool,
    /// Prior SD of a recalibrated mean's shift, in reference within-sex SDs.
    #[arg(long, value_name = "SD", default_value_t = 1.0)]
    pub shift: f64,
    /// Iterations per chain of the recalibration (a quarter is discarded as burn-in).
    #[arg(long, value_name = "N", default_value_t = 2000)]
    pub iterations: usize,
    /// Minimum age (years) from which skeletal (morphological) evidence is used; younger
    /// individuals are assessed from DNA only (default: the model's, usually 18).
    #[arg(long, value_name = "YEARS")]
    pub minimum_age: Option<f64>,
    /// Age classes of the life tables by sex (life_table.csv): from-to in years, each
    /// starting where the one before ends, the last one open.
    #[arg(long, value_name = "CLASSES", default_value = crate::summary::DEFAULT_LIFE_TABLE_CLASSES)]
    pub life_table_classes: String,
    /// Age classes of the tables of age at death by sex and of categories by age
    /// (by_sex_age.csv, category_by_age.csv): from-to in years, the first from 0, each
    /// starting where the one before ends, the last one open.
    #[arg(long, value_name = "CLASSES", default_value = crate::summary::DEFAULT_AGE_CLASSES)]
    pub age_classes: String,
    /// The sex ratio, in males per 100 females, that the population's (and each group's) is
    /// compared with (sex_ratio.csv); 105 is the usual ratio at birth.
    #[arg(long, value_name = "MALES_PER_100_FEMALES", default_value_t = crate::summary::DEFAULT_REFERENCE_RATIO)]
    pub reference_ratio: f64,
    /// The age range (years) over which the mortality of females and males is compared
    /// (hazards.csv): the ratio of their cumulative Gompertz hazards and P(female higher).
    #[arg(long, value_name = "FROM-TO", default_value = crate::summary::hazard::DEFAULT_HAZARD_AGES)]
    pub hazard_ages: String,
    /// Within-sex correlations to try in every latent block of two or more traits, e.g.
    /// 0,0.25,0.5,0.75: how far each individual's P(female) moves when the model's
    /// correlations are replaced by each (correlation_check.csv). For models whose
    /// correlations are assumed rather than published.
    #[arg(long, value_name = "VALUES")]
    pub correlation_check: Option<String>,
    /// Seed of every random stream (same seed, same bytes).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
    /// Which column holds the groups.
    #[command(flatten)]
    pub groups: GroupArgs,
}

impl Args {
    /// The options as plain data.
    pub fn options(&self) -> AnalysisOptions {
        AnalysisOptions {
            model: match &self.model {
                Some(p) => ModelChoice::File(p.clone()),
                None => ModelChoice::Embedded,
            },
            prior: self.prior.clone(),
            priors: self.priors.clone(),
            thresholds: self.thresholds.clone(),
            draws: self.draws,
            by_sex: self.by_sex.clone(),
            recalibrate: self.recalibrate,
            shift: self.shift,
            iterations: self.iterations,
            minimum_age: self.minimum_age,
            life_table_classes: self.life_table_classes.clone(),
            age_classes: self.age_classes.clone(),
            reference_ratio: self.reference_ratio,
            hazard_ages: self.hazard_ages.clone(),
            correlation_check: self.correlation_check.clone().unwrap_or_default(),
            seed: self.seed,
            read: self.input.read_options(&self.groups),
        }
    }
}

/// Run the command; returns the exit code.
///
/// # Errors
/// Every error of the pipeline ([`crate::pipeline`]) and of writing the folder.
pub fn run(args: Args) -> Result<i32, Error> {
    let run = args.options().validate()?;
    let a = run.read_path(&args.file)?;
    for w in run.input_notes(&a) {
        eprintln!("warning: {w}");
    }
    let r = run.analyse(
        a,
        super::command_line(),
        &super::TerminalProgress::default(),
    )?;
    let mut protected: Vec<&Path> = vec![args.file.as_path()];
    protected.extend(args.input.settings_files());
    if let Some(m) = &args.model {
        protected.push(m.as_path());
    }
    // One transaction: the folder ends holding exactly this run's files, or as it was. Each
    // file goes into the staging folder as soon as it is made (a regional run's long tables
    // are not all held in memory together).
    let mut folder = FolderWriter::begin(&args.out, "analyse", &protected)?;
    render_each(&r, &mut |name, bytes| folder.add_piece(name, &bytes))?;
    let names = folder.written().to_vec();
    folder.commit()?;
    for w in &r.recalibration_notes {
        eprintln!("warning: {w}");
    }
    if let Some(recal) = &r.recalibration {
        let changes = match r.recalibration_changes() {
            1 => "1 individual changes".to_string(),
            n => format!("{n} individuals change"),
        };
        println!("Recalibrated {} means of the measurements: {changes} category with them (recalibrated_individuals.csv). The summary below and every other table and figure use the model's reference means.", recal.means.len());
    }
    print!("{}", terminal_summary(&r));
    if let Some(c) = &r.correlation_check {
        println!(
            "{}",
            crate::report::publication::correlation_check_sentences(&r, c)
        );
    }
    for f in crate::report::named_at_most(
        r.flagged.len(),
        r.flagged.iter().cloned(),
        "the `flags` column of individuals.csv",
    ) {
        println!("Flagged for a person to look at: {f}");
    }
    println!("Written to {}: {}", args.out.display(), names.join(", "));
    Ok(0)
}
