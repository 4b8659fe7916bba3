//! The `[task]` section and each `[[variant]]`'s overrides → [`Task`].

use std::path::Path;

use toml::de::DeValue;

use super::{Interval, Reversal, Rewards, RunLength, Task};
use crate::toml_read::{Table, TomlReader, Value, get};

/// Keys of `[task]`; a `[[variant]]` may use any of them, plus `name`.
pub const TASK_KEYS: &[&str] = &[
    "options",
    "reward_probabilities",
    "schedule",
    "reversal_every",
    "reversal_probability",
    "trials",
    "runs",
    "tr",
    "first_cue",
    "cue_to_outcome",
    "outcome_to_cue",
    "cue_duration",
    "outcome_duration",
    "scans",
    "end_after_last_outcome",
];

/// Keys that say the same thing in different ways: a variant that sets one of a group
/// replaces whatever the planned task set from that group.
const ALTERNATIVES: &[&[&str]] = &[
    &["reward_probabilities", "schedule"],
    &["reversal_every", "reversal_probability", "schedule"],
    &["scans", "end_after_last_outcome"],
];

pub const DEFAULT_FIRST_CUE: f64 = 4.0;
pub const DEFAULT_END_AFTER_LAST_OUTCOME: f64 = 16.0;
/// More than this many options is almost certainly a typo (common practice: 2–4 armed bandits).
const MAX_OPTIONS: usize = 16;

/// The planned task with a variant's keys laid over it. Spans keep pointing at the line
/// each value was written on.
pub fn overlay<'i>(base: &Table<'i>, variant: &Table<'i>) -> Table<'i> {
    let replaced = |key: &str| {
        variant.iter().any(|(k, _)| {
            let k: &str = k.get_ref();
            k == key
                || ALTERNATIVES
                    .iter()
                    .any(|group| group.contains(&k) && group.contains(&key))
        })
    };
    let mut merged = Table::default();
    for (key, value) in base.iter() {
        if !replaced(key.get_ref()) {
            merged.insert(key.clone(), value.clone());
        }
    }
    for (key, value) in variant.iter() {
        let name: &str = key.get_ref();
        if name != "name" {
            merged.insert(key.clone(), value.clone());
        }
    }
    merged
}

/// Reads one task table; `place` names it in messages ("[task]" or the variant).
pub fn read_task(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    dir: &Path,
    place: &str,
) -> Option<Task> {
    let options = r.positive_integer(table, "options").unwrap_or(2);
    if !(2..=MAX_OPTIONS).contains(&options) {
        let span = get(table, "options").map_or(0..0, |v| v.span());
        r.problem(
            span,
            format!("{place}: options must be between 2 and {MAX_OPTIONS}, not {options}"),
        );
        return None;
    }
    let rewards = rewards(r, table, dir, options, place);
    let trials = required_count(r, table, "trials", place, "trials = 60");
    let runs = r.positive_integer(table, "runs").unwrap_or(1);
    let tr = match r.number(table, "tr") {
        Some((tr, _)) if tr > 0.0 && tr <= 100.0 => Some(tr),
        Some((tr, span)) => {
            r.problem(
                span,
                format!("{place}: tr must be between 0 and 100 seconds, not {tr}"),
            );
            None
        }
        None => {
            r.file_problem(
                format!("{place} has no `tr`"),
                "add: tr = 2.0   # seconds per volume",
            );
            None
        }
    };
    let first_cue = seconds(r, table, "first_cue", DEFAULT_FIRST_CUE, place);
    let cue_to_outcome = interval(r, table, "cue_to_outcome", place);
    let outcome_to_cue = interval(r, table, "outcome_to_cue", place);
    let cue_duration = seconds(r, table, "cue_duration", 0.0, place);
    let outcome_duration = seconds(r, table, "outcome_duration", 0.0, place);
    let scans = match (get(table, "scans"), get(table, "end_after_last_outcome")) {
        (Some(_), Some(value)) => {
            r.problem(
                value.span(),
                format!("{place}: give `scans` or `end_after_last_outcome`, not both"),
            );
            None
        }
        (Some(_), None) => r.positive_integer(table, "scans").map(RunLength::Fixed),
        (None, _) => seconds(
            r,
            table,
            "end_after_last_outcome",
            DEFAULT_END_AFTER_LAST_OUTCOME,
            place,
        )
        .map(RunLength::AfterLastOutcome),
    };
    Some(Task {
        options,
        rewards: rewards?,
        trials: trials?,
        runs,
        tr: tr?,
        first_cue: first_cue?,
        cue_to_outcome: cue_to_outcome?,
        outcome_to_cue: outcome_to_cue?,
        cue_duration: cue_duration?,
        outcome_duration: outcome_duration?,
        scans: scans?,
    })
}

fn required_count(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    key: &str,
    place: &str,
    example: &str,
) -> Option<usize> {
    if get(table, key).is_none() {
        r.file_problem(format!("{place} has no `{key}`"), format!("add: {example}"));
        return None;
    }
    r.positive_integer(table, key)
}

/// A number of seconds ≥ 0, or `default` when the key is absent.
fn seconds(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    key: &str,
    default: f64,
    place: &str,
) -> Option<f64> {
    match r.number(table, key) {
        Some((value, span)) if value < 0.0 => {
            r.problem(
                span,
                format!("{place}: {key} must be ≥ 0 seconds, not {value}"),
            );
            None
        }
        Some((value, _)) => Some(value),
        None if get(table, key).is_some() => None,
        None => Some(default),
    }
}

/// A fixed delay (`= 0.5`) or a jittered range (`= [2, 6]`), in seconds.
fn interval(r: &mut TomlReader<'_>, table: &Table<'_>, key: &str, place: &str) -> Option<Interval> {
    let Some(value) = get(table, key) else {
        r.file_problem(
            format!("{place} has no `{key}`"),
            format!(
                "add: {key} = [2.0, 6.0]   # seconds, jittered uniformly (or one number: fixed)"
            ),
        );
        return None;
    };
    let numbers = r.numbers_value(value, &format!("`{key}`"))?;
    let interval = match numbers[..] {
        [fixed] => Interval::fixed(fixed),
        [low, high] => Interval { low, high },
        _ => {
            r.problem(
                value.span(),
                format!("{place}: {key} takes one number or [low, high]"),
            );
            return None;
        }
    };
    if interval.low < 0.0 || interval.low > interval.high {
        r.problem(
            value.span(),
            format!(
                "{place}: {key} [{}, {}] must have 0 ≤ low ≤ high",
                interval.low, interval.high
            ),
        );
        return None;
    }
    Some(interval)
}

fn rewards(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    dir: &Path,
    options: usize,
    place: &str,
) -> Option<Rewards> {
    if let Some(value) = get(table, "schedule") {
        if let Some(other) = [
            "reward_probabilities",
            "reversal_every",
            "reversal_probability",
        ]
        .into_iter()
        .find(|k| get(table, k).is_some())
        {
            r.problem(
                value.span(),
                format!(
                    "{place}: a `schedule` file sets every trial's probabilities; remove `{other}`"
                ),
            );
            return None;
        }
        let (file, _) = r.string(table, "schedule")?;
        return Some(Rewards::Schedule {
            file: dir.join(file),
            rows: Vec::new(),
        });
    }
    let probabilities = match get(table, "reward_probabilities") {
        Some(value) => probabilities(r, value, options, place)?,
        None => {
            r.file_problem(
                format!("{place} has no `reward_probabilities` (or `schedule`)"),
                "add: reward_probabilities = [0.8, 0.2]   # one per option",
            );
            return None;
        }
    };
    let reversal = match (
        get(table, "reversal_every"),
        get(table, "reversal_probability"),
    ) {
        (Some(_), Some(value)) => {
            r.problem(
                value.span(),
                format!("{place}: give `reversal_every` or `reversal_probability`, not both"),
            );
            return None;
        }
        (Some(_), None) => Reversal::Every(r.positive_integer(table, "reversal_every")?),
        (None, Some(_)) => match r.number(table, "reversal_probability")? {
            (p, _) if (0.0..=1.0).contains(&p) => Reversal::Probability(p),
            (p, span) => {
                r.problem(
                    span,
                    format!("{place}: reversal_probability must be in [0, 1], not {p}"),
                );
                return None;
            }
        },
        (None, None) => Reversal::Never,
    };
    Some(Rewards::Reversing {
        probabilities,
        reversal,
    })
}

fn probabilities(
    r: &mut TomlReader<'_>,
    value: &Value<'_>,
    options: usize,
    place: &str,
) -> Option<Vec<f64>> {
    if !matches!(value.get_ref(), DeValue::Array(_)) {
        r.problem(
            value.span(),
            format!("{place}: reward_probabilities is a list, one per option, e.g. [0.8, 0.2]"),
        );
        return None;
    }
    let list = r.numbers_value(value, "each reward probability")?;
    if list.len() != options {
        r.problem(
            value.span(),
            format!(
                "{place}: {} reward probabilities for {options} options",
                list.len()
            ),
        );
        return None;
    }
    if let Some(bad) = list.iter().find(|p| !(0.0..=1.0).contains(*p)) {
        r.problem(
            value.span(),
            format!("{place}: reward probability {bad} is outside [0, 1]"),
        );
        return None;
    }
    Some(list)
}
