//! The ranking of task variants: the table, the verdict, and the two figures (each
//! variant's focus-regressor VIFs, and its participants' statuses).

use std::fmt::Write as _;

use super::{esc, variant_id};
use crate::forecast::report::ForecastReport;
use crate::forecast::spec::RankBy;
use crate::render::html::{badge, figure, plain, section};
use crate::render::numbers::{percent_tenths as share, score};
use crate::render::plots::variants::{status_bars, status_rows, variant_vifs, variant_vifs_data};
use crate::screen::Status;

/// What the score measures, in words.
pub(super) fn criterion(report: &ForecastReport) -> String {
    let what = match report.forecast.rank_by {
        RankBy::Vif => "the largest median VIF",
        RankBy::Shared => "the largest median share held with another learner's modulators",
    };
    let focus: Vec<String> = report
        .forecast
        .focus
        .iter()
        .map(|f| format!("<code>{}</code>", esc(f)))
        .collect();
    format!("{what} over {}", focus.join(", "))
}

pub(super) fn ranking(report: &ForecastReport) -> String {
    let mut body = format!(
        "<p>Variants from the best separated to the least. Score: {} (lower is better; a \
         variant whose score is undefined comes last). Participants are counted by the status \
         of their worst run.</p>\n",
        criterion(report)
    );
    body.push_str(&table(report));
    let _ = writeln!(
        body,
        "<p class=\"verdict\"><strong>Verdict.</strong> {}</p>",
        esc(&report.verdict)
    );
    body.push_str(
        "<p class=\"verdict-note\">The verdict ranks designs by how well they keep the learners' \
         regressors apart; it says nothing about which learner is right, and the thresholds are \
         rules of thumb. Read it with the <a href=\"#cautions\">cautions</a>.</p>\n",
    );
    body.push_str(&vif_figure(report));
    let caption = "Participants of each variant (ranking order) by the status of their worst \
                   simulated run: ok, caution or severe, with the shares printed on the bars. \
                   Status combines the VIF and condition-index checks of the study report.";
    body.push_str(&figure(status_bars(&status_rows(report)), caption));
    section("ranking", "Ranking of the task variants", &body)
}

fn table(report: &ForecastReport) -> String {
    let mut html = format!(
        "<table class=\"ranking\">\n<thead><tr><th class=\"num\">rank</th><th>variant</th><th class=\"num\">score</th><th class=\"num\" title=\"share of paired bootstrap resamples of the participants in which this variant ranks first\">first in</th><th class=\"num\">{}</th><th class=\"num\">{}</th><th class=\"num\">{}</th><th>task</th></tr></thead>\n<tbody>\n",
        badge(Status::Ok),
        badge(Status::Caution),
        badge(Status::Severe)
    );
    for entry in &report.ranking {
        let Some((index, v)) = report
            .variants
            .iter()
            .enumerate()
            .find(|(_, v)| v.name == entry.variant)
        else {
            continue;
        };
        let cell = |count: usize| {
            format!(
                "{count} <span class=\"range\">({})</span>",
                share(v.participants.share(count))
            )
        };
        let note = v.score_note.as_deref().map_or_else(String::new, |note| {
            format!("<br><span class=\"note\">{}</span>", esc(note))
        });
        let _ = writeln!(
            html,
            "<tr><td class=\"num\">{}</td><th scope=\"row\"><a href=\"#{}\">{}</a></th><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td class=\"num\">{}</td><td>{}{note}</td></tr>",
            entry.rank,
            variant_id(index),
            esc(&v.name),
            score(entry.score),
            share(entry.chance_best),
            cell(v.participants.ok),
            cell(v.participants.caution),
            cell(v.participants.severe),
            esc(&v.task.summary),
        );
    }
    html.push_str("</tbody>\n</table>\n");
    html
}

fn vif_figure(report: &ForecastReport) -> String {
    let thresholds = &report.forecast.thresholds;
    let data = variant_vifs_data(report);
    let mut caption = format!(
        "One row per variant in ranking order, one line per focus regressor (told apart by \
         marker shape and colour): the median VIF over every simulated run of the variant, \
         with a whisker from the 10th to the 90th percentile. Log scale. Dashed line: caution \
         ({}); solid line: severe ({}). These thresholds are rules of thumb, not laws.",
        plain(thresholds.vif_caution),
        plain(thresholds.vif_severe)
    );
    let list = |pairs: Vec<(String, String)>| {
        let items: Vec<String> = pairs
            .iter()
            .map(|(v, r)| format!("{} in “{}”", esc(r), esc(v)))
            .collect();
        items.join("; ")
    };
    let unmarked = data.unmarked();
    if !unmarked.is_empty() {
        let _ = write!(
            caption,
            " Without a mark, because the median VIF is undefined (exact dependencies in at \
             least half of the runs) or the regressor is absent: {}.",
            list(unmarked)
        );
    }
    let open = data.open_ended();
    if !open.is_empty() {
        let _ = write!(
            caption,
            " The 90th percentile is undefined (exact dependencies in more than a tenth of \
             the runs), so the whisker runs dashed to the edge: {}.",
            list(open)
        );
    }
    figure(variant_vifs(&data, thresholds), &caption)
}
