//! `--format json`: the report model as JSON (the fields of DESIGN.md). Undefined
//! numbers are `null`, with a flag in the same run saying why.

use super::Report;

pub fn render(report: &Report) -> String {
    match serde_json::to_string_pretty(report) {
        Ok(mut text) => {
            text.push('\n');
            text
        }
        // The model holds only strings, finite numbers and options: this cannot fail.
        Err(err) => format!("{{\"error\": \"cannot render the report: {err}\"}}\n"),
    }
}
