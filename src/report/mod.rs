//! Renderers. Each reads the same [`model::Report`].

mod format;
pub mod json;
pub mod model;
pub mod table;
pub mod tsv;

pub use model::Report;
