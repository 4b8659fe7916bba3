//! The models' separation across the cohort: for each ordered pair of models (A, B) and
//! each modulator of A, each participant's mean over runs of its partial R² on B's
//! modulators and of its trial-level correlation with B's corresponding modulator, then
//! the median and range over participants (as the cohort partition summarises shares).

use std::collections::HashMap;

use serde::{Deserialize, Serialize};

use super::RunDigest;
use crate::quantile;

/// Median and range over participants of participant means; `null` when no
/// participant has a defined value.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Range {
    pub median: Option<f64>,
    pub min: Option<f64>,
    pub max: Option<f64>,
}

impl Range {
    fn of(values: Vec<f64>) -> Self {
        let sorted = quantile::sorted(values);
        Range {
            median: quantile::median(&sorted),
            min: sorted.first().copied(),
            max: sorted.last().copied(),
        }
    }
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SeparationSummary {
    /// [A, B]: A's modulator measured against B's.
    pub models: [String; 2],
    pub regressor: String,
    /// Participants with a defined partial R² in at least one run.
    pub participants: usize,
    pub partial_r2: Range,
    pub trial_correlation: Range,
}

/// One participant's mean over runs of one modulator's separation from one model.
#[derive(Debug, Clone, PartialEq)]
pub struct ParticipantSeparation {
    pub models: [String; 2],
    pub regressor: String,
    pub subject: String,
    pub partial_r2: Option<f64>,
    pub trial_correlation: Option<f64>,
}

/// Per (A, B, modulator) in order of first appearance, each participant's means (in
/// order of appearance), and the summary over participants.
pub fn summarise(digests: &[RunDigest]) -> (Vec<SeparationSummary>, Vec<ParticipantSeparation>) {
    type Key = ([String; 2], String);
    /// A participant's sums and counts of the partial R² and the trial correlation.
    type Sums = (String, [f64; 2], [usize; 2]);
    let mut order: Vec<Key> = Vec::new();
    let mut sums: HashMap<Key, Vec<Sums>> = HashMap::new();
    for digest in digests {
        for s in &digest.separations {
            let key = (s.models.clone(), s.regressor.clone());
            let participants = sums.entry(key.clone()).or_insert_with(|| {
                order.push(key);
                Vec::new()
            });
            if participants.last().is_none_or(|p| p.0 != digest.subject) {
                participants.push((digest.subject.clone(), [0.0; 2], [0; 2]));
            }
            let Some(entry) = participants.last_mut() else {
                continue;
            };
            for (slot, value) in [s.partial_r2, s.trial_correlation].into_iter().enumerate() {
                if let Some(v) = value {
                    entry.1[slot] += v;
                    entry.2[slot] += 1;
                }
            }
        }
    }
    let mut summaries = Vec::new();
    let mut per_participant = Vec::new();
    for key in order {
        let participants = sums.remove(&key).unwrap_or_default();
        let mean = |p: &Sums, slot: usize| (p.2[slot] > 0).then(|| p.1[slot] / p.2[slot] as f64);
        let means = |slot: usize| -> Vec<f64> {
            participants.iter().filter_map(|p| mean(p, slot)).collect()
        };
        let partial = means(0);
        for p in &participants {
            per_participant.push(ParticipantSeparation {
                models: key.0.clone(),
                regressor: key.1.clone(),
                subject: p.0.clone(),
                partial_r2: mean(p, 0),
                trial_correlation: mean(p, 1),
            });
        }
        summaries.push(SeparationSummary {
            participants: partial.len(),
            partial_r2: Range::of(partial),
            trial_correlation: Range::of(means(1)),
            models: key.0,
            regressor: key.1,
        });
    }
    (summaries, per_participant)
}
