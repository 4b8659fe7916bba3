//! Renderers: each reads the report model ([`crate::report::Report`], or the forecast's
//! [`crate::forecast::report::ForecastReport`]) and formats it; none computes a number.

pub mod forecast;
pub mod html;
pub mod json;
pub mod methods;
pub mod numbers;
pub mod plots;
pub mod table;
pub mod tsv;
pub mod words;

use crate::forecast::report::ForecastReport;
use crate::report::Report;
use tsv::TsvTable;

/// The formats of a check report.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    Table,
    Tsv,
    Json,
    /// A self-contained HTML report with plots (use with --out).
    Html,
    /// A paragraph for a paper's methods section.
    Methods,
}

/// The formats of a forecast report.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum ForecastFormat {
    Table,
    Tsv,
    Json,
    /// A self-contained HTML page with a plot comparing the variants (use with --out).
    Html,
}

/// A rendered report: one text, or TSV tables — each its own file when written to a
/// file (`main` to the file named, the others beside it), one after another on
/// standard output (`joined`).
pub enum Document {
    Text(String),
    Tables {
        tables: Vec<TsvTable>,
        main: &'static str,
        joined: fn(&[TsvTable]) -> String,
    },
}

/// The check report in `format`: the one place a format is chosen.
pub fn check_report(report: &Report, format: Format) -> Document {
    match format {
        Format::Table => Document::Text(table::render(report)),
        Format::Tsv => Document::Tables {
            tables: tsv::render(report),
            main: "regressors",
            joined: tsv::join,
        },
        Format::Json => Document::Text(json::render(report)),
        Format::Html => Document::Text(html::render(report)),
        Format::Methods => Document::Text(methods::render(report)),
    }
}

/// The forecast report in `format`.
pub fn forecast_report(report: &ForecastReport, format: ForecastFormat) -> Document {
    match format {
        ForecastFormat::Table => Document::Text(forecast::table::render(report)),
        ForecastFormat::Tsv => Document::Tables {
            tables: forecast::tsv::render(report),
            main: "variants",
            joined: forecast::tsv::join,
        },
        ForecastFormat::Json => Document::Text(forecast::json(report)),
        ForecastFormat::Html => Document::Text(forecast::html::render(report)),
    }
}
