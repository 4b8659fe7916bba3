//! The design at trial level, before any convolution: which trials each regressor has
//! and with which heights — onsets (height 1), task modulators and the models'
//! modulators (mean-centred values) — with the flags about trials and values.

use super::{Regressor, RegressorKind, TrialValues};
use crate::flags::{Flag, FlagCode, Severity};
use crate::study::ModelSpec;
use crate::trials::{EventTrials, ModulatorValues, RunTrials};

/// One regressor before sampling: which event's trials, with which heights.
#[derive(Debug, Clone)]
pub(super) struct Pending {
    pub regressor: Regressor,
    pub event: usize,
    pub heights: Vec<f64>,
    pub included: bool,
}

/// The trial-level regressors of `run`, in design order: every event's onset, then
/// every event's task modulators, then each model's modulators in the study's order;
/// `kept` marks the trials inside the run. Also the modulators' trial values, for
/// trial-level correlations.
pub(super) fn pending_regressors(
    models: &[ModelSpec],
    centre: bool,
    run: &RunTrials,
    kept: &[Vec<bool>],
    flags: &mut Vec<Flag>,
) -> (Vec<Pending>, Vec<TrialValues>) {
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
    let mut add = |pending: &mut Vec<Pending>,
                   index: usize,
                   name: String,
                   model: Option<&str>,
                   values: &ModulatorValues| {
        let event = &run.events[index];
        let heights = modulator_heights(&values.values, &kept[index], centre);
        let usable_values: Vec<Option<f64>> = values
            .values
            .iter()
            .zip(&kept[index])
            .map(|(v, &k)| if k { *v } else { None })
            .collect();
        modulator_flags(&name, event, &usable_values, &kept[index], &heights, flags);
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
                model: model.map(str::to_string),
                column: Some(values.column.clone()),
            },
            event: index,
            heights,
            included,
        });
    };
    for (index, event) in run.events.iter().enumerate() {
        for values in event.modulators.iter().filter(|m| m.model.is_none()) {
            let name = format!("{}:{}", event.name, values.column);
            add(&mut pending, index, name, None, values);
        }
    }
    for model in models {
        for modulator in &model.modulators {
            let Some((index, event)) = run
                .events
                .iter()
                .enumerate()
                .find(|(_, e)| e.name == modulator.event)
            else {
                continue;
            };
            let Some(values) = event.modulators.iter().find(|m| {
                m.model.as_deref() == Some(model.name.as_str()) && m.column == modulator.column
            }) else {
                continue;
            };
            let name = modulator_name(model, &modulator.column, &modulator.event);
            add(&mut pending, index, name, Some(&model.name), values);
        }
    }
    (pending, trial_values)
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

pub(super) fn timing_flags(
    event: &EventTrials,
    kept: &[bool],
    run_end: f64,
    flags: &mut Vec<Flag>,
) {
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
