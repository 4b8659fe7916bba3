//! Finding a task's events files: `sub-<label>[/ses-<label>]/func/` files named
//! `sub-<label>[_ses-<label>]_task-<label>[_…][_run-<index>]_events.tsv` (BIDS
//! specification, "Task events" and "File name structure").

use std::path::{Path, PathBuf};

use super::entities::BidsName;
use crate::error::{Location, Problem, Result};
use crate::files::InputFiles;
use crate::study::BidsSource;

/// One run's events file and where it sits.
#[derive(Debug, Clone, PartialEq)]
pub struct RunFiles {
    pub subject: String,
    pub session: Option<String>,
    /// The `run-` label, or "1" when the file has none (a single run).
    pub run: String,
    pub events: PathBuf,
    pub name: BidsName,
}

impl RunFiles {
    /// The BOLD image this events file describes, if one exists (`.nii.gz`, then `.nii`).
    pub fn image(&self, files: &dyn InputFiles) -> Option<PathBuf> {
        [".nii.gz", ".nii"]
            .iter()
            .map(|ext| self.sibling("bold", ext))
            .find(|path| files.is_file(path))
    }

    /// The name of the image this events file describes, whether or not it exists.
    pub fn image_name(&self) -> PathBuf {
        self.sibling("bold", ".nii.gz")
    }

    fn sibling(&self, suffix: &str, extension: &str) -> PathBuf {
        let stem: Vec<String> = self
            .name
            .entities
            .iter()
            .map(|(k, v)| format!("{k}-{v}"))
            .collect();
        self.events
            .with_file_name(format!("{}_{suffix}{extension}", stem.join("_")))
    }
}

fn label_of(path: &Path, prefix: &str) -> Option<String> {
    let name = path.file_name()?.to_str()?;
    let label = name.strip_prefix(prefix)?;
    (!label.is_empty() && label.chars().all(|c| c.is_ascii_alphanumeric()))
        .then(|| label.to_string())
}

fn folders(files: &dyn InputFiles, folder: &Path, prefix: &str) -> Vec<(String, PathBuf)> {
    files
        .list(folder)
        .unwrap_or_default()
        .into_iter()
        .filter(|p| !files.is_file(p))
        .filter_map(|p| label_of(&p, prefix).map(|label| (label, p)))
        .collect()
}

/// Every events file of the task, in subject, session and run order.
pub fn find_runs(files: &dyn InputFiles, source: &BidsSource) -> Result<Vec<RunFiles>> {
    if files.list(&source.root).is_err() {
        return Err(Problem::new(
            Location::file(&source.root),
            "the BIDS dataset folder cannot be read",
        )
        .with_hint("check [bids] root; it is taken from the study file's folder")
        .into());
    }
    let mut runs = Vec::new();
    for (subject, subject_dir) in folders(files, &source.root, "sub-") {
        let sessions = folders(files, &subject_dir, "ses-");
        let places: Vec<(Option<String>, PathBuf)> = if sessions.is_empty() {
            vec![(None, subject_dir.join("func"))]
        } else {
            sessions
                .into_iter()
                .map(|(s, dir)| (Some(s), dir.join("func")))
                .collect()
        };
        for (session, func) in places {
            if let (Some(wanted), Some(s)) = (&source.sessions, &session) {
                if !wanted.contains(s) {
                    continue;
                }
            }
            for path in files.list(&func).unwrap_or_default() {
                let Some(file_name) = path.file_name().and_then(|n| n.to_str()) else {
                    continue;
                };
                let Some(name) = BidsName::parse(file_name) else {
                    continue;
                };
                if name.suffix != "events"
                    || name.extension != ".tsv"
                    || name.get("task") != Some(source.task.as_str())
                {
                    continue;
                }
                if name.get("sub") != Some(subject.as_str())
                    || name.get("ses") != session.as_deref()
                {
                    return Err(Problem::new(
                        Location::file(&path),
                        "the file name's sub-/ses- labels do not match the folders it is in",
                    )
                    .with_hint(
                        "rename the file or move it to its subject's (and session's) func folder",
                    )
                    .into());
                }
                let run = name.get("run").unwrap_or("1").to_string();
                if source
                    .runs
                    .as_ref()
                    .is_some_and(|wanted| !wanted.contains(&run))
                {
                    continue;
                }
                runs.push(RunFiles {
                    subject: subject.clone(),
                    session: session.clone(),
                    run,
                    events: path.clone(),
                    name,
                });
            }
        }
    }
    if runs.is_empty() {
        return Err(Problem::new(
            Location::file(&source.root),
            format!(
                "no events files for task \"{}\" (looked for sub-*/[ses-*/]func/*_task-{}_*events.tsv)",
                source.task, source.task
            ),
        )
        .with_hint("check [bids] task, and the sessions / runs filters")
        .into());
    }
    // Runs in numeric order where labels are numbers ("2" before "10").
    runs.sort_by(|a, b| {
        let key = |r: &RunFiles| (r.run.parse::<u64>().unwrap_or(u64::MAX), r.run.clone());
        (&a.subject, &a.session)
            .cmp(&(&b.subject, &b.session))
            .then(key(a).cmp(&key(b)))
    });
    Ok(runs)
}
