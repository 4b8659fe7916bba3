//! A BIDS study's runs: each events file read (and joined to its model outputs), its TR
//! taken from the BOLD sidecar, its volumes from the image header, then turned into
//! [`RunTrials`] by the same code as a flat trial table.

use std::collections::BTreeMap;
use std::path::PathBuf;

use super::discover::{RunFiles, find_runs};
use super::join::{find_derivative, join};
use super::nifti::read_image_header;
use super::sidecar::resolve_sidecar;
use super::{RUN_COLUMN, SUBJECT_COLUMN};
use crate::error::{Error, Location, Problem, Problems, Result};
use crate::files::InputFiles;
use crate::flags::{Flag, FlagCode, Severity};
use crate::study::{BidsSource, LabelColumns, MAX_PLAUSIBLE_TR, ScanCounts, Study};
use crate::trials::{RunTrials, ScanTable, Table, collect_runs};

/// Largest difference between two TRs that still counts as agreement (seconds).
const TR_TOLERANCE: f64 = crate::precision::SAME_TR_SECONDS;

/// What one run's files say about its acquisition.
struct Acquired {
    tr: f64,
    tr_source: PathBuf,
    scans: usize,
    flags: Vec<Flag>,
}

/// The study's TR (from the data, or the study file's override) and its runs.
pub fn collect_bids_runs(
    files: &dyn InputFiles,
    study: &Study,
    source: &BidsSource,
) -> Result<(f64, Vec<RunTrials>)> {
    let found = find_runs(files, source)?;
    let mut problems = Problems::default();
    let mut read = Vec::new();
    for run in &found {
        let table = problems.keep(events_table(files, source, run));
        let acquired = problems.keep(acquisition(files, study, source, run));
        if let (Some(table), Some(acquired)) = (table, acquired) {
            read.push((run, table, acquired));
        }
    }
    let read = problems.finish(read)?;
    let tr = match study.acquisition.tr {
        Some(tr) => tr,
        None => common_tr(&read)?,
    };
    let labels = LabelColumns {
        subject: SUBJECT_COLUMN.into(),
        run: RUN_COLUMN.into(),
    };
    let mut problems = Problems::default();
    let mut runs = Vec::new();
    for (files_of_run, table, acquired) in read {
        let counts = BTreeMap::from([(
            (files_of_run.subject.clone(), files_of_run.run.clone()),
            acquired.scans,
        )]);
        let scans = ScanTable::PerRun {
            path: files_of_run.events.clone(),
            counts,
        };
        if let Some(mut collected) = problems.keep(collect_runs(study, &labels, tr, &table, &scans))
        {
            for run in &mut collected {
                run.session = files_of_run.session.clone();
                run.flags.extend(acquired.flags.iter().cloned());
            }
            runs.extend(collected);
        }
    }
    let runs = problems.finish(runs)?;
    Ok((tr, runs))
}

/// The events file with the subject and run labels as columns, joined to its model
/// outputs when the study names a derivatives folder.
fn events_table(files: &dyn InputFiles, source: &BidsSource, run: &RunFiles) -> Result<Table> {
    let mut table = Table::read(files, &run.events)?;
    if let Some(root) = &source.derivatives {
        let path = find_derivative(files, root, &source.root, run)?;
        let outputs = Table::read(files, &path)?;
        table = join(table, &outputs, &source.join)?;
    }
    let labels = [&run.subject, &run.run];
    Ok(
        table.with_columns(vec![SUBJECT_COLUMN.into(), RUN_COLUMN.into()], |_, k| {
            labels[k].clone()
        }),
    )
}

/// TR and volumes of one run, with flags where the study file overrides the data.
fn acquisition(
    files: &dyn InputFiles,
    study: &Study,
    source: &BidsSource,
    run: &RunFiles,
) -> Result<Acquired> {
    let image = run.image(files);
    let image_name = image.clone().unwrap_or_else(|| run.image_name());
    let sidecar = resolve_sidecar(files, &source.root, &image_name)?;
    let mut flags = Vec::new();
    let data_tr = sidecar.positive_number("RepetitionTime")?;
    let (tr, tr_source) = match (study.acquisition.tr, data_tr) {
        (Some(given), Some((found, file))) => {
            if (given - found).abs() > TR_TOLERANCE {
                flags.push(Flag::new(
                    Severity::Warning,
                    FlagCode::TrDisagreesWithData,
                    Vec::new(),
                    format!("the study file's tr = {given} s overrides RepetitionTime = {found} s in {}", file.display()),
                ));
            }
            (given, study.path.clone())
        }
        (Some(given), None) => (given, study.path.clone()),
        (None, Some((found, file))) if found > MAX_PLAUSIBLE_TR => {
            return Err(Problem::new(
                Location::file(&file),
                format!("\"RepetitionTime\": {found} seconds is implausible"),
            )
            .with_hint(format!(
                "BIDS gives RepetitionTime in seconds, not milliseconds: write {}, or set tr = <seconds> under [acquisition]",
                found / 1000.0
            ))
            .into());
        }
        (None, Some((found, file))) => (found, file),
        (None, None) => {
            return Err(Problem::new(
                Location::file(&image_name),
                "no RepetitionTime: no JSON sidecar applies to this image (or none has the key)",
            )
            .with_hint(format!(
                "add {} with \"RepetitionTime\" (seconds), a sidecar higher up (e.g. task-{}_bold.json at the dataset root), or tr = <seconds> under [acquisition]",
                image_name.with_extension("").with_extension("json").display(),
                source.task
            ))
            .into());
        }
    };
    let header = match &image {
        Some(path) => Some((read_image_header(files, path)?, path.clone())),
        None => None,
    };
    let scans = match (fixed_scans(study), &header) {
        (Some(given), Some((header, path))) => {
            if given != header.volumes {
                flags.push(Flag::new(
                    Severity::Warning,
                    FlagCode::ScansDisagreeWithData,
                    Vec::new(),
                    format!(
                        "the study file's scans = {given} overrides the {} volumes in {}",
                        header.volumes,
                        path.display()
                    ),
                ));
            }
            given
        }
        (Some(given), None) => given,
        (None, Some((header, path))) if header.volumes > crate::study::MAX_SCANS => {
            return Err(Problem::new(
                Location::file(path),
                format!(
                    "the image header gives {} volumes, more than tangle reads ({})",
                    header.volumes,
                    crate::study::MAX_SCANS
                ),
            )
            .with_hint("the header may be damaged: re-export the image, or give scans = <volumes> under [acquisition]")
            .into());
        }
        (None, Some((header, _))) => header.volumes,
        (None, None) => {
            return Err(Problem::new(
                Location::file(&run.events),
                format!("no image {} to count this run's volumes", image_name.display()),
            )
            .with_hint("put the BOLD image (or a copy of its header) beside the events file, or give scans = <volumes> under [acquisition]")
            .into());
        }
    };
    if let Some((times, file)) = sidecar.numbers("SliceTiming")? {
        if let Some(flag) = slice_timing_note(&times, &file, tr, study.acquisition.reference) {
            flags.push(flag);
        }
    }
    Ok(Acquired {
        tr,
        tr_source,
        scans,
        flags,
    })
}

/// The study file's override of every run's volumes, if it gives one.
fn fixed_scans(study: &Study) -> Option<usize> {
    match study.acquisition.scans {
        Some(ScanCounts::Fixed(scans)) => Some(scans),
        _ => None,
    }
}

/// A note suggesting the sampling reference that matches the middle of the slice
/// acquisition times, when the study's differs from it by more than 5 % of the TR.
fn slice_timing_note(
    times: &[f64],
    file: &std::path::Path,
    tr: f64,
    reference: f64,
) -> Option<Flag> {
    let first = times.iter().copied().fold(f64::INFINITY, f64::min);
    let last = times.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    if !(first.is_finite() && last.is_finite()) || tr <= 0.0 {
        return None;
    }
    let suggested = ((first + last) / 2.0 / tr).clamp(0.0, 1.0);
    ((suggested - reference).abs() > 0.05).then(|| {
        Flag::new(
            Severity::Note,
            FlagCode::SliceTimingReference,
            Vec::new(),
            format!(
                "SliceTiming in {} spans {first}–{last} s; the middle of that span is {:.2} of the TR, the study samples at reference = {reference}. If slice-timing correction aligns the data to the middle slice time, set [acquisition] reference = {suggested:.2}.",
                file.display(),
                suggested
            ),
        )
    })
}

/// The TR every run shares; runs with different TRs are an error naming two of them.
fn common_tr(read: &[(&RunFiles, Table, Acquired)]) -> Result<f64> {
    let Some((_, _, first)) = read.first() else {
        return Err(Error::Internal("no runs to take a TR from".into()));
    };
    for (_, _, other) in read {
        if (other.tr - first.tr).abs() > TR_TOLERANCE {
            return Err(Problem::new(
                Location::file(&other.tr_source),
                format!(
                    "RepetitionTime {} s differs from {} s in {}",
                    other.tr,
                    first.tr,
                    first.tr_source.display()
                ),
            )
            .with_hint("tangle checks one TR per study: check the runs separately, or set tr under [acquisition] if the sidecars are wrong")
            .into());
        }
    }
    Ok(first.tr)
}
