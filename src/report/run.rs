//! One run's report: its design, every diagnostic, the screening and its status.

use serde::{Deserialize, Serialize};

use super::Text;
use crate::design::{Design, EventSummary, Regressor, RegressorKind};
use crate::diagnose::{
    Contrast, Dependency, Diagnostics, ModelOverlap, ModelSet, RegressorPartition,
    TrialCorrelation, most_correlated,
};
use crate::flags::{Flag, Severity};
use crate::screen::{EntangledDimension, Status, dimension_severity, vif_status};
use crate::settings::Orthogonalisation;
use crate::signal::RegionPartition;
use crate::study::Thresholds;

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct RegressorReport {
    #[serde(flatten)]
    pub regressor: Regressor,
    /// `false` when the regressor was left out of the design (see the flags).
    pub in_design: bool,
    pub status: Status,
}

#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct RunReport {
    pub subject: String,
    pub run: String,
    /// The BIDS session; omitted from JSON when the study has none.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub session: Option<String>,
    /// The GLM this report describes.
    pub glm: String,
    pub scans: usize,
    /// Constant and cosine columns projected out.
    pub drift_columns: usize,
    /// Trials and durations of each event in the run.
    pub events: Vec<EventSummary>,
    pub regressors: Vec<RegressorReport>,
    /// Aligned with `regressors`; `null` where undefined (a flag says why).
    pub vif: Vec<Option<f64>>,
    /// √VIF: how many times larger each standard error is than without overlap.
    pub se_inflation: Vec<Option<f64>>,
    pub correlation: Vec<Vec<Option<f64>>>,
    pub trial_correlation: Vec<TrialCorrelation>,
    pub dependencies: Vec<Dependency>,
    /// Belsley–Kuh–Welsch condition indices of the filtered, unit-length design.
    pub condition_indices: Vec<f64>,
    /// Dimensions × regressors (`null` for regressors not analysed).
    pub variance_proportions: Vec<Vec<Option<f64>>>,
    pub entangled_dimensions: Vec<EntangledDimension>,
    pub model_sets: Vec<ModelSet>,
    /// Own-contrast efficiency of each regressor (design units; compare within a study only).
    pub efficiency: Vec<Option<f64>>,
    pub contrasts: Vec<Contrast>,
    /// Each modulator's variance: unique, and shared with each group (commonality analysis).
    pub partition: Vec<RegressorPartition>,
    pub model_overlap: Vec<ModelOverlap>,
    /// With `--signal`: each region's variance split into model-unique and shared parts.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub signal: Vec<RegionPartition>,
    /// Present with `--orthogonalise serial`: the same run with modulators orthogonalised.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub orthogonalised: Option<OrthogonalisedView>,
    pub flags: Vec<Flag>,
    pub status: Status,
    /// What renderers show that the JSON does not hold, derived once from the numbers
    /// above: when the run is assessed, and when it is read back ([`RunReport::read`]).
    #[serde(skip)]
    pub views: RunViews,
}

/// Derived facts a renderer shows about a run.
#[derive(Debug, Clone, Default)]
pub struct RunViews {
    /// Per regressor, the regressor it is most correlated with (an index into
    /// `regressors`) and that correlation.
    pub partners: Vec<Option<(usize, f64)>>,
    /// Per entangled dimension, how much it matters (as its `near_dependency` flag).
    pub dimension_severity: Vec<Severity>,
}

impl RunViews {
    fn of(run: &RunReport, thresholds: &Thresholds) -> Self {
        let regressors: Vec<Regressor> =
            run.regressors.iter().map(|r| r.regressor.clone()).collect();
        RunViews {
            partners: (0..run.regressors.len())
                .map(|index| most_correlated(&run.correlation, index))
                .collect(),
            dimension_severity: run
                .entangled_dimensions
                .iter()
                .map(|d| dimension_severity(d, &regressors, thresholds))
                .collect(),
        }
    }
}

/// The numbers that orthogonalisation changes, beside the as-written ones.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct OrthogonalisedView {
    pub method: Text,
    /// Modulators in the order they were orthogonalised.
    pub order: Vec<String>,
    pub vif: Vec<Option<f64>>,
    pub efficiency: Vec<Option<f64>>,
    pub model_sets: Vec<ModelSet>,
    pub contrasts: Vec<Contrast>,
    pub caution: Text,
}

/// Said wherever orthogonalised numbers are shown.
pub const ORTHOGONALISATION_CAUTION: &str = "Serial orthogonalisation does not remove redundancy, it assigns it. The fitted space is unchanged; each modulator's column loses what it shares with the modulators before it, and its estimate takes over what it shares with the modulators after it. So the last modulator keeps its estimate and its test (its VIF drops only because its column got shorter), while the earlier ones no longer measure what their models alone predict (Mumford, Poline & Poldrack 2015). Statuses and flags refer to the design as written.";

/// Said wherever numbers orthogonalised within events are shown.
pub const WITHIN_EVENT_CAUTION: &str = "Orthogonalisation within events (each modulator's trial values replaced by their part orthogonal to the modulators listed before it on the same event, before convolution) does not remove redundancy either, it assigns it: the earlier modulators' estimates take over what they share with the later ones, which then measure only what is left of them. Because it acts before convolution and within one event, the convolved columns are not made orthogonal to other events' regressors, and the fitted space of the event's modulators is unchanged (Mumford, Poline & Poldrack 2015). Statuses and flags refer to the design as written.";

impl OrthogonalisedView {
    pub fn new(method: Orthogonalisation, design: &Design, diagnostics: Diagnostics) -> Self {
        let caution = match method {
            Orthogonalisation::WithinEvent => WITHIN_EVENT_CAUTION,
            _ => ORTHOGONALISATION_CAUTION,
        };
        OrthogonalisedView {
            method: Text::Borrowed(method.label()),
            order: design
                .regressors
                .iter()
                .filter(|r| r.kind == RegressorKind::Modulator)
                .map(|r| r.name.clone())
                .collect(),
            vif: diagnostics.vif,
            efficiency: diagnostics.efficiency,
            model_sets: diagnostics.model_sets,
            contrasts: diagnostics.contrasts,
            caution: Text::Borrowed(caution),
        }
    }
}

/// What a run report holds besides the design and its diagnostics.
pub struct RunScreening {
    pub signal: Vec<RegionPartition>,
    pub entangled_dimensions: Vec<EntangledDimension>,
    pub flags: Vec<Flag>,
    pub status: Status,
    pub orthogonalised: Option<OrthogonalisedView>,
}

impl RunReport {
    pub fn new(
        glm: &str,
        design: Design,
        diagnostics: Diagnostics,
        screening: RunScreening,
        thresholds: &Thresholds,
    ) -> Self {
        let regressors = design
            .regressors
            .into_iter()
            .enumerate()
            .map(|(index, regressor)| {
                let in_design = design.included[index];
                let status = if regressor.kind.of_interest() {
                    let undefined = diagnostics.vif[index].is_none();
                    if undefined {
                        Status::Severe
                    } else {
                        vif_status(diagnostics.vif[index], thresholds)
                    }
                } else {
                    Status::Ok
                };
                RegressorReport {
                    regressor,
                    in_design,
                    status,
                }
            })
            .collect();
        RunReport {
            subject: design.subject,
            run: design.run,
            session: design.session,
            glm: glm.to_string(),
            scans: design.scans,
            drift_columns: design.drift.len(),
            events: design.events,
            regressors,
            se_inflation: diagnostics.vif.iter().map(|v| v.map(f64::sqrt)).collect(),
            vif: diagnostics.vif,
            correlation: diagnostics.correlation,
            trial_correlation: diagnostics.trial_correlation,
            dependencies: diagnostics.dependencies,
            condition_indices: diagnostics.conditioning.condition_indices,
            variance_proportions: diagnostics.conditioning.variance_proportions,
            entangled_dimensions: screening.entangled_dimensions,
            model_sets: diagnostics.model_sets,
            efficiency: diagnostics.efficiency,
            contrasts: diagnostics.contrasts,
            partition: diagnostics.partition,
            model_overlap: diagnostics.model_overlap,
            signal: screening.signal,
            orthogonalised: screening.orthogonalised,
            flags: screening.flags,
            status: screening.status,
            views: RunViews::default(),
        }
        .with_views(thresholds)
    }

    /// A run report read back from its JSON (e.g. from a shard), with its views derived
    /// as when it was assessed; `thresholds` are the report's settings.
    pub fn read(json: &str, thresholds: &Thresholds) -> serde_json::Result<Self> {
        serde_json::from_str::<RunReport>(json).map(|run| run.with_views(thresholds))
    }

    fn with_views(mut self, thresholds: &Thresholds) -> Self {
        self.views = RunViews::of(&self, thresholds);
        self
    }
}

impl RunReport {
    /// What the cohort views need of this GLM's report.
    pub fn glm_digest(&self) -> crate::cohort::GlmDigest {
        crate::cohort::GlmDigest::new(
            &self.glm,
            self.status,
            self.regressors.iter().map(|r| &r.regressor),
            &self.vif,
            &self.condition_indices,
        )
    }
}

/// One ordered pair of models' separation in one run, as the report's `separations`
/// list holds it.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct RunSeparation {
    pub subject: String,
    pub run: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub session: Option<String>,
    #[serde(flatten)]
    pub separation: crate::diagnose::ModelSeparation,
}

/// A modulator's partition in the design with every model (its own share, the R² on
/// each group alone, the commonality components), one run: the report's `model_shares`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ModulatorShare {
    pub subject: String,
    pub run: String,
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub session: Option<String>,
    #[serde(flatten)]
    pub partition: RegressorPartition,
}
