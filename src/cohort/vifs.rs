//! The VIFs of each regressor of interest across the cohort: over every run (for the
//! methods paragraph), and per participant (the worst over their runs, for the
//! overview figure). An undefined VIF (an exact dependency, a regressor left out) is
//! counted, never averaged.

use std::collections::HashMap;

use super::RunDigest;
use crate::quantile;

/// One regressor's VIFs over every run that has it.
#[derive(Debug, Clone, PartialEq)]
pub struct RegressorVifs {
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

/// One participant's VIFs of one regressor over their runs.
#[derive(Debug, Clone, PartialEq)]
pub struct ParticipantVifs {
    pub subject: String,
    pub regressor: String,
    /// The participant's runs that have the regressor.
    pub runs: usize,
    /// The largest defined VIF over those runs.
    pub worst: Option<f64>,
    /// Runs where the VIF is undefined.
    pub undefined_runs: Vec<String>,
}

/// Per regressor of interest (in order of first appearance), its VIFs over all runs.
pub fn over_runs(digests: &[RunDigest]) -> Vec<RegressorVifs> {
    let mut order: Vec<&str> = Vec::new();
    let mut values: HashMap<&str, (Vec<f64>, usize)> = HashMap::new();
    for digest in digests {
        for (name, vif) in &digest.vifs {
            let entry = values.entry(name.as_str()).or_insert_with(|| {
                order.push(name);
                (Vec::new(), 0)
            });
            match vif {
                Some(v) if v.is_finite() => entry.0.push(*v),
                _ => entry.1 += 1,
            }
        }
    }
    order
        .into_iter()
        .map(|name| {
            let (defined, undefined) = values.remove(name).unwrap_or_default();
            let defined = quantile::sorted(defined);
            RegressorVifs {
                regressor: name.to_string(),
                runs: defined.len() + undefined,
                undefined,
                median: quantile::median(&defined),
                min: defined.first().copied(),
                max: defined.last().copied(),
            }
        })
        .collect()
}

/// Per regressor of interest and participant (regressors, then participants, each in
/// order of first appearance), the participant's VIFs over their runs.
pub fn per_participant(digests: &[RunDigest]) -> Vec<ParticipantVifs> {
    let mut regressors: Vec<&str> = Vec::new();
    let mut subjects: Vec<&str> = Vec::new();
    let mut seen: std::collections::HashSet<&str> = std::collections::HashSet::new();
    let mut cells: HashMap<(&str, &str), ParticipantVifs> = HashMap::new();
    for digest in digests {
        if seen.insert(&digest.subject) {
            subjects.push(&digest.subject);
        }
        for (name, vif) in &digest.vifs {
            if !regressors.contains(&name.as_str()) {
                regressors.push(name);
            }
            let cell = cells
                .entry((name.as_str(), digest.subject.as_str()))
                .or_insert_with(|| ParticipantVifs {
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
    let mut result = Vec::new();
    for regressor in &regressors {
        for subject in &subjects {
            if let Some(cell) = cells.remove(&(*regressor, *subject)) {
                result.push(cell);
            }
        }
    }
    result
}
