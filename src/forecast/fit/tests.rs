use rand::rngs::Xoshiro256PlusPlus;
use rand::{RngExt, SeedableRng};
use statrs::statistics::Statistics;

use super::*;
use crate::forecast::choice::{draw_choice, log_likelihood};
use crate::forecast::learners::{INITIAL_VALUE, Learner};

/// Reward probability of each option on trial `t` of a run: 0.8 / 0.2, swapped every 20
/// trials (a common reversal-learning schedule).
fn reward_probabilities(t: usize) -> [f64; 2] {
    if (t / 20) % 2 == 0 {
        [0.8, 0.2]
    } else {
        [0.2, 0.8]
    }
}

/// Three runs of 80 trials of a softmax chooser with this learner on the reversal task.
fn simulate(
    learner: &LearnerModel,
    beta: f64,
    rng: &mut Xoshiro256PlusPlus,
) -> Vec<Vec<ChoiceOutcome>> {
    (0..3)
        .map(|_| {
            let mut state = learner.start(2, INITIAL_VALUE);
            (0..80)
                .map(|t| {
                    let choice = draw_choice(beta, &state.values, rng);
                    let won = rng.random::<f64>() < reward_probabilities(t)[choice];
                    let trial = ChoiceOutcome {
                        choice,
                        reward: if won { 1.0 } else { 0.0 },
                    };
                    learner.learn(&mut state, trial);
                    trial
                })
                .collect()
        })
        .collect()
}

/// Pearson correlation from statrs' sample covariance and standard deviations.
fn pearson(x: &[f64], y: &[f64]) -> f64 {
    x.iter().covariance(y.iter()) / (x.iter().std_dev() * y.iter().std_dev())
}

fn uniform(rng: &mut Xoshiro256PlusPlus, low: f64, high: f64) -> f64 {
    low + (high - low) * rng.random::<f64>()
}

/// One simulated participant: true parameters (all_parameters order) and choices.
struct Participant {
    truth: Vec<f64>,
    runs: Vec<Vec<ChoiceOutcome>>,
}

fn delta_participants(count: usize) -> Vec<Participant> {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(2024);
    (0..count)
        .map(|_| {
            let alpha = uniform(&mut rng, 0.1, 0.6);
            let beta = uniform(&mut rng, 3.0, 8.0);
            let learner = LearnerModel::new(LearnerKind::Delta, &[alpha]);
            let runs = simulate(&learner, beta, &mut rng);
            Participant {
                truth: vec![alpha, beta],
                runs,
            }
        })
        .collect()
}

fn hybrid_participants(count: usize) -> Vec<Participant> {
    let mut rng = Xoshiro256PlusPlus::seed_from_u64(7);
    (0..count)
        .map(|_| {
            let learning = [
                uniform(&mut rng, 0.3, 0.9),
                uniform(&mut rng, 0.1, 0.6),
                uniform(&mut rng, 0.5, 1.0),
            ];
            let beta = uniform(&mut rng, 3.0, 8.0);
            let learner = LearnerModel::new(LearnerKind::Hybrid, &learning);
            let runs = simulate(&learner, beta, &mut rng);
            let mut truth = learning.to_vec();
            truth.push(beta);
            Participant { truth, runs }
        })
        .collect()
}

fn log_likelihood_at(kind: LearnerKind, parameters: &[f64], runs: &[Vec<ChoiceOutcome>]) -> f64 {
    let n = parameters.len();
    let learner = LearnerModel::new(kind, &parameters[..n - 1]);
    log_likelihood(&learner, parameters[n - 1], 2, INITIAL_VALUE, runs)
}

#[test]
fn delta_rule_parameters_are_recovered() {
    // Parameter recovery (common practice, e.g. Wilson & Collins 2019): correlation of
    // true and fitted values across simulated participants. Measured with these seeds:
    // r(α) = 0.899, r(β) = 0.818 (60 participants, seed 2024); the thresholds leave
    // room for last-bit differences of another platform's exp and ln.
    let people = delta_participants(60);
    let fits: Vec<Fit> = people
        .iter()
        .map(|p| fit_learner(LearnerKind::Delta, &[None, None], 2, INITIAL_VALUE, &p.runs))
        .collect();
    let column = |v: &dyn Fn(usize) -> f64| (0..people.len()).map(v).collect::<Vec<f64>>();
    let r_alpha = pearson(
        &column(&|i| people[i].truth[0]),
        &column(&|i| fits[i].parameters[0]),
    );
    let r_beta = pearson(
        &column(&|i| people[i].truth[1]),
        &column(&|i| fits[i].parameters[1]),
    );
    eprintln!("delta recovery: r(alpha) = {r_alpha:.4}, r(beta) = {r_beta:.4}");
    assert!(r_alpha > 0.85, "r(alpha) = {r_alpha}");
    assert!(r_beta > 0.75, "r(beta) = {r_beta}");
}

#[test]
fn hybrid_learner_parameters_are_recovered_more_loosely() {
    // As above for the hybrid learner: four free parameters from 240 trials, and κ and
    // α₀ trade off (only their product sets the first step), so recovery is weaker.
    // Measured (60 participants, seed 7): r(κ) = 0.675, r(η) = 0.451, r(α₀) = 0.389,
    // r(β) = 0.478; checked are κ and β, with looser thresholds.
    let people = hybrid_participants(60);
    let fits: Vec<Fit> = people
        .iter()
        .map(|p| fit_learner(LearnerKind::Hybrid, &[None; 4], 2, INITIAL_VALUE, &p.runs))
        .collect();
    let r: Vec<f64> = (0..4)
        .map(|j| {
            let truth: Vec<f64> = people.iter().map(|p| p.truth[j]).collect();
            let fitted: Vec<f64> = fits.iter().map(|f| f.parameters[j]).collect();
            pearson(&truth, &fitted)
        })
        .collect();
    eprintln!("hybrid recovery: r = {r:.3?}");
    assert!(r[0] > 0.55, "r(learning rate) = {}", r[0]);
    assert!(r[3] > 0.35, "r(beta) = {}", r[3]);
    // Maximum likelihood with four parameters: a local optimum below the truth's
    // likelihood is allowed for a few participants (measured: 1 of 60).
    let below_truth = people
        .iter()
        .zip(&fits)
        .filter(|(p, f)| {
            f.log_likelihood < log_likelihood_at(LearnerKind::Hybrid, &p.truth, &p.runs) - 1e-6
        })
        .count();
    eprintln!("hybrid fits below the truth: {below_truth} of 60");
    assert!(below_truth <= 3, "{below_truth} of 60 below the truth");
}

#[test]
fn the_fit_is_at_least_as_likely_as_the_truth_and_the_grid() {
    // Maximum likelihood: the estimate cannot be less likely than the true parameters
    // (which lie inside the bounds) unless the search stopped in a local optimum.
    let people = delta_participants(30);
    let mut below_truth = 0;
    for p in &people {
        let fit = fit_learner(LearnerKind::Delta, &[None, None], 2, INITIAL_VALUE, &p.runs);
        let truth = log_likelihood_at(LearnerKind::Delta, &p.truth, &p.runs);
        if fit.log_likelihood < truth - 1e-6 {
            below_truth += 1;
        }
        let objective =
            Objective::new(LearnerKind::Delta, &[None, None], 2, INITIAL_VALUE, &p.runs);
        let grid = Grid::for_free(&objective);
        let grid_best = grid.best_points(&objective, 1)[0].1;
        assert!(
            fit.log_likelihood >= -grid_best,
            "{} < {}",
            fit.log_likelihood,
            -grid_best
        );
        // The reported likelihood is the likelihood of the reported parameters.
        let again = log_likelihood_at(LearnerKind::Delta, &fit.parameters, &p.runs);
        assert!((fit.log_likelihood - again).abs() < 1e-12 * again.abs());
    }
    eprintln!("fits below the truth: {below_truth} of {}", people.len());
    assert!(
        below_truth <= 1,
        "{below_truth} fits less likely than the truth"
    );
}

/// α = 1 makes each option's value its last reward. After a first trial at equal values
/// (option 0, reward 1) the values are [1, 0.5] for good: option 0 is chosen three times
/// (reward 1) and option 1 once (reward 0.5), always with a value difference of ±0.5.
fn three_of_four() -> Vec<Vec<ChoiceOutcome>> {
    let trials = [(0, 1.0), (0, 1.0), (1, 0.5), (0, 1.0), (0, 1.0)];
    vec![
        trials
            .map(|(choice, reward)| ChoiceOutcome { choice, reward })
            .to_vec(),
    ]
}

#[test]
fn inverse_temperature_of_a_hand_checkable_sequence() {
    // log L(β) = ln ½ + 3 ln σ(β/2) + ln σ(−β/2) is largest where σ(β/2) = 3/4, i.e.
    // β = 2 ln 3 = 2.1972245773362196 (by hand), with log L = ln ½ + 3 ln ¾ + ln ¼.
    let fit = fit_learner(
        LearnerKind::Delta,
        &[Some(1.0), None],
        2,
        0.5,
        &three_of_four(),
    );
    let beta = 2.0 * 3f64.ln();
    assert!((fit.parameters[1] / beta - 1.0).abs() < 1e-5, "{:?}", fit);
    let ll = 0.5f64.ln() + 3.0 * 0.75f64.ln() + 0.25f64.ln();
    assert!(
        (fit.log_likelihood - ll).abs() < 1e-9,
        "{} vs {ll}",
        fit.log_likelihood
    );
    assert_eq!(fit.parameters[0], 1.0);
    assert_eq!(fit.at_bound, vec![false, false]);
}

#[test]
fn an_always_right_chooser_drives_the_inverse_temperature_to_its_bound() {
    // α = 1: option 0's value becomes 0.55 after the first trial and stays there, option
    // 1 keeps 0.5; always choosing option 0 makes log L = ln ½ + 4 ln σ(0.05 β) rise with
    // β all the way (by hand), so the estimate sits at the upper bound 50. (The value gap
    // is small so that the likelihood is not flat to rounding well before the bound.)
    let trials = [(0, 0.55); 5];
    let runs = vec![
        trials
            .map(|(choice, reward)| ChoiceOutcome { choice, reward })
            .to_vec(),
    ];
    let fit = fit_learner(LearnerKind::Delta, &[Some(1.0), None], 2, 0.5, &runs);
    assert!(fit.parameters[1] > 49.95, "{fit:?}");
    let at_50 = 0.5f64.ln() - 4.0 * (1.0 + (-2.5f64).exp()).ln();
    // d log L / dβ = 4 · 0.05 · (1 − σ(2.5)) ≈ 0.015 here (by hand), so 0.05 short of
    // 50 costs < 1e-3.
    assert!(
        (fit.log_likelihood - at_50).abs() < 1e-3,
        "{fit:?} vs {at_50}"
    );
    assert_eq!(fit.at_bound, vec![false, true]);
    assert!(fit.log_likelihood.is_finite() && fit.log_likelihood < 0.0);
}

#[test]
fn fixed_parameters_stay_and_all_fixed_is_one_evaluation() {
    let people = hybrid_participants(1);
    let runs = &people[0].runs;
    let fit = fit_learner(
        LearnerKind::Hybrid,
        &[None, Some(0.25), None, Some(4.5)],
        2,
        INITIAL_VALUE,
        runs,
    );
    assert_eq!(fit.parameters[1], 0.25);
    assert_eq!(fit.parameters[3], 4.5);
    assert!(!fit.at_bound[1] && !fit.at_bound[3]);
    assert!(fit.evaluations > 0);

    let truth = &people[0].truth;
    let fixed: Vec<Option<f64>> = truth.iter().copied().map(Some).collect();
    let all_fixed = fit_learner(LearnerKind::Hybrid, &fixed, 2, INITIAL_VALUE, runs);
    assert_eq!(&all_fixed.parameters, truth);
    assert_eq!(all_fixed.evaluations, 1);
    assert_eq!(all_fixed.at_bound, vec![false; 4]);
    let direct = log_likelihood_at(LearnerKind::Hybrid, truth, runs);
    assert!((all_fixed.log_likelihood - direct).abs() < 1e-12 * direct.abs());
    // Freeing two parameters can only raise the likelihood (ML; by construction).
    assert!(
        fit.log_likelihood >= log_likelihood_at(LearnerKind::Hybrid, &fit.parameters, runs) - 1e-9
    );
}

#[test]
fn no_trials_give_midpoints_without_evaluating() {
    for runs in [vec![], vec![vec![], vec![]]] {
        let fit = fit_learner(LearnerKind::Delta, &[None, None], 2, INITIAL_VALUE, &runs);
        // Midpoints of [0, 1] and [0, 50] (by hand).
        assert_eq!(fit.parameters, vec![0.5, 25.0]);
        assert_eq!((fit.log_likelihood, fit.evaluations), (0.0, 0));
        assert_eq!(fit.at_bound, vec![false, false]);
        let kalman = fit_learner(
            LearnerKind::Kalman,
            &[None, Some(2.0), None, None],
            2,
            0.0,
            &runs,
        );
        // Geometric midpoint of [1e-4, 1e2] is 1e-1 (by hand).
        assert!((kalman.parameters[0] - 0.1).abs() < 1e-15);
        assert_eq!(kalman.parameters[1], 2.0);
    }
}

#[test]
fn the_same_input_gives_the_same_fit() {
    let people = hybrid_participants(3);
    for p in &people {
        let a = fit_learner(LearnerKind::Hybrid, &[None; 4], 2, INITIAL_VALUE, &p.runs);
        let b = fit_learner(LearnerKind::Hybrid, &[None; 4], 2, INITIAL_VALUE, &p.runs);
        assert_eq!(a, b);
    }
}

#[test]
fn a_non_finite_likelihood_is_penalised_not_propagated() {
    // A NaN reward makes every value after it NaN, so no parameter vector has a finite
    // likelihood: the fit still returns finite numbers.
    let runs = vec![vec![
        ChoiceOutcome {
            choice: 0,
            reward: f64::NAN,
        },
        ChoiceOutcome {
            choice: 1,
            reward: 1.0,
        },
    ]];
    let fit = fit_learner(LearnerKind::Delta, &[None, None], 2, INITIAL_VALUE, &runs);
    assert_eq!(fit.log_likelihood, -NON_FINITE_COST);
    assert!(fit.parameters.iter().all(|v| v.is_finite()));
}

/// Release-mode timing of the forecast's workload (run with
/// `cargo test --release --lib fit_timing -- --ignored --nocapture`).
#[test]
#[ignore]
fn fit_timing() {
    for (kind, people) in [
        (LearnerKind::Delta, delta_participants(300)),
        (LearnerKind::Hybrid, hybrid_participants(300)),
    ] {
        let fixed = vec![None; kind.all_parameters().len()];
        let start = std::time::Instant::now();
        let mut evaluations = 0;
        let mut below_truth = 0;
        for p in &people {
            let fit = fit_learner(kind, &fixed, 2, INITIAL_VALUE, &p.runs);
            evaluations += fit.evaluations;
            if fit.log_likelihood < log_likelihood_at(kind, &p.truth, &p.runs) - 1e-6 {
                below_truth += 1;
            }
        }
        let ms = start.elapsed().as_secs_f64() * 1e3 / people.len() as f64;
        eprintln!(
            "{kind:?}: {ms:.3} ms and {:.0} evaluations per fit; {below_truth} of {} \
             less likely than the truth",
            evaluations as f64 / people.len() as f64,
            people.len()
        );
    }
}
