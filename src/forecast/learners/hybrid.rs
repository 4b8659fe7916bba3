//! Delta rule whose step size is scaled by an associability that follows the size of
//! recent surprises (associability after Pearce & Hall 1980; the hybrid form as used in
//! model-based fMRI, e.g. Li, Schiller, Schoenbaum, Phelps & Daw 2011):
//! δ = r − V_c; V_c ← V_c + κ·α_c·δ; then α_c ← η·|δ| + (1 − η)·α_c.
//! The associability is updated after it has been used on the trial.

use super::{ChoiceOutcome, Learner, LearnerState, TrialQuantities};

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HybridAssociability {
    /// κ, in (0, 1].
    pub learning_rate: f64,
    /// η, in [0, 1]: how fast associability follows |δ|.
    pub associability_rate: f64,
    /// α₀ of every option, in (0, 1].
    pub initial_associability: f64,
}

impl Learner for HybridAssociability {
    fn start(&self, options: usize, initial_value: f64) -> LearnerState {
        LearnerState {
            values: vec![initial_value; options],
            spreads: vec![self.initial_associability; options],
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        let c = trial.choice;
        let value = state.values[c];
        let associability = state.spreads[c];
        let prediction_error = trial.reward - value;
        let learning_rate = self.learning_rate * associability;
        state.values[c] = value + learning_rate * prediction_error;
        let eta = self.associability_rate;
        state.spreads[c] = eta * prediction_error.abs() + (1.0 - eta) * associability;
        TrialQuantities {
            value,
            prediction_error,
            learning_rate,
            associability: Some(associability),
            uncertainty: None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{TRACE_REWARDS, one_option};
    use super::super::{DeltaRule, INITIAL_VALUE};
    use super::*;

    #[test]
    fn without_associability_change_it_is_the_delta_rule() {
        // η = 0 and α₀ = 1 keep α_c = 1, so V_c moves by κ·δ: the delta rule with α = κ.
        let hybrid = HybridAssociability {
            learning_rate: 0.35,
            associability_rate: 0.0,
            initial_associability: 1.0,
        };
        let delta = DeltaRule {
            learning_rate: 0.35,
        };
        let trials: Vec<ChoiceOutcome> = TRACE_REWARDS
            .iter()
            .enumerate()
            .map(|(t, &reward)| ChoiceOutcome {
                choice: t % 3,
                reward,
            })
            .collect();
        for (h, d) in hybrid
            .trace(3, 0.5, &trials)
            .iter()
            .zip(delta.trace(3, 0.5, &trials))
        {
            assert_eq!(h.value, d.value);
            assert_eq!(h.prediction_error, d.prediction_error);
            assert_eq!(h.learning_rate, d.learning_rate);
            assert_eq!(h.associability, Some(1.0));
        }
        // Associability rate 0 with α₀ < 1 is a fixed-rate delta rule with α = κ·α₀.
        let scaled = HybridAssociability {
            initial_associability: 0.5,
            ..hybrid
        };
        let slow = DeltaRule {
            learning_rate: 0.175,
        };
        let trials = one_option(&TRACE_REWARDS);
        for (h, d) in scaled
            .trace(2, 0.0, &trials)
            .iter()
            .zip(slow.trace(2, 0.0, &trials))
        {
            assert!((h.value - d.value).abs() < 1e-15);
        }
    }

    #[test]
    fn three_trials_by_hand() {
        // κ = 0.4, η = 0.3, α0 = 1, V0 = 0.5 for both options.
        // Trial 1, option 1, r = 1: V = 0.5, α = 1, δ = 0.5;
        //   V1 ← 0.5 + 0.4·1·0.5 = 0.7;  α1 ← 0.3·0.5 + 0.7·1 = 0.85.
        // Trial 2, option 1, r = 0: V = 0.7, α = 0.85, δ = −0.7;
        //   V1 ← 0.7 − 0.4·0.85·0.7 = 0.462;  α1 ← 0.3·0.7 + 0.7·0.85 = 0.805.
        // Trial 3, option 0, r = 1: V = 0.5, α = 1, δ = 0.5; V0 ← 0.7;  α0 ← 0.85.
        let learner = HybridAssociability {
            learning_rate: 0.4,
            associability_rate: 0.3,
            initial_associability: 1.0,
        };
        let trials =
            [(1, 1.0), (1, 0.0), (0, 1.0)].map(|(choice, reward)| ChoiceOutcome { choice, reward });
        let mut state = learner.start(2, INITIAL_VALUE);
        let got: Vec<TrialQuantities> = trials
            .iter()
            .map(|&t| learner.learn(&mut state, t))
            .collect();
        let expected = [(0.5, 0.5, 1.0), (0.7, -0.7, 0.85), (0.5, 0.5, 1.0)];
        for (q, (value, error, assoc)) in got.iter().zip(expected) {
            assert!((q.value - value).abs() < 1e-12);
            assert!((q.prediction_error - error).abs() < 1e-12);
            assert!((q.associability.unwrap_or(f64::NAN) - assoc).abs() < 1e-12);
            assert!((q.learning_rate - 0.4 * assoc).abs() < 1e-12);
        }
        assert!((state.values[0] - 0.7).abs() < 1e-12);
        assert!((state.values[1] - 0.462).abs() < 1e-12);
        assert!((state.spreads[0] - 0.85).abs() < 1e-12);
        assert!((state.spreads[1] - 0.805).abs() < 1e-12);
        assert_eq!(got, learner.trace(2, INITIAL_VALUE, &trials));
    }
}
