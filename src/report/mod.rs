//! Renderers. Each reads the same [`model::Report`].

pub mod forecast;
pub(crate) mod format;
pub mod html;
pub mod json;
pub mod methods;
pub mod model;
pub mod plots;
pub mod table;
pub mod tsv;

pub use model::Report;
