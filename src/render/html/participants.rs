//! Participants: a summary table that always prints, and a closed-by-default detail
//! block per participant.

use std::fmt::Write as _;

use super::participant_tables::{differences, entangled, flags, model_sets, signals, vif_table};
use super::{badge, esc, number, participant_id, percent, section};
use crate::cohort::SubjectSummary;
use crate::flags::Severity;
use crate::render::words::count;
use crate::report::Report;
use crate::report::RunReport;

pub(super) fn participants(report: &Report) -> String {
    let mut body = String::from(
        "<table class=\"subjects\">\n<thead><tr><th>participant</th><th>status</th><th class=\"num\">worst VIF</th><th class=\"num\">SE x</th><th>regressor (run)</th><th class=\"num\">largest condition index</th><th>largest share with another model</th><th>runs flagged</th></tr></thead>\n<tbody>\n",
    );
    for summary in &report.subjects {
        body.push_str(&summary_row(summary));
    }
    body.push_str("</tbody>\n</table>\n");
    body.push_str(
        "<p class=\"note\">Below, one block per participant. Their flags fold away under a \
         click; browsers print folded parts folded, so open the ones you need before printing.</p>\n",
    );
    for summary in &report.subjects {
        let runs: Vec<&RunReport> = report
            .runs
            .iter()
            .filter(|r| r.subject == summary.subject)
            .collect();
        body.push_str(&participant_detail(summary, &runs));
    }
    section("participants", "Participants", &body)
}

fn summary_row(summary: &SubjectSummary) -> String {
    let worst = match (&summary.worst_regressor, &summary.worst_run) {
        (Some(regressor), Some(run)) => format!("{} ({})", esc(regressor), esc(run)),
        (Some(regressor), None) => esc(regressor),
        _ => "—".to_string(),
    };
    let shared = summary.largest_shared.as_ref().map_or_else(
        || "—".to_string(),
        |s| {
            format!(
                "{} with {}: {} (run {})",
                esc(&s.regressor),
                esc(&s.model),
                percent(s.share),
                esc(&s.run)
            )
        },
    );
    let flagged = if summary.runs_flagged.is_empty() {
        "—".to_string()
    } else {
        esc(&summary.runs_flagged.join(", "))
    };
    format!(
        "<tr><th scope=\"row\"><a href=\"#{}\">{}</a></th><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}</td><td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>\n",
        participant_id(&summary.subject),
        esc(&summary.subject),
        badge(summary.status),
        number(summary.worst_vif),
        number(summary.worst_vif.map(f64::sqrt)),
        worst,
        number(summary.worst_condition_index),
        shared,
        flagged
    )
}

/// A participant's block: the VIF table and the model sets stay visible (they print);
/// the long lists — flags, model differences, measured signals — fold away.
fn participant_detail(summary: &SubjectSummary, runs: &[&RunReport]) -> String {
    let run_count = count(runs.len(), "run", "runs");
    let flagged = if summary.runs_flagged.is_empty() {
        "no run flagged".to_string()
    } else {
        format!("runs flagged: {}", esc(&summary.runs_flagged.join(", ")))
    };
    let mut html = format!(
        "<article class=\"participant\" id=\"{}\">\n<h3>{} {} <span class=\"aside\">worst VIF {} · {run_count} · {flagged}</span></h3>\n<div class=\"columns\">\n<div>\n",
        participant_id(&summary.subject),
        esc(&summary.subject),
        badge(summary.status),
        number(summary.worst_vif),
    );
    let mut glms: Vec<&str> = Vec::new();
    for run in runs {
        if !glms.contains(&run.glm.as_str()) {
            glms.push(&run.glm);
        }
    }
    for glm in glms {
        let of_glm: Vec<&RunReport> = runs.iter().copied().filter(|r| r.glm == glm).collect();
        let _ = writeln!(html, "<h4>GLM {}</h4>", esc(glm));
        html.push_str(&vif_table(&of_glm));
    }
    html.push_str("</div>\n<div>\n");
    html.push_str(&model_sets(runs));
    html.push_str(&entangled(runs));
    html.push_str("</div>\n</div>\n");
    let folded = [differences(runs), signals(runs), flags(runs)].concat();
    let _ = writeln!(
        html,
        "<details>\n<summary>{}</summary>\n{folded}</details>\n</article>",
        flag_summary(runs)
    );
    html
}

/// "Flags and model differences (12: 4 severe, 2 caution, 6 warning)".
fn flag_summary(runs: &[&RunReport]) -> String {
    let all: Vec<Severity> = runs
        .iter()
        .flat_map(|r| r.flags.iter().map(|f| f.severity))
        .collect();
    let mut counts = Vec::new();
    for severity in [
        Severity::Error,
        Severity::Severe,
        Severity::Caution,
        Severity::Warning,
        Severity::Note,
    ] {
        let n = all.iter().filter(|s| **s == severity).count();
        if n > 0 {
            counts.push(format!("{n} {}", severity.label()));
        }
    }
    if counts.is_empty() {
        "Flags (none) and model differences".to_string()
    } else {
        format!(
            "Flags ({}: {}) and model differences",
            all.len(),
            counts.join(", ")
        )
    }
}
