//! The softmax choice rule and the log-likelihood of observed choices under a learner.
//!
//! P(choose i) = exp(β·V_i) / Σ_j exp(β·V_j) (the softmax or Luce choice rule with
//! inverse temperature β; e.g. Sutton & Barto 1998, Daw 2011). Values are shifted by
//! their maximum before exponentiating so that large β·V cannot overflow.

use rand::{Rng, RngExt};

use super::learners::{ChoiceOutcome, Learner};

/// Choice probabilities of every option, written into `out` (same length as `values`).
pub fn softmax_into(inverse_temperature: f64, values: &[f64], out: &mut [f64]) {
    let top = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let mut total = 0.0;
    for (p, v) in out.iter_mut().zip(values) {
        *p = (inverse_temperature * (v - top)).exp();
        total += *p;
    }
    for p in out.iter_mut() {
        *p /= total;
    }
}

/// Choice probabilities of every option.
pub fn softmax(inverse_temperature: f64, values: &[f64]) -> Vec<f64> {
    let mut out = vec![0.0; values.len()];
    softmax_into(inverse_temperature, values, &mut out);
    out
}

/// log P(choose `choice`), computed as β·V_c − log Σ exp(β·V_j) with the maximum
/// shifted out, so that it stays finite where the probability underflows.
pub fn log_probability(inverse_temperature: f64, values: &[f64], choice: usize) -> f64 {
    let top = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let total: f64 = values
        .iter()
        .map(|v| (inverse_temperature * (v - top)).exp())
        .sum();
    inverse_temperature * (values[choice] - top) - total.ln()
}

/// Draws an option from the softmax probabilities with one uniform draw.
pub fn draw_choice<R: Rng + ?Sized>(
    inverse_temperature: f64,
    values: &[f64],
    rng: &mut R,
) -> usize {
    let u: f64 = rng.random();
    let top = values.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let weights: Vec<f64> = values
        .iter()
        .map(|v| (inverse_temperature * (v - top)).exp())
        .collect();
    let total: f64 = weights.iter().sum();
    let mut cumulative = 0.0;
    for (i, w) in weights.iter().enumerate() {
        cumulative += w / total;
        if u < cumulative {
            return i;
        }
    }
    values.len() - 1
}

/// Log-likelihood of the choices of several runs under `learner` with softmax choice
/// (values restart at `initial_value` in every run, as the simulation does).
pub fn log_likelihood<L: Learner + ?Sized>(
    learner: &L,
    inverse_temperature: f64,
    options: usize,
    initial_value: f64,
    runs: &[Vec<ChoiceOutcome>],
) -> f64 {
    let mut total = 0.0;
    for run in runs {
        let mut state = learner.start(options, initial_value);
        for &trial in run {
            total += log_probability(inverse_temperature, &state.values, trial.choice);
            learner.learn(&mut state, trial);
        }
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::forecast::learners::DeltaRule;
    use rand::SeedableRng;
    use rand::rngs::Xoshiro256PlusPlus;

    #[test]
    fn two_option_softmax_is_the_logistic() {
        // β = 2, V1 − V0 = 0.5: 1 / (1 + e^−1) = 0.7310585786300049 (exact to f64).
        let p = softmax(2.0, &[0.25, 0.75]);
        assert!((p[1] - 0.731_058_578_630_004_9).abs() < 1e-15);
        assert!((p[0] + p[1] - 1.0).abs() < 1e-15);
        assert_eq!(softmax(0.0, &[0.0, 1.0, 3.0]), vec![1.0 / 3.0; 3]);
        assert_eq!(softmax(1e6, &[0.0, 1.0]), vec![0.0, 1.0]);
        let lp = log_probability(1e6, &[0.0, 1.0], 0);
        assert!((lp + 1e6).abs() < 1e-6, "finite where p underflows: {lp}");
    }

    #[test]
    fn draws_follow_the_probabilities() {
        let mut rng = Xoshiro256PlusPlus::seed_from_u64(11);
        let values = [0.2, 0.5, 0.9];
        let p = softmax(3.0, &values);
        let mut counts = [0usize; 3];
        for _ in 0..40_000 {
            counts[draw_choice(3.0, &values, &mut rng)] += 1;
        }
        for (c, p) in counts.iter().zip(p) {
            let share = *c as f64 / 40_000.0;
            // Four binomial standard errors at n = 40,000 are under 0.01.
            assert!((share - p).abs() < 0.01, "{share} vs {p}");
        }
    }

    #[test]
    fn log_likelihood_by_hand() {
        // α = 0.5, β = 2, V0 = 0.5, two options. Trial 1: choose 0 (p = 0.5), r = 1 →
        // V0 = 0.75. Trial 2: choose 1: p = 1/(1 + e^{2·0.25}) = 0.3775406687981454.
        let runs = vec![vec![
            ChoiceOutcome {
                choice: 0,
                reward: 1.0,
            },
            ChoiceOutcome {
                choice: 1,
                reward: 0.0,
            },
        ]];
        let ll = log_likelihood(&DeltaRule { learning_rate: 0.5 }, 2.0, 2, 0.5, &runs);
        let expected = 0.5f64.ln() + 0.377_540_668_798_145_4f64.ln();
        assert!((ll - expected).abs() < 1e-14, "{ll} vs {expected}");
    }
}
