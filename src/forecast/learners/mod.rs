//! Learner models of a choice task with any number of options and real-valued (usually
//! binary) rewards.
//!
//! Every learner keeps one value per option and, where the model has one, one spread per
//! option (an associability or a posterior variance). On each trial only the chosen
//! option learns from the outcome. The per-trial quantities a model-based analysis puts
//! into the GLM as parametric modulators come back from [`Learner::learn`] as
//! [`TrialQuantities`]:
//!
//! - at the cue: the value of the chosen option before the update, and for the Kalman
//!   learner its uncertainty (prior variance);
//! - at the outcome: the prediction error δ = r − V_chosen, the step size that scaled the
//!   update (learning rate), and for the hybrid learner the associability.
//!
//! Everything here is pure and deterministic; drawing choices and rewards lives in
//! [`super::choice`] and [`super::simulate`].

mod delta;
mod hybrid;
mod kalman;
pub mod kind;

pub use delta::{DeltaRule, DualRateDelta};
pub use hybrid::HybridAssociability;
pub use kalman::KalmanLearner;
pub use kind::{LearnerKind, ParameterInfo, ParameterScale, Quantity};

/// Value every option starts with unless a caller says otherwise.
pub const INITIAL_VALUE: f64 = 0.5;

/// What the participant chose on one trial (option index from 0) and what they received.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChoiceOutcome {
    pub choice: usize,
    pub reward: f64,
}

/// The model quantities of one trial.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrialQuantities {
    /// Value of the chosen option at the cue (before the update).
    pub value: f64,
    /// Prediction error at the outcome: reward − value.
    pub prediction_error: f64,
    /// The step size that multiplied this trial's prediction error.
    pub learning_rate: f64,
    /// Associability of the chosen option used on this trial (hybrid learner only).
    pub associability: Option<f64>,
    /// Prior variance of the chosen option's value at the cue (Kalman learner only).
    pub uncertainty: Option<f64>,
}

impl TrialQuantities {
    /// The value of one named quantity; `None` when this learner does not have it.
    pub fn get(&self, quantity: Quantity) -> Option<f64> {
        match quantity {
            Quantity::Value => Some(self.value),
            Quantity::PredictionError => Some(self.prediction_error),
            Quantity::LearningRate => Some(self.learning_rate),
            Quantity::Associability => self.associability,
            Quantity::Uncertainty => self.uncertainty,
        }
    }
}

/// What a learner carries from one trial to the next.
#[derive(Debug, Clone, PartialEq)]
pub struct LearnerState {
    /// Current value of each option.
    pub values: Vec<f64>,
    /// Current associability (hybrid) or posterior variance (Kalman) of each option;
    /// unused by the delta rules.
    pub spreads: Vec<f64>,
}

/// A trial-by-trial learner.
pub trait Learner {
    /// The state before the first trial: `options` options, each at `initial_value`.
    fn start(&self, options: usize, initial_value: f64) -> LearnerState;

    /// Learn from one trial: return that trial's quantities and update `state`.
    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities;

    /// Per-trial quantities over a sequence of trials, from a fresh start.
    fn trace(
        &self,
        options: usize,
        initial_value: f64,
        trials: &[ChoiceOutcome],
    ) -> Vec<TrialQuantities> {
        let mut state = self.start(options, initial_value);
        trials
            .iter()
            .map(|&trial| self.learn(&mut state, trial))
            .collect()
    }
}

/// Any of the learners, for code that picks one at run time (from a forecast spec).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LearnerModel {
    Delta(DeltaRule),
    DualRate(DualRateDelta),
    Hybrid(HybridAssociability),
    Kalman(KalmanLearner),
}

impl LearnerModel {
    /// The learner of `kind` with `parameters` in the order of [`LearnerKind::parameters`]
    /// (the learning parameters only; the choice rule's inverse temperature is not a
    /// learner parameter). Panics on a wrong count, which is a programming error.
    pub fn new(kind: LearnerKind, parameters: &[f64]) -> LearnerModel {
        assert_eq!(
            parameters.len(),
            kind.parameters().len(),
            "{kind:?} takes {} learning parameters",
            kind.parameters().len()
        );
        let p = parameters;
        match kind {
            LearnerKind::Delta => LearnerModel::Delta(DeltaRule {
                learning_rate: p[0],
            }),
            LearnerKind::DualRate => LearnerModel::DualRate(DualRateDelta {
                positive_rate: p[0],
                negative_rate: p[1],
            }),
            LearnerKind::Hybrid => LearnerModel::Hybrid(HybridAssociability {
                learning_rate: p[0],
                associability_rate: p[1],
                initial_associability: p[2],
            }),
            LearnerKind::Kalman => LearnerModel::Kalman(KalmanLearner {
                initial_variance: p[0],
                observation_noise: p[1],
                drift: p[2],
            }),
        }
    }
}

impl Learner for LearnerModel {
    fn start(&self, options: usize, initial_value: f64) -> LearnerState {
        match self {
            LearnerModel::Delta(l) => l.start(options, initial_value),
            LearnerModel::DualRate(l) => l.start(options, initial_value),
            LearnerModel::Hybrid(l) => l.start(options, initial_value),
            LearnerModel::Kalman(l) => l.start(options, initial_value),
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        match self {
            LearnerModel::Delta(l) => l.learn(state, trial),
            LearnerModel::DualRate(l) => l.learn(state, trial),
            LearnerModel::Hybrid(l) => l.learn(state, trial),
            LearnerModel::Kalman(l) => l.learn(state, trial),
        }
    }
}

#[cfg(test)]
pub(crate) mod test_support {
    use super::ChoiceOutcome;

    /// Option 0 on every trial, with these rewards.
    pub fn one_option(rewards: &[f64]) -> Vec<ChoiceOutcome> {
        rewards
            .iter()
            .map(|&reward| ChoiceOutcome { choice: 0, reward })
            .collect()
    }

    pub const TRACE_REWARDS: [f64; 10] = [1.0, 1.0, 0.0, 1.0, 1.0, 1.0, 0.0, 0.0, 1.0, 1.0];
}
