//! The whole check: study file → report model. This module reads — the study's runs,
//! each run's nuisance and signal tables — and batches the runs over the threads; each
//! run is assessed by [`crate::assess::assess_run`], the cohort views come from
//! [`crate::cohort`].

mod inputs;
pub mod select;

pub use select::Shard;

use std::path::Path;

use rayon::prelude::*;

use crate::assess::{AssessedRun, assess_run};
use crate::cohort::{RunDigest, Summaries, summarise};
use crate::error::{Error, Problems, Result};
use crate::files::{InputFiles, read_text};
use crate::render::json::{JsonStream, render_item};
use crate::report::{Report, ReportHead, RunEntries, Settings, StudyInfo, ToolInfo};
use crate::settings::{AnalysisOptions, RunSettings};
use crate::study::{Study, TrialSource, parse_study};
use crate::trials::{ROWS_PER_CHUNK, RunTrials, ScanTable};

/// What a check is asked for besides the study file (the command-line options).
#[derive(Debug, Clone, Default)]
pub struct CheckOptions {
    pub analysis: AnalysisOptions,
    /// Path template (`{subject}`, `{run}`) of measured signals to partition, if any.
    pub signal: Option<String>,
    /// Only these participants, when given.
    pub subjects: Option<Vec<String>>,
    /// Only this shard of the participants, when given.
    pub shard: Option<Shard>,
}

/// Reads the study file at `path` and checks the whole study.
pub fn check_file(files: &dyn InputFiles, path: &Path, options: CheckOptions) -> Result<Report> {
    let text = read_text(files, path)?;
    let study = parse_study(path, &text)?;
    check_study(files, &study, options)
}

pub fn check_study(files: &dyn InputFiles, study: &Study, options: CheckOptions) -> Result<Report> {
    let prepared = prepare(files, study, options)?;
    let mut entries = RunEntries::default();
    let summaries = prepared.run_all(files, &mut |run| {
        entries.glms.extend(run.glms);
        entries.separations.extend(run.separations);
        entries.shares.extend(run.shares);
        Ok(())
    })?;
    Ok(Report::new(prepared.head(), entries, summaries))
}

/// The study's runs, and the TR (seconds) every run shares: the study file's, or, in a
/// BIDS study that leaves it out, the one the sidecars agree on. The one place a TR is
/// resolved.
pub fn read_runs(files: &dyn InputFiles, study: &Study) -> Result<(f64, Vec<RunTrials>)> {
    match &study.source {
        TrialSource::Bids(source) => crate::bids::collect_bids_runs(files, study, source),
        TrialSource::Table(table) => {
            let (Some(tr), Some(counts)) = (study.acquisition.tr, &study.acquisition.scans) else {
                return Err(Error::Internal(
                    "a study with a trial table was read without its tr and scans".into(),
                ));
            };
            let scans = ScanTable::load(files, counts)?;
            let runs = crate::trials::read_runs(files, study, table, tr, &scans, ROWS_PER_CHUNK)?;
            Ok((tr, runs))
        }
    }
}

/// A study read and its runs collected, ready to be checked run by run.
pub struct Prepared {
    study: Study,
    runs: Vec<RunTrials>,
    settings: RunSettings,
    signal: Option<String>,
}

/// Reads the trial table (or BIDS dataset) and collects the runs to check, after
/// `--subjects` and `--shard`.
pub fn prepare(files: &dyn InputFiles, study: &Study, options: CheckOptions) -> Result<Prepared> {
    let (tr, runs) = read_runs(files, study)?;
    let runs = match &options.subjects {
        Some(wanted) => select::subjects(runs, wanted, study.source_path())?,
        None => runs,
    };
    let runs = match options.shard {
        Some(shard) => shard.runs_of(runs),
        None => runs,
    };
    Ok(Prepared {
        settings: RunSettings::of_study(study, tr, options.analysis)?,
        study: study.clone(),
        runs,
        signal: options.signal,
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
            settings: Settings::of(&self.settings),
        }
    }

    /// Checks every run (in parallel, a batch at a time) and hands each assessed run to
    /// `each` in table order; returns the cohort views. Problems of all runs are
    /// collected and returned together at the end.
    pub fn run_all(
        &self,
        files: &dyn InputFiles,
        each: &mut dyn FnMut(AssessedRun) -> Result<()>,
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
        render: &(dyn Fn(AssessedRun) -> T + Sync),
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
                            let assessed = self.check_run(files, run)?;
                            Ok((assessed.digest(&run.subject, &run.run), render(assessed)))
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

    /// Reads the run's own tables and assesses it.
    fn check_run(&self, files: &dyn InputFiles, run: &RunTrials) -> Result<AssessedRun> {
        let nuisance = inputs::nuisance(files, &self.study, run)?;
        let signal = inputs::signal(files, self.signal.as_deref(), run)?;
        assess_run(&self.settings, run, nuisance.as_ref(), signal.as_ref())
    }
}

/// `check --format json` of a prepared study: every run is checked and written to `out`
/// as its batch finishes (rendered on the worker threads), so the whole report is never
/// held in memory. Returns the cohort views; an error of the check itself is returned as
/// is, a failed write as [`Error::Output`].
pub fn stream_json(
    prepared: &Prepared,
    files: &dyn InputFiles,
    out: &mut dyn std::io::Write,
) -> Result<Summaries> {
    let output_error = |source| Error::Output {
        path: "the report".into(),
        source,
    };
    let mut stream = JsonStream::begin(out, &prepared.head()).map_err(output_error)?;
    // The GLM entries are written as they come; the separations and model shares, a
    // few numbers per run, follow the runs (in run order).
    let mut separations: Vec<Vec<u8>> = Vec::new();
    let mut shares: Vec<Vec<u8>> = Vec::new();
    let summaries = prepared.run_all_rendered(files, &render_entries, &mut |rendered| {
        let rendered = rendered.map_err(output_error)?;
        for run in &rendered.glms {
            stream.item(run).map_err(output_error)?;
        }
        separations.extend(rendered.separations);
        shares.extend(rendered.shares);
        Ok(())
    })?;
    for (key, items) in [("separations", &separations), ("model_shares", &shares)] {
        stream.next_list(key).map_err(output_error)?;
        for item in items {
            stream.item(item).map_err(output_error)?;
        }
    }
    stream.finish(&summaries).map_err(output_error)?;
    Ok(summaries)
}

/// A run's entries, each rendered as it sits in its list of the report.
struct RenderedEntries {
    glms: Vec<Vec<u8>>,
    separations: Vec<Vec<u8>>,
    shares: Vec<Vec<u8>>,
}

fn render_entries(run: AssessedRun) -> std::io::Result<RenderedEntries> {
    Ok(RenderedEntries {
        glms: run
            .glms
            .iter()
            .map(render_item)
            .collect::<std::io::Result<_>>()?,
        separations: run
            .separations
            .iter()
            .map(render_item)
            .collect::<std::io::Result<_>>()?,
        shares: run
            .shares
            .iter()
            .map(render_item)
            .collect::<std::io::Result<_>>()?,
    })
}
