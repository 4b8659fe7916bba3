//! One GLM's design taken from the design with every model: the same columns (each
//! regressor is built, whitened and filtered on its own, so taking a subset changes
//! none of them), the GLM's models' modulators only.

use super::Design;
use crate::study::GlmSpec;

impl Design {
    /// The design of `glm`: every onset, task modulator, derivative and nuisance
    /// regressor, and the modulators (with their derivatives) of the GLM's models, in
    /// the order of this design. Flags naming a regressor the GLM leaves out are dropped.
    pub fn for_glm(&self, glm: &GlmSpec) -> Design {
        let keep: Vec<bool> = self
            .regressors
            .iter()
            .map(|r| r.model.as_deref().is_none_or(|m| glm.holds(m)))
            .collect();
        let mut new_index = vec![None; keep.len()];
        let mut count = 0;
        for (index, &kept) in keep.iter().enumerate() {
            if kept {
                new_index[index] = Some(count);
                count += 1;
            }
        }
        let pick = |values: &[Vec<f64>]| -> Vec<Vec<f64>> {
            values
                .iter()
                .zip(&keep)
                .filter(|(_, k)| **k)
                .map(|(v, _)| v.clone())
                .collect()
        };
        let left_out: Vec<&str> = self
            .regressors
            .iter()
            .zip(&keep)
            .filter(|(_, k)| !**k)
            .map(|(r, _)| r.name.as_str())
            .collect();
        Design {
            subject: self.subject.clone(),
            run: self.run.clone(),
            session: self.session.clone(),
            scans: self.scans,
            regressors: self
                .regressors
                .iter()
                .zip(&keep)
                .filter(|(_, k)| **k)
                .map(|(r, _)| r.clone())
                .collect(),
            sampled: pick(&self.sampled),
            filtered: pick(&self.filtered),
            included: self
                .included
                .iter()
                .zip(&keep)
                .filter(|(_, k)| **k)
                .map(|(i, _)| *i)
                .collect(),
            drift: self.drift.clone(),
            noise: self.noise,
            trial_values: self
                .trial_values
                .iter()
                .filter_map(|t| {
                    new_index[t.regressor].map(|regressor| super::TrialValues {
                        regressor,
                        ..t.clone()
                    })
                })
                .collect(),
            events: self.events.clone(),
            flags: self
                .flags
                .iter()
                .filter(|f| !f.regressors.iter().any(|r| left_out.contains(&r.as_str())))
                .cloned()
                .collect(),
        }
    }
}
