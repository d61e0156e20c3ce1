//! `tessera fit REFERENCE --traits SPEC --out MODEL.yaml`: a model fitted to a documented
//! reference collection, with a table of estimates beside it.

use super::input::InputArgs;
use crate::catalogue::Catalogue;
use crate::data::{Assemblage, Individual, Sex};
use crate::fit::{check_spec, fit, FitSpec, FittedModel, ReferenceInfo};
use crate::output::write_all_atomic;
use crate::Error;
use std::path::{Path, PathBuf};

/// Arguments of `tessera fit`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// The reference table: the input columns plus `known_sex` (documented sex).
    pub reference: PathBuf,
    /// Fitting specification (YAML): blocks, their traits, how dispersion and correlation are
    /// shared by the sexes.
    #[arg(long, value_name = "SPEC")]
    pub traits: PathBuf,
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
    let (spec, catalogue) = load_spec(&args.traits)?;
    let settings = args.input.settings(&catalogue)?;
    let a = crate::pipeline::read_path(&args.reference, &catalogue, &settings)?;
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
    let mut protected: Vec<&Path> = vec![args.reference.as_path(), args.traits.as_path()];
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
        args.reference.display(),
        args.traits.display()
    );
    Ok(0)
}
