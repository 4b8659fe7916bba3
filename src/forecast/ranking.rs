//! Ranking the task variants, and how sure that ranking is.
//!
//! A variant's score is, over the focus regressors, the largest median (over simulated
//! runs) of the VIF — or of the share held with another model. Lower separates better.
//! Because the same simulated participants do every variant, the ranking can be
//! resampled in pairs: each bootstrap resample draws participants with replacement
//! (Efron & Tibshirani 1993) and recomputes every variant's score on the same draw; the
//! share of resamples in which a variant comes first says how much its lead owes to the
//! particular participants simulated.

use rand::RngExt;
use statrs::statistics::{Data, OrderStatistics};

use super::participant::{CUE, OUTCOME};
use super::report::{RankEntry, VariantForecast};
use super::simulate::{Stream, stream};
use super::spec::{ForecastSpec, RankBy};

/// Bootstrap resamples behind `chance_best`.
pub const RESAMPLES: usize = 1000;

/// Per participant, per run, per focus regressor: the value the score takes a median
/// of (`None` where it is undefined, which ranks above every defined value).
pub type FocusValues = Vec<Vec<Vec<Option<f64>>>>;

/// The score over the participants listed in `draw` (indices, repeats allowed).
pub fn score_of(values: &FocusValues, draw: &[usize]) -> Option<f64> {
    let focus = values.first().and_then(|p| p.first()).map_or(0, Vec::len);
    let mut worst = f64::NEG_INFINITY;
    for f in 0..focus {
        let pooled: Vec<f64> = draw
            .iter()
            .flat_map(|&p| {
                values[p]
                    .iter()
                    .map(move |run| run[f].unwrap_or(f64::INFINITY))
            })
            .collect();
        if pooled.is_empty() {
            continue;
        }
        let median = Data::new(pooled).quantile(0.5);
        if !median.is_finite() {
            return None;
        }
        worst = worst.max(median);
    }
    worst.is_finite().then_some(worst)
}

/// Per variant, the share of paired bootstrap resamples in which it scores lowest
/// (ties go to the variant listed first, as in the ranking).
pub fn chance_best(spec: &ForecastSpec, variants: &[FocusValues]) -> Vec<f64> {
    let participants = variants.first().map_or(0, Vec::len);
    let mut wins = vec![0usize; variants.len()];
    if participants == 0 {
        return vec![0.0; variants.len()];
    }
    let mut rng = stream(spec.seed, 0, Stream::Ranking);
    for _ in 0..RESAMPLES {
        let draw: Vec<usize> = (0..participants)
            .map(|_| rng.random_range(0..participants))
            .collect();
        let best = (0..variants.len())
            .map(|v| (v, score_of(&variants[v], &draw).unwrap_or(f64::INFINITY)))
            .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)))
            .map(|(v, _)| v);
        if let Some(v) = best {
            wins[v] += 1;
        }
    }
    wins.iter().map(|&w| w as f64 / RESAMPLES as f64).collect()
}

/// The score of one variant on all its participants, with the reason when undefined.
pub fn score(spec: &ForecastSpec, variant: &mut VariantForecast) {
    let mut worst: Option<f64> = Some(f64::NEG_INFINITY);
    for m in variant
        .regressors
        .iter()
        .filter(|m| spec.focus.contains(&m.regressor))
    {
        let median = match spec.rank_by {
            RankBy::Vif => m.vif.median,
            // An event has no partition; ranking by shares looks at modulators only.
            RankBy::Shared => match &m.shared_with_other_models {
                Some(shared) => shared.median,
                None => continue,
            },
        };
        match median {
            Some(v) => worst = worst.map(|w| w.max(v)),
            None => {
                variant.score_note = Some(format!(
                    "{}'s median is undefined: at least half of its runs have an exact dependency",
                    m.regressor
                ));
                worst = None;
            }
        }
    }
    variant.score = worst.filter(|w| w.is_finite());
}

/// The ranking (lowest score first; undefined scores last) and the verdict sentence.
pub fn rank(
    spec: &ForecastSpec,
    variants: &[VariantForecast],
    chance: &[f64],
) -> (Vec<RankEntry>, String) {
    let mut order: Vec<usize> = (0..variants.len()).collect();
    order.sort_by(|&a, &b| {
        let key = |i: usize| variants[i].score.unwrap_or(f64::INFINITY);
        key(a).total_cmp(&key(b)).then(a.cmp(&b))
    });
    let ranking: Vec<RankEntry> = order
        .iter()
        .enumerate()
        .map(|(r, &i)| RankEntry {
            rank: r + 1,
            variant: variants[i].name.clone(),
            score: variants[i].score,
            chance_best: chance.get(i).copied().unwrap_or(0.0),
        })
        .collect();
    let what = match spec.rank_by {
        RankBy::Vif => "median VIF",
        RankBy::Shared => "median share held with another model",
    };
    let focus = spec.focus.join(", ");
    // Naming only the events' onsets, the ranking is about timing, not about learners.
    let only_events = spec.focus.iter().all(|f| f == CUE || f == OUTCOME);
    let separates = if only_events {
        "separates the events best"
    } else {
        "separates the learners best"
    };
    let verdict = match (ranking.first(), variants.first()) {
        (Some(best), Some(planned)) if best.score.is_some() => {
            let format = |v: Option<f64>| v.map_or("undefined".into(), |v| format!("{v:.3}"));
            let sure = format!(
                "It comes first in {:.0}% of {RESAMPLES} bootstrap resamples of the simulated participants{}",
                100.0 * best.chance_best,
                if best.chance_best < 0.9 {
                    ", so the lead is not clear-cut: simulate more participants, or treat the leading variants as equals."
                } else {
                    "."
                }
            );
            if best.variant == planned.name {
                format!(
                    "\"{}\" {separates}: the largest {what} over {focus} is {}. No variant improves on the task as planned. {sure}",
                    best.variant,
                    format(best.score)
                )
            } else {
                format!(
                    "\"{}\" {separates}: the largest {what} over {focus} is {}, against {} for the task as planned. {sure}",
                    best.variant,
                    format(best.score),
                    format(planned.score)
                )
            }
        }
        _ => format!(
            "No variant has a defined {what} over {focus}: every one has exact dependencies in at least half of its runs."
        ),
    };
    (ranking, verdict)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scores_take_the_worst_focus_median_and_respect_the_draw() {
        // Two participants, two runs, two focus regressors.
        let values: FocusValues = vec![
            vec![vec![Some(1.0), Some(10.0)], vec![Some(3.0), Some(12.0)]],
            vec![vec![Some(2.0), Some(20.0)], vec![Some(4.0), None]],
        ];
        // All four runs: medians (type 8) 2.5 and 16.0 (defined, 10, 12, 20, +inf → 16).
        assert_eq!(score_of(&values, &[0, 1]), Some(16.0));
        // Participant 0 twice: runs 1, 3, 1, 3 and 10, 12, 10, 12 → max median 11.
        assert_eq!(score_of(&values, &[0, 0]), Some(11.0));
        // Participant 1 twice: the second regressor's median is among the undefined.
        assert_eq!(score_of(&values, &[1, 1]), None);
    }
}
