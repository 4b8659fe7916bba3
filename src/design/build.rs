//! RunTrials (+ nuisance table) → Design. Pure: no file access.

use std::path::PathBuf;

use super::filter::{DriftBases, whiten};
use super::hrf::{Kernel, sampled};
use super::orthogonalise::within_events;
use super::regressors::{Grid, event_regressor};
use super::trials::{Pending, pending_regressors, timing_flags};
use super::{Design, EventSummary, Regressor, RegressorKind};
use crate::error::{Error, Location, Problem};
use crate::study::{GlmSpec, ModelSpec, NoiseModel};
use crate::trials::{NuisanceTable, RunTrials};

/// How every run's design is built: the study's choices and the user's, the same for
/// every run.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignSpec {
    /// Repetition time in seconds.
    pub tr: f64,
    /// Microtime bins per TR.
    pub microtime: usize,
    /// Where in the TR each scan is sampled, as a fraction of the TR.
    pub reference: f64,
    /// High-pass cutoff in seconds; 0 turns the drift basis off.
    pub high_pass: f64,
    /// Add the temporal derivative of every onset and modulator regressor.
    pub derivative: bool,
    /// Mean-centre parametric modulators within run and event (the default).
    pub centre: bool,
    pub models: Vec<ModelSpec>,
    /// The noise model: every column is whitened under AR(1) before the drift basis
    /// (whitened too) is projected out.
    pub noise: NoiseModel,
    /// Where the runs come from (the trial table or the BIDS dataset), named in
    /// messages about a run.
    pub source: PathBuf,
}

/// A [`DesignSpec`] with what every run shares made once: the sampled response
/// kernels and the drift bases of each run length.
#[derive(Debug)]
pub struct DesignSettings {
    pub spec: DesignSpec,
    response: Kernel,
    response_derivative: Kernel,
    drift: DriftBases,
}

impl DesignSettings {
    pub fn new(spec: DesignSpec) -> Self {
        let dt = spec.tr / spec.microtime as f64;
        let (response, response_derivative) = sampled(dt);
        DesignSettings {
            spec,
            response,
            response_derivative,
            drift: DriftBases::default(),
        }
    }
}

/// The design of `run` with every model's modulators: the design every GLM's columns
/// are taken from ([`Design::for_glm`]), and the one the models' separation is measured in.
pub fn build_design(
    settings: &DesignSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
) -> Result<Design, Error> {
    build(settings, run, nuisance, &settings.spec.models, false)
}

/// The design of `glm` with each modulator orthogonalised, at trial level and before
/// convolution, against the modulators listed before it on the same event (see
/// [`super::orthogonalise::within_events`]).
pub fn build_orthogonalised_within_events(
    settings: &DesignSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
    glm: &GlmSpec,
) -> Result<Design, Error> {
    let models: Vec<ModelSpec> = settings
        .spec
        .models
        .iter()
        .filter(|m| glm.holds(&m.name))
        .cloned()
        .collect();
    build(settings, run, nuisance, &models, true)
}

fn build(
    settings: &DesignSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
    models: &[ModelSpec],
    orthogonalise_within_events: bool,
) -> Result<Design, Error> {
    let spec = &settings.spec;
    let grid = Grid::new(spec.tr, run.scans, spec.microtime, spec.reference);
    let run_end = run.scans as f64 * spec.tr;
    let mut flags = run.flags.clone();

    // Trials starting after the last scan cannot affect the data: leave them out.
    let kept: Vec<Vec<bool>> = run
        .events
        .iter()
        .map(|event| event.onsets.iter().map(|&o| o < run_end).collect())
        .collect();
    for (event, kept) in run.events.iter().zip(&kept) {
        timing_flags(event, kept, run_end, &mut flags);
    }
    let (mut pending, trial_values) =
        pending_regressors(models, spec.centre, run, &kept, &mut flags);
    if orthogonalise_within_events {
        flags.extend(within_events(&mut pending));
    }

    let (mut regressors, mut sampled_columns, mut included) =
        sample(settings, run, &grid, &pending);
    if let Some(table) = nuisance {
        for (name, column) in table.names.iter().zip(&table.columns) {
            let taken = regressors.iter().any(|r: &Regressor| &r.name == name);
            regressors.push(Regressor {
                name: if taken {
                    format!("nuisance:{name}")
                } else {
                    name.clone()
                },
                kind: RegressorKind::Nuisance,
                event: None,
                model: None,
                column: Some(name.clone()),
            });
            sampled_columns.push(column.clone());
            included.push(true);
        }
    }

    let rho = spec.noise.coefficient();
    let drift = settings.drift.get(run.scans, spec.tr, spec.high_pass, rho);
    let in_model = included.iter().filter(|&&i| i).count() + drift.len();
    if in_model > run.scans {
        return Err(Problem::new(
            Location::file(&spec.source),
            format!(
                "subject {} run {}: the design has {in_model} columns ({} regressors + {} drift and constant) but only {} scans",
                run.subject,
                run.run,
                in_model - drift.len(),
                drift.len(),
                run.scans
            ),
        )
        .with_hint("check the scan count, or use fewer regressors")
        .into());
    }
    let filtered = sampled_columns
        .iter()
        .map(|c| match spec.noise {
            NoiseModel::White => drift.residualise(c),
            NoiseModel::Ar1(rho) => drift.residualise(&whiten(c, rho)),
        })
        .collect();
    Ok(Design {
        events: event_summaries(run, &kept),
        subject: run.subject.clone(),
        run: run.run.clone(),
        session: run.session.clone(),
        scans: run.scans,
        regressors,
        sampled: sampled_columns,
        filtered,
        included,
        drift,
        noise: spec.noise,
        trial_values,
        flags,
    })
}

/// Every trial-level regressor convolved and sampled at the scans, then (with
/// `derivative`) every one's temporal derivative.
fn sample(
    settings: &DesignSettings,
    run: &RunTrials,
    grid: &Grid,
    pending: &[Pending],
) -> (Vec<Regressor>, Vec<Vec<f64>>, Vec<bool>) {
    let mut regressors = Vec::new();
    let mut sampled_columns = Vec::new();
    let mut included = Vec::new();
    for (kernel, derivative) in [
        (&settings.response, false),
        (&settings.response_derivative, true),
    ] {
        if derivative && !settings.spec.derivative {
            continue;
        }
        for item in pending {
            let event = &run.events[item.event];
            let column =
                event_regressor(grid, kernel, &event.onsets, &event.durations, &item.heights);
            let mut regressor = item.regressor.clone();
            if derivative {
                regressor.name = format!("{}:deriv", regressor.name);
                regressor.kind = RegressorKind::Derivative;
            }
            regressors.push(regressor);
            sampled_columns.push(column);
            included.push(item.included);
        }
    }
    (regressors, sampled_columns, included)
}

/// Each event's trials inside the run and their shortest and longest durations.
fn event_summaries(run: &RunTrials, kept: &[Vec<bool>]) -> Vec<EventSummary> {
    run.events
        .iter()
        .zip(kept)
        .map(|(event, kept)| {
            let durations: Vec<f64> = event
                .durations
                .iter()
                .zip(kept)
                .filter(|(_, k)| **k)
                .map(|(d, _)| *d)
                .collect();
            EventSummary {
                event: event.name.clone(),
                trials: durations.len(),
                min_duration: durations.iter().copied().reduce(f64::min),
                max_duration: durations.iter().copied().reduce(f64::max),
            }
        })
        .collect()
}
