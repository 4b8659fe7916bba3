//! Own and shared variance: each modulator's commonality shares, per model pair and
//! across participants.

use std::fmt::Write as _;

use super::{esc, figure, percent, section};
use crate::cohort::partition::UNIQUE;
use crate::render::plots;
use crate::report::Report;

pub(super) fn shared(report: &Report) -> String {
    let mut body = String::from(
        "<p>Each modulator's variance split into the part that is its own (what the GLM can use \
         to estimate its beta; 1/VIF) and the parts it shares with the rest of the design, from \
         a commonality analysis, averaged over each participant's runs. A large shared part with \
         another model means the two models' regressors rest on the same part of the signal.</p>\n",
    );
    let pairs = plots::model_pairs(report);
    if pairs.is_empty() {
        body.push_str("<p class=\"note\">The study has fewer than two models with modulators, so there is no pair of models to compare.</p>\n");
    }
    for pair in &pairs {
        let panels = plots::share_panels(report, pair);
        let clipped = panels.iter().any(|p| p.bars.iter().any(|b| b.clipped));
        let _ = writeln!(body, "<h3>{} and {}</h3>", esc(&pair.0), esc(&pair.1));
        let mut caption = format!(
            "One bar per participant (mean over their runs), one panel per modulator of {} or {}. \
             Dark: the modulator's own share. Orange: shared with the other model of the pair \
             (including parts also shared with the task's timing or nuisance regressors). Sand: \
             shared only with the rest of the design — the modulator's own model, the task's \
             timing, nuisance regressors.",
            esc(&pair.0),
            esc(&pair.1)
        );
        if clipped {
            caption.push_str(
                " * Negative commonality components (suppression) made the means fall outside \
                 0–100%; those bars are clipped for drawing, and the table below has the values.",
            );
        }
        body.push_str(&figure(plots::share_bars(&panels), &caption));
    }
    body.push_str(&cohort_shares(report));
    section("shared", "Own and shared variance", &body)
}

/// Median and range over participants of each part, one row per modulator.
fn cohort_shares(report: &Report) -> String {
    if report.cohort_partition.is_empty() {
        return String::new();
    }
    let mut parts: Vec<&str> = vec![UNIQUE];
    let mut regressors: Vec<&str> = Vec::new();
    for share in &report.cohort_partition {
        if !parts.contains(&share.part.as_str()) {
            parts.push(&share.part);
        }
        if !regressors.contains(&share.regressor.as_str()) {
            regressors.push(&share.regressor);
        }
    }
    let mut html = String::from(
        "<table class=\"shares\">\n<caption>Across participants: median (range) of each share. The shared parts overlap — a part shared with two groups counts for both — so a row does not add up to 100%.</caption>\n<thead><tr><th>modulator</th>",
    );
    for part in &parts {
        let heading = if *part == UNIQUE {
            "own".to_string()
        } else {
            format!("with {}", esc(part))
        };
        let _ = write!(html, "<th class=\"num\">{heading}</th>");
    }
    html.push_str("</tr></thead>\n<tbody>\n");
    for regressor in regressors {
        let _ = write!(html, "<tr><th scope=\"row\">{}</th>", esc(regressor));
        for part in &parts {
            let cell = report
                .cohort_partition
                .iter()
                .find(|s| s.regressor == regressor && s.part == *part)
                .map_or_else(
                    || "—".to_string(),
                    |s| {
                        format!(
                            "{} <span class=\"range\">({}–{})</span>",
                            percent(s.median),
                            percent(s.min),
                            percent(s.max)
                        )
                    },
                );
            let _ = write!(html, "<td class=\"num\">{cell}</td>");
        }
        html.push_str("</tr>\n");
    }
    html.push_str("</tbody>\n</table>\n");
    html
}
