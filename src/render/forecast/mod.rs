//! Renderers of the forecast report ([`crate::forecast::report::ForecastReport`]).

pub mod html;
pub mod table;
pub mod tsv;

/// `--format json`: the report model as it is, pretty-printed.
pub fn json(report: &crate::forecast::report::ForecastReport) -> String {
    let mut text = serde_json::to_string_pretty(report).unwrap_or_else(|err| {
        format!("{{\"error\": \"the forecast could not be written as JSON: {err}\"}}")
    });
    text.push('\n');
    text
}
