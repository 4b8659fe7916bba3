//! Cautions: how to read the numbers, comparing models, and what the diagnostics cannot
//! say.

use crate::flags::FlagCode;
use std::fmt::Write as _;

use super::prose::prose;
use super::{esc, section};
use crate::render::table::READING_NOTES;
use crate::report::ORTHOGONALISATION_CAUTION;
use crate::report::Report;
use crate::screen::CLAIMS_NOTE;

pub(super) fn cautions(report: &Report) -> String {
    // The notes open with their own title line; it becomes a heading here.
    let (title, notes) = READING_NOTES
        .split_once('\n')
        .unwrap_or(("How to read these numbers", READING_NOTES));
    let mut body = format!("<h3>{}</h3>\n{}", esc(title.trim()), prose(notes));
    body.push_str("<h3>Comparing models</h3>\n");
    let affected = report
        .subjects
        .iter()
        .filter(|s| {
            report
                .runs
                .iter()
                .filter(|r| r.subject == s.subject)
                .any(|r| {
                    r.flags
                        .iter()
                        .any(|f| f.code == FlagCode::SharedExceedsUnique)
                })
        })
        .count();
    if affected > 0 {
        let _ = writeln!(
            body,
            "<p>In {affected} of {} participants a modulator shares more of its variance with another model than it keeps for itself.</p>",
            report.cohort.subjects
        );
    }
    let claims = if report.claims_note.is_empty() {
        CLAIMS_NOTE
    } else {
        &report.claims_note
    };
    body.push_str(&prose(claims));
    if report.settings.orthogonalisation != "none" {
        body.push_str("<h3>About orthogonalised numbers</h3>\n");
        body.push_str(&prose(ORTHOGONALISATION_CAUTION));
    }
    body.push_str(
        "<p>These diagnostics describe the design, so they can be computed before any data are \
         analysed; they cannot tell which model is true, and thresholds are conventions. Decide \
         about participants and models by the lab's analysis plan, with a statistician.</p>\n",
    );
    section("cautions", "Cautions", &body)
}
