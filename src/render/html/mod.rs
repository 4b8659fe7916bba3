//! `--format html`: one self-contained page — inline CSS and inline SVG, no script, no
//! network, no external fonts — that opens in any browser and prints.
//!
//! Every string that comes from the user's files (study name and file, participant and
//! run labels, regressor, model, event, column and region names, flag messages) goes
//! through [`esc`] or [`attr`] before it reaches the page; the figures get the raw
//! strings because the SVG backend escapes text itself (see `plots`).
//!
//! One file per section of the page; this file holds the page skeleton, the helpers the
//! sections share, and the style sheet.

mod cautions;
mod correlations;
mod header;
mod methods;
mod overview;
mod participant_tables;
mod participants;
mod prose;
mod separation;
mod settings;
mod shared;

use std::fmt::Write as _;

pub(crate) use super::numbers::{percent_whole as percent, plain, ratio_finite as number};
use crate::flags::Severity;
use crate::report::Report;
use crate::screen::Status;
use cautions::cautions;
use correlations::correlations;
use header::header;
use methods::methods;
use overview::overview;
use participants::participants;
use separation::separation;
use settings::settings;
use shared::shared;

pub fn render(report: &Report) -> String {
    let mut page = String::with_capacity(256 * 1024);
    page.push_str("<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    page.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    let _ = writeln!(
        page,
        "<title>{} — {} report</title>",
        esc(&report.study.name),
        esc(&report.tool.name)
    );
    let _ = writeln!(page, "<style>{STYLE}</style>\n</head>\n<body>");
    page.push_str(&header(report));
    page.push_str("<main>\n");
    for section in [
        overview(report),
        shared(report),
        separation(report),
        correlations(report),
        participants(report),
        settings(report),
        methods(report),
        cautions(report),
    ] {
        page.push_str(&section);
    }
    page.push_str("</main>\n");
    let _ = writeln!(
        page,
        "<footer>Made by {} {} from the study file above. The numbers describe the design, not the data.</footer>",
        esc(&report.tool.name),
        esc(&report.tool.version)
    );
    page.push_str("</body>\n</html>\n");
    page
}

// ---------------------------------------------------------------------------------
// Small helpers.

/// Text content.
pub(crate) fn esc(text: &str) -> String {
    html_escape::encode_text(text).into_owned()
}

/// A double-quoted attribute value.
pub(crate) fn attr(text: &str) -> String {
    html_escape::encode_double_quoted_attribute(text).into_owned()
}

pub(crate) fn section(id: &str, title: &str, body: &str) -> String {
    format!("<section id=\"{id}\">\n<h2>{title}</h2>\n{body}</section>\n")
}

/// The glyph that stands for a status in tables; it matches the figure's markers, so
/// a status never depends on colour alone.
pub(crate) fn glyph(status: Status) -> &'static str {
    match status {
        Status::Ok => "○",
        Status::Caution => "▲",
        Status::Severe => "■",
    }
}

pub(crate) fn badge(status: Status) -> String {
    format!(
        "<span class=\"status st-{0}\"><span aria-hidden=\"true\">{1}</span> {0}</span>",
        status.label(),
        glyph(status)
    )
}

fn severity_badge(severity: Severity) -> String {
    format!(
        "<span class=\"severity sv-{0}\">{0}</span>",
        severity.label()
    )
}

/// A figure, or a short note where it could not be drawn.
pub(crate) fn figure(svg: Result<String, String>, caption: &str) -> String {
    match svg {
        Ok(svg) => format!("<figure>\n{svg}<figcaption>{caption}</figcaption>\n</figure>\n"),
        Err(reason) => format!(
            "<figure class=\"missing\"><p class=\"note\">This figure could not be drawn ({}). The same numbers are in the tables of this page.</p><figcaption>{caption}</figcaption></figure>\n",
            esc(&reason)
        ),
    }
}

fn participant_id(subject: &str) -> String {
    attr(&format!("participant-{subject}"))
}

// ---------------------------------------------------------------------------------
// Style. Meaning never rests on a background colour alone (glyphs and words carry the
// statuses), so printing without backgrounds loses nothing.

pub(crate) const STYLE: &str = r#"
:root { --ink: #1d2b3f; --ember: #d97b29; --ember-dark: #9a4f10; --sand: #eadcb5; --stone: #8a8f96; --mist: #eef0f2; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 1160px; padding: 24px 28px 40px; color: var(--ink); background: #fff;
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; }
header { border-bottom: 3px solid var(--ink); padding-bottom: 12px; margin-bottom: 8px; }
header .tool { margin: 0; font-size: 13px; letter-spacing: .04em; text-transform: uppercase; color: #4a5668; }
h1 { margin: 4px 0 6px; font-size: 30px; line-height: 1.2; }
h2 { margin: 36px 0 10px; font-size: 22px; border-bottom: 1px solid var(--sand); padding-bottom: 4px; }
h3 { margin: 22px 0 8px; font-size: 17px; }
.counts { margin: 0 0 4px; }
.space { margin: 4px 0 10px; font-size: 13px; color: #3c4859; }
nav a { display: inline-block; margin: 0 14px 4px 0; color: var(--ink); font-size: 14px; }
code { font-size: 13px; background: var(--mist); padding: 0 4px; border-radius: 3px; }
.note, figcaption, caption { font-size: 13px; color: #3c4859; }
caption { text-align: left; padding: 4px 0; caption-side: top; }
figure { margin: 14px 0 22px; }
figure svg { display: block; max-width: 100%; height: auto; }
figcaption { margin-top: 6px; max-width: 900px; }
figure.missing { border: 1px dashed var(--stone); padding: 8px 12px; }
table { border-collapse: collapse; margin: 8px 0 16px; font-size: 13.5px; }
th, td { padding: 3px 10px 3px 0; text-align: left; vertical-align: top; border-bottom: 1px solid #e2e4e7; }
thead th { border-bottom: 2px solid var(--ink); font-weight: 600; }
tbody th { font-weight: 500; }
.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
th.num { white-space: normal; }
.range { color: #5b6675; }
.status { white-space: nowrap; font-weight: 600; }
.st-ok { color: var(--ink); }
.st-caution { color: var(--ember-dark); }
.st-severe { color: var(--ink); text-decoration: underline; text-decoration-thickness: 2px; }
td.st-severe { text-decoration: none; font-weight: 700; }
td.st-caution { font-weight: 600; }
.severity { font-weight: 600; font-size: 12px; text-transform: uppercase; letter-spacing: .03em; }
.sv-severe, .sv-error { text-decoration: underline; }
.sv-caution { color: var(--ember-dark); }
.sv-note { color: #5b6675; font-weight: 400; }
article.participant { border-top: 1px solid #d6d9dd; border-left: 4px solid var(--sand); margin: 14px 0; padding: 2px 0 6px 14px; }
article.participant h3 { margin: 8px 0 2px; }
article.participant .aside { font-weight: 400; font-size: 14px; color: #3c4859; margin-left: 8px; }
.columns { display: flex; flex-wrap: wrap; gap: 0 36px; align-items: flex-start; }
.columns table { margin-bottom: 6px; }
article.participant details summary { cursor: pointer; font-size: 13.5px; padding: 2px 0; }
table.settings tbody th { width: 13em; }
table.settings td:nth-child(3) { max-width: 340px; color: #3c4859; }
p.detail, ul.detail { font-size: 13.5px; margin: 6px 0; }
table.flags td:last-child { max-width: 760px; }
.methods { max-width: 860px; }
footer { margin-top: 40px; padding-top: 8px; border-top: 1px solid var(--sand); font-size: 12px; color: #5b6675; }
@media print {
  body { max-width: none; padding: 0; font-size: 10pt; }
  table { font-size: 8.5pt; }
  th, td { padding-right: 6px; }
  nav { display: none; }
  a { color: inherit; text-decoration: none; }
  h2, h3 { break-after: avoid; page-break-after: avoid; }
  figure, table, tr, article.participant, .statuses { break-inside: avoid; page-break-inside: avoid; }
  code { background: none; padding: 0; }
  article.participant { border-left-width: 1px; }
}
"#;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::DIAGNOSTICS_SPACE;

    fn demo() -> Report {
        match crate::demo::check_demo(Default::default()) {
            Ok(report) => report,
            Err(error) => panic!("the demo study should check: {error}"),
        }
    }

    /// Words made only of letters and digits, so "inflation" is not "inf".
    fn tokens(page: &str) -> impl Iterator<Item = &str> {
        page.split(|c: char| !c.is_ascii_alphanumeric())
    }

    #[test]
    fn demo_page_has_its_sections_and_figures() {
        let page = render(&demo());
        for heading in [
            "Cohort overview",
            "Own and shared variance",
            "Correlations in the most affected design",
            "Participants",
            "Settings",
            "Methods paragraph",
            "Cautions",
        ] {
            assert!(
                page.contains(&format!("{heading}</h2>")),
                "missing section {heading}"
            );
        }
        assert!(page.matches("<svg").count() >= 3);
        assert!(!page.contains("could not be drawn"));
        assert!(!page.contains("<script"));
        assert!(page.contains("common practice"));
        assert!(page.contains(&esc(DIAGNOSTICS_SPACE)));
    }

    #[test]
    fn page_holds_no_undefined_numbers() {
        let page = render(&demo());
        for token in tokens(&page) {
            assert!(
                !matches!(
                    token.to_ascii_lowercase().as_str(),
                    "nan" | "inf" | "infinity"
                ),
                "found {token}"
            );
        }
    }

    #[test]
    fn user_strings_are_escaped_everywhere() {
        let hostile = "<script>alert(1)</script>";
        let mut report = demo();
        report.study.name = hostile.to_string();
        report.study.file = hostile.to_string();
        let subject = report.subjects[0].subject.clone();
        for summary in &mut report.subjects {
            if summary.subject == subject {
                summary.subject = hostile.to_string();
            }
        }
        for run in &mut report.runs {
            if run.subject == subject {
                run.subject = hostile.to_string();
            }
            for flag in &mut run.flags {
                flag.message = hostile.to_string();
            }
            // Rename a regressor everywhere it appears.
            let old = "delta:delta_pe";
            for entry in &mut run.regressors {
                if entry.regressor.name == old {
                    entry.regressor.name = hostile.to_string();
                }
            }
        }
        for share in &mut report.subject_partition {
            if share.subject == subject {
                share.subject = hostile.to_string();
            }
            if share.regressor == "delta:delta_pe" {
                share.regressor = hostile.to_string();
            }
        }
        let page = render(&report);
        assert!(
            !page.contains(hostile),
            "a raw user string reached the page"
        );
        assert!(!page.contains("<script"));
        assert!(page.contains("&lt;script&gt;alert(1)&lt;/script&gt;"));
        // The figures carry the escaped regressor name too.
        let svg_text = page
            .split("<svg")
            .skip(1)
            .filter(|svg| svg.contains("&lt;script&gt;"))
            .count();
        assert!(svg_text >= 2, "the figures should show the escaped name");
    }
}
