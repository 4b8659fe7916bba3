//! `tangle merge`: shard reports (the JSON of `check --shard K/N --format json`) combined
//! into the report of the whole cohort. Runs are copied as written; the participant
//! summaries and cohort views are recomputed from the runs' typed pieces by the cohort
//! module, as `check` computes them.
//!
//! Runs are ordered by participant label (the order shards are assigned in) and, within
//! a participant, as in their shard. For a trial table listed in label order, the merged
//! report is byte for byte the unsharded one.

use std::collections::{HashMap, HashSet};
use std::io::Write;
use std::path::PathBuf;

use serde::Deserialize;
use serde_json::value::RawValue;

use crate::cohort::{RunDigest, Summaries, summarise};
use crate::diagnose::RegressorPartition;
use crate::error::{Error, Result};
use crate::render::json::{JsonStream, RenderedHead};
use crate::report::{RegressorReport, Report, ReportHead, RunReport};
use crate::screen::Status;

/// One shard report as read: its head kept as text, its runs as text.
#[derive(Deserialize)]
struct ShardReport<'a> {
    #[serde(borrow)]
    tool: &'a RawValue,
    #[serde(borrow)]
    study: &'a RawValue,
    #[serde(borrow)]
    settings: &'a RawValue,
    #[serde(borrow)]
    runs: Vec<&'a RawValue>,
}

/// The typed pieces of a run that the cohort views need.
#[derive(Deserialize)]
struct RunFields {
    subject: String,
    run: String,
    #[serde(default)]
    session: Option<String>,
    status: Status,
    regressors: Vec<RegressorReport>,
    vif: Vec<Option<f64>>,
    condition_indices: Vec<f64>,
    partition: Vec<RegressorPartition>,
}

impl RunFields {
    fn digest(&self) -> RunDigest {
        RunDigest::new(
            &self.subject,
            &self.run,
            self.status,
            self.regressors.iter().map(|r| &r.regressor),
            &self.vif,
            &self.condition_indices,
            &self.partition,
        )
    }
}

/// The shards combined: the first shard's head, every run in report order, and the
/// cohort views of them all.
pub struct Merged<'a> {
    head: ShardReport<'a>,
    runs: Vec<&'a RawValue>,
    pub summaries: Summaries,
}

/// Combines the shard files `(name, text)`.
pub fn merge(shards: &[(PathBuf, String)]) -> Result<Merged<'_>> {
    if shards.is_empty() {
        return Err(Error::Usage("merge: no shard reports given".into()));
    }
    let usage = |message: String| Error::Usage(format!("merge: {message}"));
    let mut reports = Vec::new();
    for (path, text) in shards {
        let report: ShardReport<'_> = serde_json::from_str(text).map_err(|err| {
            usage(format!(
                "{} is not a tangle check report in JSON ({err})",
                path.display()
            ))
        })?;
        reports.push((path, report));
    }
    let (first_path, first) = &reports[0];
    for (path, report) in &reports[1..] {
        for (what, a, b) in [
            ("study", first.study, report.study),
            ("settings", first.settings, report.settings),
            ("tool version", first.tool, report.tool),
        ] {
            if a.get() != b.get() {
                return Err(usage(format!(
                    "{} and {} differ in their {what}: shards of one report come from one study, checked with the same settings",
                    first_path.display(),
                    path.display()
                )));
            }
        }
    }
    // Every run with the file it came from; participants may not span shards.
    let mut runs: Vec<(String, &RawValue, RunDigest)> = Vec::new();
    let mut file_of: HashMap<String, usize> = HashMap::new();
    for (file, (path, report)) in reports.iter().enumerate() {
        let mut seen_here: HashSet<(String, String, Option<String>)> = HashSet::new();
        for (position, raw) in report.runs.iter().enumerate() {
            let fields: RunFields = serde_json::from_str(raw.get()).map_err(|err| {
                usage(format!(
                    "{}: run {} cannot be read ({err})",
                    path.display(),
                    position + 1
                ))
            })?;
            let key = (
                fields.subject.clone(),
                fields.run.clone(),
                fields.session.clone(),
            );
            if !seen_here.insert(key) {
                return Err(usage(format!(
                    "{}: subject {} run {} appears twice",
                    path.display(),
                    fields.subject,
                    fields.run
                )));
            }
            match file_of.get(&fields.subject) {
                Some(&other) if other != file => {
                    return Err(usage(format!(
                        "participant {} is in both {} and {}: the shards overlap (were they made with the same N?)",
                        fields.subject,
                        reports[other].0.display(),
                        path.display()
                    )));
                }
                _ => {
                    file_of.insert(fields.subject.clone(), file);
                }
            }
            runs.push((fields.subject.clone(), *raw, fields.digest()));
        }
    }
    // Stable: within a participant, runs stay in their shard's order.
    runs.sort_by(|a, b| a.0.cmp(&b.0));
    let (runs, digests): (Vec<&RawValue>, Vec<RunDigest>) = runs
        .into_iter()
        .map(|(_, raw, digest)| (raw, digest))
        .unzip();
    let Some((_, head)) = reports.into_iter().next() else {
        return Err(Error::Internal("merge: the shards vanished".into()));
    };
    Ok(Merged {
        head,
        runs,
        summaries: summarise(&digests),
    })
}

impl Merged<'_> {
    /// The merged report's JSON: the runs copied as the shards hold them.
    pub fn write_json(&self, out: &mut dyn Write) -> Result<()> {
        let io = |source: std::io::Error| Error::Output {
            path: "the merged report".into(),
            source,
        };
        let head = RenderedHead {
            tool: self.head.tool.get().as_bytes(),
            study: self.head.study.get().as_bytes(),
            settings: self.head.settings.get().as_bytes(),
        };
        let mut stream = JsonStream::begin_rendered(out, head).map_err(io)?;
        for raw in &self.runs {
            stream.rendered_run(raw.get().as_bytes()).map_err(io)?;
        }
        stream.finish(&self.summaries).map_err(io)?;
        Ok(())
    }

    /// The merged report as the report model, for the formats other than JSON: every
    /// run read from the shards, the cohort views as merged.
    pub fn report(&self) -> Result<Report> {
        let unreadable = |err: serde_json::Error| {
            Error::Usage(format!("merge: a shard report cannot be read ({err})"))
        };
        let head = ReportHead {
            tool: serde_json::from_str(self.head.tool.get()).map_err(unreadable)?,
            study: serde_json::from_str(self.head.study.get()).map_err(unreadable)?,
            settings: serde_json::from_str(self.head.settings.get()).map_err(unreadable)?,
        };
        let thresholds = head.settings.thresholds;
        let runs = self
            .runs
            .iter()
            .map(|raw| RunReport::read(raw.get(), &thresholds))
            .collect::<std::result::Result<Vec<_>, _>>()
            .map_err(unreadable)?;
        Ok(Report::new(head, runs, self.summaries.clone()))
    }
}
