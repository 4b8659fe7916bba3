//! Forecast spec (TOML) → [`ForecastSpec`], with every problem reported at its line and
//! column, all together. Schedule files named by the spec are read afterwards by
//! [`super::load_schedules`], so that this stays a pure function of the text.

use std::collections::BTreeSet;
use std::path::Path;

use toml::de::DeValue;

use super::task::{TASK_KEYS, overlay, read_task};
use super::*;
use crate::Result;
use crate::forecast::participant::{CUE, OUTCOME};
use crate::study::schema::THRESHOLD_KEYS;
use crate::study::{
    DEFAULT_HIGH_PASS, DEFAULT_MICROTIME, DEFAULT_REFERENCE, read_glms, read_noise, read_thresholds,
};
use crate::toml_read::{Table, TomlReader, get, parse_integer, parse_toml};

const TOP_LEVEL: &[&str] = &[
    "forecast",
    "task",
    "design",
    "thresholds",
    "learner",
    "generate",
    "compare",
    "variant",
    "glm",
    "noise",
];
const FORECAST_KEYS: &[&str] = &["name", "participants", "seed", "initial_value"];
const DESIGN_KEYS: &[&str] = &["high_pass", "microtime", "reference", "hrf_derivative"];
const LEARNER_KEYS: &[&str] = &["name", "kind", "modulators", "priors"];
const GENERATE_KEYS: &[&str] = &["learner", "weights"];
const COMPARE_KEYS: &[&str] = &["regressors", "rank_by"];
/// Models plus the task and nuisance groups must stay within the partition's limit.
const MAX_LEARNERS: usize = crate::diagnose::commonality::MAX_GROUPS - 2;
/// Group names of the variance partition, which a learner may not take.
const RESERVED: &[&str] = &["task", "nuisance", "unique"];

/// Parses and validates a forecast spec; `path` is used for messages and to resolve
/// schedule files.
pub fn parse_forecast(path: &Path, text: &str) -> Result<ForecastSpec> {
    let root = parse_toml(path, text, "forecast spec")?;
    let mut r = TomlReader::new(path, text);
    let spec = read_spec(&mut r, root.get_ref());
    r.finish(spec, "forecast spec")
}

fn read_spec(r: &mut TomlReader<'_>, root: &Table<'_>) -> Option<ForecastSpec> {
    r.check_keys(root, "", TOP_LEVEL);
    let dir = r.path.parent().unwrap_or(Path::new("")).to_path_buf();
    let empty = Table::default();
    let head = r.section(root, "forecast", FORECAST_KEYS).unwrap_or(&empty);
    let name = r.string(head, "name").map(|(n, _)| n);
    let participants = r
        .positive_integer(head, "participants")
        .unwrap_or(DEFAULT_PARTICIPANTS);
    let seed = seed(r, head);
    let initial_value = r.number(head, "initial_value").map_or(0.5, |(v, _)| v);
    let design_table = r.section(root, "design", DESIGN_KEYS).unwrap_or(&empty);
    let design = design(r, design_table);
    let thresholds = match r.section(root, "thresholds", THRESHOLD_KEYS) {
        Some(table) => read_thresholds(r, table),
        None => Some(Default::default()),
    };
    let learners = learners(r, root);
    let glms = learners.as_ref().and_then(|learners| {
        let names: Vec<String> = learners.iter().map(|l| l.name.clone()).collect();
        read_glms(r, root, &names)
    });
    let noise = read_noise(r, root);
    let generating = learners.as_ref().and_then(|l| generating(r, root, l));
    let (focus, rank_by) = compare(r, root, learners.as_deref().unwrap_or(&[]));
    let variants = variants(r, root, &dir);

    let default_name = r
        .path
        .file_stem()
        .map_or("forecast".into(), |s| s.to_string_lossy().into_owned());
    Some(ForecastSpec {
        name: name.unwrap_or(default_name),
        path: r.path.to_path_buf(),
        participants,
        seed: seed?,
        initial_value,
        design: design?,
        noise: noise?,
        glms: glms?,
        thresholds: thresholds?,
        learners: learners?,
        generating: generating?,
        focus: focus?,
        rank_by: rank_by?,
        variants: variants?,
    })
}

fn seed(r: &mut TomlReader<'_>, head: &Table<'_>) -> Option<u64> {
    let Some(value) = get(head, "seed") else {
        return Some(1);
    };
    match value.get_ref() {
        DeValue::Integer(i) => match parse_integer(i.as_str(), i.radix()) {
            Some(n) if n >= 0 => Some(n as u64),
            _ => {
                r.problem(value.span(), "seed must be a whole number ≥ 0");
                None
            }
        },
        other => {
            r.problem(
                value.span(),
                format!("seed must be a whole number, not a {}", other.type_str()),
            );
            None
        }
    }
}

fn design(r: &mut TomlReader<'_>, table: &Table<'_>) -> Option<DesignChoices> {
    let high_pass = match r.number(table, "high_pass") {
        Some((v, span)) if v < 0.0 => {
            r.problem(span, "high_pass must be 0 (off) or a cutoff in seconds > 0");
            None
        }
        Some((v, _)) => Some(v),
        None => Some(DEFAULT_HIGH_PASS),
    };
    let microtime = r
        .positive_integer(table, "microtime")
        .unwrap_or(DEFAULT_MICROTIME);
    let reference = match r.number(table, "reference") {
        Some((v, span)) if !(0.0..=1.0).contains(&v) => {
            r.problem(span, "reference is a fraction of the TR, in [0, 1]");
            None
        }
        Some((v, _)) => Some(v),
        None => Some(DEFAULT_REFERENCE),
    };
    let derivative = r.boolean(table, "hrf_derivative").unwrap_or(false);
    Some(DesignChoices {
        high_pass: high_pass?,
        microtime,
        reference: reference?,
        derivative,
    })
}

fn learners(r: &mut TomlReader<'_>, root: &Table<'_>) -> Option<Vec<LearnerSpec>> {
    let Some(tables) = r.array_of_tables(root, "learner") else {
        r.file_problem(
            "the forecast spec has no [[learner]]",
            "add at least two candidate learners, e.g. [[learner]] name = \"delta\" kind = \"delta\"",
        );
        return None;
    };
    let mut names = BTreeSet::new();
    let mut learners = Vec::new();
    let mut ok = true;
    for (table, span) in &tables {
        r.check_keys(table, "learner", LEARNER_KEYS);
        match learner(r, table, span.clone(), &mut names) {
            Some(l) => learners.push(l),
            None => ok = false,
        }
    }
    if learners.len() > MAX_LEARNERS {
        r.file_problem(
            format!(
                "{} learners; at most {MAX_LEARNERS} can be compared",
                learners.len()
            ),
            "drop some [[learner]] entries",
        );
        return None;
    }
    ok.then_some(learners)
}

fn learner(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    span: std::ops::Range<usize>,
    names: &mut BTreeSet<String>,
) -> Option<LearnerSpec> {
    let name = r.required_name(table, "learner", span.clone(), names)?;
    if RESERVED.contains(&name.as_str()) || !crate::trials::is_plain_label(&name) {
        let at = get(table, "name").map_or(span, |v| v.span());
        r.problem(
            at,
            format!(
                "learner name \"{name}\" is reserved or not a plain name (letters, digits, _ or -)"
            ),
        );
        return None;
    }
    let kind = match r.string(table, "kind") {
        Some((key, at)) => match LearnerKind::from_key(&key) {
            Some(kind) => kind,
            None => {
                let known: Vec<&str> = LearnerKind::ALL.iter().map(|k| k.key()).collect();
                r.problem_with_hint(
                    at,
                    format!("unknown learner kind \"{key}\""),
                    format!("use one of: {}", known.join(", ")),
                );
                return None;
            }
        },
        None => {
            r.problem(span, format!("learner \"{name}\" has no `kind`"));
            return None;
        }
    };
    let quantities = quantities(r, table, kind, &name)?;
    let priors = priors(r, table, kind, &name)?;
    Some(LearnerSpec {
        name,
        kind,
        priors,
        quantities,
    })
}

fn quantities(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    kind: LearnerKind,
    name: &str,
) -> Option<Vec<Quantity>> {
    let Some(value) = get(table, "modulators") else {
        let mut defaults = kind.default_quantities().to_vec();
        defaults.sort_by_key(|q| !q.at_cue());
        return Some(defaults);
    };
    let keys = r.string_list(value)?;
    let mut list = Vec::new();
    for key in keys {
        match Quantity::from_key(&key).filter(|q| kind.quantities().contains(q)) {
            Some(q) if !list.contains(&q) => list.push(q),
            Some(_) => {
                r.problem(
                    value.span(),
                    format!("learner \"{name}\": `{key}` is listed twice"),
                );
                return None;
            }
            None => {
                let offered: Vec<&str> = kind.quantities().iter().map(|q| q.key()).collect();
                r.problem_with_hint(
                    value.span(),
                    format!("a {} learner has no quantity `{key}`", kind.key()),
                    format!("it offers: {}", offered.join(", ")),
                );
                return None;
            }
        }
    }
    if list.is_empty() {
        r.problem(
            value.span(),
            format!("learner \"{name}\" lists no modulators"),
        );
        return None;
    }
    list.sort_by_key(|q| !q.at_cue());
    Some(list)
}

fn priors(
    r: &mut TomlReader<'_>,
    table: &Table<'_>,
    kind: LearnerKind,
    name: &str,
) -> Option<Vec<Option<Prior>>> {
    let parameters = kind.all_parameters();
    let keys: Vec<&str> = parameters.iter().map(|p| p.name).collect();
    let empty = Table::default();
    let section = format!("learner.priors of \"{name}\"");
    let table = match get(table, "priors") {
        Some(value) => match value.get_ref() {
            DeValue::Table(t) => {
                r.check_keys(t, &section, &keys);
                t
            }
            other => {
                r.problem(
                    value.span(),
                    format!("priors must be a table, not a {}", other.type_str()),
                );
                return None;
            }
        },
        None => &empty,
    };
    let mut priors = Vec::new();
    let mut ok = true;
    for info in &parameters {
        let Some(value) = get(table, info.name) else {
            priors.push(None);
            continue;
        };
        let only_entry = match value.get_ref() {
            DeValue::Table(family) if family.len() == 1 => family.iter().next(),
            _ => None,
        };
        let prior = match (value.get_ref(), only_entry) {
            (_, Some((key, numbers))) => {
                let what = format!("prior of {}", info.name);
                r.numbers_value(numbers, &what)
                    .and_then(|n| match Prior::new(key.get_ref(), &n) {
                        Ok(p) => Some(p),
                        Err(message) => {
                            r.problem(value.span(), format!("{}: {message}", info.name));
                            None
                        }
                    })
            }
            (DeValue::Integer(_) | DeValue::Float(_), None) => {
                r.number_value(value, info.name).map(Prior::Fixed)
            }
            _ => {
                r.problem_with_hint(
                    value.span(),
                    format!(
                        "the prior of {} must be a number (fixed) or one family",
                        info.name
                    ),
                    format!("e.g. {} = {{ beta = [2, 5] }}", info.name),
                );
                None
            }
        };
        if let Some(bad) = prior.as_ref().and_then(|p| p.outside(info)) {
            r.problem(
                value.span(),
                format!(
                    "{} = {bad} is outside its range [{}, {}]",
                    info.name, info.low, info.high
                ),
            );
            ok = false;
        }
        ok &= prior.is_some();
        priors.push(prior);
    }
    ok.then_some(priors)
}

fn generating(
    r: &mut TomlReader<'_>,
    root: &Table<'_>,
    learners: &[LearnerSpec],
) -> Option<Vec<(usize, f64)>> {
    let index_of = |name: &str| learners.iter().position(|l| l.name == name);
    let Some(table) = r.section(root, "generate", GENERATE_KEYS) else {
        r.file_problem(
            "the forecast spec has no [generate] section",
            format!(
                "add: [generate] learner = \"{}\"",
                learners.first().map_or("...", |l| &l.name)
            ),
        );
        return None;
    };
    let mut chosen = Vec::new();
    match (get(table, "learner"), get(table, "weights")) {
        (Some(_), Some(value)) => {
            r.problem(value.span(), "give `learner` or `weights`, not both");
            return None;
        }
        (Some(_), None) => {
            let (name, span) = r.string(table, "learner")?;
            match index_of(&name) {
                Some(i) => chosen.push((i, 1.0)),
                None => {
                    unknown_learner(r, span, &name, learners);
                    return None;
                }
            }
        }
        (None, Some(value)) => {
            let DeValue::Table(weights) = value.get_ref() else {
                r.problem(
                    value.span(),
                    "weights is a table, e.g. { hybrid = 0.7, delta = 0.3 }",
                );
                return None;
            };
            for (key, weight) in weights.iter() {
                let name: &str = key.get_ref();
                let w = r.number_value(weight, &format!("the weight of {name}"))?;
                match index_of(name) {
                    Some(i) if w > 0.0 => chosen.push((i, w)),
                    Some(_) => {
                        r.problem(weight.span(), format!("the weight of {name} must be > 0"))
                    }
                    None => unknown_learner(r, key.span(), name, learners),
                }
            }
            if chosen.len() != weights.len() {
                return None;
            }
        }
        (None, None) => {
            r.file_problem("[generate] names no learner", "add: learner = \"<name>\"");
            return None;
        }
    }
    let total: f64 = chosen.iter().map(|c| c.1).sum();
    let mut ok = true;
    for (i, _) in &chosen {
        let learner = &learners[*i];
        let missing: Vec<&str> = learner
            .kind
            .all_parameters()
            .iter()
            .zip(&learner.priors)
            .filter(|(_, p)| p.is_none())
            .map(|(info, _)| info.name)
            .collect();
        if !missing.is_empty() {
            r.file_problem(
                format!(
                    "learner \"{}\" generates behaviour but has no prior for {}",
                    learner.name,
                    missing.join(", ")
                ),
                format!(
                    "add under its [learner.priors]: {} = {{ uniform = [low, high] }}",
                    missing[0]
                ),
            );
            ok = false;
        }
    }
    // In the learners' order, whatever order the weights were written in.
    chosen.sort_by_key(|&(i, _)| i);
    ok.then(|| chosen.into_iter().map(|(i, w)| (i, w / total)).collect())
}

fn unknown_learner(
    r: &mut TomlReader<'_>,
    span: std::ops::Range<usize>,
    name: &str,
    learners: &[LearnerSpec],
) {
    let known: Vec<&str> = learners.iter().map(|l| l.name.as_str()).collect();
    r.problem_with_hint(
        span,
        format!("no [[learner]] is named \"{name}\""),
        format!("learners: {}", known.join(", ")),
    );
}

type Compare = (Option<Vec<String>>, Option<RankBy>);

fn compare(r: &mut TomlReader<'_>, root: &Table<'_>, learners: &[LearnerSpec]) -> Compare {
    let all: Vec<String> = learners
        .iter()
        .flat_map(|l| l.quantities.iter().map(move |&q| l.column(q)))
        .collect();
    let Some(table) = r.section(root, "compare", COMPARE_KEYS) else {
        return (Some(all), Some(RankBy::Vif));
    };
    // The events' onset regressors may be named too (e.g. to rank by cue/outcome overlap).
    let mut known: Vec<String> = vec![CUE.to_string(), OUTCOME.to_string()];
    known.extend(all.iter().cloned());
    let focus = match get(table, "regressors") {
        Some(value) => r.string_list(value).and_then(|list| {
            let unknown: Vec<&String> = list.iter().filter(|n| !known.contains(n)).collect();
            if unknown.is_empty() && !list.is_empty() {
                return Some(list);
            }
            r.problem_with_hint(
                value.span(),
                format!(
                    "[compare] regressors: {} not a modulator of any learner",
                    if unknown.is_empty() {
                        "the list is empty:".to_string()
                    } else {
                        format!("\"{}\" is", unknown[0])
                    }
                ),
                format!("regressors: {}", known.join(", ")),
            );
            None
        }),
        None => Some(all.clone()),
    };
    let rank_by = match r.string(table, "rank_by") {
        Some((key, _)) if key == "vif" => Some(RankBy::Vif),
        Some((key, _)) if key == "shared" => Some(RankBy::Shared),
        Some((key, span)) => {
            r.problem(
                span,
                format!("rank_by is \"vif\" or \"shared\", not \"{key}\""),
            );
            None
        }
        None if get(table, "rank_by").is_some() => None,
        None => Some(RankBy::Vif),
    };
    (focus, rank_by)
}

fn variants(r: &mut TomlReader<'_>, root: &Table<'_>, dir: &Path) -> Option<Vec<TaskVariant>> {
    let empty = Table::default();
    let Some(base) = r.section(root, "task", TASK_KEYS) else {
        r.file_problem(
            "the forecast spec has no [task] section",
            "add [task] with trials, runs, tr, reward_probabilities, cue_to_outcome and outcome_to_cue",
        );
        return None;
    };
    let planned = read_task(r, base, dir, "[task]");
    let mut variants = vec![TaskVariant {
        name: "as planned".into(),
        task: planned?,
    }];
    let tables = r.array_of_tables(root, "variant").unwrap_or_default();
    let mut names: BTreeSet<String> = BTreeSet::from(["as planned".to_string()]);
    let mut variant_keys = TASK_KEYS.to_vec();
    variant_keys.push("name");
    let mut ok = true;
    for (table, span) in tables {
        r.check_keys(table, "variant", &variant_keys);
        let Some(name) = r.required_name(table, "variant", span, &mut names) else {
            ok = false;
            continue;
        };
        let merged = overlay(base, table);
        match read_task(r, &merged, dir, &format!("variant \"{name}\"")) {
            Some(task) => variants.push(TaskVariant { name, task }),
            None => ok = false,
        }
    }
    let _ = &empty;
    ok.then_some(variants)
}
