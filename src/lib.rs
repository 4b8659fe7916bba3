//! `tangle`: how redundant the regressors of a model-based fMRI design are, per
//! participant and run, and what that means for the claims a study can make.
//!
//! Data flow (each step a pure function over plain data; reading and writing stay at
//! the edges): study file → [`study::Study`]; trial table → [`trials::RunTrials`] per
//! run; → [`design::Design`] (the filtered design matrix) → [`diagnose::Diagnostics`]
//! → [`screen`] flags and statuses → [`report`] renderers.
//!
//! ```
//! use std::path::Path;
//! use tangle::check::{CheckOptions, check_file};
//! use tangle::files::MemoryFiles;
//!
//! let study = r#"
//! [acquisition]
//! tr = 2.0
//! scans = 60
//! [trials]
//! file = "trials.csv"
//! [[event]]
//! name = "cue"
//! onset = "cue_onset"
//! [[event]]
//! name = "outcome"
//! onset = "outcome_onset"
//! "#;
//! // Outcomes always 0.5 s after the cue: the two events cannot be told apart.
//! let mut trials = String::from("subject,run,cue_onset,outcome_onset\n");
//! for trial in 0..12 {
//!     let cue = 2.0 + 9.0 * trial as f64;
//!     trials.push_str(&format!("01,1,{cue},{}\n", cue + 0.5));
//! }
//! let files = MemoryFiles::default()
//!     .with("lab/study.toml", study)
//!     .with("lab/trials.csv", trials);
//! let report = check_file(&files, Path::new("lab/study.toml"), CheckOptions::default())?;
//! let cue_vif = report.runs[0].vif[0].expect("defined");
//! assert!(cue_vif > 10.0);
//! # Ok::<(), tangle::Error>(())
//! ```

pub mod assess;
pub mod bids;
pub mod check;
pub mod cli;
pub mod cohort;
pub mod demo;
pub mod design;
pub mod diagnose;
pub mod error;
pub mod files;
pub mod flags;
pub mod forecast;
pub mod merge;
pub mod output;
pub mod precision;
pub mod quantile;
pub mod render;
pub mod report;
pub mod screen;
pub mod settings;
pub mod signal;
pub mod study;
pub mod toml_read;
pub mod trials;

pub use error::{Error, Result};
