//! The choice log-likelihood evaluated inside the fit: the same quantity as
//! [`crate::forecast::choice::log_likelihood`], arranged for speed because a fit
//! evaluates it a few hundred times.
//!
//! Two things differ. The learner's type is resolved once per evaluation rather than per
//! trial, so each learner's update is inlined into the loop. And with two options the
//! softmax log-probability is written as log σ(β·(V_c − V_o)) = −ln(1 + e^−z), computed
//! as −(max(−z, 0) + ln(1 + e^−|z|)) so it neither overflows nor loses the small
//! probabilities; one exponential and one `ln_1p` instead of two and a `ln`. The results
//! agree with the general routine to rounding (tested below).

use crate::forecast::choice::log_probability;
use crate::forecast::learners::{ChoiceOutcome, Learner, LearnerModel};

/// Log-likelihood of `runs` under `learner` and softmax choice with inverse temperature
/// `beta`; values restart at `initial_value` in every run.
pub fn choice_log_likelihood(
    learner: &LearnerModel,
    beta: f64,
    options: usize,
    initial_value: f64,
    runs: &[Vec<ChoiceOutcome>],
) -> f64 {
    match learner {
        LearnerModel::Delta(l) => over_runs(l, beta, options, initial_value, runs),
        LearnerModel::DualRate(l) => over_runs(l, beta, options, initial_value, runs),
        LearnerModel::Hybrid(l) => over_runs(l, beta, options, initial_value, runs),
        LearnerModel::Kalman(l) => over_runs(l, beta, options, initial_value, runs),
    }
}

fn over_runs<L: Learner>(
    learner: &L,
    beta: f64,
    options: usize,
    initial_value: f64,
    runs: &[Vec<ChoiceOutcome>],
) -> f64 {
    let mut total = 0.0;
    for run in runs {
        let mut state = learner.start(options, initial_value);
        for &trial in run {
            total += if options == 2 {
                let other = state.values[1 - trial.choice];
                two_option_log_probability(beta * (state.values[trial.choice] - other))
            } else {
                log_probability(beta, &state.values, trial.choice)
            };
            learner.learn(&mut state, trial);
        }
    }
    total
}

/// log σ(z) for z = β·(V_chosen − V_other).
#[inline]
fn two_option_log_probability(z: f64) -> f64 {
    -((-z).max(0.0) + (-z.abs()).exp().ln_1p())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::forecast::choice::log_likelihood;
    use crate::forecast::learners::{HybridAssociability, KalmanLearner};

    #[test]
    fn agrees_with_the_general_softmax_likelihood() {
        // An arbitrary fixed sequence (by hand), both options chosen, rewards 0/1.
        let trials: Vec<ChoiceOutcome> = (0..60)
            .map(|t: usize| ChoiceOutcome {
                choice: (t * 7 / 5) % 2,
                reward: ((t * 3 + 1) % 4 < 2) as u8 as f64,
            })
            .collect();
        let runs = vec![trials.clone(), trials[..25].to_vec()];
        let learners = [
            LearnerModel::Hybrid(HybridAssociability {
                learning_rate: 0.6,
                associability_rate: 0.3,
                initial_associability: 0.9,
            }),
            LearnerModel::Kalman(KalmanLearner {
                initial_variance: 2.0,
                observation_noise: 0.5,
                drift: 0.01,
            }),
        ];
        for learner in &learners {
            for beta in [0.0, 0.7, 5.0, 50.0] {
                let fast = choice_log_likelihood(learner, beta, 2, 0.5, &runs);
                let general = log_likelihood(learner, beta, 2, 0.5, &runs);
                assert!(
                    (fast - general).abs() <= 1e-12 * general.abs().max(1.0),
                    "{learner:?} β = {beta}: {fast} vs {general}"
                );
            }
        }
        // Extreme z: log σ(−800) = −800 to rounding (e^−800 underflows, the form does not).
        assert_eq!(two_option_log_probability(-800.0), -800.0);
        assert_eq!(two_option_log_probability(800.0), 0.0);
        // log σ(0) = −ln 2.
        assert_eq!(two_option_log_probability(0.0), -std::f64::consts::LN_2);
    }
}
