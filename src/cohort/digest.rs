//! What the cohort views need of a run, kept for every run while the full run reports
//! are written out and dropped one by one. `check` makes it from each run report as it
//! is checked, `merge` from the typed pieces of each shard's runs, the same way.

use crate::design::Regressor;
use crate::diagnose::RegressorPartition;
use crate::screen::Status;

#[derive(Debug, Clone, PartialEq)]
pub struct RunDigest {
    pub subject: String,
    pub run: String,
    pub status: Status,
    /// (regressor, VIF) of every regressor of interest; `None` where the VIF is undefined.
    pub vifs: Vec<(String, Option<f64>)>,
    pub largest_condition_index: Option<f64>,
    /// (modulator, other model, share) for every share of a modulator with another model.
    pub shared: Vec<(String, String, f64)>,
    /// The partition without its commonality components.
    pub partition: Vec<RegressorPartition>,
}

impl RunDigest {
    /// The digest of a run: `regressors` and `vif` are aligned; `condition_indices`
    /// ascend (the last is the largest).
    pub fn new<'r>(
        subject: &str,
        run: &str,
        status: Status,
        regressors: impl Iterator<Item = &'r Regressor>,
        vif: &[Option<f64>],
        condition_indices: &[f64],
        partition: &[RegressorPartition],
    ) -> Self {
        RunDigest {
            subject: subject.to_string(),
            run: run.to_string(),
            status,
            vifs: regressors
                .zip(vif)
                .filter(|(r, _)| r.kind.of_interest())
                .map(|(r, v)| (r.name.clone(), *v))
                .collect(),
            largest_condition_index: condition_indices.last().copied(),
            shared: partition
                .iter()
                .flat_map(|p| {
                    p.shared_with_other_models()
                        .map(|g| (p.regressor.clone(), g.group.clone(), g.share))
                })
                .collect(),
            partition: partition
                .iter()
                .map(|p| RegressorPartition {
                    components: Vec::new(),
                    ..p.clone()
                })
                .collect(),
        }
    }
}
