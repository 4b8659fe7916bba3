//! RunTrials (+ nuisance table) → Design. Pure: no file access.

use std::path::PathBuf;

use super::filter::DriftBases;
use super::hrf::{Kernel, sampled};
use super::regressors::{Grid, event_regressor};
use super::{Design, EventSummary, Regressor, RegressorKind, TrialValues};
use crate::error::{Error, Location, Problem};
use crate::flags::{Flag, FlagCode, Severity};
use crate::study::ModelSpec;
use crate::trials::{EventTrials, NuisanceTable, RunTrials};

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

/// One regressor before sampling: which trials, with which heights.
struct Pending {
    regressor: Regressor,
    event: usize,
    heights: Vec<f64>,
    included: bool,
}

pub fn build_design(
    settings: &DesignSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
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

    let mut pending = Vec::new();
    for (index, event) in run.events.iter().enumerate() {
        let trials = kept[index].iter().filter(|&&k| k).count();
        if trials == 0 {
            flags.push(Flag::new(
                Severity::Severe,
                FlagCode::EventAbsent,
                vec![event.name.clone()],
                format!(
                    "event \"{}\" has no trials in this run; its regressors are left out",
                    event.name
                ),
            ));
        }
        pending.push(Pending {
            regressor: Regressor {
                name: event.name.clone(),
                kind: RegressorKind::Onset,
                event: Some(event.name.clone()),
                model: None,
                column: None,
            },
            event: index,
            heights: kept[index]
                .iter()
                .map(|&k| if k { 1.0 } else { 0.0 })
                .collect(),
            included: trials > 0,
        });
    }
    let mut trial_values = Vec::new();
    for model in &spec.models {
        for modulator in &model.modulators {
            let Some((index, event)) = run
                .events
                .iter()
                .enumerate()
                .find(|(_, e)| e.name == modulator.event)
            else {
                continue;
            };
            let Some(values) = event
                .modulators
                .iter()
                .find(|m| m.model == model.name && m.column == modulator.column)
            else {
                continue;
            };
            let name = modulator_name(model, &modulator.column, &modulator.event);
            let heights = modulator_heights(&values.values, &kept[index], spec.centre);
            let usable_values: Vec<Option<f64>> = values
                .values
                .iter()
                .zip(&kept[index])
                .map(|(v, &k)| if k { *v } else { None })
                .collect();
            modulator_flags(
                &name,
                event,
                &usable_values,
                &kept[index],
                &heights,
                &mut flags,
            );
            let included = pending[index].included && heights.iter().any(|h| *h != 0.0);
            trial_values.push(TrialValues {
                regressor: pending.len(),
                event: event.name.clone(),
                values: usable_values,
            });
            pending.push(Pending {
                regressor: Regressor {
                    name,
                    kind: RegressorKind::Modulator,
                    event: Some(event.name.clone()),
                    model: Some(model.name.clone()),
                    column: Some(modulator.column.clone()),
                },
                event: index,
                heights,
                included,
            });
        }
    }

    let mut regressors = Vec::new();
    let mut sampled_columns = Vec::new();
    let mut included = Vec::new();
    for (kernel, derivative) in [
        (&settings.response, false),
        (&settings.response_derivative, true),
    ] {
        if derivative && !spec.derivative {
            continue;
        }
        for item in &pending {
            let event = &run.events[item.event];
            let column = event_regressor(
                &grid,
                kernel,
                &event.onsets,
                &event.durations,
                &item.heights,
            );
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

    let drift = settings.drift.get(run.scans, spec.tr, spec.high_pass);
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
        .map(|c| drift.residualise(c))
        .collect();
    let events = run
        .events
        .iter()
        .zip(&kept)
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
        .collect();
    Ok(Design {
        events,
        subject: run.subject.clone(),
        run: run.run.clone(),
        session: run.session.clone(),
        scans: run.scans,
        regressors,
        sampled: sampled_columns,
        filtered,
        included,
        drift,
        trial_values,
        flags,
    })
}

fn modulator_name(model: &ModelSpec, column: &str, event: &str) -> String {
    let same_column_twice = model
        .modulators
        .iter()
        .filter(|m| m.column == column)
        .count()
        > 1;
    if same_column_twice {
        format!("{}:{column}@{event}", model.name)
    } else {
        format!("{}:{column}", model.name)
    }
}

/// Stick heights: the value minus the mean over the run's kept trials that have one
/// (when centring), 0 where the value is missing or the trial is left out.
fn modulator_heights(values: &[Option<f64>], kept: &[bool], centre: bool) -> Vec<f64> {
    let present: Vec<f64> = values
        .iter()
        .zip(kept)
        .filter_map(|(v, &k)| if k { *v } else { None })
        .collect();
    let mean = if centre && !present.is_empty() {
        present.iter().sum::<f64>() / present.len() as f64
    } else {
        0.0
    };
    let spread = present.iter().map(|v| (v - mean).abs()).fold(0.0, f64::max);
    let scale = present.iter().map(|v| v.abs()).fold(0.0, f64::max);
    values
        .iter()
        .zip(kept)
        .map(|(v, &k)| match (v, k) {
            // Differences at rounding level of the values count as no variation at all.
            (Some(v), true)
                if spread > crate::precision::NO_VARIATION * scale.max(f64::MIN_POSITIVE) =>
            {
                v - mean
            }
            _ => 0.0,
        })
        .collect()
}

fn timing_flags(event: &EventTrials, kept: &[bool], run_end: f64, flags: &mut Vec<Flag>) {
    let late: Vec<usize> = event
        .lines
        .iter()
        .zip(kept)
        .filter(|(_, k)| !**k)
        .map(|(l, _)| *l)
        .collect();
    if !late.is_empty() {
        flags.push(Flag::new(
            Severity::Caution,
            FlagCode::OnsetAfterRunEnd,
            vec![event.name.clone()],
            format!(
                "{} trial(s) of \"{}\" start after the run ends at {run_end} s and are ignored (trial table line(s) {}); check the TR, the scan count and that onsets are in seconds",
                late.len(),
                event.name,
                list_lines(&late)
            ),
        ));
    }
    let early = event.onsets.iter().filter(|&&o| o < 0.0).count();
    if early > 0 {
        flags.push(Flag::new(
            Severity::Note,
            FlagCode::NegativeOnset,
            vec![event.name.clone()],
            format!("{early} trial(s) of \"{}\" start before the first scan; the part of their response inside the run is modelled", event.name),
        ));
    }
    if event.missing_durations > 0 {
        flags.push(Flag::new(
            Severity::Note,
            FlagCode::MissingDuration,
            vec![event.name.clone()],
            format!(
                "{} trial(s) of \"{}\" have no duration and are modelled as impulses (0 s)",
                event.missing_durations, event.name
            ),
        ));
    }
}

fn modulator_flags(
    name: &str,
    event: &EventTrials,
    values: &[Option<f64>],
    kept: &[bool],
    heights: &[f64],
    flags: &mut Vec<Flag>,
) {
    // Trials left out (after the run's end) are flagged as such, not as missing values.
    let trials = kept.iter().filter(|&&k| k).count();
    let present = values.iter().filter(|v| v.is_some()).count();
    let missing = trials - present;
    if missing > 0 && present > 0 {
        flags.push(Flag::new(
            Severity::Note,
            FlagCode::MissingValues,
            vec![name.to_string()],
            format!("{missing} of {trials} trials of \"{}\" have no value for {name}; they contribute 0 to the modulator", event.name),
        ));
    }
    if present > 0 && heights.iter().all(|h| *h == 0.0) {
        flags.push(Flag::new(
            Severity::Severe,
            FlagCode::ConstantModulator,
            vec![name.to_string()],
            format!("{name} does not vary over the trials of this run; it is left out of the design and its VIF is undefined"),
        ));
    } else if present == 0 {
        flags.push(Flag::new(
            Severity::Severe,
            FlagCode::ModulatorAbsent,
            vec![name.to_string()],
            format!("{name} has no values in this run; it is left out of the design"),
        ));
    }
}

fn list_lines(lines: &[usize]) -> String {
    let shown: Vec<String> = lines.iter().take(5).map(|l| l.to_string()).collect();
    if lines.len() > 5 {
        format!("{}, …", shown.join(", "))
    } else {
        shown.join(", ")
    }
}
