//! The forecast report model: what every output format (table, TSV, JSON, HTML) shows.

use serde::Serialize;

use super::spec::{ForecastSpec, Interval, RankBy, Reversal, Rewards, RunLength, Task};
use super::summary::{ModelSetForecast, Recovery, RegressorForecast};
use crate::cohort::StatusCounts;
use crate::report::ToolInfo;
use crate::study::Thresholds;

#[derive(Debug, Clone, Serialize)]
pub struct ForecastReport {
    pub tool: ToolInfo,
    pub forecast: ForecastInfo,
    pub variants: Vec<VariantForecast>,
    /// Variant names from the best separated to the least; variants without a score last.
    pub ranking: Vec<RankEntry>,
    /// One sentence naming the best variant, with its numbers.
    pub verdict: String,
    pub cautions: Vec<&'static str>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ForecastInfo {
    pub name: String,
    pub file: String,
    pub participants: usize,
    pub seed: u64,
    pub initial_value: f64,
    pub learners: Vec<LearnerInfo>,
    pub generating: Vec<GeneratorShare>,
    pub focus: Vec<String>,
    pub rank_by: RankBy,
    pub thresholds: Thresholds,
    pub high_pass: f64,
    pub microtime: usize,
    pub reference: f64,
    pub hrf_derivative: bool,
}

#[derive(Debug, Clone, Serialize)]
pub struct LearnerInfo {
    pub name: String,
    pub kind: &'static str,
    pub modulators: Vec<String>,
    pub parameters: Vec<ParameterPrior>,
}

#[derive(Debug, Clone, Serialize)]
pub struct ParameterPrior {
    pub parameter: &'static str,
    /// How the prior is written, e.g. "beta(2, 5)"; `null` when the spec gives none.
    pub prior: Option<String>,
    /// False when a `fixed` prior holds the parameter in every fit.
    pub fitted: bool,
    pub bounds: [f64; 2],
}

#[derive(Debug, Clone, Serialize)]
pub struct GeneratorShare {
    pub learner: String,
    pub weight: f64,
}

#[derive(Debug, Clone, Serialize)]
pub struct VariantForecast {
    pub name: String,
    pub task: TaskInfo,
    pub runs_checked: usize,
    /// Participants by the status of their worst run.
    pub participants: StatusCounts,
    /// The cue and outcome onset regressors, then every modulator.
    pub regressors: Vec<RegressorForecast>,
    pub model_sets: Vec<ModelSetForecast>,
    pub recovery: Vec<Recovery>,
    /// The ranking criterion (lower separates better); `null` when undefined, with
    /// `score_note` saying why.
    pub score: Option<f64>,
    pub score_note: Option<String>,
    /// Cautions about this variant's fits (weak parameter recovery, fits at bounds).
    pub notes: Vec<String>,
}

#[derive(Debug, Clone, Serialize)]
pub struct TaskInfo {
    pub options: usize,
    pub trials: usize,
    pub runs: usize,
    pub tr: f64,
    pub first_cue: f64,
    pub cue_to_outcome: Interval,
    pub outcome_to_cue: Interval,
    pub cue_duration: f64,
    pub outcome_duration: f64,
    /// Plain-words reward schedule, e.g. "0.8/0.2, reversing every 15 trials".
    pub rewards: String,
    /// Plain-words run length, e.g. "330 volumes" or "until 16 s after the last outcome".
    pub run_length: String,
    /// The task in one line (runs, trials, delays, rewards), as the ranking shows it.
    #[serde(skip_serializing)]
    pub summary: String,
}

impl TaskInfo {
    pub fn new(task: &Task) -> TaskInfo {
        let rewards = match &task.rewards {
            Rewards::Schedule { file, .. } => format!("per-trial schedule from {}", file.display()),
            Rewards::Reversing {
                probabilities,
                reversal,
            } => {
                let p: Vec<String> = probabilities.iter().map(|p| p.to_string()).collect();
                let how = match reversal {
                    Reversal::Never => "never reversing".to_string(),
                    Reversal::Every(n) => format!("reversing every {n} trials"),
                    Reversal::Probability(h) => format!("reversing with probability {h} per trial"),
                };
                format!("{}, {how}", p.join("/"))
            }
        };
        let run_length = match task.scans {
            RunLength::Fixed(n) => format!("{n} volumes"),
            RunLength::AfterLastOutcome(s) => format!("until {s} s after the last outcome"),
        };
        let summary = format!(
            "{} runs × {} trials; cue→outcome {}; outcome→cue {}; {rewards}",
            task.runs,
            task.trials,
            task.cue_to_outcome.describe(),
            task.outcome_to_cue.describe(),
        );
        TaskInfo {
            summary,
            options: task.options,
            trials: task.trials,
            runs: task.runs,
            tr: task.tr,
            first_cue: task.first_cue,
            cue_to_outcome: task.cue_to_outcome,
            outcome_to_cue: task.outcome_to_cue,
            cue_duration: task.cue_duration,
            outcome_duration: task.outcome_duration,
            rewards,
            run_length,
        }
    }
}

#[derive(Debug, Clone, Serialize)]
pub struct RankEntry {
    pub rank: usize,
    pub variant: String,
    pub score: Option<f64>,
    /// Share of paired bootstrap resamples of the participants in which this variant
    /// scores lowest.
    pub chance_best: f64,
}

/// Printed with every forecast.
pub const FORECAST_CAUTIONS: [&str; 3] = [
    "A forecast is only as good as its priors: simulated participants are drawn from the spec's priors, and real participants may learn differently.",
    "Lower redundancy means the design can tell the learners' regressors apart; it does not make either learner true, and VIF thresholds are rules of thumb. Weigh the choice of task with the lab's analysis plan and a statistician.",
    "Every variant is done by the same simulated participants (same parameters), so differences between variants are not differences between samples; with few participants they are still noisy.",
];

impl ForecastInfo {
    pub fn new(spec: &ForecastSpec) -> ForecastInfo {
        ForecastInfo {
            name: spec.name.clone(),
            file: spec.path.display().to_string(),
            participants: spec.participants,
            seed: spec.seed,
            initial_value: spec.initial_value,
            learners: spec
                .learners
                .iter()
                .map(|l| LearnerInfo {
                    name: l.name.clone(),
                    kind: l.kind.key(),
                    modulators: l.quantities.iter().map(|&q| l.column(q)).collect(),
                    parameters: l
                        .kind
                        .all_parameters()
                        .iter()
                        .zip(&l.priors)
                        .map(|(info, prior)| ParameterPrior {
                            parameter: info.name,
                            prior: prior.map(|p| p.describe()),
                            fitted: prior.and_then(|p| p.fixed_value()).is_none(),
                            bounds: [info.low, info.high],
                        })
                        .collect(),
                })
                .collect(),
            generating: spec
                .generating
                .iter()
                .map(|&(i, weight)| GeneratorShare {
                    learner: spec.learners[i].name.clone(),
                    weight,
                })
                .collect(),
            focus: spec.focus.clone(),
            rank_by: spec.rank_by,
            thresholds: spec.thresholds,
            high_pass: spec.design.high_pass,
            microtime: spec.design.microtime,
            reference: spec.design.reference,
            hrf_derivative: spec.design.derivative,
        }
    }
}
