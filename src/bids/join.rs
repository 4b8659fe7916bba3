//! Model outputs kept under `derivatives/`: per-run tables matched to an events file by
//! their file-name entities, joined to its rows by row order or by a key column.

use std::collections::HashMap;
use std::path::{Path, PathBuf};

use super::discover::RunFiles;
use super::entities::BidsName;
use crate::error::{Location, Problem, Result};
use crate::files::InputFiles;
use crate::study::JoinBy;
use crate::trials::Table;

/// The derivative table of `run`: the one `.tsv` in the mirrored
/// `sub-<label>[/ses-<label>]/func/` folder whose entities include all of the events
/// file's (a `desc-` or other extra entity is fine).
pub fn find_derivative(
    files: &dyn InputFiles,
    root: &Path,
    dataset: &Path,
    run: &RunFiles,
) -> Result<PathBuf> {
    let relative = run
        .events
        .parent()
        .and_then(|p| p.strip_prefix(dataset).ok())
        .unwrap_or(Path::new(""));
    let folder = root.join(relative);
    let events_entities = BidsName {
        entities: run.name.entities.clone(),
        suffix: String::new(),
        extension: String::new(),
    };
    let matches: Vec<PathBuf> = files
        .list(&folder)
        .unwrap_or_default()
        .into_iter()
        .filter(|p| {
            p.file_name()
                .and_then(|n| n.to_str())
                .and_then(BidsName::parse)
                .is_some_and(|n| n.extension == ".tsv" && events_entities.entities_within(&n))
        })
        .collect();
    match matches.as_slice() {
        [one] => Ok(one.clone()),
        [] => Err(Problem::new(
            Location::file(&run.events),
            format!("no model-output table for this run in {}", folder.display()),
        )
        .with_hint("name it with the run's entities, e.g. <same entities>_desc-<model>_events.tsv, or remove [bids] derivatives")
        .into()),
        many => Err(Problem::new(
            Location::file(&run.events),
            format!(
                "{} model-output tables match this run: {}",
                many.len(),
                many.iter().map(|p| p.display().to_string()).collect::<Vec<_>>().join(", ")
            ),
        )
        .with_hint("keep one table per run in the derivatives folder")
        .into()),
    }
}

/// The events table with the derivative table's columns added to each row.
pub fn join(events: Table, outputs: &Table, by: &JoinBy) -> Result<Table> {
    let (key_in_events, key_in_outputs) = match by {
        JoinBy::RowOrder => (None, None),
        JoinBy::Column(name) => {
            let wanted = format!("[bids] join_column = \"{name}\"");
            (
                Some(events.column(name, &wanted)?),
                Some(outputs.column(name, &wanted)?),
            )
        }
    };
    let added: Vec<usize> = (0..outputs.headers.len())
        .filter(|&c| Some(c) != key_in_outputs)
        .collect();
    for &c in &added {
        if events.headers.contains(&outputs.headers[c]) {
            return Err(Problem::new(
                Location::line(&outputs.path, 1),
                format!(
                    "column \"{}\" is also in {}",
                    outputs.headers[c],
                    events.path.display()
                ),
            )
            .with_hint("rename the model-output column so each column has one source")
            .into());
        }
    }
    let rows_for: Vec<Option<usize>> = match (key_in_events, key_in_outputs) {
        (Some(ke), Some(ko)) => {
            let mut index: HashMap<&str, usize> = HashMap::new();
            for (i, row) in outputs.rows().enumerate() {
                if index.insert(row.cell(ko), i).is_some() {
                    return Err(Problem::new(
                        Location::line(&outputs.path, row.line()),
                        format!("key \"{}\" appears twice", row.cell(ko)),
                    )
                    .with_hint("each row of a model-output table needs its own key")
                    .into());
                }
            }
            events
                .rows()
                .map(|row| index.get(row.cell(ke)).copied())
                .collect()
        }
        _ => {
            if events.row_count() != outputs.row_count() {
                return Err(Problem::new(
                    Location::file(&outputs.path),
                    format!(
                        "{} rows, but the events file {} has {}",
                        outputs.row_count(),
                        events.path.display(),
                        events.row_count()
                    ),
                )
                .with_hint("joined by row order, both tables need one row per event; or set [bids] join_column")
                .into());
            }
            (0..events.row_count()).map(Some).collect()
        }
    };
    let names = added.iter().map(|&c| outputs.headers[c].clone()).collect();
    Ok(events.with_columns(names, |row, k| {
        rows_for[row.index()].map_or_else(
            || "n/a".to_string(),
            |i| outputs.row(i).cell(added[k]).to_string(),
        )
    }))
}
