//! The whole check: study file → report model. Reading happens here; everything
//! between reading and the report is pure and runs per run, in parallel.

use std::path::Path;

use rayon::prelude::*;

use crate::design::{DesignSettings, build_design};
use crate::diagnose::diagnose;
use crate::error::{Problems, Result};
use crate::files::{InputFiles, read_text};
use crate::report::model::{Cohort, Report, RunReport, Settings, StudyInfo, ToolInfo};
use crate::screen::{RunOutcome, run_status, summarise_subjects, vif_flags};
use crate::study::{Study, parse_study};
use crate::trials::{RunTrials, ScanTable, Table, collect_runs, read_nuisance};

#[derive(Debug, Clone, Copy)]
pub struct CheckOptions {
    /// Mean-centre parametric modulators (default true; off shows what centring does).
    pub centre: bool,
}

impl Default for CheckOptions {
    fn default() -> Self {
        CheckOptions { centre: true }
    }
}

/// Reads the study file at `path` and checks the whole study.
pub fn check_file(files: &dyn InputFiles, path: &Path, options: CheckOptions) -> Result<Report> {
    let text = read_text(files, path)?;
    let study = parse_study(path, &text)?;
    check_study(files, &study, options)
}

pub fn check_study(files: &dyn InputFiles, study: &Study, options: CheckOptions) -> Result<Report> {
    let scans = ScanTable::load(files, &study.acquisition.scans)?;
    let table = Table::read(files, &study.trials.file)?;
    let runs = collect_runs(study, &table, &scans)?;
    let settings = DesignSettings::new(study, options.centre);
    let results: Vec<Result<RunReport>> = runs
        .par_iter()
        .map(|run| check_run(files, study, &settings, run))
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
        })
        .collect();
    let subjects = summarise_subjects(&outcomes);
    Ok(Report {
        tool: ToolInfo::default(),
        study: StudyInfo {
            name: study.name.clone(),
            file: study.path.display().to_string(),
        },
        settings: Settings::new(study, options.centre),
        cohort: Cohort::count(&subjects, reports.len()),
        subjects,
        runs: reports,
    })
}

fn check_run(
    files: &dyn InputFiles,
    study: &Study,
    settings: &DesignSettings,
    run: &RunTrials,
) -> Result<RunReport> {
    let nuisance = match &study.nuisance {
        Some(spec) => Some(read_nuisance(
            files,
            spec,
            &run.subject,
            &run.run,
            run.scans,
        )?),
        None => None,
    };
    let design = build_design(settings, run, nuisance.as_ref())?;
    let diagnostics = diagnose(&design);
    let mut flags = design.flags.clone();
    flags.extend(diagnostics.flags.iter().cloned());
    flags.extend(vif_flags(&design, &diagnostics, &study.thresholds));
    let status = run_status(&flags);
    Ok(RunReport::new(
        design,
        diagnostics,
        flags,
        status,
        &study.thresholds,
    ))
}
