//! The whole forecast: every simulated participant on every variant, in parallel, then
//! the per-variant summaries and the ranking.

use rayon::prelude::*;

use super::participant::{
    CUE, OUTCOME, SimulatedParticipant, check_runs, run_trials, simulate, study_for,
};
use super::report::{
    FORECAST_CAUTIONS, ForecastInfo, ForecastReport, RankEntry, TaskInfo, VariantForecast,
};
use super::simulate::draw_persona;
use super::spec::{ForecastSpec, RankBy};
use super::summary::{
    Recovery, RunDigest, StatusCounts, Tracked, model_set_forecast, pearson, regressor_forecast,
};
use crate::design::DesignSettings;
use crate::error::Result;

/// What a caller may want besides the report.
#[derive(Debug, Clone, Copy, Default)]
pub struct ForecastOptions {
    /// Keep every simulated participant (for `--write-trials`).
    pub keep_participants: bool,
}

/// The report, and the simulated participants per variant when asked to keep them.
#[derive(Debug, Clone)]
pub struct Forecast {
    pub report: ForecastReport,
    pub participants: Vec<Vec<SimulatedParticipant>>,
}

/// One participant on one variant, reduced to what the summaries need.
struct Outcome {
    runs: Vec<RunDigest>,
    status: crate::screen::Status,
    truth: Vec<f64>,
    generator: usize,
    fits: Vec<(Vec<f64>, Vec<bool>)>,
    kept: Option<SimulatedParticipant>,
}

/// Runs the forecast. `progress` is called once per finished (variant, participant)
/// pair, from any thread; the result does not depend on the order of the calls.
pub fn run_forecast(
    spec: &ForecastSpec,
    options: ForecastOptions,
    progress: &(dyn Fn() + Sync),
) -> Result<Forecast> {
    let personas: Vec<_> = (1..=spec.participants)
        .map(|n| draw_persona(spec, n))
        .collect();
    let mut tracked = vec![Tracked::Event(CUE.into()), Tracked::Event(OUTCOME.into())];
    tracked.extend(spec.learners.iter().flat_map(|l| {
        l.quantities.iter().map(|&q| Tracked::Modulator {
            learner: l.name.clone(),
            column: l.column(q),
        })
    }));
    let learner_names: Vec<String> = spec.learners.iter().map(|l| l.name.clone()).collect();
    let mut variants = Vec::new();
    let mut kept = Vec::new();
    for variant in &spec.variants {
        let study = study_for(spec, variant);
        let settings = DesignSettings::new(&study, true);
        let outcomes: Vec<Result<Outcome>> = personas
            .par_iter()
            .map(|persona| {
                let participant = simulate(spec, variant, persona);
                let runs = run_trials(spec, variant, &participant);
                let reports = check_runs(&study, &settings, &runs)?;
                let digests: Vec<RunDigest> = reports
                    .iter()
                    .map(|r| RunDigest::of(r, &tracked, &learner_names))
                    .collect();
                let status = digests
                    .iter()
                    .map(|d| d.status)
                    .max()
                    .unwrap_or(crate::screen::Status::Ok);
                let outcome = Outcome {
                    status,
                    truth: persona.truth.clone(),
                    generator: persona.generator,
                    fits: participant
                        .fits
                        .iter()
                        .map(|f| (f.parameters.clone(), f.at_bound.clone()))
                        .collect(),
                    runs: digests,
                    kept: options.keep_participants.then_some(participant),
                };
                progress();
                Ok(outcome)
            })
            .collect();
        let outcomes: Vec<Outcome> = outcomes.into_iter().collect::<Result<_>>()?;
        variants.push(summarise_variant(
            spec,
            &variant.name,
            &variant.task,
            &tracked,
            &outcomes,
        ));
        kept.push(outcomes.into_iter().filter_map(|o| o.kept).collect());
    }
    let (ranking, verdict) = rank(spec, &mut variants);
    Ok(Forecast {
        report: ForecastReport {
            tool: Default::default(),
            forecast: ForecastInfo::new(spec),
            variants,
            ranking,
            verdict,
            cautions: FORECAST_CAUTIONS.to_vec(),
        },
        participants: kept,
    })
}

fn summarise_variant(
    spec: &ForecastSpec,
    name: &str,
    task: &super::spec::Task,
    tracked: &[Tracked],
    outcomes: &[Outcome],
) -> VariantForecast {
    let runs: Vec<&RunDigest> = outcomes.iter().flat_map(|o| &o.runs).collect();
    let mut participants = StatusCounts::default();
    for o in outcomes {
        participants.add(o.status);
    }
    let regressors = tracked
        .iter()
        .enumerate()
        .map(|(i, key)| regressor_forecast(i, key, &runs, &spec.thresholds))
        .collect();
    let model_sets = spec
        .learners
        .iter()
        .enumerate()
        .map(|(i, l)| model_set_forecast(i, &l.name, &runs))
        .collect();
    let mut variant = VariantForecast {
        name: name.to_string(),
        task: TaskInfo::new(task),
        runs_checked: runs.len(),
        participants,
        regressors,
        model_sets,
        recovery: recovery(spec, outcomes),
        score: None,
        score_note: None,
    };
    score(spec, &mut variant);
    variant
}

/// Recovery of every fitted parameter of every generating learner, over the
/// participants it generated.
fn recovery(spec: &ForecastSpec, outcomes: &[Outcome]) -> Vec<Recovery> {
    let mut out = Vec::new();
    for &(g, _) in &spec.generating {
        let learner = &spec.learners[g];
        let generated: Vec<&Outcome> = outcomes.iter().filter(|o| o.generator == g).collect();
        for (p, info) in learner.kind.all_parameters().iter().enumerate() {
            if learner.priors[p]
                .and_then(|prior| prior.fixed_value())
                .is_some()
            {
                continue;
            }
            let truth: Vec<f64> = generated.iter().map(|o| o.truth[p]).collect();
            let fitted: Vec<f64> = generated.iter().map(|o| o.fits[g].0[p]).collect();
            let at_bound = generated.iter().filter(|o| o.fits[g].1[p]).count();
            let correlation = pearson(&truth, &fitted);
            out.push(Recovery {
                learner: learner.name.clone(),
                parameter: info.name.to_string(),
                participants: generated.len(),
                correlation,
                at_bound: at_bound as f64 / generated.len().max(1) as f64,
                note: correlation.is_none().then_some(
                    "undefined: fewer than 3 participants, or no spread in the true or fitted values",
                ),
            });
        }
    }
    out
}

/// The ranking criterion of one variant: the worst focus regressor's median.
fn score(spec: &ForecastSpec, variant: &mut VariantForecast) {
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

fn rank(spec: &ForecastSpec, variants: &mut [VariantForecast]) -> (Vec<RankEntry>, String) {
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
        })
        .collect();
    let what = match spec.rank_by {
        RankBy::Vif => "median VIF",
        RankBy::Shared => "median share held with another model",
    };
    let focus = spec.focus.join(", ");
    let verdict = match (ranking.first(), variants.first()) {
        (Some(best), Some(planned)) if best.score.is_some() => {
            let format = |v: Option<f64>| v.map_or("undefined".into(), |v| format!("{v:.3}"));
            if best.variant == planned.name {
                format!(
                    "\"{}\" separates the learners best: the largest {what} over {focus} is {}. No variant improves on the task as planned.",
                    best.variant,
                    format(best.score)
                )
            } else {
                format!(
                    "\"{}\" separates the learners best: the largest {what} over {focus} is {}, against {} for the task as planned.",
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
