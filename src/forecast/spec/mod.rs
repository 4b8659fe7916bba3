//! The forecast spec: the planned task, the candidate learners with priors over their
//! parameters, who generates the simulated behaviour, and the task variants to compare.
//! Keys are documented in the README ("Forecast spec"); `parse` turns the TOML text
//! into a [`ForecastSpec`].

mod parse;
mod prior;
mod task;

pub use parse::parse_forecast;
pub use prior::Prior;

use std::path::PathBuf;

use crate::forecast::learners::{LearnerKind, Quantity};
use crate::study::{GlmSpec, NoiseModel, Thresholds};

/// Participants simulated when neither the spec nor the command line says.
pub const DEFAULT_PARTICIPANTS: usize = 100;

#[derive(Debug, Clone, PartialEq)]
pub struct ForecastSpec {
    pub name: String,
    /// The spec file as named by the user (for messages).
    pub path: PathBuf,
    pub participants: usize,
    pub seed: u64,
    /// Value every option starts a run with, in the simulation and in every fit.
    pub initial_value: f64,
    pub design: DesignChoices,
    /// How the scans' noise is modelled (`[noise]`, as in a study file).
    pub noise: NoiseModel,
    /// The GLMs the analysis will fit (`[[glm]]`, as in a study file; by default one
    /// per learner).
    pub glms: Vec<GlmSpec>,
    pub thresholds: Thresholds,
    pub learners: Vec<LearnerSpec>,
    /// Which learners generate behaviour, with their weights (summing to 1).
    pub generating: Vec<(usize, f64)>,
    /// Regressors the ranking of variants looks at (names `<learner>_<quantity>`).
    pub focus: Vec<String>,
    pub rank_by: RankBy,
    /// The task as planned first, then each `[[variant]]`.
    pub variants: Vec<TaskVariant>,
}

/// How the GLM will be built (the same choices as a study file's).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DesignChoices {
    pub high_pass: f64,
    pub microtime: usize,
    pub reference: f64,
    pub derivative: bool,
}

#[derive(Debug, Clone, PartialEq)]
pub struct LearnerSpec {
    pub name: String,
    pub kind: LearnerKind,
    /// One prior per entry of `kind.all_parameters()`; `None` where the spec gives
    /// none (the parameter is fitted, and this learner cannot generate behaviour).
    pub priors: Vec<Option<Prior>>,
    /// Quantities entered as modulators, cue ones first then outcome ones.
    pub quantities: Vec<Quantity>,
}

impl LearnerSpec {
    /// Per parameter, the value a fit must hold it at (from a `fixed` prior).
    pub fn fixed(&self) -> Vec<Option<f64>> {
        self.priors
            .iter()
            .map(|p| p.and_then(|p| p.fixed_value()))
            .collect()
    }

    /// Regressor (and trial-table column) name of one of this learner's quantities.
    pub fn column(&self, quantity: Quantity) -> String {
        format!("{}_{}", self.name, quantity.key())
    }
}

/// What the ranking of variants minimises.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "snake_case")]
pub enum RankBy {
    /// The largest, over focus regressors, of the median VIF.
    Vif,
    /// The largest, over focus regressors, of the median share held with other models.
    Shared,
}

#[derive(Debug, Clone, PartialEq)]
pub struct TaskVariant {
    pub name: String,
    pub task: Task,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Task {
    pub options: usize,
    pub rewards: Rewards,
    pub trials: usize,
    pub runs: usize,
    pub tr: f64,
    /// Cue of the first trial, in seconds from the run's first volume.
    pub first_cue: f64,
    pub cue_to_outcome: Interval,
    pub outcome_to_cue: Interval,
    pub cue_duration: f64,
    pub outcome_duration: f64,
    pub scans: RunLength,
}

/// Reward probabilities of the options on every trial.
#[derive(Debug, Clone, PartialEq)]
pub enum Rewards {
    /// Probabilities per option at the start of each run, rotated one place at each
    /// reversal.
    Reversing {
        probabilities: Vec<f64>,
        reversal: Reversal,
    },
    /// One row per trial from a schedule file (the same schedule in every run).
    Schedule { file: PathBuf, rows: Vec<Vec<f64>> },
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Reversal {
    Never,
    /// After every N trials.
    Every(usize),
    /// On each trial after the first, with this probability.
    Probability(f64),
}

/// A delay drawn uniformly from [low, high] seconds (low = high: fixed).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct Interval {
    pub low: f64,
    pub high: f64,
}

impl Interval {
    pub fn fixed(seconds: f64) -> Interval {
        Interval {
            low: seconds,
            high: seconds,
        }
    }

    /// In words: "4 s", or "2–6 s (uniform)" for a jittered delay.
    pub fn describe(self) -> String {
        if self.low == self.high {
            format!("{} s", self.low)
        } else {
            format!("{}–{} s (uniform)", self.low, self.high)
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RunLength {
    /// The same number of volumes in every run.
    Fixed(usize),
    /// Each run ends this many seconds after its last outcome.
    AfterLastOutcome(f64),
}
