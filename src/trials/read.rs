//! The runs of a study's flat trial table, read in chunks on two threads.

use super::{RunCollector, RunTrials, ScanTable, Table};
use crate::error::{Error, Result};
use crate::files::InputFiles;
use crate::study::{Study, TrialTable};

/// Rows of the trial table held at once while it is read.
pub const ROWS_PER_CHUNK: usize = 16 * 1024;

/// The runs of the flat trial table `source` of `study` (TR `tr` seconds), read
/// `rows_per_chunk` rows at a time: only the numbers the study uses are kept, never the
/// whole text. Parsing the text (this thread) and turning rows into runs (a second
/// thread) overlap, a few chunks apart.
pub fn read_runs(
    files: &dyn InputFiles,
    study: &Study,
    source: &TrialTable,
    tr: f64,
    scans: &ScanTable,
    rows_per_chunk: usize,
) -> Result<Vec<RunTrials>> {
    let (send, receive) = std::sync::mpsc::sync_channel::<Table>(2);
    std::thread::scope(|scope| {
        let collecting = scope.spawn(move || -> Result<Vec<RunTrials>> {
            let mut collector = None;
            for chunk in receive {
                let collector = match &mut collector {
                    Some(collector) => collector,
                    None => collector.insert(RunCollector::new(
                        study,
                        &source.labels,
                        tr,
                        &chunk,
                        scans,
                    )?),
                };
                collector.add(&chunk);
            }
            match collector {
                Some(collector) => collector.finish(),
                None => Err(Error::Internal(
                    "the trial table was read but gave no rows".into(),
                )),
            }
        });
        // A send fails only once the collector has stopped on an error of its own.
        let mut collector_stopped = false;
        let read = Table::read_in_chunks(files, &source.file, rows_per_chunk, &mut |chunk| {
            if send.send(chunk).is_err() {
                collector_stopped = true;
                return Err(Error::Internal("the run collector stopped".into()));
            }
            Ok(())
        });
        drop(send);
        let collected = collecting
            .join()
            .unwrap_or_else(|_| Err(Error::Internal("the run collector panicked".into())));
        match read {
            // The table's own problems come first, as when the rows are read in one pass.
            Err(err) if !collector_stopped => Err(err),
            _ => collected,
        }
    })
}
