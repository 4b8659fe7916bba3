//! Per-run nuisance tables (e.g. motion estimates): one row per scan, a header row.

use std::path::Path;

use super::Table;
use crate::error::{Error, Location, Problem, Result};
use crate::files::InputFiles;
use crate::study::NuisanceSpec;

#[derive(Debug, Clone, PartialEq)]
pub struct NuisanceTable {
    pub names: Vec<String>,
    /// One vector per column, one value per scan.
    pub columns: Vec<Vec<f64>>,
}

pub fn read_nuisance(
    files: &dyn InputFiles,
    spec: &NuisanceSpec,
    subject: &str,
    run: &str,
    scans: usize,
) -> Result<NuisanceTable> {
    let path = spec.path_for(subject, run);
    let table = Table::read(files, &path)?;
    let names: Vec<String> = if spec.columns.is_empty() {
        table.headers.clone()
    } else {
        spec.columns.clone()
    };
    let mut indices = Vec::new();
    let mut problems = Vec::new();
    for name in &names {
        match table.column(name, "[nuisance] columns") {
            Ok(index) => indices.push(index),
            Err(problem) => problems.push(problem),
        }
    }
    if !problems.is_empty() {
        return Err(Error::Input(problems));
    }
    if table.rows.len() != scans {
        return Err(wrong_row_count(
            &path,
            table.rows.len(),
            scans,
            subject,
            run,
        ));
    }
    let mut columns = vec![Vec::with_capacity(scans); names.len()];
    for row in &table.rows {
        for (values, &index) in columns.iter_mut().zip(&indices) {
            match table.number(row, index) {
                Ok(Some(value)) => values.push(value),
                Ok(None) => problems.push(
                    Problem::new(table.cell_location(row, index), "missing value in a nuisance table")
                        .with_hint("nuisance regressors need a value for every scan (e.g. 0 for the first scan's motion derivative)"),
                ),
                Err(problem) => problems.push(problem),
            }
        }
    }
    if !problems.is_empty() {
        return Err(Error::Input(problems));
    }
    Ok(NuisanceTable { names, columns })
}

fn wrong_row_count(path: &Path, rows: usize, scans: usize, subject: &str, run: &str) -> Error {
    Problem::new(
        Location::file(path),
        format!(
            "the nuisance table has {rows} rows but subject {subject} run {run} has {scans} scans"
        ),
    )
    .with_hint("a nuisance table needs exactly one row per scan (after its header row)")
    .into()
}
