//! The whole check: study file → report model. Reading happens here; everything
//! between reading and the report is pure and runs per run, in parallel.

use std::path::Path;

use rayon::prelude::*;

use crate::cohort::partition as cohort;
use crate::cohort::{CohortShare, ParticipantShare};
use crate::design::orthogonalise;
use crate::design::{DesignSettings, build_design};
use crate::diagnose::diagnose;
use crate::diagnose::partition;
use crate::diagnose::partition::RegressorPartition;
use crate::error::{Error, Problems, Result};
use crate::files::{InputFiles, read_text};
use crate::report::{
    Cohort, OrthogonalisedView, Report, RunReport, RunScreening, Settings, StudyInfo, ToolInfo,
};
use crate::screen::{
    CLAIMS_NOTE, RunOutcome, Status, SubjectSummary, claim_flags, entangled_dimensions,
    entanglement_flags, run_status, summarise_subjects, vif_flags,
};
use crate::signal;
use crate::signal::BootstrapSettings;
use crate::study::{NuisanceSpec, Study, parse_study};
use crate::trials::{
    NuisanceTable, PerScanTable, ROWS_PER_CHUNK, RunTrials, ScanTable, fill_template,
    read_nuisance, read_per_scan, read_runs,
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
    /// Only this shard of the participants, when given.
    pub shard: Option<Shard>,
}

impl Default for CheckOptions {
    fn default() -> Self {
        CheckOptions {
            centre: true,
            orthogonalise: false,
            signal: None,
            bootstrap: BootstrapSettings::default(),
            subjects: None,
            shard: None,
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
    let prepared = prepare(files, study, options)?;
    let mut reports = Vec::new();
    let summaries = prepared.run_all(files, &mut |run| {
        reports.push(run);
        Ok(())
    })?;
    Ok(prepared.head().into_report(reports, summaries))
}

/// Which participants a shard holds: participants sorted by label, participant `i`
/// (0-based) belongs to shard `(i mod count) + 1`. Deterministic and balanced.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    /// 1-based.
    pub index: usize,
    pub count: usize,
}

impl Shard {
    /// Parses `K/N` (1 ≤ K ≤ N).
    pub fn parse(text: &str) -> std::result::Result<Shard, String> {
        let bad = || format!("--shard: expected K/N with 1 <= K <= N (e.g. 3/10), got \"{text}\"");
        let (k, n) = text.split_once('/').ok_or_else(bad)?;
        let index: usize = k.trim().parse().map_err(|_| bad())?;
        let count: usize = n.trim().parse().map_err(|_| bad())?;
        if index == 0 || count == 0 || index > count {
            return Err(bad());
        }
        Ok(Shard { index, count })
    }

    /// The labels (sorted, distinct) of the participants this shard holds.
    pub fn select<'a>(&self, labels: impl IntoIterator<Item = &'a str>) -> Vec<&'a str> {
        let mut labels: Vec<&str> = labels.into_iter().collect();
        labels.sort_unstable();
        labels.dedup();
        labels
            .into_iter()
            .enumerate()
            .filter(|(i, _)| i % self.count + 1 == self.index)
            .map(|(_, label)| label)
            .collect()
    }
}

/// A study read and its runs collected, ready to be checked run by run.
pub struct Prepared {
    study: Study,
    runs: Vec<RunTrials>,
    settings: DesignSettings,
    options: CheckOptions,
}

/// Everything a report holds before its runs: the same for every shard of a study.
pub struct ReportHead {
    pub tool: ToolInfo,
    pub study: StudyInfo,
    pub settings: Settings,
}

/// The cohort views, computed from every run's [`RunDigest`].
pub struct Summaries {
    pub subjects: Vec<SubjectSummary>,
    pub cohort: Cohort,
    pub subject_partition: Vec<ParticipantShare>,
    pub cohort_partition: Vec<CohortShare>,
}

impl ReportHead {
    pub fn into_report(self, runs: Vec<RunReport>, summaries: Summaries) -> Report {
        Report {
            tool: self.tool,
            study: self.study,
            settings: self.settings,
            runs,
            subjects: summaries.subjects,
            cohort: summaries.cohort,
            subject_partition: summaries.subject_partition,
            cohort_partition: summaries.cohort_partition,
            claims_note: crate::report::Text::Borrowed(CLAIMS_NOTE),
        }
    }
}

/// What the cohort views need of a run; kept for every run while the full run reports
/// are written out and dropped one by one.
pub struct RunDigest {
    pub subject: String,
    pub run: String,
    pub status: Status,
    /// (regressor, VIF) of the regressors of interest with a defined VIF.
    pub vifs: Vec<(String, f64)>,
    pub largest_condition_index: Option<f64>,
    /// (modulator, other model, share).
    pub shared: Vec<(String, String, f64)>,
    /// The partition without its commonality components.
    pub partition: Vec<RegressorPartition>,
}

impl RunDigest {
    pub fn of(run: &RunReport) -> Self {
        RunDigest {
            subject: run.subject.clone(),
            run: run.run.clone(),
            status: run.status,
            vifs: run
                .regressors
                .iter()
                .zip(&run.vif)
                .filter(|(r, _)| r.regressor.kind.of_interest())
                .filter_map(|(r, v)| v.map(|v| (r.regressor.name.clone(), v)))
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
                        .map(|g| (p.regressor.clone(), g.group.clone(), g.share))
                })
                .collect(),
            partition: run
                .partition
                .iter()
                .map(|p| RegressorPartition {
                    components: Vec::new(),
                    ..p.clone()
                })
                .collect(),
        }
    }

    fn outcome(&self) -> RunOutcome<'_> {
        RunOutcome {
            subject: &self.subject,
            run: &self.run,
            status: self.status,
            vifs: self.vifs.iter().map(|(n, v)| (n.as_str(), *v)).collect(),
            largest_condition_index: self.largest_condition_index,
            shared: self
                .shared
                .iter()
                .map(|(r, g, s)| (r.as_str(), g.as_str(), *s))
                .collect(),
        }
    }
}

/// The cohort views of a report whose runs are `digests`, in report order (used by
/// `check` and by `merge`, so that both give the same summaries).
pub fn summarise(digests: &[RunDigest]) -> Summaries {
    let outcomes: Vec<RunOutcome<'_>> = digests.iter().map(RunDigest::outcome).collect();
    let subjects = summarise_subjects(&outcomes);
    let by_run: Vec<(&str, &[RegressorPartition])> = digests
        .iter()
        .map(|r| (r.subject.as_str(), r.partition.as_slice()))
        .collect();
    let subject_partition = cohort::participant_means(&by_run);
    Summaries {
        cohort: Cohort::count(&subjects, digests.len()),
        cohort_partition: cohort::summarise(&subject_partition),
        subject_partition,
        subjects,
    }
}

/// Reads the trial table (or BIDS dataset) and collects the runs to check, after
/// `--subjects` and `--shard`.
pub fn prepare(files: &dyn InputFiles, study: &Study, options: CheckOptions) -> Result<Prepared> {
    let (resolved, runs) = match &study.bids {
        Some(source) => crate::bids::collect_bids_runs(files, study, source)?,
        None => {
            let scans = ScanTable::load(files, &study.acquisition.scans)?;
            (
                study.clone(),
                read_runs(files, study, &scans, ROWS_PER_CHUNK)?,
            )
        }
    };
    let runs = match &options.subjects {
        Some(wanted) => select_subjects(runs, wanted, &resolved)?,
        None => runs,
    };
    let runs = match options.shard {
        Some(shard) => {
            let keep: std::collections::HashSet<String> = shard
                .select(runs.iter().map(|r| r.subject.as_str()))
                .into_iter()
                .map(str::to_string)
                .collect();
            runs.into_iter()
                .filter(|r| keep.contains(&r.subject))
                .collect()
        }
        None => runs,
    };
    let settings = DesignSettings::new(&resolved, options.centre);
    Ok(Prepared {
        study: resolved,
        runs,
        settings,
        options,
    })
}

/// Runs checked at once: enough to keep every core busy, few enough that memory stays
/// bounded however many runs the study has.
const RUNS_PER_BATCH: usize = 256;

impl Prepared {
    pub fn head(&self) -> ReportHead {
        ReportHead {
            tool: ToolInfo::default(),
            study: StudyInfo {
                name: self.study.name.clone(),
                file: self.study.path.display().to_string(),
            },
            settings: Settings::new(&self.study, self.options.centre, self.options.orthogonalise),
        }
    }

    /// Checks every run (in parallel, a batch at a time) and hands each run's report to
    /// `each` in table order; returns the cohort views. Problems of all runs are
    /// collected and returned together at the end.
    pub fn run_all(
        &self,
        files: &dyn InputFiles,
        each: &mut dyn FnMut(RunReport) -> Result<()>,
    ) -> Result<Summaries> {
        self.run_all_rendered(files, &|report| report, each)
    }

    /// As [`Prepared::run_all`], but each report is first turned by `render` (e.g. into
    /// its JSON text) on the worker threads, and the next batch is checked while `each`
    /// consumes this one, so that a slow consumer (writing the report) and the checks
    /// overlap.
    pub fn run_all_rendered<T: Send>(
        &self,
        files: &dyn InputFiles,
        render: &(dyn Fn(RunReport) -> T + Sync),
        each: &mut dyn FnMut(T) -> Result<()>,
    ) -> Result<Summaries> {
        type Batch<T> = Vec<Result<(RunDigest, T)>>;
        let mut problems = Problems::default();
        let mut digests = Vec::with_capacity(self.runs.len());
        let (send, receive) = std::sync::mpsc::sync_channel::<Batch<T>>(1);
        std::thread::scope(|scope| {
            scope.spawn(move || {
                for batch in self.runs.chunks(RUNS_PER_BATCH) {
                    let results: Batch<T> = batch
                        .par_iter()
                        .map(|run| {
                            let report =
                                check_run(files, &self.study, &self.settings, run, &self.options)?;
                            Ok((RunDigest::of(&report), render(report)))
                        })
                        .collect();
                    if send.send(results).is_err() {
                        return; // the consumer stopped (an output error)
                    }
                }
            });
            for results in receive {
                for result in results {
                    if let Some((digest, rendered)) = problems.keep(result) {
                        if problems.is_empty() {
                            digests.push(digest);
                            each(rendered)?;
                        }
                    }
                }
            }
            Ok::<(), Error>(())
        })?;
        let digests = problems.finish(digests)?;
        Ok(summarise(&digests))
    }
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
