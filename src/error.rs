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
    /// A settings file (scale map, prior) or option is invalid.
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
    /// 3 input problems, 4 settings problems, 5 file access, 6 a numerical failure.
    pub fn exit_code(&self) -> i32 {
        match self {
            Error::Input(_) | Error::Fit(_) => 3,
            Error::Catalogue(_) | Error::Model(_) | Error::Settings { .. } => 4,
            Error::Io { .. } => 5,
            Error::Numerical { .. } => 6,
        }
    }
}
