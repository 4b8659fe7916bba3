//! The methods paragraph, as the `--format methods` text shown on the page.

use super::prose::prose;
use super::section;
use crate::report::Report;

pub(super) fn methods(report: &Report) -> String {
    let text = crate::render::methods::render(report);
    let body = format!(
        "<p class=\"note\">A draft for a paper's methods section. Adapt it, and fill in what was done with flagged participants.</p>\n<div class=\"methods\">\n{}</div>\n",
        prose(&text)
    );
    section("methods", "Methods paragraph", &body)
}
