//! A trial table read a chunk at a time gives exactly the runs of the table read whole,
//! and a row repeated in another chunk is still caught.

use std::path::Path;

use crate::common::StudyDir;
use tangle::files::{DiskFiles, read_text};
use tangle::study::{Study, TrialSource, TrialTable, parse_study};
use tangle::trials::{RunTrials, ScanTable, Table, collect_runs, read_runs};

fn study(path: &Path) -> Study {
    parse_study(path, &read_text(&DiskFiles, path).unwrap()).unwrap()
}

/// The study's trial table, TR and scan counts.
fn table_of(study: &Study) -> (&TrialTable, f64, ScanTable) {
    let TrialSource::Table(table) = &study.source else {
        panic!("a study with a trial table");
    };
    let counts = study.acquisition.scans.as_ref().unwrap();
    let scans = ScanTable::load(&DiskFiles, counts).unwrap();
    (table, study.acquisition.tr.unwrap(), scans)
}

fn in_chunks(study: &Study, rows: usize) -> tangle::Result<Vec<RunTrials>> {
    let (table, tr, scans) = table_of(study);
    let mut chunks = 0;
    Table::read_in_chunks(&DiskFiles, &table.file, rows, &mut |chunk| {
        assert!(chunk.row_count() <= rows);
        chunks += 1;
        Ok(())
    })?;
    assert!(chunks > 1, "the table should span several chunks");
    read_runs(&DiskFiles, study, table, tr, &scans, rows)
}

#[test]
fn chunks_of_any_size_give_the_runs_of_the_whole_table() {
    let study = study(Path::new("demo-data/study.toml"));
    let (table, tr, scans) = table_of(&study);
    let whole = collect_runs(
        &study,
        &table.labels,
        tr,
        &Table::read(&DiskFiles, &table.file).unwrap(),
        &scans,
    )
    .unwrap();
    assert_eq!(whole.len(), 60, "20 volunteers × 3 runs in the demo");
    for rows in [1, 7, 80, 1000] {
        assert_eq!(
            in_chunks(&study, rows).unwrap(),
            whole,
            "chunks of {rows} rows"
        );
    }
}

#[test]
fn a_row_repeated_in_a_later_chunk_is_an_error() {
    let trials = std::fs::read_to_string("demo-data/trials.csv").unwrap();
    let second_line = trials.lines().nth(1).unwrap();
    let lines = trials.lines().count();
    let dir = StudyDir::new();
    let text = std::fs::read_to_string("demo-data/study.toml").unwrap();
    dir.file("study.toml", &text)
        .file("trials.csv", &format!("{trials}{second_line}\n"));
    let err = in_chunks(&study(&dir.path("study.toml")), 7)
        .unwrap_err()
        .to_string();
    assert!(
        err.contains(&format!(
            "trials.csv, line {}: this row repeats line 2 exactly",
            lines + 1
        )),
        "{err}"
    );
}
