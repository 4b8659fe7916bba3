//! The report model: one structure that every output format reads, so that no format
//! keeps its own list of fields. Its JSON form is the contract the README's "Outputs"
//! section documents.

mod run;
mod settings;

pub use run::{
    ModulatorShare, ORTHOGONALISATION_CAUTION, OrthogonalisedView, RegressorReport, RunReport,
    RunScreening, RunSeparation, WITHIN_EVENT_CAUTION,
};
pub use settings::{DIAGNOSTICS_SPACE, HrfInfo, NoiseInfo, Settings, WHITENED_DIAGNOSTICS_SPACE};

use serde::{Deserialize, Serialize};

use crate::cohort::{
    Cohort, CohortShare, ParticipantSeparation, ParticipantShare, ParticipantVifs, RegressorVifs,
    SeparationSummary, SubjectSummary, Summaries,
};
use crate::screen::CLAIMS_NOTE;

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct Report {
    pub tool: ToolInfo,
    pub study: StudyInfo,
    pub settings: Settings,
    /// One entry per participant, run and GLM.
    pub runs: Vec<RunReport>,
    /// Per run and ordered pair of models, how far their regressors can be told apart.
    pub separations: Vec<RunSeparation>,
    /// Per run, each modulator's partition in the design with every model.
    pub model_shares: Vec<ModulatorShare>,
    pub subjects: Vec<SubjectSummary>,
    pub cohort: Cohort,
    /// Per participant and modulator, the mean over runs of its own and shared shares.
    pub subject_partition: Vec<ParticipantShare>,
    /// Per modulator, the distribution over participants of its unique and shared shares.
    pub cohort_partition: Vec<CohortShare>,
    /// Per modulator and other model, the distribution over participants of its
    /// separation.
    pub separation_summary: Vec<SeparationSummary>,
    /// Why shared variance limits model comparisons, and what to do instead.
    pub claims_note: Text,
    /// Each regressor of interest's VIFs over all runs (computed with the cohort views;
    /// not part of the JSON, which holds every run's VIFs).
    #[serde(skip)]
    pub regressor_vifs: Vec<RegressorVifs>,
    /// Each regressor of interest's VIFs per participant (as above).
    #[serde(skip)]
    pub participant_vifs: Vec<ParticipantVifs>,
    /// Each participant's mean separation of each modulator from each other model.
    #[serde(skip)]
    pub participant_separations: Vec<ParticipantSeparation>,
}

/// Fixed text of the tool (borrowed when made here, owned when read back from JSON by
/// `tangle merge`).
pub type Text = std::borrow::Cow<'static, str>;

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ToolInfo {
    pub name: Text,
    pub version: Text,
}

impl Default for ToolInfo {
    fn default() -> Self {
        ToolInfo {
            name: Text::Borrowed(env!("CARGO_PKG_NAME")),
            version: Text::Borrowed(env!("CARGO_PKG_VERSION")),
        }
    }
}

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct StudyInfo {
    pub name: String,
    pub file: String,
}

/// Everything a report holds before its runs: the same for every shard of a study.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ReportHead {
    pub tool: ToolInfo,
    pub study: StudyInfo,
    pub settings: Settings,
}

impl Report {
    pub fn new(head: ReportHead, runs: RunEntries, summaries: Summaries) -> Self {
        Report {
            tool: head.tool,
            study: head.study,
            settings: head.settings,
            runs: runs.glms,
            separations: runs.separations,
            model_shares: runs.shares,
            subjects: summaries.subjects,
            cohort: summaries.cohort,
            subject_partition: summaries.subject_partition,
            cohort_partition: summaries.cohort_partition,
            separation_summary: summaries.separations,
            claims_note: Text::Borrowed(CLAIMS_NOTE),
            regressor_vifs: summaries.regressor_vifs,
            participant_vifs: summaries.participant_vifs,
            participant_separations: summaries.participant_separations,
        }
    }
}

/// Every per-run entry of a report, in report order.
#[derive(Debug, Clone, Default)]
pub struct RunEntries {
    pub glms: Vec<RunReport>,
    pub separations: Vec<RunSeparation>,
    pub shares: Vec<ModulatorShare>,
}
