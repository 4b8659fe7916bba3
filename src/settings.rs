//! The one home of every setting a run is assessed with: how its design is built, the
//! screening thresholds, the orthogonalised view and the signal bootstrap. A check
//! makes it from the study file, the TR resolved while reading the runs and the
//! command-line options; the forecast makes it from its spec. Nothing downstream reads
//! a setting from anywhere else.

use crate::design::{DesignSettings, DesignSpec};
use crate::signal::BootstrapSettings;
use crate::study::{Study, Thresholds};

/// The choices of an analysis beyond the study file (the command-line options).
#[derive(Debug, Clone, Copy)]
pub struct AnalysisOptions {
    /// Mean-centre parametric modulators (default true; off shows what centring does).
    pub centre: bool,
    /// Also show each run with its modulators serially orthogonalised, side by side.
    pub orthogonalise: bool,
    /// Resamples and seed of the measured signals' bootstrap.
    pub bootstrap: BootstrapSettings,
}

impl Default for AnalysisOptions {
    fn default() -> Self {
        AnalysisOptions {
            centre: true,
            orthogonalise: false,
            bootstrap: BootstrapSettings::default(),
        }
    }
}

/// Everything [`crate::assess::assess_run`] needs besides the run's own tables.
#[derive(Debug)]
pub struct RunSettings {
    pub design: DesignSettings,
    pub thresholds: Thresholds,
    pub orthogonalise: bool,
    pub bootstrap: BootstrapSettings,
}

impl RunSettings {
    /// The settings of `study`, whose TR (seconds) was resolved when its runs were read.
    pub fn of_study(study: &Study, tr: f64, options: AnalysisOptions) -> Self {
        let spec = DesignSpec {
            tr,
            microtime: study.acquisition.microtime,
            reference: study.acquisition.reference,
            high_pass: study.high_pass,
            derivative: study.hrf.derivative,
            centre: options.centre,
            models: study.models.clone(),
            source: study.source_path().to_path_buf(),
        };
        RunSettings::new(spec, study.thresholds, options)
    }

    pub fn new(design: DesignSpec, thresholds: Thresholds, options: AnalysisOptions) -> Self {
        RunSettings {
            design: DesignSettings::new(design),
            thresholds,
            orthogonalise: options.orthogonalise,
            bootstrap: options.bootstrap,
        }
    }
}
