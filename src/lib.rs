//! # tessera
//!
//! Bayesian estimation of biological sex from skeletal evidence for bioarchaeologists and
//! forensic anthropologists: every surviving piece of evidence of every individual (cranial
//! and pelvic trait scores, bone and tooth measurements, ancient-DNA read counts) combined
//! into one posterior, missing elements marginalised, the assemblage's sex ratio learnt from
//! the assemblage itself.
//!
//! Results are estimates, not identifications. Forensic casework needs validated methods,
//! accredited practice and the rules of the jurisdiction. Biological sex is not gender.
//!
//! ## Reading an assemblage
//!
//! ```
//! use tessera::catalogue::Catalogue;
//! use tessera::data::{read_assemblage_text, ReadSettings, Observation};
//!
//! let table = "id,glabella,mastoid_l,femur_head_diameter_r,grave_goods\n\
//!              T-01,4,3-4,46.5,knife\n\
//!              T-02,NA,,41.0,spindle whorl\n";
//! let catalogue = Catalogue::standard()?;
//! let a = read_assemblage_text("demo.csv", table.as_bytes(), &catalogue, &ReadSettings::default())?;
//! assert_eq!(a.individuals.len(), 2);
//! let mastoid = catalogue.position("mastoid").ok_or("mastoid is in the catalogue")?;
//! assert_eq!(a.individuals[0].observations[mastoid], Some(Observation::Grade { low: 3, high: 4 }));
//! assert_eq!(a.carried_columns, vec!["grave_goods"]);
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
//!
//! ## A whole analysis
//!
//! What `tessera analyse` does, as library calls ([`pipeline`]): options (plain data whose
//! defaults are the command line's) checked all at once, a table read from bytes, the
//! analysis, and its files in memory.
//!
//! ```
//! use tessera::pipeline::{render, AnalysisOptions};
//! use tessera::progress::Silent;
//!
//! let table = "id,glabella,mastoid_l,femur_head_diameter_r\n\
//!              T-01,4,3-4,46.5\n\
//!              T-02,1,2,41.0\n";
//! let options = AnalysisOptions { priors: "flat,fixed:0.5".into(), ..AnalysisOptions::default() };
//! let run = options.validate()?;
//! let a = run.read_bytes("demo.csv", table.as_bytes())?;
//! let result = run.analyse(a, vec!["example".into()], &Silent)?;
//! let files = render(&result)?;
//! assert!(files.get("individuals.csv").is_some());
//! assert_eq!(files.get("report.md").map(|f| f.media_type), Some("text/markdown"));
//! # Ok::<(), Box<dyn std::error::Error>>(())
//! ```
#![forbid(unsafe_code)]
#![warn(missing_docs)]
// `!(x > 0.0)` is used on purpose: it rejects NaN as well as non-positive values.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

pub mod agreement;
pub mod assemblage;
pub mod case;
pub mod catalogue;
pub mod cli;
pub mod commingled;
pub mod data;
pub mod error;
pub mod fit;
pub mod likelihood;
pub mod limits;
pub mod model;
pub mod numeric;
pub mod output;
pub mod pipeline;
pub mod prior;
pub mod progress;
pub mod report;
pub mod results;
pub mod serve;
pub mod sim;
pub mod summary;
pub mod validate;

pub use error::{Error, OptionProblem, OptionProblems};

/// The program version written into every output.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
