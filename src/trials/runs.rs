//! Groups the rows of a trial table into runs and pulls out, for every event, its
//! onsets, durations and the modulator values the study's models attach to it.

use std::collections::hash_map::Entry;

use foldhash::{HashMap, HashMapExt};

use super::{Row, ScanTable, Table, check_label};
use crate::error::{Error, Location, Problem, Problems, Result};
use crate::study::{Duration, Study};

/// Everything the design builder needs to know about one run.
#[derive(Debug, Clone, PartialEq)]
pub struct RunTrials {
    pub subject: String,
    pub run: String,
    /// The BIDS session, when the study has sessions.
    pub session: Option<String>,
    pub scans: usize,
    pub events: Vec<EventTrials>,
    /// Findings made while reading the run (e.g. a TR that disagrees with the data's).
    pub flags: Vec<crate::flags::Flag>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct EventTrials {
    pub name: String,
    pub onsets: Vec<f64>,
    pub durations: Vec<f64>,
    /// Line of each trial in the trial table, for messages.
    pub lines: Vec<usize>,
    /// Trials whose duration cell was missing (taken as 0 s, an impulse).
    pub missing_durations: usize,
    /// One entry per modulator that a model attaches to this event, in study order.
    pub modulators: Vec<ModulatorValues>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct ModulatorValues {
    pub model: String,
    pub column: String,
    /// One value per trial of the event; `None` where the cell was missing.
    pub values: Vec<Option<f64>>,
}

/// Column indices resolved once for the whole table.
struct EventColumns {
    onset: usize,
    duration: Option<usize>,
    selector: Option<(usize, String)>,
    modulators: Vec<(String, String, usize)>,
}

pub fn collect_runs(study: &Study, table: &Table, scans: &ScanTable) -> Result<Vec<RunTrials>> {
    let mut problems = Problems::default();
    let mut column = |name: &str, wanted_by: String| match table.column(name, &wanted_by) {
        Ok(index) => Some(index),
        Err(problem) => {
            problems.push(problem);
            None
        }
    };
    let subject_column = column(&study.trials.subject_column, "[trials] subject".into());
    let run_column = column(&study.trials.run_column, "[trials] run".into());
    let mut events = Vec::new();
    for event in &study.events {
        let onset = column(
            &event.onset_column,
            format!("the onset of event \"{}\"", event.name),
        );
        let duration = match &event.duration {
            Duration::Seconds(_) => Some(None),
            Duration::Column(name) => {
                column(name, format!("the duration of event \"{}\"", event.name)).map(Some)
            }
        };
        let selector = match &event.selector {
            None => Some(None),
            Some(selector) => column(
                &selector.column,
                format!("type_column of event \"{}\"", event.name),
            )
            .map(|index| Some((index, selector.value.clone()))),
        };
        let mut modulators = Vec::new();
        for model in &study.models {
            for modulator in model.modulators.iter().filter(|m| m.event == event.name) {
                let wanted_by = format!("model \"{}\"", model.name);
                if let Some(index) = column(&modulator.column, wanted_by) {
                    modulators.push((model.name.clone(), modulator.column.clone(), index));
                }
            }
        }
        if let (Some(onset), Some(duration), Some(selector)) = (onset, duration, selector) {
            events.push(EventColumns {
                onset,
                duration,
                selector,
                modulators,
            });
        }
    }
    let (Some(subject_column), Some(run_column)) = (subject_column, run_column) else {
        return Err(problems.finish(()).unwrap_err());
    };
    if !problems.is_empty() {
        return Err(problems.finish(()).unwrap_err());
    }

    let mut runs: Vec<RunTrials> = Vec::new();
    // Run of each (subject, run) pair; `None` for a pair whose labels or scans were refused.
    let mut index_of: HashMap<(&str, &str), Option<usize>> = HashMap::new();
    // The first line of every row that holds an onset, to catch rows pasted twice.
    // Sized for every row at once: growing it would hash every row again.
    let mut first_line: HashMap<Row<'_>, usize> = HashMap::with_capacity(table.row_count());
    let mut previous: Option<((&str, &str), Option<usize>)> = None;
    for row in table.rows() {
        let has_onset = events
            .iter()
            .any(|columns| !super::is_missing(row.cell(columns.onset)));
        if has_onset {
            match first_line.entry(row) {
                Entry::Occupied(earlier) => {
                    problems.push(
                        Problem::new(
                            Location::line(&table.path, row.line()),
                            format!("this row repeats line {} exactly", earlier.get()),
                        )
                        .with_hint(
                            "a row pasted twice holds the same trial twice: remove one of them",
                        ),
                    );
                    continue;
                }
                Entry::Vacant(entry) => {
                    entry.insert(row.line());
                }
            }
        }
        let key = (row.cell(subject_column), row.cell(run_column));
        // Rows of one run usually follow each other: most rows need no lookup.
        let run_index = match previous {
            Some((last, index)) if last == key => index,
            _ => {
                let index = *index_of.entry(key).or_insert_with(|| {
                    new_run_for(
                        study,
                        table,
                        row,
                        key,
                        subject_column,
                        run_column,
                        scans,
                        &events,
                        &mut problems,
                    )
                    .map(|run| {
                        runs.push(run);
                        runs.len() - 1
                    })
                });
                previous = Some((key, index));
                index
            }
        };
        let Some(run_index) = run_index else {
            continue;
        };
        for (spec, (columns, trials)) in study
            .events
            .iter()
            .zip(events.iter().zip(runs[run_index].events.iter_mut()))
        {
            if let Err(problem) = add_trial(table, row, spec, columns, trials) {
                problems.push(problem);
            }
        }
    }
    for run in &runs {
        check_times(table, study.acquisition.tr, run, &mut problems);
    }
    problems.finish(runs)
}

/// A time as written in messages: huge values in exponent form.
fn seconds(value: f64) -> String {
    if value.abs() >= 1e7 {
        format!("{value:e}")
    } else {
        value.to_string()
    }
}

/// At most this many implausible times are listed per run.
const MAX_TIME_PROBLEMS: usize = 5;

/// Onsets and durations far outside the run are a wrong unit or time base, not late
/// trials: onsets that fit the run once divided by 1000 were written in milliseconds;
/// an onset more than 100 run lengths away, or a duration over 10 run lengths, is an
/// error (the latter also keeps the microtime arithmetic in range).
fn check_times(table: &Table, tr: f64, run: &RunTrials, problems: &mut Problems) {
    if tr.is_nan() || tr <= 0.0 || run.scans == 0 {
        return;
    }
    let length = run.scans as f64 * tr;
    let at = |line: usize| Location::line(&table.path, line);
    let trials = || {
        run.events.iter().flat_map(|event| {
            event
                .onsets
                .iter()
                .zip(&event.durations)
                .zip(&event.lines)
                .map(|((&onset, &duration), &line)| (onset, duration, line))
        })
    };
    let latest = trials().max_by(|a, b| a.0.total_cmp(&b.0));
    if let Some((onset, _, line)) = latest {
        if onset > 10.0 * length && onset / 1000.0 <= 1.5 * length {
            problems.push(
                Problem::new(
                    at(line),
                    format!(
                        "subject {} run {}: onsets look like milliseconds: the latest, {onset}, is {:.0} times the run's length ({length} s = {} scans × {tr} s)",
                        run.subject,
                        run.run,
                        onset / length,
                        run.scans
                    ),
                )
                .with_hint("onsets and durations are in seconds: divide those columns by 1000 (or check tr and scans)"),
            );
            return;
        }
    }
    let mut found = 0;
    for (onset, duration, line) in trials() {
        let message = if onset > 100.0 * length || onset < -length.max(60.0) {
            format!(
                "subject {} run {}: onset {} s is far outside the run (0 to {length} s)",
                run.subject,
                run.run,
                seconds(onset)
            )
        } else if duration > 10.0 * length {
            format!(
                "subject {} run {}: duration {} s is longer than ten runs ({length} s each)",
                run.subject,
                run.run,
                seconds(duration)
            )
        } else {
            continue;
        };
        found += 1;
        if found <= MAX_TIME_PROBLEMS {
            problems.push(Problem::new(at(line), message).with_hint(
                "times are seconds from the start of the run's first volume: check the unit and the time base of the table",
            ));
        }
    }
}

/// The run of a (subject, run) pair met for the first time, once its labels and its
/// number of scans are known to be good.
#[allow(clippy::too_many_arguments)]
fn new_run_for(
    study: &Study,
    table: &Table,
    row: Row<'_>,
    (subject, run): (&str, &str),
    subject_column: usize,
    run_column: usize,
    scans: &ScanTable,
    events: &[EventColumns],
    problems: &mut Problems,
) -> Option<RunTrials> {
    let labels_ok = [
        check_label(subject, "subject", table.cell_location(row, subject_column)),
        check_label(run, "run", table.cell_location(row, run_column)),
    ]
    .into_iter()
    .fold(true, |ok, result| match result {
        Ok(()) => ok,
        Err(problem) => {
            problems.push(problem);
            false
        }
    });
    if !labels_ok {
        return None;
    }
    let count = problems.keep(scans.scans(subject, run).map_err(Error::input))?;
    Some(new_run(study, subject, run, count, events))
}

fn new_run(
    study: &Study,
    subject: &str,
    run: &str,
    scans: usize,
    columns: &[EventColumns],
) -> RunTrials {
    let events = study
        .events
        .iter()
        .zip(columns)
        .map(|(event, columns)| EventTrials {
            name: event.name.clone(),
            onsets: Vec::new(),
            durations: Vec::new(),
            lines: Vec::new(),
            missing_durations: 0,
            modulators: columns
                .modulators
                .iter()
                .map(|(model, column, _)| ModulatorValues {
                    model: model.clone(),
                    column: column.clone(),
                    values: Vec::new(),
                })
                .collect(),
        })
        .collect();
    RunTrials {
        subject: subject.to_string(),
        run: run.to_string(),
        session: None,
        scans,
        events,
        flags: Vec::new(),
    }
}

fn add_trial(
    table: &Table,
    row: Row<'_>,
    spec: &crate::study::EventSpec,
    columns: &EventColumns,
    trials: &mut EventTrials,
) -> Result<(), Problem> {
    if let Some((column, value)) = &columns.selector {
        if row.cell(*column) != value {
            return Ok(());
        }
    }
    // A wide-form row without an onset for this event (e.g. a missed response) holds no trial of it.
    let Some(onset) = table.number(row, columns.onset)? else {
        return Ok(());
    };
    let duration = match (columns.duration, &spec.duration) {
        (Some(column), _) => match table.number(row, column)? {
            Some(d) if d < 0.0 => {
                return Err(Problem::new(
                    table.cell_location(row, column),
                    format!("negative duration {d}"),
                )
                .with_hint(
                    "durations are in seconds and cannot be negative; use 0 for an impulse",
                ));
            }
            Some(d) => d,
            None => {
                trials.missing_durations += 1;
                0.0
            }
        },
        (None, Duration::Seconds(seconds)) => *seconds,
        (None, Duration::Column(_)) => 0.0,
    };
    for ((_, _, column), modulator) in columns.modulators.iter().zip(trials.modulators.iter_mut()) {
        modulator.values.push(table.number(row, *column)?);
    }
    trials.onsets.push(onset);
    trials.durations.push(duration);
    trials.lines.push(row.line());
    Ok(())
}
