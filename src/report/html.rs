//! `--format html`: one self-contained page — inline CSS and inline SVG, no script, no
//! network, no external fonts — that opens in any browser and prints.
//!
//! Every string that comes from the user's files (study name and file, participant and
//! run labels, regressor, model, event, column and region names, flag messages) goes
//! through [`esc`] or [`attr`] before it reaches the page; the figures get the raw
//! strings because the SVG backend escapes text itself (see `plots`).

use std::fmt::Write as _;

use super::Report;
use super::format::ratio;
use super::model::{DIAGNOSTICS_SPACE, ORTHOGONALISATION_CAUTION, RunReport};
use super::plots;
use super::table::READING_NOTES;
use crate::flags::Severity;
use crate::partition::cohort::UNIQUE;
use crate::screen::{CLAIMS_NOTE, Status, SubjectSummary};
use crate::study::Thresholds;

pub fn render(report: &Report) -> String {
    let mut page = String::with_capacity(256 * 1024);
    page.push_str("<!doctype html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    page.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    let _ = writeln!(
        page,
        "<title>{} — {} report</title>",
        esc(&report.study.name),
        esc(report.tool.name)
    );
    let _ = writeln!(page, "<style>{STYLE}</style>\n</head>\n<body>");
    page.push_str(&header(report));
    page.push_str("<main>\n");
    for section in [
        overview(report),
        shared(report),
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
        esc(report.tool.name),
        esc(report.tool.version)
    );
    page.push_str("</body>\n</html>\n");
    page
}

// ---------------------------------------------------------------------------------
// Small helpers.

/// Text content.
fn esc(text: &str) -> String {
    html_escape::encode_text(text).into_owned()
}

/// A double-quoted attribute value.
fn attr(text: &str) -> String {
    html_escape::encode_double_quoted_attribute(text).into_owned()
}

fn section(id: &str, title: &str, body: &str) -> String {
    format!("<section id=\"{id}\">\n<h2>{title}</h2>\n{body}</section>\n")
}

/// The glyph that stands for a status in tables; it matches the figure's markers, so
/// a status never depends on colour alone.
fn glyph(status: Status) -> &'static str {
    match status {
        Status::Ok => "○",
        Status::Caution => "▲",
        Status::Severe => "■",
    }
}

fn badge(status: Status) -> String {
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

/// A share in [0, 1] as a percentage; non-finite values never reach the page.
fn percent(value: f64) -> String {
    if value.is_finite() {
        format!("{:.0}%", value * 100.0)
    } else {
        "n/a".to_string()
    }
}

/// A ratio for the page: `ratio` with a guard against non-finite values.
fn number(value: Option<f64>) -> String {
    ratio(value.filter(|v| v.is_finite()))
}

/// A setting as the user wrote it ("5", "2.5").
fn plain(value: f64) -> String {
    if value.is_finite() {
        format!("{value}")
    } else {
        "n/a".to_string()
    }
}

/// The status a VIF earns, for colouring a table cell.
fn vif_status(vif: Option<f64>, thresholds: &Thresholds) -> Status {
    crate::screen::vif_status(vif, thresholds)
}

/// Plain text (blank-line separated blocks; lines starting with "- " are list items,
/// indented lines continue the item above) as escaped HTML paragraphs and lists.
fn prose(text: &str) -> String {
    let mut html = String::new();
    for block in text.split("\n\n").filter(|b| !b.trim().is_empty()) {
        let mut paragraph: Vec<&str> = Vec::new();
        let mut items: Vec<String> = Vec::new();
        for line in block.lines() {
            let trimmed = line.trim();
            if let Some(item) = trimmed.strip_prefix("- ") {
                html.push_str(&paragraph_html(&mut paragraph));
                items.push(item.to_string());
            } else if let Some(last) = items.last_mut().filter(|_| line.starts_with(' ')) {
                last.push(' ');
                last.push_str(trimmed);
            } else if !trimmed.is_empty() {
                html.push_str(&list(&mut items));
                paragraph.push(trimmed);
            }
        }
        html.push_str(&paragraph_html(&mut paragraph));
        html.push_str(&list(&mut items));
    }
    html
}

/// The collected lines as one paragraph (the browser reflows them); empties the buffer.
fn paragraph_html(lines: &mut Vec<&str>) -> String {
    if lines.is_empty() {
        return String::new();
    }
    let html = format!("<p>{}</p>\n", esc(&lines.join(" ")));
    lines.clear();
    html
}

/// The collected items as a list; empties the buffer.
fn list(items: &mut Vec<String>) -> String {
    if items.is_empty() {
        return String::new();
    }
    let mut html = String::from("<ul>\n");
    for item in items.drain(..) {
        let _ = writeln!(html, "<li>{}</li>", esc(&item));
    }
    html.push_str("</ul>\n");
    html
}

/// A figure, or a short note where it could not be drawn.
fn figure(svg: Result<String, String>, caption: &str) -> String {
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
// The header.

fn header(report: &Report) -> String {
    let cohort = &report.cohort;
    let mut html = String::from("<header>\n");
    let _ = writeln!(
        html,
        "<p class=\"tool\">{} {} · redundancy of the design's regressors</p>",
        esc(report.tool.name),
        esc(report.tool.version)
    );
    let _ = writeln!(html, "<h1>{}</h1>", esc(&report.study.name));
    let _ = writeln!(
        html,
        "<p class=\"counts\">{} participants · {} runs · {} · {} · {} · study file <code>{}</code></p>",
        cohort.subjects,
        cohort.runs,
        count_badge(Status::Ok, cohort.ok),
        count_badge(Status::Caution, cohort.caution),
        count_badge(Status::Severe, cohort.severe),
        esc(&report.study.file)
    );
    let _ = writeln!(
        html,
        "<p class=\"space\"><strong>These are diagnostics of the filtered design.</strong> {}.</p>",
        esc(DIAGNOSTICS_SPACE)
    );
    html.push_str(
        "<nav><a href=\"#overview\">Cohort overview</a> <a href=\"#shared\">Own and shared variance</a> \
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

// ---------------------------------------------------------------------------------
// Cohort overview: the status counts and every regressor's VIF across participants.

fn overview(report: &Report) -> String {
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
            who.len(),
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

// ---------------------------------------------------------------------------------
// Own and shared variance.

fn shared(report: &Report) -> String {
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

// ---------------------------------------------------------------------------------
// The correlation matrix of the most affected run.

fn correlations(report: &Report) -> String {
    let Some(run) = plots::worst_run(report) else {
        return section(
            "correlations",
            "Correlations in the most affected design",
            "<p class=\"note\">No runs were checked.</p>\n",
        );
    };
    let caption = format!(
        "Correlations between all regressors of participant {}, run {} (the participant with the \
         highest VIF, in the run where it occurred), after the constant and the drift basis were \
         projected out. Slate blue: negative, amber: positive, white: none; hatched grey cells \
         marked n/a have no value (a regressor left out of the design). Pairwise correlations \
         show only part of the story: a VIF can be high when no single correlation is.",
        esc(&run.subject),
        esc(&run.run)
    );
    let body = figure(plots::correlation_map(run), &caption);
    section(
        "correlations",
        "Correlations in the most affected design",
        &body,
    )
}

// ---------------------------------------------------------------------------------
// Participants: a summary table that always prints, and a closed-by-default detail
// block per participant.

fn participants(report: &Report) -> String {
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
        body.push_str(&participant_detail(report, summary, &runs));
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
fn participant_detail(report: &Report, summary: &SubjectSummary, runs: &[&RunReport]) -> String {
    let run_count = match runs.len() {
        1 => "1 run".to_string(),
        n => format!("{n} runs"),
    };
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
    html.push_str(&vif_table(runs, &report.settings.thresholds));
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

fn vif_table(runs: &[&RunReport], thresholds: &Thresholds) -> String {
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
                        let status = if vif.is_none() {
                            Status::Severe
                        } else {
                            vif_status(vif, thresholds)
                        };
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

fn entangled(runs: &[&RunReport]) -> String {
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

fn model_sets(runs: &[&RunReport]) -> String {
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

fn differences(runs: &[&RunReport]) -> String {
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
fn signals(runs: &[&RunReport]) -> String {
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

fn flags(runs: &[&RunReport]) -> String {
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

// ---------------------------------------------------------------------------------
// Settings, methods, cautions.

/// "common practice" where a threshold has the field's usual value, else says that the
/// study set its own.
fn practice(value: f64, usual: f64) -> String {
    if (value - usual).abs() < 1e-12 {
        "common practice".to_string()
    } else {
        format!("set by the study; common practice is {}", plain(usual))
    }
}

fn settings(report: &Report) -> String {
    let s = &report.settings;
    let t = &s.thresholds;
    let yes_no = |b: bool| if b { "yes" } else { "no" };
    let high_pass = if s.high_pass > 0.0 {
        format!("{} s cutoff (discrete cosine basis)", s.high_pass)
    } else {
        "off (only the constant is removed)".to_string()
    };
    let rows: Vec<(&str, String, String)> = vec![
        ("study file", format!("<code>{}</code>", esc(&report.study.file)), String::new()),
        ("TR", format!("{} s", s.tr), String::new()),
        ("microtime", format!("{} bins per TR", s.microtime), String::new()),
        ("reference", format!("{} (scans sampled at (k + {})·TR)", s.reference, s.reference), String::new()),
        ("high-pass filter", high_pass, String::new()),
        ("haemodynamic response", esc(s.hrf.shape), String::new()),
        ("HRF scaling", esc(s.hrf.scaling), String::new()),
        ("temporal derivatives", yes_no(s.hrf.derivative).to_string(), String::new()),
        ("modulators mean-centred", yes_no(s.centring).to_string(), String::new()),
        ("orthogonalisation", esc(s.orthogonalisation), String::new()),
        ("VIF caution", plain(t.vif_caution), practice(t.vif_caution, 5.0)),
        ("VIF severe", plain(t.vif_severe), practice(t.vif_severe, 10.0)),
        ("condition index", plain(t.condition_index), practice(t.condition_index, 30.0)),
        ("condition index, severe", plain(t.condition_index_severe), practice(t.condition_index_severe, 100.0)),
        ("shared over own", plain(t.shared_over_unique), "a warning against comparing two models on a modulator whose share with the other model exceeds this many times its own share (tangle's default 1)".to_string()),
        ("space of the diagnostics", esc(s.diagnostics_space), String::new()),
        ("dependency tolerance", format!("{:e} (relative; below it a direction of the design counts as an exact dependency)", s.dependency_tolerance), String::new()),
    ];
    let mut body = String::from(
        "<table class=\"settings\">\n<thead><tr><th>setting</th><th>value</th><th>note</th></tr></thead>\n<tbody>\n",
    );
    for (name, value, note) in rows {
        let _ = writeln!(
            body,
            "<tr><th scope=\"row\">{name}</th><td>{value}</td><td>{note}</td></tr>"
        );
    }
    body.push_str("</tbody>\n</table>\n");
    section("settings", "Settings", &body)
}

fn methods(report: &Report) -> String {
    let text = super::methods::render(report);
    let body = format!(
        "<p class=\"note\">A draft for a paper's methods section. Adapt it, and fill in what was done with flagged participants.</p>\n<div class=\"methods\">\n{}</div>\n",
        prose(&text)
    );
    section("methods", "Methods paragraph", &body)
}

fn cautions(report: &Report) -> String {
    // The notes open with their own title line; it becomes a heading here.
    let (title, notes) = READING_NOTES
        .split_once('\n')
        .unwrap_or(("How to read these numbers", READING_NOTES));
    let mut body = format!("<h3>{}</h3>\n{}", esc(title.trim()), prose(notes));
    body.push_str("<h3>Comparing models</h3>\n");
    let affected = report
        .subjects
        .iter()
        .filter(|s| {
            report
                .runs
                .iter()
                .filter(|r| r.subject == s.subject)
                .any(|r| r.flags.iter().any(|f| f.code == "shared_exceeds_unique"))
        })
        .count();
    if affected > 0 {
        let _ = writeln!(
            body,
            "<p>In {affected} of {} participants a modulator shares more of its variance with another model than it keeps for itself.</p>",
            report.cohort.subjects
        );
    }
    let claims = if report.claims_note.is_empty() {
        CLAIMS_NOTE
    } else {
        report.claims_note
    };
    body.push_str(&prose(claims));
    if report.settings.orthogonalisation != "none" {
        body.push_str("<h3>About orthogonalised numbers</h3>\n");
        body.push_str(&prose(ORTHOGONALISATION_CAUTION));
    }
    body.push_str(
        "<p>These diagnostics describe the design, so they can be computed before any data are \
         analysed; they cannot tell which model is true, and thresholds are conventions. Decide \
         about participants and models by the lab's analysis plan, with a statistician.</p>\n",
    );
    section("cautions", "Cautions", &body)
}

// ---------------------------------------------------------------------------------
// Style. Meaning never rests on a background colour alone (glyphs and words carry the
// statuses), so printing without backgrounds loses nothing.

const STYLE: &str = r#"
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

    #[test]
    fn prose_keeps_paragraphs_and_lists() {
        let html =
            prose("Title line\n  - first item\n    continues\n  - second <b>\n\nNext & last.");
        assert_eq!(
            html,
            "<p>Title line</p>\n<ul>\n<li>first item continues</li>\n<li>second &lt;b&gt;</li>\n</ul>\n<p>Next &amp; last.</p>\n"
        );
    }

    #[test]
    fn thresholds_are_labelled_by_whether_they_are_the_usual_ones() {
        assert_eq!(practice(5.0, 5.0), "common practice");
        assert!(practice(4.0, 5.0).contains("common practice is 5"));
    }
}
