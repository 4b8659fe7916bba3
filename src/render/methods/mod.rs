//! `--format methods`: paragraphs for a paper's methods section.
//!
//! Plain text, one paragraph per line and a blank line between paragraphs, so that it
//! pastes cleanly into a word processor. Every number is read from the report; what only
//! the researcher can say (what was done with flagged participants) is left as a clearly
//! marked placeholder.
//!
//! One file per paragraph, in the order they are printed; `layout` gathers the regressors
//! they name and `format` writes their numbers.

mod closing;
mod design;
mod diagnostics;
mod layout;
mod results;

use crate::report::Report;
use closing::closing_paragraph;
use design::design_paragraph;
use diagnostics::diagnostics_paragraph;
use layout::Layout;
use results::results_paragraph;

/// The placeholder's fixed opening, so that users (and tests) can search for it.
pub const PLACEHOLDER_START: &str = "[STATE WHAT WAS DONE";

pub fn render(report: &Report) -> String {
    let layout = Layout::of(report);
    let paragraphs = [
        design_paragraph(report, &layout),
        diagnostics_paragraph(report, &layout),
        results_paragraph(report, &layout),
        closing_paragraph(report, &layout),
    ];
    let mut text = paragraphs.join("\n\n");
    text.push('\n');
    text
}
