//! `tessera fit REFERENCE --traits SPEC --out MODEL.yaml`: a model fitted to a documented
//! reference collection, with a table of estimates beside it; `tessera fit --from-summary
//! SUMMARY.yaml --out MODEL.yaml`: a model built from the summary statistics a paper publishes.

use super::input::InputArgs;
use crate::catalogue::Catalogue;
use crate::data::{Assemblage, Individual, Sex};
use crate::fit::summary::{build_from_summary, SummaryFile, SummarySpec};
use crate::fit::{check_spec, fit, FitSpec, FittedModel, ReferenceInfo};
use crate::output::write_all_atomic;
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera fit`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The reference table: the input columns plus `known_sex` (documented sex).
    #[arg(required_unless_present = "from_summary")]
    pub reference: Option<PathBuf>,
    /// Fitting specification (YAML): blocks, their traits, how dispersion and correlation are
    /// shared by the sexes.
    #[arg(long, value_name = "SPEC", required_unless_present = "from_summary")]
    pub traits: Option<PathBuf>,
    /// Build the model from published summary statistics instead of a reference table:
    /// grade counts (or shares with n) and means and SDs by sex, with the publication and its
    /// sample (YAML; see the manual's "Models from published tables").
    #[arg(long, value_name = "SUMMARY.yaml", conflicts_with_all = ["reference", "traits"])]
    pub from_summary: Option<PathBuf>,
    /// Where to write the model (YAML). The estimates with standard errors go beside it as
    /// `<name>.estimates.csv`.
    #[arg(long, value_name = "MODEL.yaml")]
    pub out: PathBuf,
    /// How to read the table.
    #[command(flatten)]
    pub input: InputArgs,
}

/// Read a fitting specification and the catalogue it extends.
///
/// # Errors
/// [`Error::Io`] when unreadable, [`Error::Settings`] listing every problem of the document.
pub fn load_spec(path: &Path) -> Result<(FitSpec, Catalogue), Error> {
    let settings = |message: String| Error::Settings {
        file: path.display().to_string(),
        message,
    };
    let text = crate::limits::read_settings_text(path).map_err(|e| e.into_error(path))?;
    let spec = FitSpec::from_yaml(&text).map_err(settings)?;
    let mut catalogue = Catalogue::standard()?;
    catalogue
        .extend(spec.traits.clone())
        .map_err(|e| settings(e.to_string()))?;
    check_spec(&spec, &catalogue).map_err(|p| settings(format!("\n  {}", p.join("\n  "))))?;
    Ok((spec, catalogue))
}

/// The individuals of known sex, and a warning when some have none.
pub fn documented(a: &Assemblage) -> (Vec<(&Individual, Sex)>, Option<String>) {
    let known: Vec<(&Individual, Sex)> = a
        .individuals
        .iter()
        .filter_map(|i| i.known_sex.map(|s| (i, s)))
        .collect();
    let left = a.individuals.len() - known.len();
    let warning = (left > 0).then(|| {
        format!("{left} individuals have no documented sex (`known_sex`) and are not used")
    });
    (known, warning)
}

/// The path of the estimates table beside a model file.
pub fn estimates_path(model: &Path) -> PathBuf {
    let stem = model
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "model".into());
    model.with_file_name(format!("{stem}.estimates.csv"))
}

/// Run the command; returns the exit code.
///
/// # Errors
/// Settings and file errors; [`Error::Input`] and [`Error::Fit`] with every problem inside.
pub fn run(args: Args) -> Result<i32, Error> {
    let (Some(reference), Some(traits)) = (args.reference.clone(), args.traits.clone()) else {
        return run_summary(args);
    };
    let (spec, catalogue) = load_spec(&traits)?;
    let settings = args.input.settings(&catalogue)?;
    let a = crate::pipeline::read_path(&reference, &catalogue, &settings)?;
    let (known, unknown) = documented(&a);
    let info = ReferenceInfo {
        file: a.file.clone(),
        sha256: a.sha256.clone(),
        command: super::command_line().join(" "),
    };
    let fitted: FittedModel = fit(&spec, &catalogue, &known, &info)?;
    let yaml = fitted.to_yaml().map_err(|m| Error::Settings {
        file: args.out.display().to_string(),
        message: m,
    })?;
    // The written model must load as any model does.
    crate::model::Model::from_yaml_in(&args.out.display().to_string(), &yaml, args.out.parent())?;
    let mut protected: Vec<&Path> = vec![reference.as_path(), traits.as_path()];
    protected.extend(args.input.settings_files());
    let estimates = estimates_path(&args.out);
    let table = fitted.estimates_csv()?;
    write_all_atomic(
        &[
            (estimates.clone(), table.as_slice()),
            (args.out.clone(), yaml.as_bytes()),
        ],
        &protected,
    )?;
    println!(
        "Fitted `{}` to {} females and {} males of documented sex from {}.",
        spec.name, fitted.n_female, fitted.n_male, a.file
    );
    for b in &spec.blocks {
        let n = b.traits.len();
        println!(
            "  block {:<14} {n} trait{}",
            b.id,
            if n == 1 { "" } else { "s" }
        );
    }
    for inc in spec.includes() {
        println!(
            "  block {:<14} taken as it is from model `{}` (not fitted; `include:` in the specification)",
            inc.blocks.join(", "),
            inc.model
        );
    }
    let mut warnings: Vec<String> = a.warnings.iter().map(|w| w.to_string()).collect();
    warnings.extend(unknown);
    warnings.extend(fitted.warnings.iter().cloned());
    if !warnings.is_empty() {
        println!("Look at these before using the model:");
        for w in &warnings {
            println!("  - {w}");
        }
    }
    println!(
        "Wrote {} and {} (estimates with standard errors).",
        args.out.display(),
        estimates.display()
    );
    println!(
        "Check the model's error rates on this reference with `tessera validate {} --traits {}`.",
        reference.display(),
        traits.display()
    );
    Ok(0)
}

/// `tessera fit --from-summary SUMMARY.yaml --out MODEL.yaml`: a model built from published
/// summary statistics, with its table of estimates beside it.
///
/// # Errors
/// Settings and file errors; [`Error::Fit`] naming every problem of the summary.
fn run_summary(args: Args) -> Result<i32, Error> {
    let Some(path) = args.from_summary.as_deref() else {
        return Err(Error::Settings {
            file: args.out.display().to_string(),
            message: "give a reference table with --traits, or --from-summary".into(),
        });
    };
    let settings = |message: String| Error::Settings {
        file: path.display().to_string(),
        message,
    };
    let text = crate::limits::read_settings_text(path).map_err(|e| e.into_error(path))?;
    let spec = SummarySpec::from_yaml(&text).map_err(settings)?;
    let mut catalogue = Catalogue::standard()?;
    catalogue
        .extend(spec.traits.clone())
        .map_err(|e| settings(e.to_string()))?;
    let file = SummaryFile {
        file: path.display().to_string(),
        sha256: crate::data::sha256_hex(text.as_bytes()),
        command: super::command_line().join(" "),
    };
    let built = build_from_summary(&spec, &catalogue, &file)?;
    let yaml = built.to_yaml().map_err(|m| Error::Settings {
        file: args.out.display().to_string(),
        message: m,
    })?;
    crate::model::Model::from_yaml_in(&args.out.display().to_string(), &yaml, args.out.parent())?;
    let estimates = estimates_path(&args.out);
    let table = built.estimates_csv()?;
    write_all_atomic(
        &[
            (estimates.clone(), table.as_slice()),
            (args.out.clone(), yaml.as_bytes()),
        ],
        &[path],
    )?;
    println!(
        "Built `{}` from the published values in {} ({} females, {} males in the source).",
        spec.name,
        path.display(),
        built.n_female,
        built.n_male
    );
    for b in &spec.blocks {
        let n = b.traits.len();
        println!(
            "  block {:<14} {n} trait{}",
            b.id,
            if n == 1 { "" } else { "s" }
        );
    }
    if !built.warnings.is_empty() {
        println!("Look at these before using the model:");
        for w in &built.warnings {
            println!("  - {w}");
        }
    }
    println!(
        "Wrote {} and {} (estimates with standard errors).",
        args.out.display(),
        estimates.display()
    );
    Ok(0)
}
