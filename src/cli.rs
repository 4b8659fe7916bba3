//! Command-line definitions (clap). Kept apart from `main.rs` so the help text can be
//! read in one place.

use std::path::PathBuf;

use clap::{Parser, Subcommand, ValueEnum};

pub use crate::render::{ForecastFormat, Format};

#[derive(Debug, Parser)]
#[command(
    name = "tangle",
    version,
    about = "How redundant are the model regressors of your fMRI design, per participant and run?",
    long_about = "tangle builds the design each participant's GLM will really have (events, parametric \
modulators from your computational models, HRF, high-pass filter, nuisance regressors) and measures \
how much each regressor is inflated by the others. Thresholds are rules of thumb; the numbers do \
not decide which model is true."
)]
pub struct Cli {
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Check every participant and run of a study file.
    Check {
        /// The study file (TOML).
        study: PathBuf,
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Combine shard reports (`check --shard K/N --format json`) into the report of the
    /// whole cohort.
    Merge {
        /// The shard reports (JSON), in any order.
        #[arg(required = true, value_name = "FILES")]
        files: Vec<PathBuf>,
        /// Output format: any format of `check` (the merged report is rebuilt from JSON).
        #[arg(long, value_enum, default_value_t = Format::Json)]
        format: Format,
        /// Write the output to this file (atomically) instead of standard output.
        #[arg(long, value_name = "FILE")]
        out: Option<PathBuf>,
    },
    /// Check the bundled demo study (invented data; works from any folder).
    Demo {
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Before scanning: simulate learners on a planned task, fit them to the simulated
    /// choices, check every simulated design, and compare task variants.
    Forecast(ForecastArgs),
}

/// What `tangle forecast` is asked for.
#[derive(Debug, clap::Args)]
pub struct ForecastArgs {
    /// The forecast spec (TOML).
    pub spec: PathBuf,
    /// Simulated participants (overrides the spec's `participants`).
    #[arg(long, value_name = "N")]
    pub participants: Option<usize>,
    /// Seed of the simulation (overrides the spec's `seed`).
    #[arg(long, value_name = "S")]
    pub seed: Option<u64>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = ForecastFormat::Table)]
    pub format: ForecastFormat,
    /// Write the output to this file (atomically) instead of standard output.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Also write each variant's simulated trial table and a matching study file
    /// into this folder (one subfolder per variant), for `tangle check`.
    #[arg(long, value_name = "DIR")]
    pub write_trials: Option<PathBuf>,
    /// No progress bar on standard error.
    #[arg(long)]
    pub quiet: bool,
}

#[derive(Debug, clap::Args)]
pub struct OutputArgs {
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Write the output to this file (atomically) instead of standard output.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// Check only these participants (comma-separated labels, as in the trial table).
    #[arg(long, value_name = "LIST", value_delimiter = ',')]
    pub subjects: Option<Vec<String>>,
    /// Check only shard K of N: participants sorted by label, the i-th (from 0) goes to
    /// shard (i mod N) + 1. Combine the shards' JSON with `tangle merge`.
    #[arg(long, value_name = "K/N", value_parser = crate::check::Shard::parse)]
    pub shard: Option<crate::check::Shard>,
    /// Exit with code 3 when any participant reaches this status.
    #[arg(long, value_enum, value_name = "STATUS")]
    pub fail_on: Option<FailOn>,
    /// Do not mean-centre parametric modulators (to see what centring does).
    #[arg(long)]
    pub no_centring: bool,
    /// Also show each run with its modulators orthogonalised, side by side with the
    /// design as written (statuses stay those of the latter): `serial` orthogonalises
    /// each filtered modulator against every one before it; `within-event` each
    /// modulator's trial values against those before it on its event, before
    /// convolution.
    #[arg(long, value_enum, value_name = "METHOD", default_value_t = Orthogonalise::None)]
    pub orthogonalise: Orthogonalise,
    /// Check only this GLM (by its name in the study file; repeat for several).
    #[arg(long = "glm", value_name = "NAME")]
    pub glm: Vec<String>,
    /// Measured signals to partition into model-unique and shared variance: a path
    /// template with {subject} and {run}, e.g. "roi/sub-{subject}_run-{run}.tsv" (one row
    /// per scan, one column per region of interest).
    #[arg(long, value_name = "TEMPLATE")]
    pub signal: Option<String>,
    /// Bootstrap resamples for the signal partition's intervals.
    #[arg(long, value_name = "N", default_value_t = 500)]
    pub resamples: usize,
    /// Seed of the bootstrap (the same seed gives the same intervals).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Orthogonalise {
    None,
    Serial,
    WithinEvent,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum FailOn {
    Caution,
    Severe,
}
