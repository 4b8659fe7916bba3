//! Study file (TOML) → [`Study`]. Walks the spanned TOML tree so that every problem —
//! a misspelt key, a wrong type, an impossible value — is reported with its line and
//! column, and all of them are reported together.

use std::collections::BTreeSet;
use std::ops::Range;
use std::path::Path;

use std::ops::{Deref, DerefMut};

use toml::de::DeValue;

use super::schema;
use super::*;
use crate::error::{Location, Problem, Result};

use crate::toml_read::{Table, TomlReader, get, has_key, parse_toml};

mod analysis;

pub(crate) use analysis::{read_glms, read_noise};

/// Models plus the task and nuisance groups must stay within the partition's group limit.
use super::MAX_MODELS;

/// Parses and validates a study file. `path` is used for messages and to resolve the
/// relative paths inside it.
pub fn parse_study(path: &Path, text: &str) -> Result<Study> {
    let root = parse_toml(path, text, "study file")?;
    let mut reader = Reader(TomlReader::new(path, text));
    let study = reader.study(root.get_ref());
    reader.0.finish(study, "study")
}

/// The study-file reader: typed TOML access plus the study's own key lists.
struct Reader<'a>(TomlReader<'a>);

impl<'a> Deref for Reader<'a> {
    type Target = TomlReader<'a>;
    fn deref(&self) -> &TomlReader<'a> {
        &self.0
    }
}

impl DerefMut for Reader<'_> {
    fn deref_mut(&mut self) -> &mut Self::Target {
        &mut self.0
    }
}

impl Reader<'_> {
    fn section<'t, 'i>(&mut self, root: &'t Table<'i>, name: &str) -> Option<&'t Table<'i>> {
        self.0.section(root, name, schema::keys_of(name))
    }

    fn study(&mut self, root: &Table<'_>) -> Option<Study> {
        self.check_keys(root, "", schema::TOP_LEVEL);
        let dir = self.path.parent().unwrap_or(Path::new("")).to_path_buf();
        let empty = Table::default();

        let study = self.section(root, "study").unwrap_or(&empty);
        let name = self.string(study, "name").map(|(name, _)| name);

        let bids = self.bids(root, &dir);
        let in_bids = matches!(bids, Some(Some(_)));
        let acquisition = self.acquisition(root, &dir, in_bids);
        let filter = self.section(root, "filter").unwrap_or(&empty);
        let high_pass = match self.number(filter, "high_pass") {
            Some((value, span)) if value < 0.0 => {
                self.problem(span, "high_pass must be 0 (off) or a cutoff in seconds > 0");
                None
            }
            Some((value, _)) => Some(value),
            None => Some(DEFAULT_HIGH_PASS),
        };
        let hrf = self.section(root, "hrf").unwrap_or(&empty);
        let derivative = self.boolean(hrf, "derivative").unwrap_or(false);
        let source = match bids {
            Some(Some(source)) if !has_key(root, "trials") => Some(TrialSource::Bids(source)),
            Some(Some(_)) => {
                let span = get(root, "trials").map_or(0..0, |v| v.span());
                self.problem(
                    span,
                    "a BIDS study reads its trials from the dataset: remove [trials]",
                );
                None
            }
            Some(None) => self.trials(root, &dir).map(TrialSource::Table),
            None => None,
        };
        let type_column = match &source {
            Some(TrialSource::Bids(source)) => Some(source.type_column.as_str()),
            _ => None,
        };
        let events = self.events(root, type_column);
        let models = self.models(root, events.as_deref().unwrap_or(&[]));
        let nuisance = self.nuisance(root, &dir);
        let thresholds = self.thresholds(root);
        let glms = match &models {
            Some(models) => {
                let names: Vec<String> = models.iter().map(|m| m.name.clone()).collect();
                analysis::read_glms(&mut self.0, root, &names)
            }
            None => None,
        };
        let noise = analysis::read_noise(&mut self.0, root);

        let default_name = self
            .path
            .file_stem()
            .map(|stem| stem.to_string_lossy().into_owned())
            .unwrap_or_else(|| "study".into());
        Some(Study {
            name: name.unwrap_or(default_name),
            path: self.path.to_path_buf(),
            acquisition: acquisition?,
            high_pass: high_pass?,
            hrf: HrfSettings { derivative },
            source: source?,
            events: events?,
            models: models?,
            nuisance: nuisance?,
            thresholds: thresholds?,
            glms: glms?,
            noise: noise?,
        })
    }

    /// With `bids`, `tr` and `scans` may be left out (they come from the data: `None`)
    /// and the section itself is optional.
    fn acquisition(&mut self, root: &Table<'_>, dir: &Path, bids: bool) -> Option<Acquisition> {
        let empty = Table::default();
        let section = self.section(root, "acquisition");
        let section = if bids {
            section.or(Some(&empty))
        } else {
            section
        };
        let Some(table) = section else {
            self.0.problems.push(
                Problem::new(
                    Location::file(self.0.path),
                    "the study file has no [acquisition] section",
                )
                .with_hint("add [acquisition] with tr = <seconds> and scans = <volumes per run>"),
            );
            return None;
        };
        let tr = match self.number(table, "tr") {
            Some((tr, span)) if tr <= 0.0 => {
                self.problem(
                    span,
                    format!("tr must be a positive number of seconds, not {tr}"),
                );
                None
            }
            Some((tr, span)) if tr > MAX_PLAUSIBLE_TR => {
                self.problem_with_hint(
                    span,
                    format!("tr = {tr} seconds is implausible"),
                    "tr is in seconds (e.g. 2.0), not milliseconds".into(),
                );
                None
            }
            Some((tr, span)) if tr < MIN_PLAUSIBLE_TR => {
                self.problem_with_hint(
                    span,
                    format!("tr = {tr} seconds is shorter than any fMRI acquisition"),
                    format!(
                        "tr is in seconds (e.g. 2.0), not minutes: {tr} minutes would be {} s",
                        tr * 60.0
                    ),
                );
                None
            }
            Some((tr, _)) => Some(Some(tr)),
            None if bids && !has_key(table, "tr") => Some(None),
            None => {
                self.missing(table, "acquisition", "tr", "tr = 2.0   # seconds");
                None
            }
        };
        let scans = match (
            self.positive_integer(table, "scans"),
            self.string(table, "scans_file"),
        ) {
            (_, Some((_, span))) if bids => {
                self.problem(span, "a BIDS study reads each run's volumes from its image header; use scans = N to override them all, not scans_file");
                None
            }
            (Some(_), Some((_, span))) => {
                self.problem(span, "give either scans or scans_file, not both");
                None
            }
            (Some(scans), None) if scans > MAX_SCANS => {
                self.problem_with_hint(
                    get(table, "scans").map_or(0..0, |v| v.span()),
                    format!("scans = {scans} volumes per run is implausible"),
                    format!("tangle reads at most {MAX_SCANS} volumes per run; give the number of volumes in one run"),
                );
                None
            }
            (Some(scans), None) => Some(Some(ScanCounts::Fixed(scans))),
            (None, Some((file, _))) => Some(Some(ScanCounts::File(dir.join(file)))),
            (None, None) if bids && !has_key(table, "scans") => Some(None),
            (None, None) => {
                if !has_key(table, "scans") {
                    self.missing(
                        table,
                        "acquisition",
                        "scans",
                        "scans = 300   # volumes per run (or scans_file = \"scans.csv\")",
                    );
                }
                None
            }
        };
        let microtime = if has_key(table, "microtime") {
            match self.positive_integer(table, "microtime") {
                Some(bins) if bins > MAX_MICROTIME => {
                    self.problem_with_hint(
                        get(table, "microtime").map_or(0..0, |v| v.span()),
                        format!("microtime = {bins} bins per TR is more than tangle uses"),
                        format!("use at most {MAX_MICROTIME} (16 is the common choice)"),
                    );
                    None
                }
                other => other,
            }
        } else {
            Some(DEFAULT_MICROTIME)
        };
        let reference = match self.number(table, "reference") {
            Some((value, span)) if !(0.0..=1.0).contains(&value) => {
                self.problem(
                    span,
                    format!("reference is a fraction of the TR between 0 and 1, not {value}"),
                );
                None
            }
            Some((value, _)) => Some(value),
            None => Some(DEFAULT_REFERENCE),
        };
        Some(Acquisition {
            tr: tr?,
            scans: scans?,
            microtime: microtime?,
            reference: reference?,
        })
    }

    fn trials(&mut self, root: &Table<'_>, dir: &Path) -> Option<TrialTable> {
        let Some(table) = self.section(root, "trials") else {
            self.0.problems.push(
                Problem::new(
                    Location::file(self.0.path),
                    "the study file has no [trials] section",
                )
                .with_hint("add [trials] with file = \"trials.csv\""),
            );
            return None;
        };
        let file = match self.string(table, "file") {
            Some((file, _)) => Some(dir.join(file)),
            None => {
                self.missing(table, "trials", "file", "file = \"trials.csv\"");
                None
            }
        };
        let subject = self
            .string(table, "subject")
            .map_or("subject".into(), |s| s.0);
        let run = self.string(table, "run").map_or("run".into(), |s| s.0);
        Some(TrialTable {
            file: file?,
            labels: LabelColumns { subject, run },
        })
    }

    /// `bids_type_column`: in a BIDS study, the column an event's `type` selects on when
    /// it names no `type_column`; durations then default to the `duration` column.
    fn events(
        &mut self,
        root: &Table<'_>,
        bids_type_column: Option<&str>,
    ) -> Option<Vec<EventSpec>> {
        let Some(entries) = self.array_of_tables(root, "event") else {
            self.0.problems.push(
                Problem::new(
                    Location::file(self.0.path),
                    "the study file declares no [[event]]",
                )
                .with_hint("add [[event]] with name = \"outcome\" and onset = \"<onset column>\""),
            );
            return None;
        };
        let mut events = Vec::new();
        let mut names = BTreeSet::new();
        let mut complete = true;
        for (table, span) in entries {
            self.check_keys(table, "event", schema::keys_of("event"));
            let name = self.required_name(table, "event", span.clone(), &mut names);
            let selector = match (
                self.string(table, "type_column"),
                self.string(table, "type"),
            ) {
                (Some((column, _)), Some((value, _))) => Some(Some(RowSelector { column, value })),
                (None, Some((value, _))) if bids_type_column.is_some() => Some(Some(RowSelector {
                    column: bids_type_column.unwrap_or_default().to_string(),
                    value,
                })),
                (None, None) => Some(None),
                (Some((_, span)), None) | (None, Some((_, span))) => {
                    self.problem(
                        span,
                        "long-form events need both type_column and type (the value selecting this event's rows)",
                    );
                    None
                }
            };
            let onset = match self.string(table, "onset") {
                Some((column, _)) => Some(column),
                None if matches!(selector, Some(Some(_))) => Some("onset".to_string()),
                None => {
                    self.missing(
                        table,
                        "event",
                        "onset",
                        "onset = \"<column of onset times in seconds>\"",
                    );
                    None
                }
            };
            let duration = match get(table, "duration") {
                None if bids_type_column.is_some() => Some(Duration::Column("duration".into())),
                None => Some(Duration::Seconds(0.0)),
                Some(value) => match value.get_ref() {
                    DeValue::String(column) => Some(Duration::Column(column.to_string())),
                    _ => match self.number(table, "duration") {
                        Some((seconds, span)) if seconds < 0.0 => {
                            self.problem(span, format!("duration cannot be negative ({seconds})"));
                            None
                        }
                        Some((seconds, _)) => Some(Duration::Seconds(seconds)),
                        None => None,
                    },
                },
            };
            let modulators = self.task_modulators(table);
            match (name, onset, duration, selector, modulators) {
                (
                    Some(name),
                    Some(onset_column),
                    Some(duration),
                    Some(selector),
                    Some(modulators),
                ) => events.push(EventSpec {
                    name,
                    onset_column,
                    duration,
                    selector,
                    modulators,
                }),
                _ => complete = false,
            }
        }
        complete.then_some(events)
    }

    fn models(&mut self, root: &Table<'_>, events: &[EventSpec]) -> Option<Vec<ModelSpec>> {
        let entries = self.array_of_tables(root, "model").unwrap_or_default();
        let event_names: Vec<&str> = events.iter().map(|e| e.name.as_str()).collect();
        let mut models = Vec::new();
        let mut names = BTreeSet::new();
        let mut complete = true;
        for (table, span) in entries {
            self.check_keys(table, "model", schema::keys_of("model"));
            let name = self.required_name(table, "model", span.clone(), &mut names);
            let name = match name {
                Some(name) if schema::RESERVED_MODEL_NAMES.contains(&name.as_str()) => {
                    let span = get(table, "name").map_or(span.clone(), |v| v.span());
                    self.problem_with_hint(
                        span,
                        format!("\"{name}\" cannot name a model: the variance partition uses it for a group of regressors"),
                        "choose another name".into(),
                    );
                    None
                }
                Some(name) if event_names.contains(&name.as_str()) => {
                    let span = get(table, "name").map_or(span.clone(), |v| v.span());
                    self.problem_with_hint(
                        span,
                        format!("\"{name}\" names both an event and a model"),
                        "task modulators are called event:column and models' modulators model:column, so a model and an event need different names".into(),
                    );
                    None
                }
                other => other,
            };
            let modulators = self.modulators(table, span, &event_names);
            match (name, modulators) {
                (Some(name), Some(modulators)) => models.push(ModelSpec { name, modulators }),
                _ => complete = false,
            }
        }
        if models.len() > MAX_MODELS {
            self.0.problems.push(
                Problem::new(
                    Location::file(self.0.path),
                    format!("the study declares {} models; at most {MAX_MODELS} are supported", models.len()),
                )
                .with_hint("the variance partition considers every subset of models and task/nuisance groups"),
            );
            return None;
        }
        complete.then_some(models)
    }

    fn modulators(
        &mut self,
        model: &Table<'_>,
        model_span: Range<usize>,
        event_names: &[&str],
    ) -> Option<Vec<ModulatorSpec>> {
        let Some(value) = get(model, "modulators") else {
            self.problem_with_hint(
                model_span,
                "this [[model]] has no modulators".into(),
                "add modulators = [ { event = \"outcome\", column = \"<trial table column>\" } ]"
                    .into(),
            );
            return None;
        };
        let DeValue::Array(items) = value.get_ref() else {
            self.problem(
                value.span(),
                "modulators must be a list of { event = ..., column = ... }",
            );
            return None;
        };
        let mut modulators = Vec::new();
        let mut seen = BTreeSet::new();
        let mut complete = true;
        for item in items {
            let DeValue::Table(entry) = item.get_ref() else {
                self.problem(
                    item.span(),
                    "each modulator must be { event = \"...\", column = \"...\" }",
                );
                complete = false;
                continue;
            };
            self.check_keys(entry, "modulators", schema::keys_of("modulators"));
            let event = self.string(entry, "event");
            let column = self.string(entry, "column");
            let (Some((event, event_span)), Some((column, column_span))) = (event, column) else {
                self.problem(item.span(), "each modulator needs both event and column");
                complete = false;
                continue;
            };
            if !event_names.contains(&event.as_str()) {
                let hint = match crate::error::closest_name(&event, event_names) {
                    Some(near) => format!(
                        "did you mean \"{near}\"? declared events: {}",
                        event_names.join(", ")
                    ),
                    None => format!("declared events: {}", event_names.join(", ")),
                };
                self.problem_with_hint(event_span, format!("unknown event \"{event}\""), hint);
                complete = false;
                continue;
            }
            if !seen.insert((event.clone(), column.clone())) {
                self.problem(
                    column_span,
                    format!("modulator {event}/{column} is listed twice in this model"),
                );
                complete = false;
                continue;
            }
            modulators.push(ModulatorSpec { event, column });
        }
        complete.then_some(modulators)
    }

    fn nuisance(&mut self, root: &Table<'_>, dir: &Path) -> Option<Option<NuisanceSpec>> {
        let Some(table) = self.section(root, "nuisance") else {
            return Some(None);
        };
        let template = match self.string(table, "file") {
            Some((template, _)) => Some(template),
            None => {
                self.missing(
                    table,
                    "nuisance",
                    "file",
                    "file = \"confounds/{subject}_run-{run}.tsv\"",
                );
                None
            }
        };
        let columns = match get(table, "columns") {
            None => Some(Vec::new()),
            Some(value) => self.string_list(value),
        };
        Some(Some(NuisanceSpec {
            template: template?,
            folder: dir.to_path_buf(),
            columns: columns?,
        }))
    }

    /// `None`: a problem; `Some(None)`: no `[bids]` section.
    fn bids(&mut self, root: &Table<'_>, dir: &Path) -> Option<Option<BidsSource>> {
        let Some(table) = self.section(root, "bids") else {
            return Some(None);
        };
        let root_dir = match self.string(table, "root") {
            Some((folder, _)) => Some(dir.join(folder)),
            None => {
                self.missing(
                    table,
                    "bids",
                    "root",
                    "root = \"bids\"   # the dataset folder",
                );
                None
            }
        };
        let task = match self.string(table, "task") {
            Some((task, span))
                if !task.chars().all(|c| c.is_ascii_alphanumeric()) || task.is_empty() =>
            {
                self.problem(span, format!("task label \"{task}\" must be letters and digits (BIDS labels are alphanumeric; no `task-` prefix)"));
                None
            }
            Some((task, _)) => Some(task),
            None => {
                self.missing(table, "bids", "task", "task = \"<label in task-<label>>\"");
                None
            }
        };
        let list = |reader: &mut Self, key: &str| -> Option<Option<Vec<String>>> {
            match get(table, key) {
                None => Some(None),
                Some(value) => reader.string_list(value).map(Some),
            }
        };
        let sessions = list(self, "sessions");
        let runs = list(self, "runs");
        let type_column = self
            .string(table, "type_column")
            .map_or("trial_type".into(), |s| s.0);
        let derivatives = self.string(table, "derivatives").map(|(f, _)| dir.join(f));
        let join = match self.string(table, "join_column") {
            Some((column, _)) => JoinBy::Column(column),
            None => JoinBy::RowOrder,
        };
        Some(Some(BidsSource {
            root: root_dir?,
            task: task?,
            sessions: sessions?,
            runs: runs?,
            type_column,
            derivatives,
            join,
        }))
    }

    fn thresholds(&mut self, root: &Table<'_>) -> Option<Thresholds> {
        match self.section(root, "thresholds") {
            Some(table) => read_thresholds(&mut self.0, table),
            None => Some(Thresholds::default()),
        }
    }
}

/// The screening thresholds of a `[thresholds]` table (keys `schema::THRESHOLD_KEYS`);
/// shared with the forecast spec, which takes the same section.
pub(crate) fn read_thresholds(
    reader: &mut TomlReader<'_>,
    table: &Table<'_>,
) -> Option<Thresholds> {
    let defaults = Thresholds::default();
    let positive =
        |reader: &mut TomlReader<'_>, key: &str, default: f64| match reader.number(table, key) {
            Some((value, span)) if value <= 0.0 => {
                reader.problem(span, format!("{key} must be positive, not {value}"));
                None
            }
            Some((value, _)) => Some(value),
            None => Some(default),
        };
    let caution = positive(reader, "vif_caution", defaults.vif_caution);
    let severe = positive(reader, "vif_severe", defaults.vif_severe);
    let index = positive(reader, "condition_index", defaults.condition_index);
    let index_severe = positive(
        reader,
        "condition_index_severe",
        defaults.condition_index_severe,
    );
    let shared_over_unique = positive(reader, "shared_over_unique", defaults.shared_over_unique);
    let (caution, severe) = (caution?, severe?);
    if caution > severe {
        let span = get(table, "vif_caution").map_or(0..0, |v| v.span());
        reader.problem(
            span,
            format!("vif_caution ({caution}) is above vif_severe ({severe})"),
        );
        return None;
    }
    let (index, index_severe) = (index?, index_severe?);
    if index > index_severe {
        let span = get(table, "condition_index").map_or(0..0, |v| v.span());
        reader.problem(
            span,
            format!("condition_index ({index}) is above condition_index_severe ({index_severe})"),
        );
        return None;
    }
    Some(Thresholds {
        vif_caution: caution,
        vif_severe: severe,
        condition_index: index,
        condition_index_severe: index_severe,
        shared_over_unique: shared_over_unique?,
    })
}

#[cfg(test)]
mod tests;
