//! Volumes per run: one number for every run, or a table (subject, run, scans).

use std::collections::BTreeMap;
use std::path::Path;

use super::Table;
use crate::error::{Error, Location, Problem, Problems, Result};
use crate::files::InputFiles;
use crate::study::MAX_SCANS;
use crate::study::ScanCounts;

#[derive(Debug, Clone)]
pub enum ScanTable {
    Fixed(usize),
    PerRun {
        path: std::path::PathBuf,
        counts: BTreeMap<(String, String), usize>,
    },
}

impl ScanTable {
    pub fn load(files: &dyn InputFiles, counts: &ScanCounts) -> Result<ScanTable> {
        match counts {
            ScanCounts::Fixed(n) => Ok(ScanTable::Fixed(*n)),
            ScanCounts::File(path) => Self::read(files, path),
        }
    }

    fn read(files: &dyn InputFiles, path: &Path) -> Result<ScanTable> {
        let table = Table::read(files, path)?;
        let columns = ["subject", "run", "scans"].map(|name| table.column(name, "scans_file"));
        let [subject, run, scans] = match columns {
            [Ok(a), Ok(b), Ok(c)] => [a, b, c],
            other => {
                return Err(Error::Input(
                    other.into_iter().filter_map(|c| c.err()).collect(),
                ));
            }
        };
        let mut problems = Problems::default();
        let mut counts = BTreeMap::new();
        for row in table.rows() {
            let key = (row.cell(subject).to_string(), row.cell(run).to_string());
            let count = match table.number(row, scans) {
                Ok(Some(n)) if n >= 1.0 && n.fract() == 0.0 && n <= MAX_SCANS as f64 => n as usize,
                Ok(value) => {
                    let found = value.map_or("nothing".to_string(), |n| n.to_string());
                    problems.push(
                        Problem::new(
                            table.cell_location(row, scans),
                            format!("scans must be a positive whole number, not {found}"),
                        )
                        .with_hint(format!(
                            "give the number of volumes of the run (1 to {MAX_SCANS})"
                        )),
                    );
                    continue;
                }
                Err(problem) => {
                    problems.push(problem);
                    continue;
                }
            };
            if counts.insert(key.clone(), count).is_some() {
                problems.push(
                    Problem::new(
                        Location::line(path, row.line()),
                        format!("subject {} run {} is listed twice", key.0, key.1),
                    )
                    .with_hint("keep one row per run"),
                );
            }
        }
        problems.finish(ScanTable::PerRun {
            path: path.to_path_buf(),
            counts,
        })
    }

    pub fn scans(&self, subject: &str, run: &str) -> Result<usize, Problem> {
        match self {
            ScanTable::Fixed(n) => Ok(*n),
            ScanTable::PerRun { path, counts } => counts
                .get(&(subject.to_string(), run.to_string()))
                .copied()
                .ok_or_else(|| {
                    Problem::new(
                        Location::file(path),
                        format!("no scan count for subject {subject} run {run}"),
                    )
                    .with_hint("add a row: subject, run, scans")
                }),
        }
    }
}
