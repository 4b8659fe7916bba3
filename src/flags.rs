//! Screening flags: something a user must know about a run, with how much it matters.

use serde::{Deserialize, Serialize};

/// How much a flag matters. `note`s inform; `warning`s say that a claim (e.g. one model
/// beating another on a regressor) would not be supported — neither changes a status;
/// `caution` and `severe` follow the study's thresholds; `error` means a number could not
/// be computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    Note,
    Warning,
    Caution,
    Severe,
    Error,
}

impl Severity {
    pub fn label(self) -> &'static str {
        match self {
            Severity::Note => "note",
            Severity::Warning => "warning",
            Severity::Caution => "caution",
            Severity::Severe => "severe",
            Severity::Error => "error",
        }
    }
}

/// What a flag is about: a stable machine-readable code, written in every output as its
/// snake-case name (e.g. `vif_severe`). The README's flag table says what each means.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum FlagCode {
    // Reading the run.
    SameOnset,
    UnusedDurationColumn,
    TrDisagreesWithData,
    ScansDisagreeWithData,
    SliceTimingReference,
    // Building the design.
    EventAbsent,
    OnsetAfterRunEnd,
    NegativeOnset,
    MissingDuration,
    MissingValues,
    ConstantModulator,
    ModulatorAbsent,
    AbsorbedByOrthogonalisation,
    // Diagnosing it.
    ExactDependency,
    VanishesAfterFiltering,
    // Screening it.
    VifCaution,
    VifSevere,
    NearDependency,
    SharedExceedsUnique,
    // Measured signals.
    UniqueSharesOverlap,
}

impl FlagCode {
    /// The code as outputs write it.
    pub fn as_str(self) -> &'static str {
        match self {
            FlagCode::SameOnset => "same_onset",
            FlagCode::UnusedDurationColumn => "unused_duration_column",
            FlagCode::TrDisagreesWithData => "tr_disagrees_with_data",
            FlagCode::ScansDisagreeWithData => "scans_disagree_with_data",
            FlagCode::SliceTimingReference => "slice_timing_reference",
            FlagCode::EventAbsent => "event_absent",
            FlagCode::OnsetAfterRunEnd => "onset_after_run_end",
            FlagCode::NegativeOnset => "negative_onset",
            FlagCode::MissingDuration => "missing_duration",
            FlagCode::MissingValues => "missing_values",
            FlagCode::ConstantModulator => "constant_modulator",
            FlagCode::ModulatorAbsent => "modulator_absent",
            FlagCode::AbsorbedByOrthogonalisation => "absorbed_by_orthogonalisation",
            FlagCode::ExactDependency => "exact_dependency",
            FlagCode::VanishesAfterFiltering => "vanishes_after_filtering",
            FlagCode::VifCaution => "vif_caution",
            FlagCode::VifSevere => "vif_severe",
            FlagCode::NearDependency => "near_dependency",
            FlagCode::SharedExceedsUnique => "shared_exceeds_unique",
            FlagCode::UniqueSharesOverlap => "unique_shares_overlap",
        }
    }
}

impl std::fmt::Display for FlagCode {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Flag {
    pub severity: Severity,
    pub code: FlagCode,
    /// Names of the regressors involved (may be empty).
    pub regressors: Vec<String>,
    pub message: String,
}

impl Flag {
    pub fn new(
        severity: Severity,
        code: FlagCode,
        regressors: Vec<String>,
        message: impl Into<String>,
    ) -> Self {
        Flag {
            severity,
            code,
            regressors,
            message: message.into(),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_serialise_as_their_written_names() {
        for code in [
            FlagCode::SameOnset,
            FlagCode::AbsorbedByOrthogonalisation,
            FlagCode::VifSevere,
            FlagCode::UniqueSharesOverlap,
        ] {
            let json = serde_json::to_string(&code).expect("serialised");
            assert_eq!(json, format!("\"{}\"", code.as_str()));
            let back: FlagCode = serde_json::from_str(&json).expect("read back");
            assert_eq!(back, code);
        }
    }
}
