//! The settings a report was made with, as every output shows them.

use serde::{Deserialize, Serialize};

use super::Text;
use crate::settings::RunSettings;
use crate::study::Thresholds;

/// Said in every output: the space the numbers live in.
pub const DIAGNOSTICS_SPACE: &str = "VIFs and correlations of the filtered design: the constant and the cosine drift basis are projected out of every regressor first; nuisance regressors stay in as regressors";

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Settings {
    pub tr: f64,
    pub microtime: usize,
    pub reference: f64,
    pub high_pass: f64,
    pub hrf: HrfInfo,
    pub centring: bool,
    /// "none" or "serial".
    pub orthogonalisation: Text,
    pub thresholds: Thresholds,
    pub diagnostics_space: Text,
    pub dependency_tolerance: f64,
}

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct HrfInfo {
    pub shape: Text,
    pub derivative: bool,
    pub scaling: Text,
}

impl Settings {
    /// The settings as a report shows them.
    pub fn of(settings: &RunSettings) -> Self {
        let design = &settings.design.spec;
        Settings {
            tr: design.tr,
            microtime: design.microtime,
            reference: design.reference,
            high_pass: design.high_pass,
            hrf: HrfInfo {
                shape: Text::Borrowed(
                    "canonical double-gamma, g(t;6,1) - g(t;16,1)/6 on 0-32 s (Friston et al. 1998)",
                ),
                derivative: design.derivative,
                scaling: Text::Borrowed("sampled kernel divided by the sum of its samples"),
            },
            centring: design.centre,
            orthogonalisation: Text::Borrowed(if settings.orthogonalise {
                "serial"
            } else {
                "none"
            }),
            thresholds: settings.thresholds,
            diagnostics_space: Text::Borrowed(DIAGNOSTICS_SPACE),
            dependency_tolerance: crate::precision::DEPENDENCY,
        }
    }
}
