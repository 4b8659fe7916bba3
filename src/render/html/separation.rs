//! Telling the models apart: how far each model's modulators can be reproduced by
//! another model's, measured in the design with every model. It sets no status.

use std::fmt::Write as _;

use super::{esc, figure, section};
use crate::render::numbers::prose_percent;
use crate::render::plots;
use crate::render::table::SEPARATION_NOTE;
use crate::report::Report;

pub(super) fn separation(report: &Report) -> String {
    let mut body = format!("<p>{}</p>\n", esc(SEPARATION_NOTE));
    if report.separation_summary.is_empty() {
        body.push_str("<p class=\"note\">The study has fewer than two models, so there is nothing to separate.</p>\n");
        return section("separation", "Telling the models apart", &body);
    }
    let caption = "One row per modulator and other model, one mark per participant: the partial \
                   R² of the modulator on the other model's modulators, given everything else in \
                   its own GLM (the participant's mean over runs). Separation is reported beside \
                   the GLMs' statuses and never sets one.";
    body.push_str(&figure(
        plots::separation_strip(&plots::separation_rows(report)),
        caption,
    ));
    body.push_str(
        "<table class=\"separation\">\n<thead><tr><th>modulator</th><th>against</th>\
         <th class=\"num\">partial R², median</th><th class=\"num\">range</th>\
         <th class=\"num\">trial r, median</th><th class=\"num\">range</th>\
         <th class=\"num\">participants</th></tr></thead>\n<tbody>\n",
    );
    // Shares near 0 and 100% keep their digits (99.99% is not all).
    let percent = |v: Option<f64>| v.map_or("undefined".to_string(), prose_percent);
    let range =
        |low: Option<f64>, high: Option<f64>, show: &dyn Fn(f64) -> String, join: &str| match (
            low, high,
        ) {
            (Some(low), Some(high)) => format!("{}{join}{}", show(low), show(high)),
            _ => "—".to_string(),
        };
    let r = |v: f64| format!("{v:.2}");
    for s in &report.separation_summary {
        let _ = writeln!(
            body,
            "<tr><th scope=\"row\">{}</th><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>",
            esc(&s.regressor),
            esc(&s.models[1]),
            percent(s.partial_r2.median),
            range(s.partial_r2.min, s.partial_r2.max, &prose_percent, "–"),
            s.trial_correlation
                .median
                .map_or_else(|| "—".to_string(), r),
            range(s.trial_correlation.min, s.trial_correlation.max, &r, " to "),
            s.participants
        );
    }
    body.push_str("</tbody>\n</table>\n");
    section("separation", "Telling the models apart", &body)
}
