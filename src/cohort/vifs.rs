//! The VIFs of each regressor of interest across the cohort, per GLM: over every run
//! (for the methods paragraph), and per participant (the worst over their runs, for the
//! overview figure). An undefined VIF (an exact dependency, a regressor left out) is
//! counted, never averaged.

use std::collections::{HashMap, HashSet};

use super::RunDigest;
use crate::quantile;

/// One regressor's VIFs in one GLM over every run that has it.
#[derive(Debug, Clone, PartialEq)]
pub struct RegressorVifs {
    pub glm: String,
    pub regressor: String,
    /// Runs that have the regressor.
    pub runs: usize,
    /// Of those, runs where its VIF is undefined.
    pub undefined: usize,
    /// Median, smallest and largest defined VIF; `None` when none is defined.
    pub median: Option<f64>,
    pub min: Option<f64>,
    pub max: Option<f64>,
}

/// One participant's VIFs of one regressor in one GLM over their runs.
#[derive(Debug, Clone, PartialEq)]
pub struct ParticipantVifs {
    pub glm: String,
    pub subject: String,
    pub regressor: String,
    /// The participant's runs that have the regressor.
    pub runs: usize,
    /// The largest defined VIF over those runs.
    pub worst: Option<f64>,
    /// Runs where the VIF is undefined.
    pub undefined_runs: Vec<String>,
}

/// Per GLM and regressor of interest (in order of first appearance), its VIFs over all
/// runs.
pub fn over_runs(digests: &[RunDigest]) -> Vec<RegressorVifs> {
    let mut order: Vec<(&str, &str)> = Vec::new();
    let mut values: HashMap<(&str, &str), (Vec<f64>, usize)> = HashMap::new();
    for digest in digests {
        for glm in &digest.glms {
            for (name, vif) in &glm.vifs {
                let key = (glm.glm.as_str(), name.as_str());
                let entry = values.entry(key).or_insert_with(|| {
                    order.push(key);
                    (Vec::new(), 0)
                });
                match vif {
                    Some(v) if v.is_finite() => entry.0.push(*v),
                    _ => entry.1 += 1,
                }
            }
        }
    }
    order
        .into_iter()
        .map(|key| {
            let (defined, undefined) = values.remove(&key).unwrap_or_default();
            let defined = quantile::sorted(defined);
            RegressorVifs {
                glm: key.0.to_string(),
                regressor: key.1.to_string(),
                runs: defined.len() + undefined,
                undefined,
                median: quantile::median(&defined),
                min: defined.first().copied(),
                max: defined.last().copied(),
            }
        })
        .collect()
}

/// Per GLM, regressor of interest and participant (GLMs and regressors, then
/// participants, each in order of first appearance), the participant's VIFs over their
/// runs.
pub fn per_participant(digests: &[RunDigest]) -> Vec<ParticipantVifs> {
    let mut rows: Vec<(&str, &str)> = Vec::new();
    let mut subjects: Vec<&str> = Vec::new();
    let mut seen: HashSet<&str> = HashSet::new();
    let mut cells: HashMap<(&str, &str, &str), ParticipantVifs> = HashMap::new();
    for digest in digests {
        if seen.insert(&digest.subject) {
            subjects.push(&digest.subject);
        }
        for glm in &digest.glms {
            for (name, vif) in &glm.vifs {
                let row = (glm.glm.as_str(), name.as_str());
                if !rows.contains(&row) {
                    rows.push(row);
                }
                let cell = cells
                    .entry((row.0, row.1, digest.subject.as_str()))
                    .or_insert_with(|| ParticipantVifs {
                        glm: glm.glm.clone(),
                        subject: digest.subject.clone(),
                        regressor: name.clone(),
                        runs: 0,
                        worst: None,
                        undefined_runs: Vec::new(),
                    });
                cell.runs += 1;
                match vif {
                    Some(v) if v.is_finite() && *v > 0.0 => {
                        cell.worst = Some(cell.worst.map_or(*v, |w| w.max(*v)));
                    }
                    _ => cell.undefined_runs.push(digest.run.clone()),
                }
            }
        }
    }
    let mut result = Vec::new();
    for (glm, regressor) in &rows {
        for subject in &subjects {
            if let Some(cell) = cells.remove(&(*glm, *regressor, *subject)) {
                result.push(cell);
            }
        }
    }
    result
}
