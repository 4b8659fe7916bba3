//! Properties that must hold for any input or by construction: invariants of the
//! diagnostics and readers (proptest), a trial table read in chunks equals the table read
//! whole, and the signal partition recovers simulated regions of known make-up.

#[path = "../common/mod.rs"]
mod common;

mod chunks;
mod invariants;
mod signal;
