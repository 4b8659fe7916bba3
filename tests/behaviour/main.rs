//! The binary and the library doing their jobs end to end: the commands on small study
//! folders, BIDS datasets, shards and merge, the forecast, and every kind of bad input.

#[path = "../common/mod.rs"]
mod common;

mod bids;
mod catalogue;
mod cli;
mod errors;
mod forecast;
mod glms;
mod shards;
