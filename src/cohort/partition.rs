//! The partition across participants: each participant's mean over their runs of every
//! modulator's own share and shared shares, and the distribution of those means over
//! the cohort (median and range).

use std::collections::HashMap;

use serde::{Deserialize, Serialize};

use crate::diagnose::partition::RegressorPartition;
use crate::quantile;

/// `unique`, or the group shared with (a model's name, `task`, `nuisance`).
pub const UNIQUE: &str = "unique";

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ParticipantShare {
    pub subject: String,
    pub regressor: String,
    /// The regressor's own model.
    pub model: Option<String>,
    pub part: String,
    /// Runs in which the share is defined.
    pub runs: usize,
    pub mean: f64,
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CohortShare {
    pub regressor: String,
    pub part: String,
    pub participants: usize,
    pub median: f64,
    pub min: f64,
    pub max: f64,
}

/// `runs`: (participant, the run's partitions), in report order. The result keeps the
/// order in which participants, regressors and parts first appear.
pub fn participant_means(runs: &[(&str, &[RegressorPartition])]) -> Vec<ParticipantShare> {
    // An index by (subject, regressor, part) keeps this linear in the number of runs;
    // `sums` keeps the order of first appearance.
    let mut sums: Vec<(ParticipantShare, f64)> = Vec::new();
    let mut index: HashMap<(String, String, String), usize> = HashMap::new();
    let mut add = |subject: &str, partition: &RegressorPartition, part: &str, value: f64| {
        let key = (
            subject.to_string(),
            partition.regressor.clone(),
            part.to_string(),
        );
        match index.get(&key) {
            Some(&at) => {
                let (share, total) = &mut sums[at];
                share.runs += 1;
                *total += value;
            }
            None => {
                index.insert(key, sums.len());
                sums.push((
                    ParticipantShare {
                        subject: subject.to_string(),
                        regressor: partition.regressor.clone(),
                        model: partition.model.clone(),
                        part: part.to_string(),
                        runs: 1,
                        mean: 0.0,
                    },
                    value,
                ));
            }
        }
    };
    for (subject, partitions) in runs {
        for partition in partitions.iter() {
            if let Some(unique) = partition.unique {
                add(subject, partition, UNIQUE, unique);
            }
            for share in &partition.shared_with {
                add(subject, partition, &share.group, share.share);
            }
        }
    }
    sums.into_iter()
        .map(|(mut share, total)| {
            share.mean = total / share.runs as f64;
            share
        })
        .collect()
}

/// Median and range over participants, per (regressor, part).
pub fn summarise(means: &[ParticipantShare]) -> Vec<CohortShare> {
    // One pass groups the values by key, in the order keys first appear.
    let mut keys: Vec<(&str, &str)> = Vec::new();
    let mut values_of: Vec<Vec<f64>> = Vec::new();
    let mut index: HashMap<(&str, &str), usize> = HashMap::new();
    for share in means {
        let key = (share.regressor.as_str(), share.part.as_str());
        let at = *index.entry(key).or_insert_with(|| {
            keys.push(key);
            values_of.push(Vec::new());
            keys.len() - 1
        });
        values_of[at].push(share.mean);
    }
    keys.into_iter()
        .zip(values_of)
        .map(|((regressor, part), mut values)| {
            values.sort_by(f64::total_cmp);
            CohortShare {
                regressor: regressor.to_string(),
                part: part.to_string(),
                participants: values.len(),
                median: quantile::median(&values).unwrap_or(values[0]),
                min: values[0],
                max: values[values.len() - 1],
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diagnose::partition::GroupShare;

    fn run(unique: f64, shared: f64) -> Vec<RegressorPartition> {
        vec![RegressorPartition {
            regressor: "a:pe".into(),
            model: Some("a".into()),
            r2: Some(1.0 - unique),
            unique: Some(unique),
            components: Vec::new(),
            shared_with: vec![GroupShare {
                group: "b".into(),
                share: shared,
            }],
        }]
    }

    #[test]
    fn participants_are_averaged_over_runs_then_summarised() {
        let (r1, r2, r3, r4) = (run(0.2, 0.7), run(0.4, 0.5), run(0.9, 0.1), run(0.5, 0.3));
        let runs: Vec<(&str, &[RegressorPartition])> =
            vec![("01", &r1), ("01", &r2), ("02", &r3), ("03", &r4)];
        let means = participant_means(&runs);
        assert_eq!(means.len(), 6);
        assert_eq!((means[0].subject.as_str(), means[0].runs), ("01", 2));
        assert!((means[0].mean - 0.3).abs() < 1e-15);
        let summary = summarise(&means);
        assert_eq!(summary.len(), 2);
        let unique = &summary[0];
        assert_eq!((unique.part.as_str(), unique.participants), (UNIQUE, 3));
        // Participant means: 0.3, 0.9, 0.5 → median 0.5, range 0.3–0.9.
        assert!(
            (unique.median - 0.5).abs() < 1e-15
                && (unique.min - 0.3).abs() < 1e-15
                && unique.max == 0.9
        );
        assert_eq!(summary[1].part, "b");
    }
}
