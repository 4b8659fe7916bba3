//! What users read: snapshots of the table, TSV and JSON formats and of the methods text,
//! the JSON read back into typed structures, and the forecast's HTML page.

#[path = "../common/mod.rs"]
mod common;

mod forecast_html;
mod formats;
mod methods;
