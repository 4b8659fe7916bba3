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

use super::participant::{CUE, OUTCOME};
use super::report::{RankEntry, VariantForecast};
use super::simulate::{Stream, stream};
use super::spec::{ForecastSpec, RankBy};
use crate::quantile;

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
        let mut pooled: Vec<f64> = draw
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
        let median = quantile::type8_unsorted(&mut pooled, 0.5)?;
        if !median.is_finite() {
            return None;
        }
        worst = worst.max(median);
    }
    worst.is_finite().then_some(worst)
}

/// How often each variant came first over the paired bootstrap resamples.
#[derive(Debug, Clone, PartialEq)]
pub struct ChanceBest {
    /// Per variant, its wins divided by the number of resamples.
    pub shares: Vec<f64>,
    /// Resamples in which no variant had a defined score: no winner.
    pub no_winner: usize,
}

/// Per variant, the share of paired bootstrap resamples in which it scores lowest
/// (ties go to the variant listed first, as in the ranking). A resample in which every
/// score is undefined has no winner: it counts for no variant.
pub fn chance_best(spec: &ForecastSpec, variants: &[FocusValues]) -> ChanceBest {
    let participants = variants.first().map_or(0, Vec::len);
    let mut wins = vec![0usize; variants.len()];
    if participants == 0 {
        return ChanceBest {
            shares: vec![0.0; variants.len()],
            no_winner: 0,
        };
    }
    let mut no_winner = 0;
    let mut rng = stream(spec.seed, 0, Stream::Ranking);
    for _ in 0..RESAMPLES {
        let draw: Vec<usize> = (0..participants)
            .map(|_| rng.random_range(0..participants))
            .collect();
        let best = (0..variants.len())
            .filter_map(|v| score_of(&variants[v], &draw).map(|score| (v, score)))
            .min_by(|a, b| a.1.total_cmp(&b.1).then(a.0.cmp(&b.0)))
            .map(|(v, _)| v);
        match best {
            Some(v) => wins[v] += 1,
            None => no_winner += 1,
        }
    }
    ChanceBest {
        shares: wins.iter().map(|&w| w as f64 / RESAMPLES as f64).collect(),
        no_winner,
    }
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
    chance: &ChanceBest,
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
            chance_best: chance.shares.get(i).copied().unwrap_or(0.0),
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
    let mut verdict = match (ranking.first(), variants.first()) {
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
    if chance.no_winner > 0 {
        verdict.push_str(&format!(
            " In {} of {RESAMPLES} bootstrap resamples no variant had a defined score; they count as won by none.",
            chance.no_winner
        ));
    }
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

    #[test]
    fn a_resample_where_every_score_is_undefined_has_no_winner() {
        // Every run of every participant undefined in both variants: no resample has a
        // winner, so neither variant is credited (the first used to win them all).
        let undefined: FocusValues = vec![vec![vec![None]]; 3];
        let spec = crate::forecast::spec::parse_forecast(
            std::path::Path::new("spec.toml"),
            include_str!("../../demo-data/forecast.toml"),
        )
        .expect("the demo spec");
        let chance = chance_best(&spec, &[undefined.clone(), undefined]);
        assert_eq!(chance.shares, vec![0.0, 0.0]);
        assert_eq!(chance.no_winner, RESAMPLES);
        // One participant defined in the second variant only: that variant wins the
        // resamples that draw the participant at least twice (its median is then
        // defined), the others have no winner.
        let mut some: FocusValues = vec![vec![vec![None]]; 3];
        some[0][0][0] = Some(2.0);
        let chance = chance_best(&spec, &[vec![vec![vec![None]]; 3], some]);
        assert_eq!(chance.shares[0], 0.0);
        let won = (chance.shares[1] * RESAMPLES as f64).round() as usize;
        assert_eq!(won + chance.no_winner, RESAMPLES);
        assert!(won > 0 && chance.no_winner > 0);
    }
}
