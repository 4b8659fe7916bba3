//! The tables of one run besides its trials: its nuisance regressors and its measured
//! signals, each from a path template filled with the run's labels.

use crate::error::{Error, Result};
use crate::files::InputFiles;
use crate::study::{NuisanceSpec, Study, TrialSource};
use crate::trials::{
    NuisanceTable, PerScanTable, RunTrials, fill_template, read_nuisance, read_per_scan,
};

/// The run's nuisance table, when the study names one.
pub fn nuisance(
    files: &dyn InputFiles,
    study: &Study,
    run: &RunTrials,
) -> Result<Option<NuisanceTable>> {
    let Some(spec) = &study.nuisance else {
        return Ok(None);
    };
    let spec = with_bids_entities(spec, study, run)?;
    read_nuisance(files, &spec, &run.subject, &run.run, run.scans).map(Some)
}

/// The run's measured signals, when `--signal` gives a template.
pub fn signal(
    files: &dyn InputFiles,
    template: Option<&str>,
    run: &RunTrials,
) -> Result<Option<PerScanTable>> {
    let Some(template) = template else {
        return Ok(None);
    };
    let path = fill_template(template, &run.subject, &run.run);
    read_per_scan(
        files,
        &path,
        &[],
        run.scans,
        &run.subject,
        &run.run,
        "signal",
    )
    .map(Some)
}

/// The nuisance template with a BIDS run's `{session}` and `{task}` filled in (the
/// `{subject}` and `{run}` placeholders are filled for every study).
fn with_bids_entities(spec: &NuisanceSpec, study: &Study, run: &RunTrials) -> Result<NuisanceSpec> {
    let mut spec = spec.clone();
    if let TrialSource::Bids(source) = &study.source {
        spec.template = spec.template.replace("{task}", &source.task);
    }
    if spec.template.contains("{session}") {
        let Some(session) = &run.session else {
            return Err(Error::Usage(format!(
                "the nuisance template \"{}\" uses {{session}}, but subject {} run {} has no session",
                spec.template, run.subject, run.run
            )));
        };
        spec.template = spec.template.replace("{session}", session);
    }
    Ok(spec)
}
