//! Learner models for a two-option task with binary (or any real-valued) rewards.
//!
//! Everything here is pure and deterministic except [`simulate_participant`], which
//! draws from the random number generator it is given (so a seeded generator makes it
//! reproducible). A learner keeps one value per option; on each trial only the chosen
//! option is updated. The per-trial quantities a model-based analysis uses as
//! parametric modulators are returned by [`Learner::trace`]:
//!
//! - the value of the chosen option at the cue, before that trial's update;
//! - the prediction error at the outcome, δ = r − V_chosen;
//! - for the hybrid learner, the associability that scaled that trial's update.

use rand::{Rng, RngExt};

/// Value both options start with unless a caller says otherwise.
pub const INITIAL_VALUE: f64 = 0.5;

/// One of the two options of the task.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Choice {
    /// Option 0.
    First,
    /// Option 1.
    Second,
}

impl Choice {
    /// Option 0 → `First`, option 1 → `Second`, anything else → `None`.
    pub fn from_index(index: usize) -> Option<Choice> {
        match index {
            0 => Some(Choice::First),
            1 => Some(Choice::Second),
            _ => None,
        }
    }

    /// 0 for `First`, 1 for `Second`.
    pub fn index(self) -> usize {
        match self {
            Choice::First => 0,
            Choice::Second => 1,
        }
    }
}

/// What the participant chose on one trial and what they received.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChoiceOutcome {
    pub choice: Choice,
    pub reward: f64,
}

/// The model quantities of one trial.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TrialQuantities {
    /// Value of the chosen option at the cue (before the update).
    pub value: f64,
    /// Prediction error at the outcome: reward − value.
    pub prediction_error: f64,
    /// Associability of the chosen option used on this trial (hybrid learner only).
    pub associability: Option<f64>,
}

/// What a learner carries from one trial to the next.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LearnerState {
    /// Current value of option 0 and option 1.
    pub values: [f64; 2],
    /// Current associability of option 0 and option 1 (unused by the delta rule).
    pub associabilities: [f64; 2],
}

/// A trial-by-trial learner over two options.
pub trait Learner {
    /// The state before the first trial, with both options at `initial_value`.
    fn start(&self, initial_value: f64) -> LearnerState;

    /// Learn from one trial: return that trial's quantities and update `state`.
    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities;

    /// Per-trial quantities over a sequence of trials, starting from [`INITIAL_VALUE`].
    fn trace(&self, trials: &[ChoiceOutcome]) -> Vec<TrialQuantities> {
        self.trace_from(INITIAL_VALUE, trials)
    }

    /// Per-trial quantities over a sequence of trials, starting from `initial_value`.
    fn trace_from(&self, initial_value: f64, trials: &[ChoiceOutcome]) -> Vec<TrialQuantities> {
        let mut state = self.start(initial_value);
        trials
            .iter()
            .map(|&trial| self.learn(&mut state, trial))
            .collect()
    }
}

/// Delta rule with a fixed learning rate (Rescorla & Wagner 1972):
/// δ = r − V_c, then V_c ← V_c + α·δ.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DeltaRule {
    /// α, in [0, 1].
    pub learning_rate: f64,
}

impl Learner for DeltaRule {
    fn start(&self, initial_value: f64) -> LearnerState {
        LearnerState {
            values: [initial_value; 2],
            associabilities: [1.0; 2],
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        let c = trial.choice.index();
        let value = state.values[c];
        let prediction_error = trial.reward - value;
        state.values[c] = value + self.learning_rate * prediction_error;
        TrialQuantities {
            value,
            prediction_error,
            associability: None,
        }
    }
}

/// Delta rule whose step size is scaled by an associability that follows the size of
/// recent surprises (associability after Pearce & Hall 1980; the hybrid form as used in
/// model-based fMRI, e.g. Li, Schiller, Schoenbaum, Phelps & Daw 2011):
/// δ = r − V_c; V_c ← V_c + κ·α_c·δ; then α_c ← η·|δ| + (1 − η)·α_c.
/// The associability is updated after it has been used on the trial.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HybridAssociability {
    /// κ, in (0, 1].
    pub learning_rate: f64,
    /// η, in [0, 1]: how fast associability follows |δ|.
    pub associability_rate: f64,
    /// α₀ of both options, in (0, 1].
    pub initial_associability: f64,
}

impl Learner for HybridAssociability {
    fn start(&self, initial_value: f64) -> LearnerState {
        LearnerState {
            values: [initial_value; 2],
            associabilities: [self.initial_associability; 2],
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        let c = trial.choice.index();
        let value = state.values[c];
        let associability = state.associabilities[c];
        let prediction_error = trial.reward - value;
        state.values[c] = value + self.learning_rate * associability * prediction_error;
        let eta = self.associability_rate;
        state.associabilities[c] = eta * prediction_error.abs() + (1.0 - eta) * associability;
        TrialQuantities {
            value,
            prediction_error,
            associability: Some(associability),
        }
    }
}

/// Either learner, for code that picks one at run time (for example from a forecast spec).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LearnerModel {
    Delta(DeltaRule),
    Hybrid(HybridAssociability),
}

impl Learner for LearnerModel {
    fn start(&self, initial_value: f64) -> LearnerState {
        match self {
            LearnerModel::Delta(learner) => learner.start(initial_value),
            LearnerModel::Hybrid(learner) => learner.start(initial_value),
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        match self {
            LearnerModel::Delta(learner) => learner.learn(state, trial),
            LearnerModel::Hybrid(learner) => learner.learn(state, trial),
        }
    }
}

/// Softmax over two options with inverse temperature β:
/// P(choose option 1) = 1 / (1 + exp(−β·(V₁ − V₀))).
pub fn probability_of_second(inverse_temperature: f64, values: [f64; 2]) -> f64 {
    1.0 / (1.0 + (-inverse_temperature * (values[1] - values[0])).exp())
}

/// A simulated trial: the choice and reward, and the simulating learner's quantities.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimulatedTrial {
    pub outcome: ChoiceOutcome,
    pub quantities: TrialQuantities,
}

/// Simulate one participant: on each trial choose by softmax over the learner's current
/// values, receive reward 1 with the chosen option's probability (else 0), and learn.
///
/// `reward_probabilities[t]` holds the reward probability of option 0 and option 1 on
/// trial t. Each trial draws two uniforms from `rng`, first for the choice, then for the
/// reward, so a seeded generator gives the same participant every time.
pub fn simulate_participant<L, R>(
    learner: &L,
    inverse_temperature: f64,
    reward_probabilities: &[[f64; 2]],
    rng: &mut R,
) -> Vec<SimulatedTrial>
where
    L: Learner + ?Sized,
    R: Rng + ?Sized,
{
    let mut state = learner.start(INITIAL_VALUE);
    reward_probabilities
        .iter()
        .map(|probabilities| {
            let p_second = probability_of_second(inverse_temperature, state.values);
            let choice = if rng.random::<f64>() < p_second {
                Choice::Second
            } else {
                Choice::First
            };
            let rewarded = rng.random::<f64>() < probabilities[choice.index()];
            let outcome = ChoiceOutcome {
                choice,
                reward: if rewarded { 1.0 } else { 0.0 },
            };
            let quantities = learner.learn(&mut state, outcome);
            SimulatedTrial {
                outcome,
                quantities,
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use rand::SeedableRng;
    use rand::rngs::Xoshiro256PlusPlus;

    /// The same option every trial, with these rewards.
    fn one_option(rewards: &[f64]) -> Vec<ChoiceOutcome> {
        rewards
            .iter()
            .map(|&reward| ChoiceOutcome {
                choice: Choice::First,
                reward,
            })
            .collect()
    }

    fn correlation(x: &[f64], y: &[f64]) -> f64 {
        let n = x.len() as f64;
        let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
        let (mut sxy, mut sxx, mut syy) = (0.0, 0.0, 0.0);
        for (a, b) in x.iter().zip(y) {
            sxy += (a - mx) * (b - my);
            sxx += (a - mx) * (a - mx);
            syy += (b - my) * (b - my);
        }
        sxy / (sxx * syy).sqrt()
    }

    const TRACE_REWARDS: [f64; 10] = [1.0, 1.0, 0.0, 1.0, 1.0, 1.0, 0.0, 0.0, 1.0, 1.0];

    #[test]
    fn delta_rule_constant_reward_matches_closed_form() {
        // shared research stats-checks.json rw.constant_reward: V_t = 1 − 0.7^t, α = 0.3, V0 = 0.
        let expected = [
            0.0,
            0.3,
            0.51,
            0.657,
            0.7599,
            0.83193,
            0.882351,
            0.9176457,
            0.94235199,
            0.959646393,
            0.9717524751,
        ];
        let trace = DeltaRule { learning_rate: 0.3 }.trace_from(0.0, &one_option(&[1.0; 11]));
        for (t, (q, v)) in trace.iter().zip(expected).enumerate() {
            assert!((q.value - v).abs() < 1e-15, "t = {t}: {} vs {v}", q.value);
        }
    }

    #[test]
    fn delta_rule_trace_matches_exact_decimals() {
        // shared research stats-checks.json rw.trace_alpha_0.3 (α = 0.3, V0 = 0).
        let values = [
            0.0,
            0.3,
            0.51,
            0.357,
            0.5499,
            0.68493,
            0.779451,
            0.5456157,
            0.38193099,
            0.567351693,
        ];
        let errors = [
            1.0,
            0.7,
            -0.51,
            0.643,
            0.4501,
            0.31507,
            -0.779451,
            -0.5456157,
            0.61806901,
            0.432648307,
        ];
        let learner = DeltaRule { learning_rate: 0.3 };
        let mut state = learner.start(0.0);
        for (t, trial) in one_option(&TRACE_REWARDS).into_iter().enumerate() {
            let q = learner.learn(&mut state, trial);
            assert!((q.value - values[t]).abs() < 1e-14, "value at t = {t}");
            assert!(
                (q.prediction_error - errors[t]).abs() < 1e-14,
                "δ at t = {t}"
            );
            assert_eq!(q.associability, None);
        }
        assert!((state.values[0] - 0.6971461851).abs() < 1e-14);
        assert_eq!(state.values[1], 0.0, "the unchosen option never moves");
    }

    #[test]
    fn two_learning_rates_give_nearly_collinear_errors() {
        // shared research stats-checks.json rw.two_learning_rates_vif.
        let trials = one_option(&TRACE_REWARDS);
        let errors = |alpha| -> Vec<f64> {
            DeltaRule {
                learning_rate: alpha,
            }
            .trace_from(0.0, &trials)
            .iter()
            .map(|q| q.prediction_error)
            .collect()
        };
        let (slow, fast) = (errors(0.3), errors(0.7));
        let expected_fast = [
            1.0,
            0.3,
            -0.91,
            0.727,
            0.2181,
            0.06543,
            -0.980371,
            -0.2941113,
            0.91176661,
            0.273529983,
        ];
        for (got, want) in fast.iter().zip(expected_fast) {
            assert!((got - want).abs() < 1e-12);
        }
        let r = correlation(&slow, &fast);
        assert!((r / 0.9337759428275223 - 1.0).abs() < 1e-12, "r = {r}");
        // With an intercept and two regressors, VIF = 1 / (1 − r²).
        let vif = 1.0 / (1.0 - r * r);
        assert!((vif / 7.80868785980136 - 1.0).abs() < 1e-12, "VIF = {vif}");
    }

    #[test]
    fn hybrid_without_associability_change_is_the_delta_rule() {
        // η = 0 and α0 = 1 keep α_c = 1, so V_c moves by κ·δ: the delta rule with α = κ.
        let hybrid = HybridAssociability {
            learning_rate: 0.35,
            associability_rate: 0.0,
            initial_associability: 1.0,
        };
        let delta = DeltaRule {
            learning_rate: 0.35,
        };
        let probabilities = vec![[0.8, 0.2]; 30]
            .into_iter()
            .chain(vec![[0.2, 0.8]; 30])
            .collect::<Vec<_>>();
        let mut rng = Xoshiro256PlusPlus::seed_from_u64(7);
        let simulated = simulate_participant(&hybrid, 5.0, &probabilities, &mut rng);
        let trials: Vec<ChoiceOutcome> = simulated.iter().map(|s| s.outcome).collect();
        for (h, d) in hybrid.trace(&trials).iter().zip(delta.trace(&trials)) {
            assert_eq!(h.value, d.value);
            assert_eq!(h.prediction_error, d.prediction_error);
            assert_eq!(h.associability, Some(1.0));
        }
    }

    #[test]
    fn hybrid_three_trials_by_hand() {
        // κ = 0.4, η = 0.3, α0 = 1, V0 = 0.5 for both options.
        // Trial 1, option 1, r = 1: V = 0.5, α = 1, δ = 0.5;
        //   V1 ← 0.5 + 0.4·1·0.5 = 0.7;  α1 ← 0.3·0.5 + 0.7·1 = 0.85.
        // Trial 2, option 1, r = 0: V = 0.7, α = 0.85, δ = −0.7;
        //   V1 ← 0.7 − 0.4·0.85·0.7 = 0.7 − 0.238 = 0.462;  α1 ← 0.3·0.7 + 0.7·0.85 = 0.805.
        // Trial 3, option 0, r = 1: option 0 untouched so far: V = 0.5, α = 1, δ = 0.5;
        //   V0 ← 0.7;  α0 ← 0.85.
        let learner = HybridAssociability {
            learning_rate: 0.4,
            associability_rate: 0.3,
            initial_associability: 1.0,
        };
        let trials = [
            (Choice::Second, 1.0),
            (Choice::Second, 0.0),
            (Choice::First, 1.0),
        ]
        .map(|(choice, reward)| ChoiceOutcome { choice, reward });
        let mut state = learner.start(INITIAL_VALUE);
        let got: Vec<TrialQuantities> = trials
            .iter()
            .map(|&t| learner.learn(&mut state, t))
            .collect();
        let expected = [(0.5, 0.5, 1.0), (0.7, -0.7, 0.85), (0.5, 0.5, 1.0)];
        for (q, (value, error, assoc)) in got.iter().zip(expected) {
            assert!((q.value - value).abs() < 1e-12);
            assert!((q.prediction_error - error).abs() < 1e-12);
            assert!((q.associability.unwrap_or(f64::NAN) - assoc).abs() < 1e-12);
        }
        assert!((state.values[0] - 0.7).abs() < 1e-12);
        assert!((state.values[1] - 0.462).abs() < 1e-12);
        assert!((state.associabilities[0] - 0.85).abs() < 1e-12);
        assert!((state.associabilities[1] - 0.805).abs() < 1e-12);
        assert_eq!(
            got,
            learner.trace(&trials),
            "trace gives the same as stepping"
        );
    }

    #[test]
    fn learner_model_delegates() {
        let trials = one_option(&TRACE_REWARDS);
        let delta = DeltaRule { learning_rate: 0.3 };
        assert_eq!(
            LearnerModel::Delta(delta).trace(&trials),
            delta.trace(&trials)
        );
    }

    #[test]
    fn softmax_probabilities() {
        assert_eq!(probability_of_second(5.0, [0.5, 0.5]), 0.5);
        // β = 2, V1 − V0 = 0.5: 1 / (1 + e^−1) = 0.7310585786300049.
        assert!((probability_of_second(2.0, [0.25, 0.75]) - 0.7310585786300049).abs() < 1e-15);
        assert!((probability_of_second(2.0, [0.75, 0.25]) - 0.2689414213699951).abs() < 1e-15);
        assert_eq!(probability_of_second(0.0, [0.0, 1.0]), 0.5);
        assert_eq!(probability_of_second(1e6, [0.0, 1.0]), 1.0);
        assert_eq!(probability_of_second(1e6, [1.0, 0.0]), 0.0);
    }

    #[test]
    fn simulation_is_reproducible_and_follows_the_schedule() {
        let learner = DeltaRule { learning_rate: 0.3 };
        let probabilities = vec![[0.9, 0.1]; 200];
        let run = |seed| {
            let mut rng = Xoshiro256PlusPlus::seed_from_u64(seed);
            simulate_participant(&learner, 8.0, &probabilities, &mut rng)
        };
        assert_eq!(run(3), run(3));
        assert_ne!(run(3), run(4));
        let picks_first = run(3)
            .iter()
            .filter(|s| s.outcome.choice == Choice::First)
            .count();
        assert!(
            picks_first > 150,
            "a sharp learner mostly picks the better option"
        );
        // A never-rewarded option gives reward 0 whenever it is chosen.
        let mut rng = Xoshiro256PlusPlus::seed_from_u64(1);
        let never = simulate_participant(&learner, 0.0, &vec![[1.0, 0.0]; 50], &mut rng);
        for s in never {
            let expected = if s.outcome.choice == Choice::First {
                1.0
            } else {
                0.0
            };
            assert_eq!(s.outcome.reward, expected);
        }
    }

    #[test]
    fn choice_indices() {
        assert_eq!(Choice::from_index(0), Some(Choice::First));
        assert_eq!(Choice::from_index(1).map(Choice::index), Some(1));
        assert_eq!(Choice::from_index(2), None);
    }
}
