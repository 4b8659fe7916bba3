//! Studies kept in the open BIDS layout: discovery of events files, sidecar metadata
//! (with the standard's inheritance), image headers, and model outputs in derivatives.

mod collect;
mod discover;
mod join;

pub mod entities;
pub mod nifti;
pub mod sidecar;

/// Columns the BIDS reader adds to each events table, holding the file's `sub-` and
/// run labels (names no BIDS column can take).
pub const SUBJECT_COLUMN: &str = "<sub>";
pub const RUN_COLUMN: &str = "<run>";

pub use collect::collect_bids_runs;
pub use discover::{RunFiles, find_runs};
