//! The learners: who generates the simulated choices, what every fit assumes (the
//! priors, bounds and fixed parameters), and the design settings of the checks.

use std::fmt::Write as _;

use super::esc;
use crate::forecast::report::{ForecastReport, LearnerInfo};
use crate::render::html::{plain, section};
use crate::render::numbers::percent_tenths as share;

pub(super) fn setup(report: &ForecastReport) -> String {
    let info = &report.forecast;
    let mut body = String::from(
        "<p>Each simulated participant draws their parameters from the priors of the learner \
         that generates their choices, does every task variant with those parameters, and is \
         then fitted with every learner below by maximum likelihood within the bounds. The \
         fitted learners' quantities become the modulators of that participant's design.</p>\n",
    );
    body.push_str(
        "<table class=\"learners\">\n<caption>Learners (priors are used only when a learner generates choices; a fixed parameter is held at its value in every fit)</caption>\n\
         <thead><tr><th>learner</th><th>kind</th><th class=\"num\">generates</th><th>modulators</th><th>parameter</th><th>prior</th><th class=\"num\">bounds</th><th>in the fits</th></tr></thead>\n<tbody>\n",
    );
    for learner in &info.learners {
        body.push_str(&learner_rows(report, learner));
    }
    body.push_str("</tbody>\n</table>\n");
    let _ = writeln!(
        body,
        "<p class=\"detail\">Design of every simulated run: high-pass {} s, microtime {} bins (reference bin {}), HRF time derivative {}, modulators mean-centred; all values start at {}. VIF thresholds {} (caution) and {} (severe), condition index {}.</p>",
        plain(info.high_pass),
        info.microtime,
        plain(info.reference),
        if info.hrf_derivative {
            "included"
        } else {
            "not included"
        },
        plain(info.initial_value),
        plain(info.thresholds.vif_caution),
        plain(info.thresholds.vif_severe),
        plain(info.thresholds.condition_index),
    );
    section("setup", "Simulated and fitted learners", &body)
}

/// One row per parameter; the learner's own cells span them.
fn learner_rows(report: &ForecastReport, learner: &LearnerInfo) -> String {
    let weight = report
        .forecast
        .generating
        .iter()
        .find(|g| g.learner == learner.name)
        .map_or_else(|| "—".to_string(), |g| share(g.weight));
    let modulators: Vec<String> = learner
        .modulators
        .iter()
        .map(|m| format!("<code>{}</code>", esc(m)))
        .collect();
    let span = learner.parameters.len().max(1);
    let mut html = format!(
        "<tr><th scope=\"row\" rowspan=\"{span}\">{}</th><td rowspan=\"{span}\">{}</td><td class=\"num\" rowspan=\"{span}\">{weight}</td><td rowspan=\"{span}\">{}</td>",
        esc(&learner.name),
        esc(learner.kind),
        if modulators.is_empty() {
            "—".to_string()
        } else {
            modulators.join(", ")
        }
    );
    if learner.parameters.is_empty() {
        html.push_str("<td>—</td><td>—</td><td class=\"num\">—</td><td>—</td></tr>\n");
        return html;
    }
    for (i, p) in learner.parameters.iter().enumerate() {
        if i > 0 {
            html.push_str("<tr>");
        }
        let _ = writeln!(
            html,
            "<td>{}</td><td>{}</td><td class=\"num\">{}–{}</td><td>{}</td></tr>",
            esc(p.parameter),
            p.prior
                .as_deref()
                .map_or_else(|| "none given".to_string(), esc),
            plain(p.bounds[0]),
            plain(p.bounds[1]),
            if p.fitted { "fitted" } else { "fixed" }
        );
    }
    html
}
