//! The cohort view of the partition: for every modulator, the distribution over
//! participants of its unique share and of what it shares with each group. A
//! participant's value is the mean over their runs where it is defined.

use serde::Serialize;

use super::RegressorPartition;

#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CohortShare {
    pub regressor: String,
    /// `unique`, or the group shared with (a model's name, `task`, `nuisance`).
    pub part: String,
    pub participants: usize,
    pub median: f64,
    pub min: f64,
    pub max: f64,
}

/// `runs`: (participant, the run's partitions), in report order.
pub fn summarise(runs: &[(&str, &[RegressorPartition])]) -> Vec<CohortShare> {
    // (regressor, part) in first-seen order, then per participant the values of their runs.
    let mut keys: Vec<(String, String)> = Vec::new();
    let mut values: Vec<Vec<(String, Vec<f64>)>> = Vec::new();
    let mut add = |regressor: &str, part: &str, subject: &str, value: f64| {
        let key = (regressor.to_string(), part.to_string());
        let index = keys.iter().position(|k| *k == key).unwrap_or_else(|| {
            keys.push(key);
            values.push(Vec::new());
            keys.len() - 1
        });
        match values[index].iter_mut().find(|(s, _)| s == subject) {
            Some((_, list)) => list.push(value),
            None => values[index].push((subject.to_string(), vec![value])),
        }
    };
    for (subject, partitions) in runs {
        for partition in partitions.iter() {
            if let Some(unique) = partition.unique {
                add(&partition.regressor, "unique", subject, unique);
            }
            for share in &partition.shared_with {
                add(&partition.regressor, &share.group, subject, share.share);
            }
        }
    }
    keys.into_iter()
        .zip(values)
        .map(|((regressor, part), by_subject)| {
            let mut means: Vec<f64> = by_subject
                .iter()
                .map(|(_, v)| v.iter().sum::<f64>() / v.len() as f64)
                .collect();
            means.sort_by(f64::total_cmp);
            CohortShare {
                regressor,
                part,
                participants: means.len(),
                median: median(&means),
                min: means[0],
                max: means[means.len() - 1],
            }
        })
        .collect()
}

/// Median of sorted, non-empty values.
fn median(sorted: &[f64]) -> f64 {
    let n = sorted.len();
    if n % 2 == 1 {
        sorted[n / 2]
    } else {
        (sorted[n / 2 - 1] + sorted[n / 2]) / 2.0
    }
}

#[cfg(test)]
mod tests {
    use super::super::GroupShare;
    use super::*;

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
        let summary = summarise(&runs);
        assert_eq!(summary.len(), 2);
        let unique = &summary[0];
        assert_eq!((unique.part.as_str(), unique.participants), ("unique", 3));
        // Participant means: 0.3, 0.9, 0.5 → median 0.5, range 0.3–0.9.
        assert!(
            (unique.median - 0.5).abs() < 1e-15
                && (unique.min - 0.3).abs() < 1e-15
                && unique.max == 0.9
        );
        assert_eq!(summary[1].part, "b");
    }
}
