//! The study: what the researcher wrote in the study file, checked and resolved.
//! Keys are those of the README's "Study file" section; `parse` turns the TOML text into
//! a [`Study`].

mod parse;
pub(crate) mod schema;

pub use parse::parse_study;
pub(crate) use parse::{read_glms, read_noise, read_thresholds};

use std::path::PathBuf;

#[derive(Debug, Clone, PartialEq)]
pub struct Study {
    pub name: String,
    /// The study file itself, as named by the user (for messages).
    pub path: PathBuf,
    pub acquisition: Acquisition,
    /// High-pass cutoff in seconds; 0 turns the drift basis off.
    pub high_pass: f64,
    pub hrf: HrfSettings,
    /// Where the trials come from: one trial table, or a BIDS dataset.
    pub source: TrialSource,
    pub events: Vec<EventSpec>,
    pub models: Vec<ModelSpec>,
    pub nuisance: Option<NuisanceSpec>,
    pub thresholds: Thresholds,
    /// The GLMs the lab will fit: declared with `[[glm]]`, or one per model.
    pub glms: Vec<GlmSpec>,
    /// How the scans' noise is modelled (`[noise]`; white by default).
    pub noise: NoiseModel,
}

/// One GLM of the analysis: every event's onset regressor (and derivatives), every task
/// modulator, the modulators of `models`, and the nuisance regressors.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct GlmSpec {
    /// Free text, unique; shown in every output.
    pub name: String,
    /// The models whose modulators the GLM holds, in the study file's order of models
    /// (columns keep that order whatever order `[[glm]] models` lists).
    pub models: Vec<String>,
}

impl GlmSpec {
    /// One GLM per model, named after it; one GLM of the events alone without models.
    pub fn one_per_model(models: &[String]) -> Vec<GlmSpec> {
        if models.is_empty() {
            return vec![GlmSpec {
                name: EVENTS_ONLY_GLM.to_string(),
                models: Vec::new(),
            }];
        }
        models
            .iter()
            .map(|m| GlmSpec {
                name: m.clone(),
                models: vec![m.clone()],
            })
            .collect()
    }

    pub fn holds(&self, model: &str) -> bool {
        self.models.iter().any(|m| m == model)
    }
}

/// The name of the one GLM of a study without models.
pub const EVENTS_ONLY_GLM: &str = "events";

/// The noise model every diagnostic is computed in.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum NoiseModel {
    /// Independent scans: ordinary least squares.
    #[default]
    White,
    /// First-order autoregressive noise with this coefficient (0 ≤ ρ < 1): generalized
    /// least squares with Σᵢⱼ = ρ^|i−j|.
    Ar1(f64),
}

impl NoiseModel {
    /// The AR(1) coefficient; 0 for white noise.
    pub fn coefficient(self) -> f64 {
        match self {
            NoiseModel::White => 0.0,
            NoiseModel::Ar1(rho) => rho,
        }
    }
}

impl Study {
    /// The trial table or the BIDS dataset's folder, named in messages about a run.
    pub fn source_path(&self) -> &std::path::Path {
        match &self.source {
            TrialSource::Table(table) => &table.file,
            TrialSource::Bids(bids) => &bids.root,
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
pub enum TrialSource {
    /// A flat trial table (the `[trials]` section).
    Table(TrialTable),
    /// A BIDS dataset (the `[bids]` section).
    Bids(BidsSource),
}

/// Where a BIDS-organised study keeps its data (the study file's `[bids]` section).
#[derive(Debug, Clone, PartialEq)]
pub struct BidsSource {
    /// The dataset root (resolved against the study file's folder).
    pub root: PathBuf,
    pub task: String,
    /// Only these sessions / runs (labels without the `ses-` / `run-` prefix), if given.
    pub sessions: Option<Vec<String>>,
    pub runs: Option<Vec<String>>,
    /// The events files' column naming each row's event (BIDS: `trial_type`).
    pub type_column: String,
    /// A folder of per-run model-output tables to join to the events, if any.
    pub derivatives: Option<PathBuf>,
    /// How derivative rows are matched to event rows.
    pub join: JoinBy,
}

#[derive(Debug, Clone, PartialEq)]
pub enum JoinBy {
    /// The n-th derivative row belongs to the n-th event row.
    RowOrder,
    /// Rows with the same value in this column (present in both tables) belong together.
    Column(String),
}

#[derive(Debug, Clone, PartialEq)]
pub struct Acquisition {
    /// Repetition time in seconds, as the study file gives it: required with a trial
    /// table; in a BIDS study it overrides the sidecars' `RepetitionTime` (with a flag
    /// when they disagree) and may be left out. The TR a check uses is resolved once,
    /// when the runs are read (`check::read_runs`), and lives in its run settings.
    pub tr: Option<f64>,
    /// Volumes per run: required with a trial table; in a BIDS study an override of
    /// every image header (`ScanCounts::Fixed` only).
    pub scans: Option<ScanCounts>,
    /// Microtime bins per TR.
    pub microtime: usize,
    /// Where in the TR each scan is sampled, as a fraction of the TR.
    pub reference: f64,
}

#[derive(Debug, Clone, PartialEq)]
pub enum ScanCounts {
    /// The same number of volumes in every run.
    Fixed(usize),
    /// A table with columns subject, run, scans (resolved path).
    File(PathBuf),
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HrfSettings {
    pub derivative: bool,
}

#[derive(Debug, Clone, PartialEq)]
pub struct TrialTable {
    /// Resolved against the study file's folder.
    pub file: PathBuf,
    pub labels: LabelColumns,
}

/// The columns of a trial table that hold each row's participant and run labels.
#[derive(Debug, Clone, PartialEq)]
pub struct LabelColumns {
    pub subject: String,
    pub run: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct EventSpec {
    pub name: String,
    pub onset_column: String,
    pub duration: Duration,
    /// Long form: only rows whose `column` holds `value` are trials of this event.
    pub selector: Option<RowSelector>,
    /// Task modulators: trial-table columns entered as parametric modulators of this
    /// event in every GLM (named `event:column`, in the partition's task group).
    pub modulators: Vec<String>,
}

#[derive(Debug, Clone, PartialEq)]
pub enum Duration {
    Seconds(f64),
    Column(String),
}

#[derive(Debug, Clone, PartialEq)]
pub struct RowSelector {
    pub column: String,
    pub value: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct ModelSpec {
    pub name: String,
    pub modulators: Vec<ModulatorSpec>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct ModulatorSpec {
    pub event: String,
    pub column: String,
}

#[derive(Debug, Clone, PartialEq)]
pub struct NuisanceSpec {
    /// Path template with `{subject}` and `{run}`, relative to the study file's folder.
    pub template: String,
    pub folder: PathBuf,
    pub columns: Vec<String>,
}

impl NuisanceSpec {
    pub fn path_for(&self, subject: &str, run: &str) -> PathBuf {
        let relative = self
            .template
            .replace("{subject}", subject)
            .replace("{run}", run);
        self.folder.join(relative)
    }
}

/// Screening thresholds. The VIF ones are common-practice rules of thumb, not laws;
/// the condition-index one is Belsley, Kuh & Welsch's (1980) suggestion.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Thresholds {
    pub vif_caution: f64,
    pub vif_severe: f64,
    pub condition_index: f64,
    /// Above this a near-dependency is severe (common practice: 100).
    pub condition_index_severe: f64,
    /// A modulator whose variance shared with another model exceeds this many times its
    /// unique share gets a warning against comparing the two models on it.
    pub shared_over_unique: f64,
}

impl Default for Thresholds {
    fn default() -> Self {
        Thresholds {
            vif_caution: 5.0,
            vif_severe: 10.0,
            condition_index: 30.0,
            condition_index_severe: 100.0,
            shared_over_unique: 1.0,
        }
    }
}

pub const DEFAULT_MICROTIME: usize = 16;
/// The most models a study may declare: with the task and nuisance groups, the
/// commonality partition has 2^(models + 2) − 1 components per modulator
/// (`crate::diagnose::commonality::MAX_GROUPS` holds the two in step).
pub const MAX_MODELS: usize = 14;
/// The most volumes per run tangle accepts (a day of scanning at TR 1 s); beyond that a
/// count is taken for a typo or a damaged header rather than allocated.
pub const MAX_SCANS: usize = 100_000;
/// The most microtime bins per TR (the grid is scans × microtime long).
pub const MAX_MICROTIME: usize = 1024;
pub const DEFAULT_REFERENCE: f64 = 0.5;
/// A TR below this many seconds (60 ms) is no fMRI acquisition: it is a TR written in
/// minutes (2 s = 0.033 min).
pub const MIN_PLAUSIBLE_TR: f64 = 0.06;
/// A TR above this many seconds is one written in milliseconds.
pub const MAX_PLAUSIBLE_TR: f64 = 100.0;
pub const DEFAULT_HIGH_PASS: f64 = 128.0;
