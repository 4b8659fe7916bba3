//! Screening: turns a run's numbers into flags against the study's thresholds, and
//! the runs of each participant into one status.
//!
//! The VIF thresholds are common-practice rules of thumb (5: look closer; 10: act),
//! not laws: a VIF says how much a regressor's variance is inflated, not whether an
//! effect can be found (O'Brien 2007). Statuses follow the lab's settings.

use serde::{Deserialize, Serialize};

use crate::design::{Design, Regressor, RegressorKind};
use crate::diagnose::{Diagnostics, most_correlated};
use crate::flags::{Flag, FlagCode, Severity};
use crate::study::Thresholds;

#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Status {
    Ok,
    Caution,
    Severe,
}

impl Status {
    pub fn label(self) -> &'static str {
        match self {
            Status::Ok => "ok",
            Status::Caution => "caution",
            Status::Severe => "severe",
        }
    }

    fn of(severity: Severity) -> Status {
        match severity {
            Severity::Note | Severity::Warning => Status::Ok,
            Severity::Caution => Status::Caution,
            Severity::Severe | Severity::Error => Status::Severe,
        }
    }
}

/// Above this VIF a regressor is a combination of others up to rounding of the input.
const NEAR_EXACT_VIF: f64 = 1e6;

/// The status a single VIF earns against the thresholds.
pub fn vif_status(vif: Option<f64>, thresholds: &Thresholds) -> Status {
    match vif {
        Some(v) if v >= thresholds.vif_severe => Status::Severe,
        Some(v) if v >= thresholds.vif_caution => Status::Caution,
        _ => Status::Ok,
    }
}

/// Flags for VIFs above the thresholds on regressors of interest.
pub fn vif_flags(design: &Design, diagnostics: &Diagnostics, thresholds: &Thresholds) -> Vec<Flag> {
    let mut flags = Vec::new();
    for (index, regressor) in design.regressors.iter().enumerate() {
        if !regressor.kind.of_interest() && regressor.kind != RegressorKind::Derivative {
            continue;
        }
        let Some(vif) = diagnostics.vif[index] else {
            continue;
        };
        let (severity, code, limit) = match vif_status(Some(vif), thresholds) {
            Status::Severe => (Severity::Severe, FlagCode::VifSevere, thresholds.vif_severe),
            Status::Caution => (
                Severity::Caution,
                FlagCode::VifCaution,
                thresholds.vif_caution,
            ),
            Status::Ok => continue,
        };
        // Derivatives are reported but do not set a status: they absorb timing, not a hypothesis.
        let severity = if regressor.kind == RegressorKind::Derivative {
            Severity::Note
        } else {
            severity
        };
        let mut message = format!(
            "{} has VIF {:.1} (threshold {limit}): its variance is {:.1}× and its standard error {:.2}× what they would be without overlap",
            regressor.name,
            vif,
            vif,
            vif.sqrt()
        );
        if vif >= NEAR_EXACT_VIF {
            message.push_str(
                "; it is almost exactly a linear combination of other regressors (is one modulator a sum or difference of others, with rounding in the exported table?)",
            );
        }
        let mut involved = vec![regressor.name.clone()];
        if let Some((other, r)) = most_correlated(&diagnostics.correlation, index) {
            let other = design.regressors[other].name.clone();
            message.push_str(&format!("; most correlated with {other} (r = {r:.2})"));
            involved.push(other);
        }
        flags.push(Flag::new(severity, code, involved, message));
    }
    flags
}

/// A direction of the design along which two or more regressors are nearly dependent:
/// condition index at or above the threshold, and at least two regressors with
/// variance-decomposition proportions ≥ 0.5 on it (Belsley, Kuh & Welsch 1980).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EntangledDimension {
    /// 1-based, in the order of `condition_indices`.
    pub dimension: usize,
    pub condition_index: f64,
    pub regressors: Vec<String>,
    pub proportions: Vec<f64>,
}

/// Proportion at which a regressor counts as loading on a dimension (BKW 1980).
pub const LOADING: f64 = 0.5;

pub fn entangled_dimensions(
    design: &Design,
    diagnostics: &Diagnostics,
    thresholds: &Thresholds,
) -> Vec<EntangledDimension> {
    let conditioning = &diagnostics.conditioning;
    let mut result = Vec::new();
    for (k, (&index, row)) in conditioning
        .condition_indices
        .iter()
        .zip(&conditioning.variance_proportions)
        .enumerate()
    {
        if index < thresholds.condition_index {
            continue;
        }
        let loading: Vec<(usize, f64)> = row
            .iter()
            .enumerate()
            .filter_map(|(j, p)| p.filter(|&p| p >= LOADING).map(|p| (j, p)))
            .collect();
        if loading.len() < 2 {
            continue;
        }
        result.push(EntangledDimension {
            dimension: k + 1,
            condition_index: index,
            regressors: loading
                .iter()
                .map(|&(j, _)| design.regressors[j].name.clone())
                .collect(),
            proportions: loading.iter().map(|&(_, p)| p).collect(),
        });
    }
    result
}

/// How much an entangled dimension matters: a note when none of its regressors is of
/// interest, severe from `condition_index_severe` on, a caution below.
pub fn dimension_severity(
    dimension: &EntangledDimension,
    regressors: &[Regressor],
    thresholds: &Thresholds,
) -> Severity {
    let of_interest = dimension.regressors.iter().any(|name| {
        regressors
            .iter()
            .any(|r| &r.name == name && r.kind.of_interest())
    });
    match (
        of_interest,
        dimension.condition_index >= thresholds.condition_index_severe,
    ) {
        (false, _) => Severity::Note,
        (true, true) => Severity::Severe,
        (true, false) => Severity::Caution,
    }
}

/// One flag per entangled dimension; a note when none of its regressors is of interest.
pub fn entanglement_flags(
    design: &Design,
    dimensions: &[EntangledDimension],
    thresholds: &Thresholds,
) -> Vec<Flag> {
    dimensions
        .iter()
        .map(|dimension| {
            let severity = dimension_severity(dimension, &design.regressors, thresholds);
            let members: Vec<String> = dimension
                .regressors
                .iter()
                .zip(&dimension.proportions)
                .map(|(name, p)| format!("{name} ({p:.2})"))
                .collect();
            Flag::new(
                severity,
                FlagCode::NearDependency,
                dimension.regressors.clone(),
                format!(
                    "near-dependency (condition index {:.1}, threshold {}): {} have most of their variance on one direction of the design, so their separate estimates are unstable",
                    dimension.condition_index,
                    thresholds.condition_index,
                    members.join(", ")
                ),
            )
        })
        .collect()
}

/// Plain words said by every report in which a model comparison would not be supported.
pub const CLAIMS_NOTE: &str = "Where a modulator shares more of its variance with another model than it keeps for itself, the data cannot show which of the two models the brain follows: the two betas, t-maps or explained variances are estimated from largely the same part of the signal, so whichever model 'wins' may win on noise in the small part that is its own. Instead: compare the models on behaviour first; compare whole GLMs on held-out data (e.g. cross-validated across runs); change the task so the models disagree (forecast the design before scanning); and report the shared share beside any model comparison.";

/// One warning per modulator and other model whose shared variance exceeds the
/// modulator's own share `shared_over_unique` times.
pub fn claim_flags(
    design: &Design,
    diagnostics: &Diagnostics,
    thresholds: &Thresholds,
) -> Vec<Flag> {
    let mut flags = Vec::new();
    for partition in &diagnostics.partition {
        let Some(unique) = partition.unique else {
            continue;
        };
        let own_model = partition.model.clone();
        for share in &partition.shared_with {
            let is_other_model = design
                .regressors
                .iter()
                .any(|r| r.model.as_deref() == Some(share.group.as_str()))
                && own_model.as_deref() != Some(share.group.as_str());
            if !is_other_model || share.share <= thresholds.shared_over_unique * unique {
                continue;
            }
            let own = own_model.as_deref().unwrap_or("its model");
            flags.push(Flag::new(
                Severity::Warning,
                FlagCode::SharedExceedsUnique,
                vec![partition.regressor.clone()],
                format!(
                    "{} shares {:.0}% of its variance with model {} and keeps only {:.0}% for itself: comparing {own} and {} on this regressor (betas, t-maps, explained variance) cannot show which model the signal follows",
                    partition.regressor,
                    100.0 * share.share,
                    share.group,
                    100.0 * unique,
                    share.group
                ),
            ));
        }
    }
    flags
}

/// The worst status any flag earns.
pub fn run_status(flags: &[Flag]) -> Status {
    flags
        .iter()
        .map(|f| Status::of(f.severity))
        .max()
        .unwrap_or(Status::Ok)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thresholds_are_inclusive_lower_bounds() {
        let t = Thresholds::default();
        assert_eq!(vif_status(Some(4.99), &t), Status::Ok);
        assert_eq!(vif_status(Some(5.0), &t), Status::Caution);
        assert_eq!(vif_status(Some(10.0), &t), Status::Severe);
        assert_eq!(vif_status(None, &t), Status::Ok);
    }
}
