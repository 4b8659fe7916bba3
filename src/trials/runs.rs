//! Groups the rows of a trial table into runs and pulls out, for every event, its
//! onsets, durations and the modulator values the study's models attach to it.

use foldhash::{HashMap, HashMapExt};

use super::{Row, ScanTable, Table, check_label};
use crate::error::{Error, Location, Problem, Problems, Result};
use crate::flags::{Flag, FlagCode, Severity};
use crate::study::{Duration, LabelColumns, Study};

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

impl RunTrials {
    /// Room for as many trials as `other` has: the runs of a study mostly have the same
    /// number, and growing vectors by doubling would hold up to twice the room.
    fn reserve_like(&mut self, other: &RunTrials) {
        for (event, like) in self.events.iter_mut().zip(&other.events) {
            let trials = like.onsets.len();
            event.onsets.reserve_exact(trials);
            event.durations.reserve_exact(trials);
            event.lines.reserve_exact(trials);
            for modulator in &mut event.modulators {
                modulator.values.reserve_exact(trials);
            }
        }
    }

    /// Gives back the room the vectors grew into while the table was read.
    fn shrink_to_fit(&mut self) {
        for event in &mut self.events {
            event.onsets.shrink_to_fit();
            event.durations.shrink_to_fit();
            event.lines.shrink_to_fit();
            for modulator in &mut event.modulators {
                modulator.values.shrink_to_fit();
            }
        }
    }
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
    /// One entry per modulator of this event, in study order: the event's task
    /// modulators first, then each model's.
    pub modulators: Vec<ModulatorValues>,
}

#[derive(Debug, Clone, PartialEq)]
pub struct ModulatorValues {
    /// The model whose modulator this is; `None` for a task modulator of the event.
    pub model: Option<String>,
    pub column: String,
    /// One value per trial of the event; `None` where the cell was missing.
    pub values: Vec<Option<f64>>,
}

/// Column indices resolved once for the whole table.
struct EventColumns {
    onset: usize,
    duration: Option<usize>,
    selector: Option<(usize, String)>,
    /// (model — `None` for a task modulator —, column, index).
    modulators: Vec<(Option<String>, String, usize)>,
}

/// The runs of `table`: `labels` names its participant and run columns, `tr` (seconds)
/// is the study's, for the checks of onset units.
pub fn collect_runs(
    study: &Study,
    labels: &LabelColumns,
    tr: f64,
    table: &Table,
    scans: &ScanTable,
) -> Result<Vec<RunTrials>> {
    let mut collector = RunCollector::new(study, labels, tr, table, scans)?;
    collector.add(table);
    collector.finish()
}

/// Trials of a study's runs gathered from a trial table read a chunk at a time (any
/// number of [`Table`]s with the same columns, in file order).
pub struct RunCollector<'s> {
    study: &'s Study,
    tr: f64,
    scans: &'s ScanTable,
    path: std::path::PathBuf,
    subject_column: usize,
    run_column: usize,
    events: Vec<EventColumns>,
    runs: Vec<RunTrials>,
    /// Run of each (subject, run) pair; `None` for a pair whose labels or scans were refused.
    index_of: HashMap<(String, String), Option<usize>>,
    /// A fingerprint and the line of every row that holds an onset, to catch rows pasted twice.
    fingerprints: Vec<(u128, usize)>,
    /// Notes about the table as a whole, given to every run.
    notes: Vec<Flag>,
    problems: Problems,
}

impl<'s> RunCollector<'s> {
    /// Finds the columns the study needs in the table's header (`table` may be the
    /// first chunk: only its header is read here).
    pub fn new(
        study: &'s Study,
        labels: &LabelColumns,
        tr: f64,
        table: &Table,
        scans: &'s ScanTable,
    ) -> Result<Self> {
        let mut problems = Problems::default();
        let mut column = |name: &str, wanted_by: String| match table.column(name, &wanted_by) {
            Ok(index) => Some(index),
            Err(problem) => {
                problems.push(problem);
                None
            }
        };
        let subject_column = column(&labels.subject, "[trials] subject".into());
        let run_column = column(&labels.run, "[trials] run".into());
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
            for task_column in &event.modulators {
                let wanted_by = format!("a task modulator of event \"{}\"", event.name);
                if let Some(index) = column(task_column, wanted_by) {
                    modulators.push((None, task_column.clone(), index));
                }
            }
            for model in &study.models {
                for modulator in model.modulators.iter().filter(|m| m.event == event.name) {
                    let wanted_by = format!("model \"{}\"", model.name);
                    if let Some(index) = column(&modulator.column, wanted_by) {
                        modulators.push((
                            Some(model.name.clone()),
                            modulator.column.clone(),
                            index,
                        ));
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
        problems.finish(())?;
        let (Some(subject_column), Some(run_column)) = (subject_column, run_column) else {
            return Err(Error::Internal("a missing column was not reported".into()));
        };
        Ok(RunCollector {
            notes: unused_duration_note(study, table).into_iter().collect(),
            study,
            tr,
            scans,
            path: table.path.clone(),
            subject_column,
            run_column,
            events,
            runs: Vec::new(),
            index_of: HashMap::new(),
            fingerprints: Vec::new(),
            problems: Problems::default(),
        })
    }

    /// Adds the trials of every row of `table`.
    pub fn add(&mut self, table: &Table) {
        // Rows of one run usually follow each other: most rows need no lookup.
        let mut previous: Option<(Row<'_>, Option<usize>)> = None;
        for row in table.rows() {
            let has_onset = self
                .events
                .iter()
                .any(|columns| !super::is_missing(row.cell(columns.onset)));
            if has_onset {
                self.fingerprints.push((fingerprint(row), row.line()));
            }
            let (subject, run) = (row.cell(self.subject_column), row.cell(self.run_column));
            let run_index = match previous {
                Some((last, index))
                    if last.cell(self.subject_column) == subject
                        && last.cell(self.run_column) == run =>
                {
                    index
                }
                _ => {
                    let index = self.run_index(table, row);
                    previous = Some((row, index));
                    index
                }
            };
            let Some(run_index) = run_index else {
                continue;
            };
            for (spec, (columns, trials)) in self.study.events.iter().zip(
                self.events
                    .iter()
                    .zip(self.runs[run_index].events.iter_mut()),
            ) {
                if let Err(problem) = add_trial(table, row, spec, columns, trials) {
                    self.problems.push(problem);
                }
            }
        }
    }

    /// The run a row belongs to, made when its (subject, run) pair is new.
    fn run_index(&mut self, table: &Table, row: Row<'_>) -> Option<usize> {
        let key = (
            row.cell(self.subject_column).to_string(),
            row.cell(self.run_column).to_string(),
        );
        if let Some(&index) = self.index_of.get(&key) {
            return index;
        }
        let index = new_run_for(
            self.study,
            table,
            row,
            (&key.0, &key.1),
            (self.subject_column, self.run_column),
            self.scans,
            &self.events,
            &mut self.problems,
        )
        .map(|mut run| {
            if let Some(previous) = self.runs.last() {
                run.reserve_like(previous);
            }
            run.flags.extend(self.notes.iter().cloned());
            self.runs.push(run);
            self.runs.len() - 1
        });
        self.index_of.insert(key, index);
        index
    }

    /// The runs, or every problem found in the table.
    pub fn finish(mut self) -> Result<Vec<RunTrials>> {
        self.fingerprints.sort_unstable();
        for pair in self.fingerprints.windows(2) {
            let ((first, earlier), (second, line)) = (pair[0], pair[1]);
            if first == second {
                self.problems.push(
                    Problem::new(
                        Location::line(&self.path, line),
                        format!("this row repeats line {earlier} exactly"),
                    )
                    .with_hint("a row pasted twice holds the same trial twice: remove one of them"),
                );
            }
        }
        for run in &mut self.runs {
            check_times(&self.path, self.tr, run, &mut self.problems);
            same_onset_flags(run);
            run.shrink_to_fit();
        }
        self.problems.finish(self.runs)
    }
}

/// The column a long-form table usually holds each row's duration in.
const DURATION_COLUMN: &str = "duration";

/// A note when the table has a `duration` column that no event takes its durations
/// from while some long-form event has a fixed duration (0 s unless the study says
/// otherwise): the durations written in the table are then not modelled.
fn unused_duration_note(study: &Study, table: &Table) -> Option<Flag> {
    if !table.headers.iter().any(|h| h == DURATION_COLUMN) {
        return None;
    }
    let used = study
        .events
        .iter()
        .any(|e| matches!(&e.duration, Duration::Column(c) if c == DURATION_COLUMN));
    let fixed: Vec<String> = study
        .events
        .iter()
        .filter(|e| e.selector.is_some() && matches!(e.duration, Duration::Seconds(_)))
        .map(|e| e.name.clone())
        .collect();
    (!used && !fixed.is_empty()).then(|| {
        Flag::new(
            Severity::Note,
            FlagCode::UnusedDurationColumn,
            fixed.clone(),
            format!(
                "the trial table has a \"{DURATION_COLUMN}\" column, but {} {} a fixed duration from the study file; to model the durations the table gives, write duration = \"{DURATION_COLUMN}\" under [[event]]",
                fixed.join(", "),
                if fixed.len() == 1 { "takes" } else { "take" }
            ),
        )
    })
}

/// A caution where two trials of one event start at the same time: their regressors add
/// up as one trial of twice the height (and their modulator values add), which is a row
/// exported twice with different values more often than a design.
fn same_onset_flags(run: &mut RunTrials) {
    for event in &run.events {
        let mut starts: Vec<(f64, usize)> = event
            .onsets
            .iter()
            .copied()
            .zip(event.lines.iter().copied())
            .collect();
        starts.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        let pairs: Vec<(f64, usize, usize)> = starts
            .windows(2)
            .filter(|pair| pair[0].0 == pair[1].0)
            .map(|pair| (pair[0].0, pair[0].1, pair[1].1))
            .collect();
        let Some(&(onset, first, second)) = pairs.first() else {
            continue;
        };
        let more = match pairs.len() {
            1 => String::new(),
            n => format!(" ({n} pairs in all)"),
        };
        run.flags.push(Flag::new(
            Severity::Caution,
            FlagCode::SameOnset,
            vec![event.name.clone()],
            format!(
                "two trials of event \"{}\" start at {onset} s (trial table lines {first} and {second}){more}: they add up as one trial of twice the height; if a row was exported twice with different values, remove one",
                event.name
            ),
        ));
    }
}

/// A 128-bit fingerprint of a row's cells (XXH3): rows are told apart by it without
/// keeping their text. Two different rows share one with a chance of about 2^-128.
fn fingerprint(row: Row<'_>) -> u128 {
    let mut hasher = xxhash_rust::xxh3::Xxh3::new();
    for cell in row.cells() {
        // The length keeps ("ab", "c") apart from ("a", "bc").
        hasher.update(&(cell.len() as u64).to_le_bytes());
        hasher.update(cell.as_bytes());
    }
    hasher.digest128()
}

/// A time as written in messages: huge values in exponent form.
fn seconds(value: f64) -> String {
    if value.abs() >= 1e7 {
        format!("{value:e}")
    } else {
        value.to_string()
    }
}

/// Onsets are taken for minutes only when a run has at least this many trials (a few
/// early events in a long run are a real design).
const MIN_TRIALS_FOR_UNITS: usize = 10;

/// At most this many implausible times are listed per run.
const MAX_TIME_PROBLEMS: usize = 5;

/// Onsets and durations far outside the run are a wrong unit or time base, not late
/// trials: onsets that fit the run once divided by 1000 were written in milliseconds;
/// an onset more than 100 run lengths away, or a duration over 10 run lengths, is an
/// error (the latter also keeps the microtime arithmetic in range).
fn check_times(path: &std::path::Path, tr: f64, run: &RunTrials, problems: &mut Problems) {
    if tr.is_nan() || tr <= 0.0 || run.scans == 0 {
        return;
    }
    let length = run.scans as f64 * tr;
    let at = |line: usize| Location::line(path, line);
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
    let count = trials().count();
    if let Some((onset, _, line)) = latest {
        if count >= MIN_TRIALS_FOR_UNITS
            && onset > 0.0
            && onset <= length / 30.0
            && (0.5 * length..=1.5 * length).contains(&(onset * 60.0))
        {
            problems.push(
                Problem::new(
                    at(line),
                    format!(
                        "subject {} run {}: onsets look like minutes: all {count} trials start in the first {} s of a {length} s run ({} scans × {tr} s), and the latest times 60 is about the run's length",
                        run.subject,
                        run.run,
                        seconds(onset),
                        run.scans
                    ),
                )
                .with_hint("onsets and durations are in seconds: multiply those columns by 60 (or check tr and scans)"),
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
    (subject_column, run_column): (usize, usize),
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
