//! Trial tables and nuisance tables → the trials of each run.

mod labels;
mod nuisance;
mod runs;
mod scans;
mod table;

pub use labels::check_label;
pub use nuisance::{NuisanceTable, read_nuisance};
pub use runs::{EventTrials, ModulatorValues, RunTrials, collect_runs};
pub use scans::ScanTable;
pub use table::{Row, Table, is_missing};
