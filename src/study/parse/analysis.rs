//! The analysis the lab will run, as the study file declares it: task modulators of an
//! event, the GLMs (`[[glm]]`) and the noise model (`[noise]`).

use std::collections::BTreeSet;

use toml::de::DeValue;

use super::Reader;
use crate::study::schema;
use crate::study::{GlmSpec, NoiseModel};
use crate::toml_read::{Table, TomlReader, get};

impl Reader<'_> {
    /// An event's `modulators = ["reward", "rt"]`: columns entered as task modulators.
    pub(super) fn task_modulators(&mut self, event: &Table<'_>) -> Option<Vec<String>> {
        let Some(value) = get(event, "modulators") else {
            return Some(Vec::new());
        };
        if let DeValue::Array(items) = value.get_ref() {
            if items
                .iter()
                .any(|item| matches!(item.get_ref(), DeValue::Table(_)))
            {
                self.problem_with_hint(
                    value.span(),
                    "an event's modulators are trial-table column names".into(),
                    "write modulators = [\"reward\", \"rt\"] under [[event]]; a model's modulators ({ event = ..., column = ... }) go under [[model]]".into(),
                );
                return None;
            }
        }
        let columns = self.string_list(value)?;
        let mut seen = BTreeSet::new();
        for column in &columns {
            if !seen.insert(column.as_str()) {
                self.problem(
                    value.span(),
                    format!("task modulator \"{column}\" is listed twice for this event"),
                );
                return None;
            }
        }
        Some(columns)
    }
}

/// The `[[glm]]` entries, or one GLM per model when there are none.
pub(crate) fn read_glms(
    r: &mut TomlReader<'_>,
    root: &Table<'_>,
    models: &[String],
) -> Option<Vec<GlmSpec>> {
    let Some(entries) = r.array_of_tables(root, "glm") else {
        return Some(GlmSpec::one_per_model(models));
    };
    let model_names: Vec<&str> = models.iter().map(String::as_str).collect();
    let mut glms = Vec::new();
    let mut names = BTreeSet::new();
    let mut complete = true;
    for (table, span) in entries {
        r.check_keys(table, "glm", schema::keys_of("glm"));
        let name = r.required_name(table, "glm", span.clone(), &mut names);
        let listed = match get(table, "models") {
            None => {
                r.problem_with_hint(
                    span.clone(),
                    "this [[glm]] names no models".into(),
                    format!(
                        "add models = [\"{}\"] (the models whose modulators the GLM holds)",
                        model_names.first().copied().unwrap_or("model")
                    ),
                );
                None
            }
            Some(value) => glm_models(r, value, &model_names),
        };
        match (name, listed) {
            (Some(name), Some(listed)) => glms.push(GlmSpec {
                name,
                // The study's order of models, whatever order the GLM lists them in.
                models: model_names
                    .iter()
                    .filter(|m| listed.iter().any(|l| l == *m))
                    .map(|m| m.to_string())
                    .collect(),
            }),
            _ => complete = false,
        }
    }
    complete.then_some(glms)
}

fn glm_models(
    r: &mut TomlReader<'_>,
    value: &toml::Spanned<DeValue<'_>>,
    known: &[&str],
) -> Option<Vec<String>> {
    let listed = r.string_list(value)?;
    if listed.is_empty() {
        r.problem_with_hint(
            value.span(),
            "this [[glm]] lists no models".into(),
            format!("declared models: {}", known.join(", ")),
        );
        return None;
    }
    let mut seen = BTreeSet::new();
    for model in &listed {
        if !known.contains(&model.as_str()) {
            let hint = match crate::error::closest_name(model, known) {
                Some(near) => format!(
                    "did you mean \"{near}\"? declared models: {}",
                    known.join(", ")
                ),
                None => format!("declared models: {}", known.join(", ")),
            };
            r.problem_with_hint(value.span(), format!("unknown model \"{model}\""), hint);
            return None;
        }
        if !seen.insert(model.as_str()) {
            r.problem(
                value.span(),
                format!("model \"{model}\" is listed twice in this GLM"),
            );
            return None;
        }
    }
    Some(listed)
}

/// `[noise]`: white (the default) or AR(1) with its coefficient.
pub(crate) fn read_noise(r: &mut TomlReader<'_>, root: &Table<'_>) -> Option<NoiseModel> {
    let Some(table) = r.section(root, "noise", schema::keys_of("noise")) else {
        return Some(NoiseModel::White);
    };
    let coefficient = match r.number(table, "ar1") {
        Some((rho, span)) if !(0.0..1.0).contains(&rho) => {
            r.problem_with_hint(
                span,
                format!("ar1 = {rho} is not an AR(1) coefficient"),
                "give 0 <= ar1 < 1 (common practice: about 0.2-0.4 at TR 2 s, larger at shorter TRs)".into(),
            );
            return None;
        }
        other => other,
    };
    if get(table, "model").is_none() {
        r.missing(table, "noise", "model", "model = \"ar1\"   # or \"white\"");
        return None;
    }
    let (model, span) = r.string(table, "model")?;
    let ar1_given = get(table, "ar1").is_some();
    match (model.as_str(), coefficient) {
        ("white", _) if ar1_given => {
            r.problem_with_hint(
                span,
                "ar1 is given but model = \"white\"".into(),
                "use model = \"ar1\" to whiten with that coefficient, or remove ar1".into(),
            );
            None
        }
        ("white", _) => Some(NoiseModel::White),
        ("ar1", Some((rho, _))) => Some(NoiseModel::Ar1(rho)),
        ("ar1", None) if !ar1_given => {
            r.missing(
                table,
                "noise",
                "ar1",
                "ar1 = 0.3   # the AR(1) coefficient, 0 <= ar1 < 1",
            );
            None
        }
        ("ar1", None) => None,
        (other, _) => {
            r.problem_with_hint(
                span,
                format!("unknown noise model \"{other}\""),
                "model = \"white\" (independent scans) or \"ar1\" (first-order autoregressive)"
                    .into(),
            );
            None
        }
    }
}
