//! A Kalman filter over each option's mean reward, the Bayesian learner of bandit tasks
//! in model-based fMRI (after Daw, O'Doherty, Dayan, Seymour & Dolan 2006; the
//! filter itself is Kalman 1960). Each option's mean is believed to drift as a
//! Gaussian random walk with variance σ²_d per trial; rewards are that mean plus
//! Gaussian noise of variance σ²_o. On a trial with choice c:
//!
//! - gain k = σ²_c / (σ²_c + σ²_o) — the learning rate of this trial;
//! - δ = r − μ_c; μ_c ← μ_c + k·δ; σ²_c ← (1 − k)·σ²_c;
//! - then every option's variance grows by the drift: σ²_i ← σ²_i + σ²_d.
//!
//! The uncertainty reported at the cue is σ²_c before the trial's observation.

use super::{ChoiceOutcome, Learner, LearnerState, TrialQuantities};

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KalmanLearner {
    /// σ²₀: prior variance of every option's mean.
    pub initial_variance: f64,
    /// σ²_o: variance of a reward around the option's mean.
    pub observation_noise: f64,
    /// σ²_d: variance added to every option's mean on every trial.
    pub drift: f64,
}

impl KalmanLearner {
    /// The gain a filter converges to when the same option is chosen on every trial:
    /// the prior variance P solves the Riccati equation P = P·σ²_o/(P + σ²_o) + σ²_d,
    /// i.e. P² − σ²_d·P − σ²_d·σ²_o = 0, so P = (σ²_d + √(σ²_d² + 4·σ²_d·σ²_o)) / 2 and
    /// k* = P / (P + σ²_o).
    pub fn steady_state_gain(&self) -> f64 {
        let (q, r) = (self.drift, self.observation_noise);
        let prior = (q + (q * q + 4.0 * q * r).sqrt()) / 2.0;
        prior / (prior + r)
    }
}

impl Learner for KalmanLearner {
    fn start(&self, options: usize, initial_value: f64) -> LearnerState {
        LearnerState {
            values: vec![initial_value; options],
            spreads: vec![self.initial_variance; options],
        }
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        let c = trial.choice;
        let value = state.values[c];
        let uncertainty = state.spreads[c];
        let gain = uncertainty / (uncertainty + self.observation_noise);
        let prediction_error = trial.reward - value;
        state.values[c] = value + gain * prediction_error;
        state.spreads[c] = (1.0 - gain) * uncertainty;
        for variance in &mut state.spreads {
            *variance += self.drift;
        }
        TrialQuantities {
            value,
            prediction_error,
            learning_rate: gain,
            associability: None,
            uncertainty: Some(uncertainty),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::DeltaRule;
    use super::super::test_support::one_option;
    use super::*;

    #[test]
    fn gain_converges_to_the_riccati_solution() {
        // Derivation in `steady_state_gain`; with σ²_d = 0.1, σ²_o = 0.5:
        // P = (0.1 + √(0.01 + 0.2)) / 2 = 0.279128784747792, k* = P / (P + 0.5) = 0.35825756949558.
        let learner = KalmanLearner {
            initial_variance: 5.0,
            observation_noise: 0.5,
            drift: 0.1,
        };
        let k_star = learner.steady_state_gain();
        assert!(
            (k_star - 0.358_257_569_495_584).abs() < 1e-12,
            "k* = {k_star}"
        );
        let trace = learner.trace(2, 0.5, &one_option(&[1.0; 60]));
        assert!((trace[0].learning_rate - 5.0 / 5.5).abs() < 1e-15);
        assert!((trace[59].learning_rate - k_star).abs() < 1e-12);
        // Starting at the steady-state prior, the gain stays put from the first trial.
        let prior = k_star * 0.5 / (1.0 - k_star);
        let settled = KalmanLearner {
            initial_variance: prior,
            ..learner
        };
        for q in settled.trace(2, 0.5, &one_option(&[0.0, 1.0, 1.0])) {
            assert!((q.learning_rate - k_star).abs() < 1e-12);
            assert!((q.uncertainty.unwrap_or(f64::NAN) - prior).abs() < 1e-12);
        }
    }

    #[test]
    fn settled_filter_is_a_delta_rule_and_unchosen_options_grow_uncertain() {
        let learner = KalmanLearner {
            initial_variance: 1.0,
            observation_noise: 0.5,
            drift: 0.1,
        };
        let k_star = learner.steady_state_gain();
        let prior = k_star * 0.5 / (1.0 - k_star);
        let settled = KalmanLearner {
            initial_variance: prior,
            ..learner
        };
        let trials = one_option(&[1.0, 0.0, 1.0, 1.0, 0.0]);
        let delta = DeltaRule {
            learning_rate: k_star,
        }
        .trace(2, 0.2, &trials);
        for (k, d) in settled.trace(2, 0.2, &trials).iter().zip(delta) {
            assert!((k.value - d.value).abs() < 1e-12);
        }
        let mut state = learner.start(2, 0.5);
        for trial in &trials {
            learner.learn(&mut state, *trial);
        }
        assert!((state.spreads[1] - 1.5).abs() < 1e-12, "1 + 5 × 0.1");
        assert_eq!(state.values[1], 0.5);
    }
}
