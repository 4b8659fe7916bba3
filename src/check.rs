//! The whole check: study file → report model. Reading happens here; everything
//! between reading and the report is pure and runs per run, in parallel.

use std::path::Path;

use rayon::prelude::*;

use crate::design::orthogonalise;
use crate::design::{DesignSettings, build_design};
use crate::diagnose::diagnose;
use crate::error::{Error, Problems, Result};
use crate::files::{InputFiles, read_text};
use crate::partition::signal::BootstrapSettings;
use crate::partition::{self, cohort, signal};
use crate::report::model::{
    Cohort, OrthogonalisedView, Report, RunReport, RunScreening, Settings, StudyInfo, ToolInfo,
};
use crate::screen::{
    CLAIMS_NOTE, RunOutcome, claim_flags, entangled_dimensions, entanglement_flags, run_status,
    summarise_subjects, vif_flags,
};
use crate::study::{NuisanceSpec, Study, parse_study};
use crate::trials::{
    NuisanceTable, PerScanTable, RunTrials, ScanTable, Table, collect_runs, fill_template,
    read_nuisance, read_per_scan,
};

#[derive(Debug, Clone)]
pub struct CheckOptions {
    /// Mean-centre parametric modulators (default true; off shows what centring does).
    pub centre: bool,
    /// Also show the run with modulators serially orthogonalised, side by side.
    pub orthogonalise: bool,
    /// Path template (`{subject}`, `{run}`) of measured signals to partition, if any.
    pub signal: Option<String>,
    pub bootstrap: BootstrapSettings,
    /// Only these participants, when given.
    pub subjects: Option<Vec<String>>,
}

impl Default for CheckOptions {
    fn default() -> Self {
        CheckOptions {
            centre: true,
            orthogonalise: false,
            signal: None,
            bootstrap: BootstrapSettings::default(),
            subjects: None,
        }
    }
}

/// Reads the study file at `path` and checks the whole study.
pub fn check_file(files: &dyn InputFiles, path: &Path, options: CheckOptions) -> Result<Report> {
    let text = read_text(files, path)?;
    let study = parse_study(path, &text)?;
    check_study(files, &study, options)
}

pub fn check_study(files: &dyn InputFiles, study: &Study, options: CheckOptions) -> Result<Report> {
    let (resolved, runs) = match &study.bids {
        Some(source) => crate::bids::collect_bids_runs(files, study, source)?,
        None => {
            let scans = ScanTable::load(files, &study.acquisition.scans)?;
            let table = Table::read(files, &study.trials.file)?;
            (study.clone(), collect_runs(study, &table, &scans)?)
        }
    };
    let study = &resolved;
    let runs = match &options.subjects {
        Some(wanted) => select_subjects(runs, wanted, study)?,
        None => runs,
    };
    let settings = DesignSettings::new(study, options.centre);
    let options = &options;
    let results: Vec<Result<RunReport>> = runs
        .par_iter()
        .map(|run| check_run(files, study, &settings, run, options))
        .collect();
    let mut problems = Problems::default();
    let reports: Vec<RunReport> = results
        .into_iter()
        .filter_map(|r| problems.keep(r))
        .collect();
    let reports = problems.finish(reports)?;
    let outcomes: Vec<RunOutcome<'_>> = reports
        .iter()
        .map(|run| RunOutcome {
            subject: &run.subject,
            run: &run.run,
            status: run.status,
            vifs: run
                .regressors
                .iter()
                .zip(&run.vif)
                .filter(|(r, _)| r.regressor.kind.of_interest())
                .filter_map(|(r, v)| v.map(|v| (r.regressor.name.as_str(), v)))
                .collect(),
            largest_condition_index: run.condition_indices.last().copied(),
            shared: run
                .partition
                .iter()
                .flat_map(|p| {
                    p.shared_with
                        .iter()
                        .filter(|g| {
                            Some(&g.group) != p.model.as_ref()
                                && g.group != partition::TASK
                                && g.group != partition::NUISANCE
                        })
                        .map(|g| (p.regressor.as_str(), g.group.as_str(), g.share))
                })
                .collect(),
        })
        .collect();
    let subjects = summarise_subjects(&outcomes);
    let by_run: Vec<(&str, &[_])> = reports
        .iter()
        .map(|r| (r.subject.as_str(), r.partition.as_slice()))
        .collect();
    let subject_partition = cohort::participant_means(&by_run);
    Ok(Report {
        tool: ToolInfo::default(),
        study: StudyInfo {
            name: study.name.clone(),
            file: study.path.display().to_string(),
        },
        settings: Settings::new(study, options.centre, options.orthogonalise),
        cohort: Cohort::count(&subjects, reports.len()),
        cohort_partition: cohort::summarise(&subject_partition),
        subject_partition,
        claims_note: CLAIMS_NOTE,
        subjects,
        runs: reports,
    })
}

/// The runs of the participants in `wanted`; a label not in the table is an error.
fn select_subjects(
    runs: Vec<RunTrials>,
    wanted: &[String],
    study: &Study,
) -> Result<Vec<RunTrials>> {
    let missing: Vec<&String> = wanted
        .iter()
        .filter(|w| !runs.iter().any(|r| &r.subject == *w))
        .collect();
    if !missing.is_empty() {
        let mut known: Vec<&str> = runs.iter().map(|r| r.subject.as_str()).collect();
        known.dedup();
        return Err(Error::Usage(format!(
            "--subjects: no participant {} in {} (participants: {})",
            missing
                .iter()
                .map(|m| format!("\"{m}\""))
                .collect::<Vec<_>>()
                .join(", "),
            study.trials.file.display(),
            known.join(", ")
        )));
    }
    Ok(runs
        .into_iter()
        .filter(|r| wanted.contains(&r.subject))
        .collect())
}

fn check_run(
    files: &dyn InputFiles,
    study: &Study,
    settings: &DesignSettings,
    run: &RunTrials,
    options: &CheckOptions,
) -> Result<RunReport> {
    let nuisance = match &study.nuisance {
        Some(spec) => Some(read_nuisance(
            files,
            &with_bids_entities(spec, study, run)?,
            &run.subject,
            &run.run,
            run.scans,
        )?),
        None => None,
    };
    let signal = match &options.signal {
        Some(template) => {
            let path = fill_template(template, &run.subject, &run.run);
            Some(read_per_scan(
                files,
                &path,
                &[],
                run.scans,
                &run.subject,
                &run.run,
                "signal",
            )?)
        }
        None => None,
    };
    assess_run(
        study,
        settings,
        run,
        nuisance.as_ref(),
        signal.as_ref(),
        options,
    )
}

/// The nuisance template with a BIDS run's `{session}` and `{task}` filled in (the
/// `{subject}` and `{run}` placeholders are filled for every study).
fn with_bids_entities(spec: &NuisanceSpec, study: &Study, run: &RunTrials) -> Result<NuisanceSpec> {
    let mut spec = spec.clone();
    if let Some(source) = &study.bids {
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

/// Everything about one run once its tables are read: the design, its diagnostics,
/// the screening flags and the run's status. Pure; the forecast calls it directly on
/// simulated runs.
pub fn assess_run(
    study: &Study,
    settings: &DesignSettings,
    run: &RunTrials,
    nuisance: Option<&NuisanceTable>,
    signal: Option<&PerScanTable>,
    options: &CheckOptions,
) -> Result<RunReport> {
    let design = build_design(settings, run, nuisance)?;
    let diagnostics = diagnose(&design);
    let thresholds = &study.thresholds;
    let dimensions = entangled_dimensions(&design, &diagnostics, thresholds);
    let mut flags = design.flags.clone();
    flags.extend(diagnostics.flags.iter().cloned());
    flags.extend(vif_flags(&design, &diagnostics, thresholds));
    flags.extend(entanglement_flags(&design, &dimensions, thresholds));
    flags.extend(claim_flags(&design, &diagnostics, thresholds));
    let orthogonalised = options.orthogonalise.then(|| {
        let serial = orthogonalise::serial(&design);
        let view = OrthogonalisedView::new(&serial, diagnose(&serial));
        let absorbed = serial
            .flags
            .into_iter()
            .filter(|f| f.code == "absorbed_by_orthogonalisation");
        flags.extend(absorbed);
        view
    });
    let signal = match signal {
        Some(table) => {
            let regions = signal::partition_signals(
                settings,
                &design,
                &diagnostics,
                table,
                options.bootstrap,
            );
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
