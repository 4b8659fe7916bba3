//! Forecasting before scanning: simulated learners on a planned task, fitted the way a
//! real analysis would fit them, then the full design check on every simulated run.

pub mod choice;
pub mod fit;
pub mod learners;
pub mod participant;
pub mod ranking;
pub mod report;
pub mod run;
pub mod schedule;
pub mod simulate;
pub mod spec;
pub mod summary;
pub mod write;

pub use run::{Forecast, ForecastOptions, run_forecast};

use std::path::Path;

use crate::files::{InputFiles, read_text};

/// Reads a forecast spec and the schedule files it names; `participants` and `seed`
/// override the spec's own values when given (e.g. from the command line).
pub fn read_spec(
    files: &dyn InputFiles,
    path: &Path,
    participants: Option<usize>,
    seed: Option<u64>,
) -> crate::Result<spec::ForecastSpec> {
    let text = read_text(files, path)?;
    let mut spec = spec::parse_forecast(path, &text)?;
    if let Some(n) = participants {
        if n == 0 {
            return Err(crate::Error::Usage(
                "--participants must be at least 1".into(),
            ));
        }
        spec.participants = n;
    }
    if let Some(seed) = seed {
        spec.seed = seed;
    }
    schedule::load_schedules(files, &mut spec)?;
    Ok(spec)
}
