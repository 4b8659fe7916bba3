//! The tables of a participant's block, one column per run: VIFs, entangled dimensions,
//! model sets, model differences, measured signals and flags.

use std::fmt::Write as _;

use super::{esc, glyph, number, percent, severity_badge};
use crate::report::RunReport;

/// Names in the order they first appear over the runs.
fn union<'a>(names: impl Iterator<Item = &'a str>) -> Vec<&'a str> {
    let mut all: Vec<&str> = Vec::new();
    for name in names {
        if !all.contains(&name) {
            all.push(name);
        }
    }
    all
}

fn run_headings(runs: &[&RunReport]) -> String {
    runs.iter()
        .map(|r| format!("<th class=\"num\">run {}</th>", esc(&r.run)))
        .collect()
}

pub(super) fn vif_table(runs: &[&RunReport]) -> String {
    let names = union(
        runs.iter()
            .flat_map(|r| r.regressors.iter().map(|e| e.regressor.name.as_str())),
    );
    let mut html = format!(
        "<table class=\"vifs\">\n<caption>VIF of every regressor in every run (○ below caution, ▲ caution, ■ severe; derivative and nuisance regressors set no status)</caption>\n<thead><tr><th>regressor</th><th>kind</th>{}</tr></thead>\n<tbody>\n",
        run_headings(runs)
    );
    for name in names {
        let kind = runs
            .iter()
            .flat_map(|r| r.regressors.iter())
            .find(|e| e.regressor.name == name)
            .map_or("", |e| e.regressor.kind.label());
        let _ = write!(
            html,
            "<tr><th scope=\"row\">{}</th><td>{kind}</td>",
            esc(name)
        );
        for run in runs {
            let cell = match run.regressors.iter().position(|e| e.regressor.name == name) {
                None => "<td class=\"num\">—</td>".to_string(),
                Some(index) => {
                    let entry = &run.regressors[index];
                    let vif = run
                        .vif
                        .get(index)
                        .copied()
                        .flatten()
                        .filter(|v| v.is_finite());
                    if !entry.in_design {
                        "<td class=\"num st-severe\">left out</td>".to_string()
                    } else if entry.regressor.kind.of_interest() {
                        let status = entry.status;
                        format!(
                            "<td class=\"num st-{}\">{} <span aria-hidden=\"true\">{}</span></td>",
                            status.label(),
                            number(vif),
                            glyph(status)
                        )
                    } else {
                        format!("<td class=\"num\">{}</td>", number(vif))
                    }
                }
            };
            html.push_str(&cell);
        }
        html.push_str("</tr>\n");
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

pub(super) fn entangled(runs: &[&RunReport]) -> String {
    let mut items = String::new();
    for run in runs {
        for dimension in &run.entangled_dimensions {
            let members: Vec<String> = dimension
                .regressors
                .iter()
                .zip(&dimension.proportions)
                .map(|(name, p)| format!("{} ({:.2})", esc(name), p))
                .collect();
            let _ = writeln!(
                items,
                "<li>run {}: condition index {} — {}</li>",
                esc(&run.run),
                number(Some(dimension.condition_index)),
                members.join(", ")
            );
        }
    }
    if items.is_empty() {
        "<p class=\"detail\">Entangled dimensions: none at or above the condition-index threshold.</p>\n".to_string()
    } else {
        format!(
            "<p class=\"detail\">Entangled dimensions (regressors with a variance-decomposition proportion ≥ 0.5 on a dimension whose condition index reaches the threshold):</p>\n<ul class=\"detail\">\n{items}</ul>\n"
        )
    }
}

pub(super) fn model_sets(runs: &[&RunReport]) -> String {
    let models = union(
        runs.iter()
            .flat_map(|r| r.model_sets.iter().map(|m| m.model.as_str())),
    );
    if models.is_empty() {
        return String::new();
    }
    let mut html = format!(
        "<table class=\"sets\">\n<caption>Each model's modulators as a set: generalized VIF / GVIF<sup>1/(2·df)</sup> (the second is comparable across sets of different size)</caption>\n<thead><tr><th>model</th>{}</tr></thead>\n<tbody>\n",
        run_headings(runs)
    );
    for model in models {
        let _ = write!(html, "<tr><th scope=\"row\">{}</th>", esc(model));
        for run in runs {
            let cell = run
                .model_sets
                .iter()
                .find(|m| m.model == model)
                .map_or_else(
                    || "—".to_string(),
                    |m| format!("{} / {}", number(m.gvif), number(m.gvif_scaled)),
                );
            let _ = write!(html, "<td class=\"num\">{cell}</td>");
        }
        html.push_str("</tr>\n");
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

pub(super) fn differences(runs: &[&RunReport]) -> String {
    let names = union(
        runs.iter()
            .flat_map(|r| r.contrasts.iter().map(|c| c.name.as_str())),
    );
    if names.is_empty() {
        return String::new();
    }
    let mut html = format!(
        "<table class=\"sets\">\n<caption>Differences between corresponding modulators of two models: how many times the variance of the difference is inflated</caption>\n<thead><tr><th>difference</th>{}</tr></thead>\n<tbody>\n",
        run_headings(runs)
    );
    for name in names {
        let _ = write!(html, "<tr><th scope=\"row\">{}</th>", esc(name));
        for run in runs {
            let cell = run
                .contrasts
                .iter()
                .find(|c| c.name == name)
                .map_or_else(|| "—".to_string(), |c| number(c.variance_inflation));
            let _ = write!(html, "<td class=\"num\">{cell}</td>");
        }
        html.push_str("</tr>\n");
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

/// With measured signals: each region's explained variance split by model.
pub(super) fn signals(runs: &[&RunReport]) -> String {
    let mut rows = String::new();
    for run in runs {
        for region in &run.signal {
            let components: Vec<String> = region
                .components
                .iter()
                .map(|c| {
                    format!(
                        "{}: {} [{}, {}]",
                        esc(&c.groups.join(" & ")),
                        percent(c.share),
                        percent(c.low),
                        percent(c.high)
                    )
                })
                .collect();
            let _ = writeln!(
                rows,
                "<tr><td>{}</td><th scope=\"row\">{}</th><td class=\"num\">{}</td><td>{}</td></tr>",
                esc(&run.run),
                esc(&region.region),
                percent(region.r2),
                components.join("; ")
            );
        }
    }
    if rows.is_empty() {
        return String::new();
    }
    format!(
        "<table class=\"sets\">\n<caption>Measured signals: share of each region's variance explained, split by model (bootstrap interval in brackets)</caption>\n<thead><tr><th>run</th><th>region</th><th class=\"num\">R²</th><th>parts</th></tr></thead>\n<tbody>\n{rows}</tbody>\n</table>\n"
    )
}

pub(super) fn flags(runs: &[&RunReport]) -> String {
    let mut all: Vec<(&str, &crate::flags::Flag)> = runs
        .iter()
        .flat_map(|r| r.flags.iter().map(move |f| (r.run.as_str(), f)))
        .collect();
    if all.is_empty() {
        return "<p class=\"detail\">No flags.</p>\n".to_string();
    }
    // Most serious first; within a severity, in run order.
    all.sort_by_key(|(_, flag)| std::cmp::Reverse(flag.severity));
    let mut html = String::from(
        "<table class=\"flags\">\n<caption>Flags</caption>\n<thead><tr><th>run</th><th>severity</th><th>message</th></tr></thead>\n<tbody>\n",
    );
    for (run, flag) in all {
        let _ = writeln!(
            html,
            "<tr><td>{}</td><td>{}</td><td>{}</td></tr>",
            esc(run),
            severity_badge(flag.severity),
            esc(&flag.message)
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}
