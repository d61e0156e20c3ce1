//! The library's top-level error type.

use crate::catalogue::CatalogueError;
use crate::data::InputError;
use crate::fit::FitError;
use crate::model::ModelError;
use std::path::PathBuf;

/// Anything that stops a tessera run.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// The input table has problems (all of them are listed inside).
    #[error(transparent)]
    Input(#[from] InputError),
    /// A trait catalogue is invalid.
    #[error(transparent)]
    Catalogue(#[from] CatalogueError),
    /// A model file is invalid (every problem is listed inside).
    #[error(transparent)]
    Model(#[from] ModelError),
    /// A reference sample cannot support the model asked for (every problem is listed inside).
    #[error(transparent)]
    Fit(#[from] FitError),
    /// Options that cannot be used (every one of them is listed inside).
    #[error(transparent)]
    Options(#[from] OptionProblems),
    /// A settings file (scale map, prior, profile) is invalid.
    #[error("{file}: {message}")]
    Settings {
        /// The file.
        file: String,
        /// What is wrong and what was expected.
        message: String,
    },
    /// A computation gave a value that is not a number (never classified, never written).
    #[error("numerical failure: {message}")]
    Numerical {
        /// What failed, where.
        message: String,
    },
    /// An output could not be built (nothing was written).
    #[error(transparent)]
    Render(#[from] crate::report::RenderError),
    /// A file could not be read or written.
    #[error("{}: {source}", path.display())]
    Io {
        /// The file.
        path: PathBuf,
        /// The underlying error.
        source: std::io::Error,
    },
}

impl Error {
    /// The process exit code for this error (documented in README):
    /// 3 input problems, 4 settings problems, 5 file access, 6 a numerical failure, 7 an
    /// output that could not be built.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Input(_) | Error::Fit(_) => 3,
            Error::Catalogue(_) | Error::Model(_) | Error::Settings { .. } | Error::Options(_) => 4,
            Error::Io { .. } => 5,
            Error::Numerical { .. } => 6,
            Error::Render(_) => 7,
        }
    }
}

/// One option that cannot be used, and why.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct OptionProblem {
    /// The option, as named on the command line without its dashes (`by-sex`).
    pub option: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl OptionProblem {
    /// A problem with `option` (leading dashes are dropped).
    pub fn new(option: &str, message: impl Into<String>) -> Self {
        OptionProblem {
            option: option.trim_start_matches('-').to_string(),
            message: message.into(),
        }
    }
}

impl std::fmt::Display for OptionProblem {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "--{}: {}", self.option, self.message)
    }
}

/// Every option of a run that cannot be used, found before any work began.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OptionProblems(pub Vec<OptionProblem>);

impl OptionProblems {
    /// A single problem.
    pub fn one(option: &str, message: impl Into<String>) -> Self {
        OptionProblems(vec![OptionProblem::new(option, message)])
    }
}

impl std::error::Error for OptionProblems {}

impl std::fmt::Display for OptionProblems {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self.0.as_slice() {
            [one] => write!(f, "{one}"),
            all => {
                write!(
                    f,
                    "{} options cannot be used; nothing was computed:",
                    all.len()
                )?;
                for p in all {
                    write!(f, "\n  {p}")?;
                }
                Ok(())
            }
        }
    }
}
