//! The report model: one structure that every output format reads, so that no format
//! keeps its own list of fields. Its JSON form is the contract of DESIGN.md.

use serde::Serialize;

use crate::design::{Design, Regressor};
use crate::diagnose::{DEPENDENCY_TOLERANCE, Dependency, Diagnostics, TrialCorrelation};
use crate::flags::Flag;
use crate::screen::{Status, SubjectSummary, vif_status};
use crate::study::{Study, Thresholds};

/// Said in every output: the space the numbers live in.
pub const DIAGNOSTICS_SPACE: &str = "VIFs and correlations of the filtered design: the constant and the cosine drift basis are projected out of every regressor first; nuisance regressors stay in as regressors";

#[derive(Debug, Clone, Serialize)]
pub struct Report {
    pub tool: ToolInfo,
    pub study: StudyInfo,
    pub settings: Settings,
    pub runs: Vec<RunReport>,
    pub subjects: Vec<SubjectSummary>,
    pub cohort: Cohort,
}

#[derive(Debug, Clone, Serialize)]
pub struct ToolInfo {
    pub name: &'static str,
    pub version: &'static str,
}

impl Default for ToolInfo {
    fn default() -> Self {
        ToolInfo {
            name: env!("CARGO_PKG_NAME"),
            version: env!("CARGO_PKG_VERSION"),
        }
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct StudyInfo {
    pub name: String,
    pub file: String,
}

#[derive(Debug, Clone, Serialize)]
pub struct Settings {
    pub tr: f64,
    pub microtime: usize,
    pub reference: f64,
    pub high_pass: f64,
    pub hrf: HrfInfo,
    pub centring: bool,
    pub thresholds: Thresholds,
    pub diagnostics_space: &'static str,
    pub dependency_tolerance: f64,
}

#[derive(Debug, Clone, Serialize)]
pub struct HrfInfo {
    pub shape: &'static str,
    pub derivative: bool,
    pub scaling: &'static str,
}

impl Settings {
    pub fn new(study: &Study, centring: bool) -> Self {
        Settings {
            tr: study.acquisition.tr,
            microtime: study.acquisition.microtime,
            reference: study.acquisition.reference,
            high_pass: study.high_pass,
            hrf: HrfInfo {
                shape: "canonical double-gamma, g(t;6,1) - g(t;16,1)/6 on 0-32 s (Friston et al. 1998)",
                derivative: study.hrf.derivative,
                scaling: "sampled kernel divided by the sum of its samples",
            },
            centring,
            thresholds: study.thresholds,
            diagnostics_space: DIAGNOSTICS_SPACE,
            dependency_tolerance: DEPENDENCY_TOLERANCE,
        }
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct RegressorReport {
    #[serde(flatten)]
    pub regressor: Regressor,
    /// `false` when the regressor was left out of the design (see the flags).
    pub in_design: bool,
    pub status: Status,
}

#[derive(Debug, Clone, Serialize)]
pub struct RunReport {
    pub subject: String,
    pub run: String,
    pub scans: usize,
    /// Constant and cosine columns projected out.
    pub drift_columns: usize,
    pub regressors: Vec<RegressorReport>,
    /// Aligned with `regressors`; `null` where undefined (a flag says why).
    pub vif: Vec<Option<f64>>,
    /// √VIF: how many times larger each standard error is than without overlap.
    pub se_inflation: Vec<Option<f64>>,
    pub correlation: Vec<Vec<Option<f64>>>,
    pub trial_correlation: Vec<TrialCorrelation>,
    pub dependencies: Vec<Dependency>,
    pub flags: Vec<Flag>,
    pub status: Status,
}

impl RunReport {
    pub fn new(
        design: Design,
        diagnostics: Diagnostics,
        flags: Vec<Flag>,
        status: Status,
        thresholds: &Thresholds,
    ) -> Self {
        let regressors = design
            .regressors
            .into_iter()
            .enumerate()
            .map(|(index, regressor)| {
                let in_design = design.included[index];
                let status = if regressor.kind.of_interest() {
                    let undefined = diagnostics.vif[index].is_none();
                    if undefined {
                        Status::Severe
                    } else {
                        vif_status(diagnostics.vif[index], thresholds)
                    }
                } else {
                    Status::Ok
                };
                RegressorReport {
                    regressor,
                    in_design,
                    status,
                }
            })
            .collect();
        RunReport {
            subject: design.subject,
            run: design.run,
            scans: design.scans,
            drift_columns: design.drift_columns,
            regressors,
            se_inflation: diagnostics.vif.iter().map(|v| v.map(f64::sqrt)).collect(),
            vif: diagnostics.vif,
            correlation: diagnostics.correlation,
            trial_correlation: diagnostics.trial_correlation,
            dependencies: diagnostics.dependencies,
            flags,
            status,
        }
    }
}

#[derive(Debug, Clone, Default, Serialize)]
pub struct Cohort {
    pub subjects: usize,
    pub runs: usize,
    pub ok: usize,
    pub caution: usize,
    pub severe: usize,
}

impl Cohort {
    pub fn count(subjects: &[SubjectSummary], runs: usize) -> Self {
        let with = |status| subjects.iter().filter(|s| s.status == status).count();
        Cohort {
            subjects: subjects.len(),
            runs,
            ok: with(Status::Ok),
            caution: with(Status::Caution),
            severe: with(Status::Severe),
        }
    }
}
