//! Each participant summarised over their runs: the worst VIF and where it sits, the
//! largest condition index, the largest share held with another model, and the worst
//! status with the runs that reach it.

use serde::{Deserialize, Serialize};

#[cfg(test)]
use super::GlmDigest;
use super::RunDigest;
use crate::screen::Status;

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SubjectSummary {
    pub subject: String,
    /// Largest VIF among onset and modulator regressors over all the participant's runs.
    pub worst_vif: Option<f64>,
    pub worst_regressor: Option<String>,
    /// Run holding the worst VIF.
    pub worst_run: Option<String>,
    /// GLM holding the worst VIF.
    pub worst_glm: Option<String>,
    /// Largest condition index of the filtered design over the participant's runs.
    pub worst_condition_index: Option<f64>,
    /// Largest share of a modulator's variance shared with another model, over runs.
    pub largest_shared: Option<SharedShare>,
    pub status: Status,
    /// Runs whose status equals the participant's (when not ok).
    pub runs_flagged: Vec<String>,
}

/// A modulator's variance shared with another model.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SharedShare {
    pub regressor: String,
    pub model: String,
    pub share: f64,
    pub run: String,
}

/// One summary per participant, in order of first appearance.
pub fn summarise_subjects(runs: &[RunDigest]) -> Vec<SubjectSummary> {
    let mut subjects: Vec<SubjectSummary> = Vec::new();
    // Index by label: linear in the number of runs, in the order subjects first appear.
    let mut index_of: std::collections::HashMap<&str, usize> = std::collections::HashMap::new();
    for run in runs {
        let index = match index_of.get(run.subject.as_str()) {
            Some(&i) => i,
            None => {
                index_of.insert(&run.subject, subjects.len());
                subjects.push(SubjectSummary {
                    subject: run.subject.to_string(),
                    worst_vif: None,
                    worst_regressor: None,
                    worst_run: None,
                    worst_glm: None,
                    worst_condition_index: None,
                    largest_shared: None,
                    status: Status::Ok,
                    runs_flagged: Vec::new(),
                });
                subjects.len() - 1
            }
        };
        let summary = &mut subjects[index];
        for glm in &run.glms {
            for (name, vif) in glm.vifs.iter().filter_map(|(n, v)| v.map(|v| (n, v))) {
                if summary.worst_vif.is_none_or(|worst| vif > worst) {
                    summary.worst_vif = Some(vif);
                    summary.worst_regressor = Some(name.clone());
                    summary.worst_run = Some(run.run.clone());
                    summary.worst_glm = Some(glm.glm.clone());
                }
            }
            if let Some(index) = glm.largest_condition_index {
                if summary
                    .worst_condition_index
                    .is_none_or(|worst| index > worst)
                {
                    summary.worst_condition_index = Some(index);
                }
            }
        }
        for (regressor, model, share) in &run.shared {
            let share = *share;
            if summary
                .largest_shared
                .as_ref()
                .is_none_or(|s| share > s.share)
            {
                summary.largest_shared = Some(SharedShare {
                    regressor: regressor.clone(),
                    model: model.clone(),
                    share,
                    run: run.run.clone(),
                });
            }
        }
        let status = run.status();
        if status > summary.status {
            summary.status = status;
            summary.runs_flagged.clear();
        }
        if status == summary.status && status != Status::Ok {
            summary.runs_flagged.push(run.run.clone());
        }
    }
    subjects
}

#[cfg(test)]
mod tests {
    use super::*;

    fn digest(subject: &str, run: &str, status: Status, vifs: Vec<(&str, f64)>) -> RunDigest {
        let largest = vifs
            .iter()
            .map(|v| v.1)
            .fold(None, |m: Option<f64>, v| Some(m.map_or(v, |m| m.max(v))));
        RunDigest {
            subject: subject.into(),
            run: run.into(),
            glms: vec![GlmDigest {
                glm: "joint".into(),
                status,
                vifs: vifs
                    .into_iter()
                    .map(|(n, v)| (n.to_string(), Some(v)))
                    .collect(),
                largest_condition_index: largest,
            }],
            shared: vec![("a".into(), "m".into(), 0.5)],
            partition: Vec::new(),
            separations: Vec::new(),
        }
    }

    #[test]
    fn subjects_take_their_worst_run() {
        let runs = [
            digest("01", "1", Status::Caution, vec![("a", 6.0)]),
            digest("01", "2", Status::Severe, vec![("a", 12.0), ("b", 2.0)]),
            digest("01", "3", Status::Severe, vec![("b", 11.0)]),
            digest("02", "1", Status::Ok, vec![]),
        ];
        let summary = summarise_subjects(&runs);
        assert_eq!(summary.len(), 2);
        assert_eq!(summary[0].worst_vif, Some(12.0));
        assert_eq!(summary[0].worst_regressor.as_deref(), Some("a"));
        assert_eq!(summary[0].worst_run.as_deref(), Some("2"));
        assert_eq!(summary[0].worst_glm.as_deref(), Some("joint"));
        assert_eq!(summary[0].status, Status::Severe);
        assert_eq!(summary[0].runs_flagged, ["2", "3"]);
        assert_eq!(summary[0].worst_condition_index, Some(12.0));
        assert_eq!(
            summary[0].largest_shared.as_ref().map(|s| s.run.as_str()),
            Some("1")
        );
        assert_eq!(summary[1].worst_vif, None);
        assert_eq!(summary[1].status, Status::Ok);
    }
}
