//! What the cohort views need of a run, kept for every run while the full run reports
//! are written out and dropped one by one. `check` makes it from each run as it is
//! assessed, `merge` from the typed pieces of each shard's entries, the same way.

use crate::design::Regressor;
use crate::diagnose::{ModelSeparation, RegressorPartition};
use crate::screen::Status;

/// A run over all its GLMs.
#[derive(Debug, Clone, PartialEq)]
pub struct RunDigest {
    pub subject: String,
    pub run: String,
    /// One per GLM, in the settings' order.
    pub glms: Vec<GlmDigest>,
    /// (modulator, other model, share) for every share of a modulator with another
    /// model, in the design with every model.
    pub shared: Vec<(String, String, f64)>,
    /// Each modulator's partition in the design with every model, without components.
    pub partition: Vec<RegressorPartition>,
    /// Each modulator's separation from each other model.
    pub separations: Vec<SeparationDigest>,
}

/// One GLM of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct GlmDigest {
    pub glm: String,
    pub status: Status,
    /// (regressor, VIF) of every regressor of interest; `None` where the VIF is undefined.
    pub vifs: Vec<(String, Option<f64>)>,
    pub largest_condition_index: Option<f64>,
}

/// One modulator of model A against model B.
#[derive(Debug, Clone, PartialEq)]
pub struct SeparationDigest {
    pub models: [String; 2],
    pub regressor: String,
    pub partial_r2: Option<f64>,
    pub trial_correlation: Option<f64>,
}

impl GlmDigest {
    /// The digest of one GLM's report: `regressors` and `vif` are aligned;
    /// `condition_indices` ascend (the last is the largest).
    pub fn new<'r>(
        glm: &str,
        status: Status,
        regressors: impl Iterator<Item = &'r Regressor>,
        vif: &[Option<f64>],
        condition_indices: &[f64],
    ) -> Self {
        GlmDigest {
            glm: glm.to_string(),
            status,
            vifs: regressors
                .zip(vif)
                .filter(|(r, _)| r.kind.of_interest())
                .map(|(r, v)| (r.name.clone(), *v))
                .collect(),
            largest_condition_index: condition_indices.last().copied(),
        }
    }
}

impl RunDigest {
    pub fn new<'s>(
        subject: &str,
        run: &str,
        glms: Vec<GlmDigest>,
        partition: impl Iterator<Item = RegressorPartition>,
        separations: impl Iterator<Item = &'s ModelSeparation>,
    ) -> Self {
        let partition: Vec<RegressorPartition> = partition
            .map(|p| RegressorPartition {
                components: Vec::new(),
                ..p
            })
            .collect();
        RunDigest {
            subject: subject.to_string(),
            run: run.to_string(),
            glms,
            shared: partition
                .iter()
                .flat_map(|p| {
                    p.shared_with_other_models()
                        .map(|g| (p.regressor.clone(), g.group.clone(), g.share))
                })
                .collect(),
            partition,
            separations: separations
                .flat_map(|s| {
                    s.modulators.iter().map(|m| SeparationDigest {
                        models: s.models.clone(),
                        regressor: m.regressor.clone(),
                        partial_r2: m.partial_r2,
                        trial_correlation: m.trial_correlation,
                    })
                })
                .collect(),
        }
    }

    /// The run's status: the worst over its GLMs.
    pub fn status(&self) -> Status {
        self.glms
            .iter()
            .map(|g| g.status)
            .max()
            .unwrap_or(Status::Ok)
    }
}
