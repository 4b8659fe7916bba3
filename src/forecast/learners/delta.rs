//! Delta rules: one learning rate (Rescorla & Wagner 1972), or separate rates for
//! positive and negative prediction errors (as in, e.g., Frank, Moustafa, Haughey,
//! Curran & Hutchison 2007; Niv, Edlund, Dayan & O'Doherty 2012).

use super::{ChoiceOutcome, Learner, LearnerState, TrialQuantities};

/// δ = r − V_c, then V_c ← V_c + α·δ.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DeltaRule {
    /// α, in [0, 1].
    pub learning_rate: f64,
}

/// δ = r − V_c, then V_c ← V_c + α⁺·δ when δ > 0 and V_c + α⁻·δ otherwise.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DualRateDelta {
    /// α⁺, in [0, 1].
    pub positive_rate: f64,
    /// α⁻, in [0, 1].
    pub negative_rate: f64,
}

fn fresh(options: usize, initial_value: f64) -> LearnerState {
    LearnerState {
        values: vec![initial_value; options],
        spreads: Vec::new(),
    }
}

fn step(
    state: &mut LearnerState,
    trial: ChoiceOutcome,
    rate_for: impl Fn(f64) -> f64,
) -> TrialQuantities {
    let value = state.values[trial.choice];
    let prediction_error = trial.reward - value;
    let learning_rate = rate_for(prediction_error);
    state.values[trial.choice] = value + learning_rate * prediction_error;
    TrialQuantities {
        value,
        prediction_error,
        learning_rate,
        associability: None,
        uncertainty: None,
    }
}

impl Learner for DeltaRule {
    fn start(&self, options: usize, initial_value: f64) -> LearnerState {
        fresh(options, initial_value)
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        step(state, trial, |_| self.learning_rate)
    }
}

impl Learner for DualRateDelta {
    fn start(&self, options: usize, initial_value: f64) -> LearnerState {
        fresh(options, initial_value)
    }

    fn learn(&self, state: &mut LearnerState, trial: ChoiceOutcome) -> TrialQuantities {
        step(state, trial, |delta| {
            if delta > 0.0 {
                self.positive_rate
            } else {
                self.negative_rate
            }
        })
    }
}

#[cfg(test)]
mod tests {
    use super::super::test_support::{TRACE_REWARDS, one_option};
    use super::*;

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

    #[test]
    fn constant_reward_matches_closed_form() {
        // V_t = 1 − (1 − α)^t from V0 = 0 (Rescorla & Wagner 1972); decimals from shared
        // research stats-checks.json rw.constant_reward (α = 0.3).
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
        let trace = DeltaRule { learning_rate: 0.3 }.trace(2, 0.0, &one_option(&[1.0; 11]));
        for (t, (q, v)) in trace.iter().zip(expected).enumerate() {
            assert!((q.value - v).abs() < 1e-15, "t = {t}: {} vs {v}", q.value);
            let closed_form = 1.0 - 0.7f64.powi(t as i32);
            assert!((q.value - closed_form).abs() < 1e-14);
            assert_eq!(q.learning_rate, 0.3);
        }
    }

    #[test]
    fn trace_matches_exact_decimals() {
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
        let mut state = learner.start(2, 0.0);
        for (t, trial) in one_option(&TRACE_REWARDS).into_iter().enumerate() {
            let q = learner.learn(&mut state, trial);
            assert!((q.value - values[t]).abs() < 1e-14, "value at t = {t}");
            assert!(
                (q.prediction_error - errors[t]).abs() < 1e-14,
                "δ at t = {t}"
            );
            assert_eq!((q.associability, q.uncertainty), (None, None));
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
            .trace(2, 0.0, &trials)
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
    fn dual_rate_with_equal_rates_is_the_delta_rule_and_otherwise_splits() {
        let trials = one_option(&TRACE_REWARDS);
        let same = DualRateDelta {
            positive_rate: 0.3,
            negative_rate: 0.3,
        }
        .trace(2, 0.0, &trials);
        assert_eq!(
            same,
            DeltaRule { learning_rate: 0.3 }.trace(2, 0.0, &trials)
        );
        // By hand, α⁺ = 0.5, α⁻ = 0.1, V0 = 0: r = 1 → δ = 1, V = 0.5; r = 1 → δ = 0.5,
        // V = 0.75; r = 0 → δ = −0.75, V = 0.75 − 0.075 = 0.675.
        let split = DualRateDelta {
            positive_rate: 0.5,
            negative_rate: 0.1,
        }
        .trace(2, 0.0, &trials);
        let got: Vec<(f64, f64, f64)> = split[..4]
            .iter()
            .map(|q| (q.value, q.prediction_error, q.learning_rate))
            .collect();
        let want = [
            (0.0, 1.0, 0.5),
            (0.5, 0.5, 0.5),
            (0.75, -0.75, 0.1),
            (0.675, 0.325, 0.5),
        ];
        for (g, w) in got.iter().zip(want) {
            assert!((g.0 - w.0).abs() < 1e-15 && (g.1 - w.1).abs() < 1e-15 && g.2 == w.2);
        }
    }
}
