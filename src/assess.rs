//! One run, from its trials to its report: the design is built, diagnosed and screened,
//! optionally shown orthogonalised, and its measured signals (if any) partitioned. Pure:
//! the run's tables are read before, by `check`, or simulated, by the forecast.

use crate::design::{build_design, orthogonalise};
use crate::diagnose::diagnose;
use crate::error::Result;
use crate::flags::FlagCode;
use crate::report::{OrthogonalisedView, RunReport, RunScreening};
use crate::screen::{claim_flags, entangled_dimensions, entanglement_flags, run_status, vif_flags};
use crate::settings::RunSettings;
use crate::signal;
use crate::trials::{NuisanceTable, PerScanTable, RunTrials};

/// Everything about one run once its tables are read: the design, its diagnostics, the
/// screening flags and the run's status.
pub fn assess_run(
    settings: &RunSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
    signal: Option<&PerScanTable>,
) -> Result<RunReport> {
    let design = build_design(&settings.design, run, nuisance)?;
    let diagnostics = diagnose(&design);
    let thresholds = &settings.thresholds;
    let dimensions = entangled_dimensions(&design, &diagnostics, thresholds);
    let mut flags = design.flags.clone();
    flags.extend(diagnostics.flags.iter().cloned());
    flags.extend(vif_flags(&design, &diagnostics, thresholds));
    flags.extend(entanglement_flags(&design, &dimensions, thresholds));
    flags.extend(claim_flags(&design, &diagnostics, thresholds));
    let orthogonalised = settings.orthogonalise.then(|| {
        let serial = orthogonalise::serial(&design);
        let view = OrthogonalisedView::new(&serial, diagnose(&serial));
        let absorbed = serial
            .flags
            .into_iter()
            .filter(|f| f.code == FlagCode::AbsorbedByOrthogonalisation);
        flags.extend(absorbed);
        view
    });
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
    Ok(RunReport::new(design, diagnostics, screening, thresholds))
}
