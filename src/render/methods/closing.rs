//! The closing paragraph: the placeholder for what was done with flagged participants,
//! and what the numbers cannot say.

use super::PLACEHOLDER_START;
use super::layout::Layout;
use crate::report::Report;

pub(super) fn closing_paragraph(report: &Report, layout: &Layout) -> String {
    let cohort = &report.cohort;
    let flagged = cohort.statuses.at_least(crate::screen::Status::Caution);
    let placeholder = if flagged == 0 {
        format!(
            "{PLACEHOLDER_START}: no participant was flagged; state any exclusions for other reasons, or delete this sentence]"
        )
    } else {
        format!(
            "{PLACEHOLDER_START} WITH THE {flagged} FLAGGED {}: excluded / kept / modelled separately, and why]",
            if flagged == 1 {
                "PARTICIPANT"
            } else {
                "PARTICIPANTS"
            }
        )
    };
    let mut caveat = "These thresholds are rules of thumb: a high VIF costs precision but does not by itself invalidate a design (O'Brien, 2007). The statistics describe the design, not the data, and do not show which model is true".to_string();
    if layout.models.len() > 1 {
        caveat.push_str("; where modulators share most of their variance, comparing the models' estimates cannot decide between them");
    }
    caveat.push('.');
    format!("{placeholder} {caveat}")
}
