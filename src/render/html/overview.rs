//! Cohort overview: the status counts and every regressor's VIF across participants.

use std::fmt::Write as _;

use super::{badge, esc, figure, participant_id, plain, section};
use crate::render::plots;
use crate::report::Report;
use crate::screen::Status;

pub(super) fn overview(report: &Report) -> String {
    let thresholds = &report.settings.thresholds;
    let mut body = status_table(report);
    let strip = plots::vif_strip_data(report);
    let mut caption = format!(
        "Each row is a regressor of interest (task onsets and model modulators), each mark one \
         participant: their <em>largest</em> VIF for that regressor over their runs. Log scale. \
         Participants at or above the caution threshold are labelled. Dashed line: caution \
         ({}); solid line: severe ({}). These are rules of thumb, not laws: a VIF says how \
         much precision a regressor loses, not whether an effect can be found.",
        plain(thresholds.vif_caution),
        plain(thresholds.vif_severe)
    );
    let missing: Vec<String> = strip
        .rows
        .iter()
        .filter(|row| !row.undefined.is_empty())
        .map(|row| {
            let who: Vec<String> = row
                .undefined
                .iter()
                .map(|u| {
                    if u.every_run {
                        esc(&u.subject)
                    } else {
                        format!("{} (run {})", esc(&u.subject), esc(&u.runs.join(", ")))
                    }
                })
                .collect();
            format!("{}: {}", esc(&row.regressor), who.join(", "))
        })
        .collect();
    if !missing.is_empty() {
        caption.push_str(
            " Without a mark, because their VIF was undefined (an exact dependency, or a \
             regressor left out of the design) in every run or in the runs named — ",
        );
        caption.push_str(&missing.join("; "));
        caption.push_str(". The flags in the participant blocks say why.");
    }
    body.push_str(&figure(plots::vif_strip(&strip, thresholds), &caption));
    section("overview", "Cohort overview", &body)
}

fn status_table(report: &Report) -> String {
    let t = &report.settings.thresholds;
    let meaning = |status: Status| match status {
        Status::Ok => format!(
            "no regressor of interest reaches VIF {}, no entangled dimension reaches condition index {}",
            plain(t.vif_caution),
            plain(t.condition_index)
        ),
        Status::Caution => format!(
            "a regressor of interest has VIF ≥ {}, or regressors are entangled on a dimension with condition index ≥ {}, or events fall after the end of a run",
            plain(t.vif_caution),
            plain(t.condition_index)
        ),
        Status::Severe => format!(
            "a regressor of interest has VIF ≥ {}, is part of an exact dependency or could not be estimated, or is entangled on a dimension with condition index ≥ {}",
            plain(t.vif_severe),
            plain(t.condition_index_severe)
        ),
    };
    let mut html = String::from(
        "<table class=\"statuses\">\n<thead><tr><th>status</th><th class=\"num\">participants</th><th>who</th><th>meaning (worst run counts)</th></tr></thead>\n<tbody>\n",
    );
    for status in [Status::Ok, Status::Caution, Status::Severe] {
        let who: Vec<String> = report
            .subjects
            .iter()
            .filter(|s| s.status == status)
            .map(|s| {
                format!(
                    "<a href=\"#{}\">{}</a>",
                    participant_id(&s.subject),
                    esc(&s.subject)
                )
            })
            .collect();
        let _ = writeln!(
            html,
            "<tr><td>{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>",
            badge(status),
            report.cohort.statuses.at(status),
            if who.is_empty() {
                "—".to_string()
            } else {
                who.join(" ")
            },
            meaning(status)
        );
    }
    let _ = writeln!(
        html,
        "</tbody>\n</table>\n<p class=\"note\">{} participants, {} runs. A participant takes the worst status of their runs; derivative and nuisance regressors are shown but do not set a status.</p>",
        report.cohort.subjects, report.cohort.runs
    );
    html
}
