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

#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Flag {
    pub severity: Severity,
    /// A stable machine-readable code, e.g. `vif_severe` (owned only when read back
    /// from a report's JSON).
    pub code: std::borrow::Cow<'static, str>,
    /// Names of the regressors involved (may be empty).
    pub regressors: Vec<String>,
    pub message: String,
}

impl Flag {
    pub fn new(
        severity: Severity,
        code: &'static str,
        regressors: Vec<String>,
        message: impl Into<String>,
    ) -> Self {
        Flag {
            severity,
            code: std::borrow::Cow::Borrowed(code),
            regressors,
            message: message.into(),
        }
    }
}
