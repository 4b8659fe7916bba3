//! `tangle merge`: shard reports (the JSON of `check --shard K/N --format json`) combined
//! into the report of the whole cohort. Runs are copied as written; the participant
//! summaries and cohort views are recomputed with the functions `check` uses
//! ([`crate::check::summarise`]).
//!
//! Runs are ordered by participant label (the order shards are assigned in) and, within
//! a participant, as in their shard. For a trial table listed in label order, the merged
//! report is byte for byte the unsharded one.

use std::collections::HashMap;
use std::io::Write;
use std::path::PathBuf;

use serde::Deserialize;
use serde_json::value::RawValue;

use crate::check::{RunDigest, Summaries, summarise};
use crate::diagnose::partition::{GroupShare, RegressorPartition};
use crate::error::{Error, Result};
use crate::screen::{CLAIMS_NOTE, Status};

/// One shard report as read: its head kept as text, its runs as text plus what the
/// summaries need of them.
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

#[derive(Deserialize)]
struct RunFields {
    subject: String,
    run: String,
    #[serde(default)]
    session: Option<String>,
    status: String,
    regressors: Vec<RegressorFields>,
    vif: Vec<Option<f64>>,
    condition_indices: Vec<f64>,
    partition: Vec<PartitionFields>,
}

#[derive(Deserialize)]
struct RegressorFields {
    name: String,
    kind: String,
}

#[derive(Deserialize)]
struct PartitionFields {
    regressor: String,
    model: Option<String>,
    r2: Option<f64>,
    unique: Option<f64>,
    shared_with: Vec<GroupFields>,
}

#[derive(Deserialize)]
struct GroupFields {
    group: String,
    share: f64,
}

fn status(label: &str) -> Option<Status> {
    match label {
        "ok" => Some(Status::Ok),
        "caution" => Some(Status::Caution),
        "severe" => Some(Status::Severe),
        _ => None,
    }
}

fn digest(fields: RunFields) -> Option<RunDigest> {
    let status = status(&fields.status)?;
    let partition: Vec<RegressorPartition> = fields
        .partition
        .into_iter()
        .map(|p| RegressorPartition {
            regressor: p.regressor,
            model: p.model,
            r2: p.r2,
            unique: p.unique,
            components: Vec::new(),
            shared_with: p
                .shared_with
                .into_iter()
                .map(|g| GroupShare {
                    group: g.group,
                    share: g.share,
                })
                .collect(),
        })
        .collect();
    let shared = partition
        .iter()
        .flat_map(|p| {
            p.shared_with
                .iter()
                .filter(|g| {
                    Some(&g.group) != p.model.as_ref()
                        && g.group != crate::diagnose::partition::TASK
                        && g.group != crate::diagnose::partition::NUISANCE
                })
                .map(|g| (p.regressor.clone(), g.group.clone(), g.share))
        })
        .collect();
    Some(RunDigest {
        subject: fields.subject,
        run: fields.run,
        status,
        vifs: fields
            .regressors
            .iter()
            .zip(&fields.vif)
            .filter(|(r, _)| r.kind == "onset" || r.kind == "modulator")
            .filter_map(|(r, v)| v.map(|v| (r.name.clone(), v)))
            .collect(),
        largest_condition_index: fields.condition_indices.last().copied(),
        shared,
        partition,
    })
}

/// The merged cohort report's JSON, from the shard files' `(name, text)`.
pub fn merge_json(shards: &[(PathBuf, String)], out: &mut dyn Write) -> Result<Summaries> {
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
    let mut runs: Vec<(String, usize, &RawValue, RunDigest)> = Vec::new();
    let mut file_of: HashMap<String, usize> = HashMap::new();
    for (file, (path, report)) in reports.iter().enumerate() {
        let mut seen_here: HashMap<(String, String, Option<String>), ()> = HashMap::new();
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
            if seen_here.insert(key, ()).is_some() {
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
            let subject = fields.subject.clone();
            let digest = digest(fields).ok_or_else(|| {
                usage(format!(
                    "{}: run {} has an unknown status",
                    path.display(),
                    position + 1
                ))
            })?;
            runs.push((subject, position, *raw, digest));
        }
    }
    // Stable: within a participant, runs stay in their shard's order.
    runs.sort_by(|a, b| a.0.cmp(&b.0));
    let io = |err: std::io::Error| Error::Output {
        path: "the merged report".into(),
        source: err,
    };
    let write = |out: &mut dyn Write, bytes: &[u8]| out.write_all(bytes).map_err(io);
    write(out, b"{\n  \"tool\": ")?;
    write(out, first.tool.get().as_bytes())?;
    write(out, b",\n  \"study\": ")?;
    write(out, first.study.get().as_bytes())?;
    write(out, b",\n  \"settings\": ")?;
    write(out, first.settings.get().as_bytes())?;
    write(out, b",\n  \"runs\": [")?;
    for (index, (_, _, raw, _)) in runs.iter().enumerate() {
        write(out, if index == 0 { b"\n    " } else { b",\n    " })?;
        write(out, raw.get().as_bytes())?;
    }
    write(out, if runs.is_empty() { b"]" } else { b"\n  ]" })?;
    let digests: Vec<RunDigest> = runs.into_iter().map(|(_, _, _, d)| d).collect();
    let summaries = summarise(&digests);
    let mut tail = Vec::new();
    tail.extend_from_slice(b",\n  \"subjects\": ");
    indented(&mut tail, &summaries.subjects)?;
    tail.extend_from_slice(b",\n  \"cohort\": ");
    indented(&mut tail, &summaries.cohort)?;
    tail.extend_from_slice(b",\n  \"subject_partition\": ");
    indented(&mut tail, &summaries.subject_partition)?;
    tail.extend_from_slice(b",\n  \"cohort_partition\": ");
    indented(&mut tail, &summaries.cohort_partition)?;
    tail.extend_from_slice(b",\n  \"claims_note\": ");
    indented(&mut tail, &CLAIMS_NOTE)?;
    tail.extend_from_slice(b"\n}\n");
    write(out, &tail)?;
    Ok(summaries)
}

fn indented<T: serde::Serialize>(out: &mut Vec<u8>, value: &T) -> Result<()> {
    let text = serde_json::to_vec_pretty(value)
        .map_err(|err| Error::Internal(format!("cannot render the merged report: {err}")))?;
    for (index, line) in text.split(|&b| b == b'\n').enumerate() {
        if index > 0 {
            out.extend_from_slice(b"\n  ");
        }
        out.extend_from_slice(line);
    }
    Ok(())
}

/// The merged report as the report model, for the formats other than JSON: read back
/// from the merged JSON, so every format shows exactly the numbers the JSON holds.
pub fn merged_report(merged_json: &[u8]) -> Result<crate::report::Report> {
    serde_json::from_slice(merged_json)
        .map_err(|err| Error::Internal(format!("cannot read back the merged report: {err}")))
}
