//! The design each run will really have: onset regressors, parametric modulators,
//! optional temporal derivatives and nuisance regressors, sampled at the scan times,
//! then with the constant and the cosine drift basis projected out.

mod build;
pub mod filter;
pub mod hrf;
pub mod orthogonalise;
pub mod regressors;
mod select;
mod trials;

pub use build::{DesignSettings, DesignSpec, build_design, build_orthogonalised_within_events};

use serde::{Deserialize, Serialize};

use crate::flags::Flag;

#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum RegressorKind {
    Onset,
    Modulator,
    Derivative,
    Nuisance,
}

impl RegressorKind {
    pub fn label(self) -> &'static str {
        match self {
            RegressorKind::Onset => "onset",
            RegressorKind::Modulator => "modulator",
            RegressorKind::Derivative => "derivative",
            RegressorKind::Nuisance => "nuisance",
        }
    }

    /// Regressors of interest: those a screening status is based on.
    pub fn of_interest(self) -> bool {
        matches!(self, RegressorKind::Onset | RegressorKind::Modulator)
    }
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Regressor {
    pub name: String,
    pub kind: RegressorKind,
    pub event: Option<String>,
    pub model: Option<String>,
    pub column: Option<String>,
}

#[derive(Debug, Clone)]
pub struct Design {
    pub subject: String,
    pub run: String,
    pub session: Option<String>,
    pub scans: usize,
    pub regressors: Vec<Regressor>,
    /// Sampled columns before filtering, one per regressor.
    pub sampled: Vec<Vec<f64>>,
    /// The same columns as the GLM estimates them: whitened under AR(1) noise, then
    /// with the (whitened) constant and drift basis projected out.
    pub filtered: Vec<Vec<f64>>,
    /// `false` for regressors left out of the design (e.g. a constant modulator).
    pub included: Vec<bool>,
    /// The constant and cosine drift columns projected out of every regressor (and of
    /// any measured signal of the run).
    pub drift: std::sync::Arc<filter::DriftBasis>,
    /// The noise model the filtered columns are whitened for.
    pub noise: crate::study::NoiseModel,
    /// Trial-level (centred) modulator heights, for trial-level correlations.
    pub trial_values: Vec<TrialValues>,
    /// Each event's trials inside the run and their durations.
    pub events: Vec<EventSummary>,
    pub flags: Vec<Flag>,
}

/// An event's trials inside the run (those starting after its end are left out).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EventSummary {
    pub event: String,
    pub trials: usize,
    /// Shortest and longest duration in seconds (0 = sticks); `None` without trials.
    pub min_duration: Option<f64>,
    pub max_duration: Option<f64>,
}

/// The values of one modulator on the trials of its event (`None` = missing).
#[derive(Debug, Clone)]
pub struct TrialValues {
    pub regressor: usize,
    pub event: String,
    pub values: Vec<Option<f64>>,
}

impl Design {
    /// A series of the run's scans (e.g. a measured signal) in the space the filtered
    /// columns live in: whitened under AR(1) noise, the drift basis projected out.
    pub fn to_analysis_space(&self, series: &[f64]) -> Vec<f64> {
        match self.noise {
            crate::study::NoiseModel::White => self.drift.residualise(series),
            crate::study::NoiseModel::Ar1(rho) => {
                self.drift.residualise(&filter::whiten(series, rho))
            }
        }
    }
}
