//! `tangle merge`: shard reports (the JSON of `check --shard K/N --format json`) combined
//! into the report of the whole cohort. Entries are copied as written; the participant
//! summaries and cohort views are recomputed from their typed pieces by the cohort
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

use crate::cohort::{GlmDigest, RunDigest, Summaries, summarise};
use crate::error::{Error, Result};
use crate::render::json::{JsonStream, RenderedHead};
use crate::report::{
    ModulatorShare, RegressorReport, Report, ReportHead, RunEntries, RunReport, RunSeparation,
};
use crate::screen::Status;

/// One shard report as read: its head and every entry kept as text.
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
    #[serde(borrow)]
    separations: Vec<&'a RawValue>,
    #[serde(borrow)]
    model_shares: Vec<&'a RawValue>,
}

/// The typed pieces of a GLM entry that the cohort views need.
#[derive(Deserialize)]
struct GlmFields {
    subject: String,
    run: String,
    #[serde(default)]
    session: Option<String>,
    glm: String,
    status: Status,
    regressors: Vec<RegressorReport>,
    vif: Vec<Option<f64>>,
    condition_indices: Vec<f64>,
}

/// A run of a shard: its entries as text and their typed pieces.
struct ShardRun<'a> {
    subject: String,
    run: String,
    glms: Vec<(&'a RawValue, GlmDigest)>,
    separations: Vec<(&'a RawValue, RunSeparation)>,
    shares: Vec<(&'a RawValue, ModulatorShare)>,
}

impl ShardRun<'_> {
    fn digest(&self) -> RunDigest {
        RunDigest::new(
            &self.subject,
            &self.run,
            self.glms.iter().map(|(_, g)| g.clone()).collect(),
            self.shares.iter().map(|(_, s)| s.partition.clone()),
            self.separations.iter().map(|(_, s)| &s.separation),
        )
    }
}

type RunKey = (String, String, Option<String>);

/// The shards combined: the first shard's head, every entry in report order, and the
/// cohort views of them all.
pub struct Merged<'a> {
    head: (&'a RawValue, &'a RawValue, &'a RawValue),
    glms: Vec<&'a RawValue>,
    separations: Vec<&'a RawValue>,
    shares: Vec<&'a RawValue>,
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
    let mut runs: Vec<ShardRun<'_>> = Vec::new();
    let mut file_of: HashMap<String, usize> = HashMap::new();
    for (file, (path, report)) in reports.iter().enumerate() {
        let read = |what: &str, position: usize, err: serde_json::Error| {
            usage(format!(
                "{}: {what} {} cannot be read ({err})",
                path.display(),
                position + 1
            ))
        };
        let mut index_of: HashMap<RunKey, usize> = HashMap::new();
        let mut seen: HashSet<(RunKey, String)> = HashSet::new();
        let first_run = runs.len();
        for (position, raw) in report.runs.iter().enumerate() {
            let fields: GlmFields =
                serde_json::from_str(raw.get()).map_err(|err| read("run", position, err))?;
            let key = (
                fields.subject.clone(),
                fields.run.clone(),
                fields.session.clone(),
            );
            if !seen.insert((key.clone(), fields.glm.clone())) {
                return Err(usage(format!(
                    "{}: subject {} run {} GLM \"{}\" appears twice",
                    path.display(),
                    fields.subject,
                    fields.run,
                    fields.glm
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
            let digest = GlmDigest::new(
                &fields.glm,
                fields.status,
                fields.regressors.iter().map(|r| &r.regressor),
                &fields.vif,
                &fields.condition_indices,
            );
            let at = *index_of.entry(key).or_insert_with(|| {
                runs.push(ShardRun {
                    subject: fields.subject.clone(),
                    run: fields.run.clone(),
                    glms: Vec::new(),
                    separations: Vec::new(),
                    shares: Vec::new(),
                });
                runs.len() - 1
            });
            runs[at].glms.push((*raw, digest));
        }
        let run_of = |key: RunKey, what: &str, position: usize| {
            index_of.get(&key).copied().ok_or_else(|| {
                usage(format!(
                    "{}: {what} {} names subject {} run {}, which has no entry in runs",
                    path.display(),
                    position + 1,
                    key.0,
                    key.1
                ))
            })
        };
        for (position, raw) in report.separations.iter().enumerate() {
            let entry: RunSeparation =
                serde_json::from_str(raw.get()).map_err(|err| read("separation", position, err))?;
            let key = (
                entry.subject.clone(),
                entry.run.clone(),
                entry.session.clone(),
            );
            let at = run_of(key, "separation", position)?;
            runs[at].separations.push((*raw, entry));
        }
        for (position, raw) in report.model_shares.iter().enumerate() {
            let entry: ModulatorShare = serde_json::from_str(raw.get())
                .map_err(|err| read("model share", position, err))?;
            let key = (
                entry.subject.clone(),
                entry.run.clone(),
                entry.session.clone(),
            );
            let at = run_of(key, "model share", position)?;
            runs[at].shares.push((*raw, entry));
        }
        debug_assert!(runs[first_run..].iter().all(|r| !r.glms.is_empty()));
    }
    // Stable: within a participant, runs stay in their shard's order.
    runs.sort_by(|a, b| a.subject.cmp(&b.subject));
    let digests: Vec<RunDigest> = runs.iter().map(ShardRun::digest).collect();
    let Some((_, head)) = reports.into_iter().next() else {
        return Err(Error::Internal("merge: the shards vanished".into()));
    };
    Ok(Merged {
        head: (head.tool, head.study, head.settings),
        glms: runs
            .iter()
            .flat_map(|r| r.glms.iter().map(|g| g.0))
            .collect(),
        separations: runs
            .iter()
            .flat_map(|r| r.separations.iter().map(|s| s.0))
            .collect(),
        shares: runs
            .iter()
            .flat_map(|r| r.shares.iter().map(|s| s.0))
            .collect(),
        summaries: summarise(&digests),
    })
}

impl Merged<'_> {
    /// The merged report's JSON: every entry copied as the shards hold it.
    pub fn write_json(&self, out: &mut dyn Write) -> Result<()> {
        let io = |source: std::io::Error| Error::Output {
            path: "the merged report".into(),
            source,
        };
        let head = RenderedHead {
            tool: self.head.0.get().as_bytes(),
            study: self.head.1.get().as_bytes(),
            settings: self.head.2.get().as_bytes(),
        };
        let mut stream = JsonStream::begin_rendered(out, head).map_err(io)?;
        for raw in &self.glms {
            stream.item(raw.get().as_bytes()).map_err(io)?;
        }
        for (key, items) in [
            ("separations", &self.separations),
            ("model_shares", &self.shares),
        ] {
            stream.next_list(key).map_err(io)?;
            for raw in items {
                stream.item(raw.get().as_bytes()).map_err(io)?;
            }
        }
        stream.finish(&self.summaries).map_err(io)?;
        Ok(())
    }

    /// The merged report as the report model, for the formats other than JSON: every
    /// entry read from the shards, the cohort views as merged.
    pub fn report(&self) -> Result<Report> {
        let unreadable = |err: serde_json::Error| {
            Error::Usage(format!("merge: a shard report cannot be read ({err})"))
        };
        let head = ReportHead {
            tool: serde_json::from_str(self.head.0.get()).map_err(unreadable)?,
            study: serde_json::from_str(self.head.1.get()).map_err(unreadable)?,
            settings: serde_json::from_str(self.head.2.get()).map_err(unreadable)?,
        };
        let thresholds = head.settings.thresholds;
        let entries = RunEntries {
            glms: self
                .glms
                .iter()
                .map(|raw| RunReport::read(raw.get(), &thresholds))
                .collect::<std::result::Result<Vec<_>, _>>()
                .map_err(unreadable)?,
            separations: typed(&self.separations).map_err(unreadable)?,
            shares: typed(&self.shares).map_err(unreadable)?,
        };
        Ok(Report::new(head, entries, self.summaries.clone()))
    }
}

/// Entries read back from their JSON text.
fn typed<'a, T: serde::Deserialize<'a>>(items: &[&'a RawValue]) -> serde_json::Result<Vec<T>> {
    items
        .iter()
        .map(|raw| serde_json::from_str(raw.get()))
        .collect()
}
