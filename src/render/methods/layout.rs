//! The regressors the text names: events, each model's modulators, nuisance columns.

use crate::design::RegressorKind;
use crate::report::Report;

/// A regressor as it appears in the text.
pub(super) struct Named {
    /// The regressor's name in the report.
    pub(super) name: String,
    /// What the text calls it: the trial-table column when that is unambiguous.
    pub(super) label: String,
    pub(super) event: Option<String>,
}

pub(super) struct ModelInfo {
    pub(super) name: String,
    pub(super) modulators: Vec<Named>,
}

/// The regressors of the study, gathered over all runs in order of first appearance.
pub(super) struct Layout {
    pub(super) events: Vec<Named>,
    pub(super) models: Vec<ModelInfo>,
    pub(super) nuisance: Vec<String>,
}

impl Layout {
    pub(super) fn of(report: &Report) -> Self {
        let mut events: Vec<Named> = Vec::new();
        let mut modulators: Vec<(String, Named, Option<String>)> = Vec::new();
        let mut nuisance: Vec<String> = Vec::new();
        for run in &report.runs {
            for entry in &run.regressors {
                let regressor = &entry.regressor;
                match regressor.kind {
                    RegressorKind::Onset => {
                        if !events.iter().any(|e| e.name == regressor.name) {
                            events.push(Named {
                                name: regressor.name.clone(),
                                label: regressor
                                    .event
                                    .clone()
                                    .unwrap_or_else(|| regressor.name.clone()),
                                event: regressor.event.clone(),
                            });
                        }
                    }
                    RegressorKind::Modulator => {
                        if !modulators.iter().any(|(_, m, _)| m.name == regressor.name) {
                            let model = regressor.model.clone().unwrap_or_default();
                            modulators.push((
                                model,
                                Named {
                                    name: regressor.name.clone(),
                                    label: regressor.name.clone(),
                                    event: regressor.event.clone(),
                                },
                                regressor.column.clone(),
                            ));
                        }
                    }
                    RegressorKind::Nuisance => {
                        if !nuisance.contains(&regressor.name) {
                            nuisance.push(regressor.name.clone());
                        }
                    }
                    RegressorKind::Derivative => {}
                }
            }
        }
        // A modulator is called by its column when no other modulator uses that column.
        let columns: Vec<Option<String>> = modulators.iter().map(|(_, _, c)| c.clone()).collect();
        let mut models: Vec<ModelInfo> = Vec::new();
        for (model, mut named, column) in modulators {
            if let Some(column) = column {
                let uses = columns
                    .iter()
                    .filter(|c| c.as_deref() == Some(column.as_str()))
                    .count();
                if uses == 1 {
                    named.label = column;
                }
            }
            match models.iter_mut().find(|m| m.name == model) {
                Some(found) => found.modulators.push(named),
                None => models.push(ModelInfo {
                    name: model,
                    modulators: vec![named],
                }),
            }
        }
        Layout {
            events,
            models,
            nuisance,
        }
    }

    pub(super) fn modulators(&self) -> impl Iterator<Item = (&ModelInfo, &Named)> {
        self.models
            .iter()
            .flat_map(|model| model.modulators.iter().map(move |m| (model, m)))
    }

    pub(super) fn has_modulators(&self) -> bool {
        self.models.iter().any(|m| !m.modulators.is_empty())
    }
}
