//! The whole forecast: every simulated participant on every variant, in parallel, then
//! the per-variant summaries and the ranking.

use rayon::prelude::*;

use super::participant::{
    CUE, OUTCOME, SimulatedParticipant, check_runs, run_trials, settings_for, simulate,
};
use super::ranking::{FocusValues, chance_best, rank, score};
use super::report::{FORECAST_CAUTIONS, ForecastInfo, ForecastReport, TaskInfo, VariantForecast};
use super::simulate::draw_persona;
use super::spec::{ForecastSpec, RankBy};
use super::summary::{
    Recovery, RunDigest, Slots, Tracked, model_set_forecast, pearson, regressor_forecast,
};
use crate::cohort::StatusCounts;
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
    let slots = Slots::new(&spec.glms, tracked, learner_names);
    let mut variants = Vec::new();
    let mut kept = Vec::new();
    let mut focus_values = Vec::new();
    for variant in &spec.variants {
        let settings = settings_for(spec, variant);
        let outcomes: Vec<Result<Outcome>> = personas
            .par_iter()
            .map(|persona| {
                let participant = simulate(spec, variant, persona);
                let runs = run_trials(spec, variant, &participant);
                let assessed = check_runs(&settings, &runs)?;
                let digests: Vec<RunDigest> =
                    assessed.iter().map(|r| RunDigest::of(r, &slots)).collect();
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
            &slots,
            &outcomes,
        ));
        focus_values.push(focus_values_of(spec, &slots, &outcomes));
        kept.push(outcomes.into_iter().filter_map(|o| o.kept).collect());
    }
    let chance = chance_best(spec, &focus_values);
    let (ranking, verdict) = rank(spec, &variants, &chance);
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
    slots: &Slots,
    outcomes: &[Outcome],
) -> VariantForecast {
    let runs: Vec<&RunDigest> = outcomes.iter().flat_map(|o| &o.runs).collect();
    let participants = StatusCounts::of(outcomes.iter().map(|o| o.status));
    let regressors = (0..slots.regressors.len())
        .map(|i| regressor_forecast(i, slots, &runs, &spec.thresholds))
        .collect();
    let model_sets = (0..slots.model_sets.len())
        .map(|i| model_set_forecast(i, slots, &runs))
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
        notes: Vec::new(),
    };
    variant.notes = recovery_notes(&variant.recovery);
    score(spec, &mut variant);
    variant
}

/// Below this correlation of true and fitted values a parameter counts as poorly
/// recovered (a rule of thumb of ours; the field has no single standard).
pub const WEAK_RECOVERY: f64 = 0.5;
/// Above this share of fits at a bound, the bound shapes the estimates.
pub const MANY_AT_BOUND: f64 = 0.25;

fn recovery_notes(recovery: &[Recovery]) -> Vec<String> {
    let mut notes = Vec::new();
    let weak: Vec<String> = recovery
        .iter()
        .filter(|r| r.correlation.is_some_and(|c| c < WEAK_RECOVERY))
        .map(|r| {
            format!(
                "{} {} (r = {:.2})",
                r.learner,
                r.parameter,
                r.correlation.unwrap_or(0.0)
            )
        })
        .collect();
    if !weak.is_empty() {
        notes.push(format!(
            "Parameter recovery is weak for {}: on this task the fits follow the simulated learning only loosely, so these regressors are the fitted learners' (as in a real analysis), not the true ones. Consider a task, trial count or population that recovers parameters better before trusting fits.",
            weak.join(", ")
        ));
    }
    let bound: Vec<String> = recovery
        .iter()
        .filter(|r| r.at_bound > MANY_AT_BOUND)
        .map(|r| format!("{} {} ({:.0}%)", r.learner, r.parameter, 100.0 * r.at_bound))
        .collect();
    if !bound.is_empty() {
        notes.push(format!(
            "Many fits end at a bound of {}: the data do not pin these parameters down.",
            bound.join(", ")
        ));
    }
    notes
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

/// What the ranking's bootstrap needs: per participant and run, the focus regressors'
/// VIFs in every GLM that holds them (or their shares with another model).
fn focus_values_of(spec: &ForecastSpec, slots: &Slots, outcomes: &[Outcome]) -> FocusValues {
    let is_focus = |t: usize| spec.focus.iter().any(|f| f == slots.tracked[t].name());
    let focus: Vec<usize> = match spec.rank_by {
        RankBy::Vif => (0..slots.regressors.len())
            .filter(|&i| is_focus(slots.regressors[i].1))
            .collect(),
        RankBy::Shared => (0..slots.tracked.len())
            .filter(|&t| is_focus(t) && slots.tracked[t].learner().is_some())
            .collect(),
    };
    outcomes
        .iter()
        .map(|o| {
            o.runs
                .iter()
                .map(|run| {
                    focus
                        .iter()
                        .map(|&i| match spec.rank_by {
                            RankBy::Vif => run.vif[i],
                            RankBy::Shared => run.shared[i],
                        })
                        .collect()
                })
                .collect()
        })
        .collect()
}
