//! The one home of every setting a run is assessed with: how its design is built (noise
//! model included), the GLMs, the screening thresholds, the orthogonalised view and the
//! signal bootstrap. A check makes it from the study file, the TR resolved while reading
//! the runs and the command-line options; the forecast makes it from its spec. Nothing
//! downstream reads a setting from anywhere else.

use crate::design::{DesignSettings, DesignSpec};
use crate::error::{Error, Result};
use crate::signal::BootstrapSettings;
use crate::study::{GlmSpec, Study, Thresholds};

/// How a run's modulators are also shown orthogonalised, beside the design as written.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Orthogonalisation {
    /// Not shown.
    #[default]
    None,
    /// Each filtered modulator column against every modulator before it.
    Serial,
    /// At trial level, before convolution, within each event.
    WithinEvent,
}

impl Orthogonalisation {
    /// The name outputs use.
    pub fn label(self) -> &'static str {
        match self {
            Orthogonalisation::None => "none",
            Orthogonalisation::Serial => "serial",
            Orthogonalisation::WithinEvent => "within-event",
        }
    }
}

/// The choices of an analysis beyond the study file (the command-line options).
#[derive(Debug, Clone)]
pub struct AnalysisOptions {
    /// Mean-centre parametric modulators (default true; off shows what centring does).
    pub centre: bool,
    /// Also show each run with its modulators orthogonalised, side by side.
    pub orthogonalise: Orthogonalisation,
    /// Resamples and seed of the measured signals' bootstrap.
    pub bootstrap: BootstrapSettings,
    /// Only these GLMs (by name), when given.
    pub glms: Option<Vec<String>>,
}

impl Default for AnalysisOptions {
    fn default() -> Self {
        AnalysisOptions {
            centre: true,
            orthogonalise: Orthogonalisation::None,
            bootstrap: BootstrapSettings::default(),
            glms: None,
        }
    }
}

/// Everything [`crate::assess::assess_run`] needs besides the run's own tables.
#[derive(Debug)]
pub struct RunSettings {
    pub design: DesignSettings,
    /// The GLMs each run is assessed in.
    pub glms: Vec<GlmSpec>,
    pub thresholds: Thresholds,
    pub orthogonalise: Orthogonalisation,
    pub bootstrap: BootstrapSettings,
}

impl RunSettings {
    /// The settings of `study`, whose TR (seconds) was resolved when its runs were read.
    /// A GLM named in `options.glms` that the study does not declare is an error.
    pub fn of_study(study: &Study, tr: f64, options: AnalysisOptions) -> Result<Self> {
        let spec = DesignSpec {
            tr,
            microtime: study.acquisition.microtime,
            reference: study.acquisition.reference,
            high_pass: study.high_pass,
            derivative: study.hrf.derivative,
            centre: options.centre,
            models: study.models.clone(),
            noise: study.noise,
            source: study.source_path().to_path_buf(),
        };
        let glms = chosen_glms(&study.glms, options.glms.as_deref())?;
        Ok(RunSettings::new(spec, glms, study.thresholds, options))
    }

    pub fn new(
        design: DesignSpec,
        glms: Vec<GlmSpec>,
        thresholds: Thresholds,
        options: AnalysisOptions,
    ) -> Self {
        RunSettings {
            design: DesignSettings::new(design),
            glms,
            thresholds,
            orthogonalise: options.orthogonalise,
            bootstrap: options.bootstrap,
        }
    }

    /// The design every GLM is taken from holds every model: is `glm` that design?
    pub fn holds_every_model(&self, glm: &GlmSpec) -> bool {
        self.design.spec.models.iter().all(|m| glm.holds(&m.name))
    }
}

/// The GLMs `wanted` names (all when `None`), in the study's order.
fn chosen_glms(glms: &[GlmSpec], wanted: Option<&[String]>) -> Result<Vec<GlmSpec>> {
    let Some(wanted) = wanted else {
        return Ok(glms.to_vec());
    };
    let names: Vec<&str> = glms.iter().map(|g| g.name.as_str()).collect();
    if let Some(unknown) = wanted.iter().find(|w| !names.contains(&w.as_str())) {
        let near = crate::error::closest_name(unknown, &names)
            .map_or_else(String::new, |n| format!("did you mean \"{n}\"? "));
        return Err(Error::Usage(format!(
            "--glm: no GLM named \"{unknown}\"; {near}the study's GLMs: {}",
            names
                .iter()
                .map(|n| format!("\"{n}\""))
                .collect::<Vec<_>>()
                .join(", ")
        )));
    }
    Ok(glms
        .iter()
        .filter(|g| wanted.contains(&g.name))
        .cloned()
        .collect())
}
