//! One section per task variant: what the task is (marking what differs from the task
//! as planned), then the regressor table, the model-set GVIFs and parameter recovery.

use std::fmt::Write as _;

use super::{esc, spread_cells, variant_id};
use crate::forecast::report::{ForecastReport, TaskInfo, VariantForecast};
use crate::render::html::{glyph, plain, section};
use crate::render::numbers::{
    percent_tenths as share, ratio_finite as ratio_cell, share_tenths as share_cell,
};
use crate::screen::{Status, vif_status};

/// The task's settings as (label, value) pairs, values already escaped.
fn task_rows(t: &TaskInfo) -> Vec<(&'static str, String)> {
    vec![
        ("options", t.options.to_string()),
        ("trials per run", t.trials.to_string()),
        ("runs", t.runs.to_string()),
        ("TR", format!("{} s", plain(t.tr))),
        ("run length", esc(&t.run_length)),
        ("first cue", format!("{} s", plain(t.first_cue))),
        ("cue → outcome", t.cue_to_outcome.describe()),
        ("outcome → next cue", t.outcome_to_cue.describe()),
        ("cue duration", format!("{} s", plain(t.cue_duration))),
        (
            "outcome duration",
            format!("{} s", plain(t.outcome_duration)),
        ),
        ("rewards", esc(&t.rewards)),
    ]
}

pub(super) fn variant(report: &ForecastReport, index: usize, v: &VariantForecast) -> String {
    let rank = report
        .ranking
        .iter()
        .find(|r| r.variant == v.name)
        .map_or_else(String::new, |r| {
            format!(
                " <span class=\"rank\">rank {} of {}</span>",
                r.rank,
                report.ranking.len()
            )
        });
    let planned = report.variants.first().filter(|_| index > 0);
    let mut body = format!(
        "<p>{} simulated runs checked ({} participants × {} runs).</p>\n",
        v.runs_checked,
        v.participants.total(),
        v.task.runs
    );
    body.push_str(&task_table(v, planned));
    body.push_str(&regressor_table(report, v));
    // Side by side: each is narrow, and together they fit one screen.
    let _ = writeln!(
        body,
        "<div class=\"columns\">\n<div>{}</div>\n<div>{}</div>\n</div>",
        model_set_table(v),
        recovery_table(v)
    );
    if let Some(note) = &v.score_note {
        let _ = writeln!(
            body,
            "<p class=\"note\">Score undefined: {}.</p>",
            esc(note)
        );
    }
    for note in &v.notes {
        let _ = writeln!(body, "<p class=\"note\">{}</p>", esc(note));
    }
    let title = format!("Variant “{}”{rank}", esc(&v.name));
    section(&variant_id(index), &title, &body)
}

fn task_table(v: &VariantForecast, planned: Option<&VariantForecast>) -> String {
    let mut html = String::from("<table class=\"task\">\n<caption>The task");
    if let Some(p) = planned {
        let _ = write!(html, " (<em>changed</em>: differs from “{}”)", esc(&p.name));
    }
    html.push_str("</caption>\n<tbody>\n");
    let base = planned.map(|p| task_rows(&p.task));
    for (i, (label, value)) in task_rows(&v.task).into_iter().enumerate() {
        let changed = base.as_ref().is_some_and(|b| b[i].1 != value);
        let (class, mark) = if changed {
            (" class=\"changed\"", " <em>(changed)</em>")
        } else {
            ("", "")
        };
        let _ = writeln!(
            html,
            "<tr><th scope=\"row\">{label}</th><td{class}>{value}{mark}</td></tr>"
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

fn regressor_table(report: &ForecastReport, v: &VariantForecast) -> String {
    let thresholds = &report.forecast.thresholds;
    let mut html = String::from(
        "<table class=\"regressors\">\n<caption>Per regressor, over the simulated runs: the VIF's median and 10–90% range (○ below caution, ▲ caution, ■ severe, by the median), the share of runs at or above each threshold, and the share of the regressor's variance held jointly with other learners' modulators. An undefined VIF (exact dependency) counts as above every threshold; — : not computed (onset regressors have no partition).</caption>\n\
         <thead><tr><th>GLM</th><th>regressor</th><th>learner</th><th class=\"num\">VIF median</th><th class=\"num\">10–90%</th><th class=\"num\">P(caution or worse)</th><th class=\"num\">P(severe)</th><th class=\"num\">shared with other learners, median</th><th class=\"num\">10–90%</th><th class=\"num\">runs with undefined VIF</th></tr></thead>\n<tbody>\n",
    );
    for r in &v.regressors {
        let [median, range] = spread_cells(&r.vif, ratio_cell);
        let status = match r.vif.median.filter(|m| m.is_finite()) {
            Some(m) => vif_status(Some(m), thresholds),
            None if r.vif.count > 0 => Status::Severe,
            None => Status::Ok,
        };
        let [shared, shared_range] = match &r.shared_with_other_models {
            Some(s) => spread_cells(s, share_cell),
            None => ["—".to_string(), "—".to_string()],
        };
        let _ = writeln!(
            html,
            "<tr><td>{}</td><th scope=\"row\"><code>{}</code></th><td>{}</td><td class=\"num st-{}\">{median} <span aria-hidden=\"true\">{}</span></td><td class=\"num range\">{range}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{shared}</td><td class=\"num range\">{shared_range}</td><td class=\"num\">{} of {}</td></tr>",
            esc(&r.glm),
            esc(&r.regressor),
            r.learner
                .as_deref()
                .map_or_else(|| "onset".to_string(), esc),
            status.label(),
            glyph(status),
            share(r.p_caution_or_worse),
            share(r.p_severe),
            r.vif.undefined,
            r.vif.count,
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

fn model_set_table(v: &VariantForecast) -> String {
    if v.model_sets.is_empty() {
        return String::new();
    }
    let mut html = String::from(
        "<table class=\"sets\">\n<caption>Each learner's modulators as one set: generalised VIF over the simulated runs, plain and scaled (GVIF^(1/(2·df)), comparable across set sizes)</caption>\n\
         <thead><tr><th>GLM</th><th>learner</th><th class=\"num\">GVIF median</th><th class=\"num\">10–90%</th><th class=\"num\">scaled median</th><th class=\"num\">10–90%</th><th class=\"num\">runs with undefined GVIF</th></tr></thead>\n<tbody>\n",
    );
    for s in &v.model_sets {
        let [g, gr] = spread_cells(&s.gvif, ratio_cell);
        let [sc, scr] = spread_cells(&s.gvif_scaled, ratio_cell);
        let _ = writeln!(
            html,
            "<tr><td>{}</td><th scope=\"row\">{}</th><td class=\"num\">{g}</td><td class=\"num range\">{gr}</td><td class=\"num\">{sc}</td><td class=\"num range\">{scr}</td><td class=\"num\">{} of {}</td></tr>",
            esc(&s.glm),
            esc(&s.learner),
            s.gvif.undefined,
            s.gvif.count
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

fn recovery_table(v: &VariantForecast) -> String {
    if v.recovery.is_empty() {
        return "<p class=\"note\">No parameter recovery: no generating learner has a fitted parameter.</p>\n".to_string();
    }
    let mut html = String::from(
        "<table class=\"recovery\">\n<caption>Parameter recovery (common practice before trusting fitted parameters): the generating learner fitted to the choices it produced. r: correlation of true and fitted values over its participants; at a bound: share of fits that ended at a bound of the parameter.</caption>\n\
         <thead><tr><th>learner</th><th>parameter</th><th class=\"num\">participants</th><th class=\"num\">r(true, fitted)</th><th class=\"num\">at a bound</th></tr></thead>\n<tbody>\n",
    );
    for r in &v.recovery {
        let correlation = match r.correlation.filter(|c| c.is_finite()) {
            Some(c) => format!("{c:.3}"),
            None => r.note.map_or_else(
                || "undefined".to_string(),
                |note| {
                    format!(
                        "undefined <span class=\"note\">({})</span>",
                        esc(note.trim_start_matches("undefined: "))
                    )
                },
            ),
        };
        let _ = writeln!(
            html,
            "<tr><th scope=\"row\">{}</th><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{correlation}</td><td class=\"num\">{}</td></tr>",
            esc(&r.learner),
            esc(&r.parameter),
            r.participants,
            share(r.at_bound)
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}
