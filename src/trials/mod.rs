//! Trial tables and nuisance tables → the trials of each run.

mod labels;
mod per_scan;
mod read;
mod records;
mod runs;
mod scans;
mod table;

pub use labels::{check_label, is_plain_label};
pub use per_scan::{NuisanceTable, PerScanTable, fill_template, read_nuisance, read_per_scan};
pub use read::{ROWS_PER_CHUNK, read_runs};
pub use runs::{EventTrials, ModulatorValues, RunCollector, RunTrials, collect_runs};
pub use scans::ScanTable;
pub use table::{Row, Table, is_missing};
