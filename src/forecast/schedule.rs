//! Reading the per-trial reward schedule files a forecast spec names: one row per trial
//! of a run, one column `p1`, `p2`, … per option, each a probability in [0, 1].

use crate::error::{Error, Problem, Problems, Result};
use crate::files::InputFiles;
use crate::forecast::spec::{ForecastSpec, Rewards};
use crate::trials::Table;

/// Fills in the rows of every schedule file the spec's variants name.
pub fn load_schedules(files: &dyn InputFiles, spec: &mut ForecastSpec) -> Result<()> {
    let mut problems = Problems::default();
    for variant in &mut spec.variants {
        let (options, trials) = (variant.task.options, variant.task.trials);
        if let Rewards::Schedule { file, rows } = &mut variant.task.rewards {
            match read_schedule(files, file, options, trials) {
                Ok(read) => *rows = read,
                Err(err) => {
                    problems.keep::<()>(Err(err));
                }
            }
        }
    }
    problems.finish(())
}

fn read_schedule(
    files: &dyn InputFiles,
    path: &std::path::Path,
    options: usize,
    trials: usize,
) -> Result<Vec<Vec<f64>>> {
    let table = Table::read(files, path)?;
    let mut problems = Problems::default();
    let columns: Vec<Option<usize>> = (1..=options)
        .map(|k| {
            let name = format!("p{k}");
            problems.keep(
                table
                    .column(&name, &format!("option {k} of the reward schedule"))
                    .map_err(Into::into),
            )
        })
        .collect();
    let columns: Option<Vec<usize>> = columns.into_iter().collect();
    // A missing column was kept as a problem: finishing reports it.
    let Some(columns) = columns else {
        problems.finish(())?;
        return Err(Error::Internal(
            "a missing schedule column was not reported".into(),
        ));
    };
    if table.row_count() != trials {
        problems.push(
            Problem::new(
                crate::error::Location::file(path),
                format!(
                    "the schedule has {} rows but the task has {trials} trials per run",
                    table.row_count()
                ),
            )
            .with_hint("give one row per trial of a run (the same schedule is used in every run)"),
        );
    }
    let mut rows = Vec::with_capacity(table.row_count());
    for row in table.rows() {
        let mut probabilities = Vec::with_capacity(options);
        for &column in &columns {
            match table.number(row, column) {
                Ok(Some(p)) if (0.0..=1.0).contains(&p) => probabilities.push(p),
                Ok(value) => problems.push(
                    Problem::new(
                        table.cell_location(row, column),
                        match value {
                            Some(p) => format!("reward probability {p} is outside [0, 1]"),
                            None => "a reward probability is missing".to_string(),
                        },
                    )
                    .with_hint("every cell of a schedule is a probability in [0, 1]"),
                ),
                Err(problem) => problems.push(problem),
            }
        }
        rows.push(probabilities);
    }
    problems.finish(rows)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::files::MemoryFiles;
    use std::path::Path;

    #[test]
    fn schedules_are_read_and_checked() {
        let files = MemoryFiles::default()
            .with("s.csv", "p1,p2\n0.9,0.1\n0.1,0.9\n")
            .with("bad.csv", "p1,p3\n0.9,0.1\n1.5,0.9\n");
        let rows = read_schedule(&files, Path::new("s.csv"), 2, 2).expect("valid");
        assert_eq!(rows, vec![vec![0.9, 0.1], vec![0.1, 0.9]]);
        let err = read_schedule(&files, Path::new("bad.csv"), 2, 2)
            .unwrap_err()
            .to_string();
        assert!(err.contains("p2"), "{err}");
        let err = read_schedule(&files, Path::new("s.csv"), 2, 3)
            .unwrap_err()
            .to_string();
        assert!(err.contains("2 rows but the task has 3"), "{err}");
        let files = MemoryFiles::default().with("s.csv", "p1,p2\n0.9,0.1\n1.5,x\n");
        let err = read_schedule(&files, Path::new("s.csv"), 2, 2)
            .unwrap_err()
            .to_string();
        assert!(
            err.contains("s.csv, line 3") && err.contains("outside [0, 1]"),
            "{err}"
        );
    }
}
