//! `tangle`: how redundant the regressors of a model-based fMRI design are, per
//! participant and run, and what that means for the claims a study can make.
//!
//! Data flow (each step a pure function over plain data; reading and writing stay at
//! the edges): study file → [`study::Study`]; trial table → [`trials::RunTrials`] per
//! run; → [`design::Design`] (the filtered design matrix) → [`diagnose::Diagnostics`]
//! → [`screen`] flags and statuses → [`report`] renderers.

pub mod check;
pub mod cli;
pub mod demo;
pub mod design;
pub mod diagnose;
pub mod error;
pub mod files;
pub mod flags;
pub mod forecast;
pub mod output;
pub mod report;
pub mod screen;
pub mod study;
pub mod trials;

pub use error::{Error, Result};
