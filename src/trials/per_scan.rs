//! Per-run tables with one row per scan and a header row: nuisance regressors (e.g.
//! motion estimates) and measured signals (one column per region of interest). Their
//! paths come from templates with `{subject}` and `{run}`.

use std::path::{Path, PathBuf};

use super::Table;
use crate::error::{Error, Location, Problem, Result};
use crate::files::InputFiles;
use crate::study::NuisanceSpec;

#[derive(Debug, Clone, PartialEq)]
pub struct PerScanTable {
    pub names: Vec<String>,
    /// One vector per column, one value per scan.
    pub columns: Vec<Vec<f64>>,
}

/// The nuisance regressors of one run.
pub type NuisanceTable = PerScanTable;

pub fn read_nuisance(
    files: &dyn InputFiles,
    spec: &NuisanceSpec,
    subject: &str,
    run: &str,
    scans: usize,
) -> Result<NuisanceTable> {
    let path = spec.path_for(subject, run);
    read_per_scan(files, &path, &spec.columns, scans, subject, run, "nuisance")
}

/// `template` with the run's labels filled in.
pub fn fill_template(template: &str, subject: &str, run: &str) -> PathBuf {
    PathBuf::from(template.replace("{subject}", subject).replace("{run}", run))
}

/// Reads the columns `wanted` (all columns when empty) of a table that must have one
/// row per scan and a number in every cell.
pub fn read_per_scan(
    files: &dyn InputFiles,
    path: &Path,
    wanted: &[String],
    scans: usize,
    subject: &str,
    run: &str,
    what: &str,
) -> Result<PerScanTable> {
    let table = Table::read(files, path)?;
    let names: Vec<String> = if wanted.is_empty() {
        table.headers.clone()
    } else {
        wanted.to_vec()
    };
    let mut indices = Vec::new();
    let mut problems = Vec::new();
    for name in &names {
        match table.column(name, &format!("the {what} columns")) {
            Ok(index) => indices.push(index),
            Err(problem) => problems.push(problem),
        }
    }
    if !problems.is_empty() {
        return Err(Error::Input(problems));
    }
    if table.row_count() != scans {
        return Err(Problem::new(
            Location::file(path),
            format!(
                "the {what} table has {} rows but subject {subject} run {run} has {scans} scans",
                table.row_count()
            ),
        )
        .with_hint(format!(
            "a {what} table needs exactly one row per scan (after its header row)"
        ))
        .into());
    }
    let mut columns = vec![Vec::with_capacity(scans); names.len()];
    for row in table.rows() {
        for (values, &index) in columns.iter_mut().zip(&indices) {
            match table.number(row, index) {
                Ok(Some(value)) => values.push(value),
                Ok(None) => problems.push(
                    Problem::new(
                        table.cell_location(row, index),
                        format!("missing value in a {what} table"),
                    )
                    .with_hint(
                        "every scan needs a value (e.g. 0 for the first scan's motion derivative)",
                    ),
                ),
                Err(problem) => problems.push(problem),
            }
        }
    }
    if !problems.is_empty() {
        return Err(Error::Input(problems));
    }
    Ok(PerScanTable { names, columns })
}
