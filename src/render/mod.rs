//! Renderers: each reads the report model ([`crate::report::Report`], or the forecast's
//! [`crate::forecast::report::ForecastReport`]) and formats it; none computes a number.

pub mod forecast;
pub(crate) mod format;
pub mod html;
pub mod json;
pub mod methods;
pub mod plots;
pub mod table;
pub mod tsv;
