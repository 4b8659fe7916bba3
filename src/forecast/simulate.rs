//! Simulated participants on a planned task: their parameters, each run's timing and
//! reward schedule, and the choices and rewards their generating learner produces.
//!
//! Randomness comes from three streams per participant, each seeded from
//! (spec seed, participant number, stream), so that a participant is the same whatever
//! the thread count, and the same person (same parameters) does every task variant:
//! differences between variants are then not differences between samples.

use rand::rngs::Xoshiro256PlusPlus;
use rand::{Rng, RngExt, SeedableRng};

use super::choice::draw_choice;
use super::learners::{ChoiceOutcome, Learner, LearnerModel};
use super::spec::{ForecastSpec, Reversal, Rewards, RunLength, Task};

/// Which stream a draw comes from.
#[derive(Debug, Clone, Copy)]
pub enum Stream {
    Parameters = 1,
    Plan = 2,
    Behaviour = 3,
    /// The ranking's bootstrap (one stream for the whole forecast).
    Ranking = 4,
}

/// SplitMix64's output function (Steele, Lea & Flood 2014): spreads nearby integers
/// (participant 1, 2, 3 …) over the whole 64-bit range before they seed a generator.
fn mix(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// The generator of one stream of one participant. The three numbers are chained
/// through the mixer into one 64-bit key, which `seed_from_u64` expands into the
/// generator's whole state (every state word then depends on every input).
pub fn stream(seed: u64, participant: usize, which: Stream) -> Xoshiro256PlusPlus {
    let key = mix(mix(mix(seed) ^ participant as u64) ^ which as u64);
    Xoshiro256PlusPlus::seed_from_u64(key)
}

/// Who a simulated participant is: their generating learner and its true parameters.
#[derive(Debug, Clone, PartialEq)]
pub struct Persona {
    /// 1-based number; the label is this number with leading zeros.
    pub number: usize,
    /// Index of the generating learner in the spec.
    pub generator: usize,
    /// In the order of that learner's `all_parameters()` (inverse temperature last).
    pub truth: Vec<f64>,
}

/// Draws the participant's generating learner (by the spec's weights) and parameters.
pub fn draw_persona(spec: &ForecastSpec, number: usize) -> Persona {
    let mut rng = stream(spec.seed, number, Stream::Parameters);
    let u: f64 = rng.random();
    let mut cumulative = 0.0;
    let mut generator = spec.generating[spec.generating.len() - 1].0;
    for &(index, weight) in &spec.generating {
        cumulative += weight;
        if u < cumulative {
            generator = index;
            break;
        }
    }
    let learner = &spec.learners[generator];
    let truth = learner
        .kind
        .all_parameters()
        .iter()
        .zip(&learner.priors)
        .map(|(info, prior)| match prior {
            Some(prior) => prior.draw(info, &mut rng),
            // The parser refuses a generating learner without every prior.
            None => (info.low + info.high) / 2.0,
        })
        .collect();
    Persona {
        number,
        generator,
        truth,
    }
}

/// One run as it will be presented: when each cue and outcome happens, every option's
/// reward probability on every trial, and the number of volumes.
#[derive(Debug, Clone, PartialEq)]
pub struct RunPlan {
    pub cue_onsets: Vec<f64>,
    pub outcome_onsets: Vec<f64>,
    pub probabilities: Vec<Vec<f64>>,
    pub scans: usize,
}

/// Draws the timing and reward schedule of one run. Times are rounded to the
/// millisecond, as a stimulus log would record them.
pub fn plan_run<R: Rng + ?Sized>(task: &Task, rng: &mut R) -> RunPlan {
    let mut draw = |low: f64, high: f64| {
        let x = if high > low {
            rng.random_range(low..=high)
        } else {
            low
        };
        (x * 1000.0).round() / 1000.0
    };
    let mut cue = task.first_cue;
    let (mut cue_onsets, mut outcome_onsets) = (Vec::new(), Vec::new());
    for _ in 0..task.trials {
        let outcome = cue + draw(task.cue_to_outcome.low, task.cue_to_outcome.high);
        cue_onsets.push(round_ms(cue));
        outcome_onsets.push(round_ms(outcome));
        cue = outcome
            + task.outcome_duration
            + draw(task.outcome_to_cue.low, task.outcome_to_cue.high);
    }
    let probabilities = schedule(task, rng);
    let scans = match task.scans {
        RunLength::Fixed(n) => n,
        RunLength::AfterLastOutcome(tail) => {
            let end = outcome_onsets.last().copied().unwrap_or(0.0) + task.outcome_duration + tail;
            (end / task.tr).ceil().max(1.0) as usize
        }
    };
    RunPlan {
        cue_onsets,
        outcome_onsets,
        probabilities,
        scans,
    }
}

fn round_ms(x: f64) -> f64 {
    (x * 1000.0).round() / 1000.0 + 0.0
}

/// Each trial's reward probabilities: rotated one place at each reversal, or read from
/// the schedule file.
fn schedule<R: Rng + ?Sized>(task: &Task, rng: &mut R) -> Vec<Vec<f64>> {
    match &task.rewards {
        Rewards::Schedule { rows, .. } => rows.clone(),
        Rewards::Reversing {
            probabilities,
            reversal,
        } => {
            let mut current = probabilities.clone();
            (0..task.trials)
                .map(|t| {
                    let reverse = match *reversal {
                        Reversal::Never => false,
                        Reversal::Every(n) => t > 0 && t % n == 0,
                        Reversal::Probability(p) => t > 0 && rng.random::<f64>() < p,
                    };
                    if reverse {
                        current.rotate_right(1);
                    }
                    current.clone()
                })
                .collect()
        }
    }
}

/// Choices and rewards of one run: softmax over the learner's values, then reward 1
/// with the chosen option's probability (else 0). Two uniform draws per trial.
pub fn behave<R: Rng + ?Sized>(
    learner: &LearnerModel,
    inverse_temperature: f64,
    initial_value: f64,
    probabilities: &[Vec<f64>],
    rng: &mut R,
) -> Vec<ChoiceOutcome> {
    let options = probabilities.first().map_or(2, Vec::len);
    let mut state = learner.start(options, initial_value);
    probabilities
        .iter()
        .map(|p| {
            let choice = draw_choice(inverse_temperature, &state.values, rng);
            let reward = if rng.random::<f64>() < p[choice] {
                1.0
            } else {
                0.0
            };
            let trial = ChoiceOutcome { choice, reward };
            learner.learn(&mut state, trial);
            trial
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::forecast::learners::DeltaRule;
    use crate::forecast::spec::{Interval, Rewards};

    fn task(reversal: Reversal) -> Task {
        Task {
            options: 2,
            rewards: Rewards::Reversing {
                probabilities: vec![0.8, 0.2],
                reversal,
            },
            trials: 40,
            runs: 1,
            tr: 2.0,
            first_cue: 4.0,
            cue_to_outcome: Interval {
                low: 2.0,
                high: 6.0,
            },
            outcome_to_cue: Interval::fixed(3.0),
            cue_duration: 0.0,
            outcome_duration: 1.0,
            scans: RunLength::AfterLastOutcome(16.0),
        }
    }

    #[test]
    fn plans_follow_the_task() {
        let mut rng = stream(7, 1, Stream::Plan);
        let plan = plan_run(&task(Reversal::Every(10)), &mut rng);
        assert_eq!(plan.cue_onsets[0], 4.0);
        for t in 0..40 {
            let delay = plan.outcome_onsets[t] - plan.cue_onsets[t];
            assert!((2.0 - 1e-9..=6.0 + 1e-9).contains(&delay), "{delay}");
            if t > 0 {
                let gap = plan.cue_onsets[t] - plan.outcome_onsets[t - 1];
                assert!(
                    (gap - 4.0).abs() < 1e-9,
                    "1 s outcome + 3 s interval: {gap}"
                );
            }
            let expected = if (t / 10) % 2 == 0 {
                [0.8, 0.2]
            } else {
                [0.2, 0.8]
            };
            assert_eq!(plan.probabilities[t], expected);
        }
        let end = plan.outcome_onsets[39] + 1.0 + 16.0;
        assert_eq!(plan.scans, (end / 2.0).ceil() as usize);
    }

    #[test]
    fn probabilistic_reversals_happen_at_about_their_rate() {
        let mut rng = stream(3, 2, Stream::Plan);
        let mut long = task(Reversal::Probability(0.1));
        long.trials = 20_000;
        let plan = plan_run(&long, &mut rng);
        let reversals = plan
            .probabilities
            .windows(2)
            .filter(|w| w[0] != w[1])
            .count();
        // Binomial(19,999, 0.1): mean 2000, sd 42.
        assert!((reversals as f64 - 2000.0).abs() < 170.0, "{reversals}");
    }

    #[test]
    fn streams_are_reproducible_and_distinct() {
        let draw = |seed, p, s| stream(seed, p, s).random::<u64>();
        assert_eq!(draw(1, 1, Stream::Plan), draw(1, 1, Stream::Plan));
        assert_ne!(draw(1, 1, Stream::Plan), draw(1, 2, Stream::Plan));
        assert_ne!(draw(1, 1, Stream::Plan), draw(1, 1, Stream::Behaviour));
        assert_ne!(draw(1, 1, Stream::Plan), draw(2, 1, Stream::Plan));
    }

    #[test]
    fn behaviour_is_rewarded_by_the_schedule() {
        let learner = LearnerModel::Delta(DeltaRule { learning_rate: 0.3 });
        let probabilities = vec![vec![1.0, 0.0]; 300];
        let mut rng = stream(1, 1, Stream::Behaviour);
        let trials = behave(&learner, 6.0, 0.5, &probabilities, &mut rng);
        for t in &trials {
            assert_eq!(t.reward, if t.choice == 0 { 1.0 } else { 0.0 });
        }
        let first = trials.iter().filter(|t| t.choice == 0).count();
        assert!(first > 250, "a learner finds the rewarded option: {first}");
    }
}
