//! One run, from its trials to its reports: the design with every model is built once
//! and diagnosed (the models' separation is measured in it); each GLM's design is taken
//! from it, diagnosed and screened, optionally shown orthogonalised, and its measured
//! signals (if any) partitioned. Pure: the run's tables are read before, by `check`, or
//! simulated, by the forecast.

use crate::cohort::RunDigest;
use crate::design::{Design, build_design, build_orthogonalised_within_events, orthogonalise};
use crate::diagnose::{Diagnostics, diagnose};
use crate::error::Result;
use crate::flags::{Flag, FlagCode};
use crate::report::{ModulatorShare, OrthogonalisedView, RunReport, RunScreening, RunSeparation};
use crate::screen::{claim_flags, entangled_dimensions, entanglement_flags, run_status, vif_flags};
use crate::settings::{Orthogonalisation, RunSettings};
use crate::signal;
use crate::study::GlmSpec;
use crate::trials::{NuisanceTable, PerScanTable, RunTrials};

/// A run assessed: one report per GLM, and the separation of every ordered pair of
/// models.
#[derive(Debug, Clone)]
pub struct AssessedRun {
    pub glms: Vec<RunReport>,
    pub separations: Vec<RunSeparation>,
    /// Each modulator's partition in the design with every model.
    pub shares: Vec<ModulatorShare>,
}

impl AssessedRun {
    /// What the cohort views need of this run.
    pub fn digest(&self, subject: &str, run: &str) -> RunDigest {
        RunDigest::new(
            subject,
            run,
            self.glms.iter().map(RunReport::glm_digest).collect(),
            self.shares.iter().map(|s| s.partition.clone()),
            self.separations.iter().map(|s| &s.separation),
        )
    }
}

/// Everything about one run once its tables are read.
pub fn assess_run(
    settings: &RunSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
    signal: Option<&PerScanTable>,
) -> Result<AssessedRun> {
    let every_model = build_design(&settings.design, run, nuisance)?;
    let separation = diagnose(&every_model);
    // Cross-model claims are judged where every model is present, whatever the GLMs.
    let claims = claim_flags(&every_model, &separation, &settings.thresholds);
    let mut glms = Vec::with_capacity(settings.glms.len());
    for glm in &settings.glms {
        let (design, diagnostics) = if settings.holds_every_model(glm) {
            (every_model.clone(), separation.clone())
        } else {
            let design = every_model.for_glm(glm);
            let diagnostics = diagnose(&design);
            (design, diagnostics)
        };
        glms.push(assess_glm(
            settings,
            glm,
            design,
            diagnostics,
            &claims,
            (run, nuisance),
            signal,
        )?);
    }
    let session = run.session.as_deref();
    let shares = separation
        .partition
        .iter()
        .map(|p| ModulatorShare {
            subject: run.subject.clone(),
            run: run.run.clone(),
            session: session.map(str::to_string),
            partition: p.clone(),
        })
        .collect();
    let separations = separation
        .separations
        .into_iter()
        .map(|separation| RunSeparation {
            subject: run.subject.clone(),
            run: run.run.clone(),
            session: run.session.clone(),
            separation,
        })
        .collect();
    Ok(AssessedRun {
        glms,
        separations,
        shares,
    })
}

/// One GLM's report: its diagnostics screened, the claims about its modulators, the
/// orthogonalised view and the measured signals.
fn assess_glm(
    settings: &RunSettings,
    glm: &GlmSpec,
    design: Design,
    diagnostics: Diagnostics,
    claims: &[Flag],
    (run, nuisance): (&RunTrials, Option<&NuisanceTable>),
    signal: Option<&PerScanTable>,
) -> Result<RunReport> {
    let thresholds = &settings.thresholds;
    let dimensions = entangled_dimensions(&design, &diagnostics, thresholds);
    let mut flags = design.flags.clone();
    flags.extend(diagnostics.flags.iter().cloned());
    flags.extend(vif_flags(&design, &diagnostics, thresholds));
    flags.extend(entanglement_flags(&design, &dimensions, thresholds));
    flags.extend(
        claims
            .iter()
            .filter(|f| {
                f.regressors
                    .iter()
                    .all(|r| design.regressors.iter().any(|d| &d.name == r))
            })
            .cloned(),
    );
    let orthogonalised = match settings.orthogonalise {
        Orthogonalisation::None => None,
        Orthogonalisation::Serial => {
            let serial = orthogonalise::serial(&design);
            Some(view(settings.orthogonalise, serial, &mut flags))
        }
        Orthogonalisation::WithinEvent => {
            let within = build_orthogonalised_within_events(&settings.design, run, nuisance, glm)?;
            Some(view(settings.orthogonalise, within, &mut flags))
        }
    };
    let signal = match signal {
        Some(table) => {
            let regions =
                signal::partition_signals(&design, &diagnostics, table, settings.bootstrap);
            flags.extend(signal::uncertainty_flags(&regions));
            regions
        }
        None => Vec::new(),
    };
    let screening = RunScreening {
        signal,
        entangled_dimensions: dimensions,
        status: run_status(&flags),
        flags,
        orthogonalised,
    };
    Ok(RunReport::new(
        &glm.name,
        design,
        diagnostics,
        screening,
        thresholds,
    ))
}

/// The orthogonalised view of `design`; the modulators orthogonalisation absorbed
/// entirely are flagged on the run.
fn view(method: Orthogonalisation, design: Design, flags: &mut Vec<Flag>) -> OrthogonalisedView {
    let diagnostics = diagnose(&design);
    let view = OrthogonalisedView::new(method, &design, diagnostics);
    flags.extend(
        design
            .flags
            .into_iter()
            .filter(|f| f.code == FlagCode::AbsorbedByOrthogonalisation),
    );
    view
}
