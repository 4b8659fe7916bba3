//! How far two models' regressors can be told apart, measured in the design that holds
//! every model's modulators with the task and nuisance regressors. For an ordered pair
//! of models (A, B) and each modulator j of A: the partial R² of j on B's modulators,
//!
//!   [R²(j ~ C ∪ B) − R²(j ~ C)] / [1 − R²(j ~ C)],
//!
//! with C the task regressors (onsets, derivatives, task modulators), the nuisance
//! regressors and A's other modulators (and their derivatives), other models left out:
//! the share of what j has left after everything else in its own GLM that B's
//! modulators reproduce (a squared partial correlation; e.g. Cohen, Cohen, West & Aiken
//! 2003, *Applied Multiple Regression/Correlation Analysis*, §5.4). Beside it, the
//! canonical correlations of the two modulator sets (Hotelling 1936) and the
//! trial-level correlation of j with B's corresponding modulator (the same event, the
//! same position among B's modulators of that event). None of these sets a status.

use serde::{Deserialize, Serialize};

use super::{Core, kept_position, model_names, modulators_of};
use crate::design::{Design, RegressorKind};

/// The separation of model A from model B in one run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModelSeparation {
    /// [A, B]: A's modulators measured against B's.
    pub models: [String; 2],
    /// Canonical correlations of the two modulator sets after task and nuisance.
    pub canonical_correlations: Vec<f64>,
    pub modulators: Vec<SeparatedModulator>,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SeparatedModulator {
    /// A modulator of model A.
    pub regressor: String,
    /// Partial R² on B's modulators given everything else of A's GLM; `null` when the
    /// modulator or B's set is undefined (an exact dependency) in this design.
    pub partial_r2: Option<f64>,
    /// B's corresponding modulator, when B has one.
    pub corresponding: Option<String>,
    /// Trial-level correlation with it; `null` without one, or with fewer than 3 trials.
    pub trial_correlation: Option<f64>,
}

pub(super) fn separations(
    design: &Design,
    core: &Core,
    overlaps: &[super::ModelOverlap],
    trial: &[super::TrialCorrelation],
) -> Vec<ModelSeparation> {
    let models = model_names(design);
    let position = |index: usize| kept_position(core, index);
    // Kept positions of the columns that belong to no model.
    let common: Vec<usize> = design
        .regressors
        .iter()
        .enumerate()
        .filter(|(_, r)| r.model.is_none())
        .filter_map(|(i, _)| position(i))
        .collect();
    let columns_of = |model: &str| -> Vec<usize> {
        design
            .regressors
            .iter()
            .enumerate()
            .filter(|(_, r)| r.model.as_deref() == Some(model))
            .map(|(i, _)| i)
            .collect()
    };
    let mut result = Vec::new();
    for a in &models {
        for b in &models {
            if a == b {
                continue;
            }
            let b_set: Option<Vec<usize>> = modulators_of(design, b).map(position).collect();
            let a_modulators: Vec<usize> = modulators_of(design, a).collect();
            let b_modulators: Vec<usize> = modulators_of(design, b).collect();
            let modulators = a_modulators
                .iter()
                .map(|&j| {
                    let name = &design.regressors[j].name;
                    let corresponding = corresponding(design, &a_modulators, &b_modulators, j);
                    SeparatedModulator {
                        regressor: name.clone(),
                        partial_r2: position(j).zip(b_set.as_ref()).and_then(|(target, b_set)| {
                            let mut controls = common.clone();
                            controls.extend(
                                columns_of(a)
                                    .into_iter()
                                    .filter(|&i| i != j)
                                    .filter_map(position),
                            );
                            partial_r_squared(core, target, &controls, b_set)
                        }),
                        trial_correlation: corresponding.and_then(|k| {
                            let other = &design.regressors[k].name;
                            trial
                                .iter()
                                .find(|t| {
                                    (&t.regressors[0] == name && &t.regressors[1] == other)
                                        || (&t.regressors[0] == other && &t.regressors[1] == name)
                                })
                                .and_then(|t| t.r)
                        }),
                        corresponding: corresponding.map(|k| design.regressors[k].name.clone()),
                    }
                })
                .collect();
            let canonical_correlations = overlaps
                .iter()
                .find(|o| {
                    (&o.models[0] == a && &o.models[1] == b)
                        || (&o.models[0] == b && &o.models[1] == a)
                })
                .map_or_else(Vec::new, |o| o.canonical_correlations.clone());
            result.push(ModelSeparation {
                models: [a.to_string(), b.to_string()],
                canonical_correlations,
                modulators,
            });
        }
    }
    result
}

/// B's modulator corresponding to A's modulator `j`: on the same event, at the same
/// position among B's modulators of that event as `j` among A's.
fn corresponding(design: &Design, a: &[usize], b: &[usize], j: usize) -> Option<usize> {
    let event = &design.regressors[j].event;
    let rank = a
        .iter()
        .filter(|&&x| x < j && &design.regressors[x].event == event)
        .count();
    b.iter()
        .copied()
        .filter(|&x| {
            &design.regressors[x].event == event
                && design.regressors[x].kind == RegressorKind::Modulator
        })
        .nth(rank)
}

/// [R²(target ~ C ∪ B) − R²(target ~ C)] / [1 − R²(target ~ C)], from the QR triangle.
fn partial_r_squared(core: &Core, target: usize, controls: &[usize], b: &[usize]) -> Option<f64> {
    let r2_c = core.triangle.r_squared(target, controls)?;
    let mut all = controls.to_vec();
    all.extend_from_slice(b);
    let r2_cb = core.triangle.r_squared(target, &all)?;
    let rest = 1.0 - r2_c;
    (rest > 0.0).then(|| ((r2_cb - r2_c) / rest).clamp(0.0, 1.0))
}
