//! The header: study name, counts by status, the space of the diagnostics, and the
//! page's table of contents.

use std::fmt::Write as _;

use super::{esc, glyph};
use crate::render::table::{glm_contents, noise};
use crate::report::Report;
use crate::screen::Status;

pub(super) fn header(report: &Report) -> String {
    let cohort = &report.cohort;
    let mut html = String::from("<header>\n");
    let _ = writeln!(
        html,
        "<p class=\"tool\">{} {} · redundancy of the design's regressors</p>",
        esc(&report.tool.name),
        esc(&report.tool.version)
    );
    let _ = writeln!(html, "<h1>{}</h1>", esc(&report.study.name));
    let _ = writeln!(
        html,
        "<p class=\"counts\">{} participants · {} runs · {} · {} · {} · study file <code>{}</code></p>",
        cohort.subjects,
        cohort.runs,
        count_badge(Status::Ok, cohort.statuses.ok),
        count_badge(Status::Caution, cohort.statuses.caution),
        count_badge(Status::Severe, cohort.statuses.severe),
        esc(&report.study.file)
    );
    let _ = writeln!(
        html,
        "<p class=\"space\"><strong>These are diagnostics of the filtered design.</strong> {}.</p>",
        esc(&report.settings.diagnostics_space)
    );
    let glms: Vec<String> = report
        .settings
        .glms
        .iter()
        .map(|g| {
            format!(
                "<strong>{}</strong> ({})",
                esc(&g.name),
                esc(&glm_contents(g))
            )
        })
        .collect();
    let _ = writeln!(
        html,
        "<p class=\"space\">GLMs: {}. Noise: {}. A participant takes the worst status over their GLMs.</p>",
        glms.join("; "),
        esc(&noise(&report.settings))
    );
    html.push_str(
        "<nav><a href=\"#overview\">Cohort overview</a> <a href=\"#shared\">Own and shared variance</a> \
         <a href=\"#separation\">Telling the models apart</a> \
         <a href=\"#correlations\">Correlations</a> <a href=\"#participants\">Participants</a> \
         <a href=\"#settings\">Settings</a> <a href=\"#methods\">Methods paragraph</a> \
         <a href=\"#cautions\">Cautions</a></nav>\n</header>\n",
    );
    html
}

fn count_badge(status: Status, count: usize) -> String {
    format!(
        "<span class=\"status st-{0}\"><span aria-hidden=\"true\">{1}</span> {2} {0}</span>",
        status.label(),
        glyph(status),
        count
    )
}
