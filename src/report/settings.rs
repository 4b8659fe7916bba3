//! The settings a report was made with, as every output shows them.

use serde::{Deserialize, Serialize};

use super::Text;
use crate::settings::RunSettings;
use crate::study::{GlmSpec, NoiseModel, Thresholds};

/// Said in every output under AR(1) noise: the space the numbers live in.
pub const WHITENED_DIAGNOSTICS_SPACE: &str = "VIFs and correlations of the whitened, filtered design (generalized least squares under AR(1) noise): every column, the constant and the cosine drift basis included, is prewhitened (Prais-Winsten), then the whitened constant and drift are projected out; nuisance regressors stay in as regressors";

/// The noise model as a report shows it.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct NoiseInfo {
    /// "white" or "ar1".
    pub model: Text,
    /// The AR(1) coefficient; absent for white noise.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub ar1: Option<f64>,
}

impl NoiseInfo {
    pub fn of(noise: NoiseModel) -> Self {
        match noise {
            NoiseModel::White => NoiseInfo {
                model: Text::Borrowed("white"),
                ar1: None,
            },
            NoiseModel::Ar1(rho) => NoiseInfo {
                model: Text::Borrowed("ar1"),
                ar1: Some(rho),
            },
        }
    }
}

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
    pub noise: NoiseInfo,
    /// The GLMs the runs were assessed in.
    pub glms: Vec<GlmSpec>,
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
            orthogonalisation: Text::Borrowed(settings.orthogonalise.label()),
            thresholds: settings.thresholds,
            diagnostics_space: Text::Borrowed(match design.noise {
                NoiseModel::White => DIAGNOSTICS_SPACE,
                NoiseModel::Ar1(_) => WHITENED_DIAGNOSTICS_SPACE,
            }),
            noise: NoiseInfo::of(design.noise),
            glms: settings.glms.clone(),
            dependency_tolerance: crate::precision::DEPENDENCY,
        }
    }
}
