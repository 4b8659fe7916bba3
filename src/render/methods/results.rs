//! The third paragraph: VIFs over runs, statuses, shares and dependencies.

use super::layout::{Layout, Named};
use crate::cohort::partition::UNIQUE;
use crate::flags::FlagCode;
use crate::render::numbers::{
    prose_percent as percent, prose_percent_range as percent_range, prose_vif as vif,
};
use crate::render::words::count;
use crate::report::Report;
use crate::report::RunReport;

pub(super) fn results_paragraph(report: &Report, layout: &Layout) -> String {
    let mut sentences: Vec<String> = Vec::new();
    let runs = &report.runs;

    // VIFs over runs: the modulators, or the event regressors if there are none.
    let (what, regressors): (&str, Vec<&Named>) = if layout.has_modulators() {
        ("modulator", layout.modulators().map(|(_, m)| m).collect())
    } else {
        ("event-regressor", layout.events.iter().collect())
    };
    if !regressors.is_empty() && !runs.is_empty() {
        let glms = &report.settings.glms;
        for glm in glms {
            let items: Vec<String> = regressors
                .iter()
                .filter(|named| {
                    report
                        .regressor_vifs
                        .iter()
                        .any(|v| v.glm == glm.name && v.regressor == named.name)
                })
                .map(|named| vif_summary(report, &glm.name, named))
                .collect();
            if items.is_empty() {
                continue;
            }
            let place = if glms.len() > 1 {
                format!("In the \u{201c}{}\u{201d} GLM, over runs", glm.name)
            } else {
                "Over runs".to_string()
            };
            sentences.push(format!(
                "{place}, {what} VIFs had median (range): {}.",
                items.join("; ")
            ));
        }
    }

    let cohort = &report.cohort;
    sentences.push(if cohort.statuses.ok == cohort.subjects {
        format!(
            "None of the {} reached caution or severe status.",
            count(cohort.subjects, "participant", "participants")
        )
    } else {
        format!(
            "Of the {}, {} reached severe status, {} caution and {} neither.",
            count(cohort.subjects, "participant", "participants"),
            cohort.statuses.severe,
            cohort.statuses.caution,
            cohort.statuses.ok
        )
    });

    if let Some(shares) = share_sentence(report, layout) {
        sentences.push(shares);
    }
    if let Some(separation) = separation_sentence(report, layout) {
        sentences.push(separation);
    }

    let exact = participants_with(report, |run| {
        run.flags
            .iter()
            .any(|f| f.code == FlagCode::ExactDependency)
    });
    let entangled = participants_with(report, |run| !run.entangled_dimensions.is_empty());
    let participants = |n| count(n, "participant", "participants");
    sentences.push(match (entangled, exact) {
        (0, 0) => "No run had a near-dependency or an exact dependency.".to_string(),
        (0, e) => format!(
            "No run had a near-dependency; exact dependencies occurred in {}.",
            participants(e)
        ),
        (n, 0) => format!(
            "Near-dependencies occurred in {}; no run had an exact dependency.",
            participants(n)
        ),
        (n, e) => format!(
            "Near-dependencies occurred in {} and exact dependencies in {}.",
            participants(n),
            participants(e)
        ),
    });
    sentences.join(" ")
}

/// "label median (min–max)", with the runs in which the VIF was undefined.
fn vif_summary(report: &Report, glm: &str, named: &Named) -> String {
    let vifs = report
        .regressor_vifs
        .iter()
        .find(|v| v.glm == glm && v.regressor == named.name);
    let undefined = vifs.map_or(0, |v| v.undefined);
    let undefined_note = |all: bool| {
        if all {
            format!("undefined in all {}", count(undefined, "run", "runs"))
        } else {
            format!("undefined in {}", count(undefined, "run", "runs"))
        }
    };
    match vifs.map(|v| (v.median, v.min, v.max)) {
        Some((Some(mid), Some(low), Some(high))) => {
            let note = if undefined > 0 {
                format!("; {}", undefined_note(false))
            } else {
                String::new()
            };
            format!(
                "{} {} ({}–{}{note})",
                named.label,
                vif(mid),
                vif(low),
                vif(high)
            )
        }
        _ => format!("{} ({})", named.label, undefined_note(true)),
    }
}

/// The commonality results: per modulator, its median share with each other model and
/// its median own share (participant means over runs, summarised over participants).
fn share_sentence(report: &Report, layout: &Layout) -> Option<String> {
    let find = |regressor: &str, part: &str| {
        report
            .cohort_partition
            .iter()
            .find(|c| c.regressor == regressor && c.part == part)
    };
    let mut items: Vec<String> = Vec::new();
    for (model, named) in layout.modulators() {
        // The first item says what the numbers are; the others follow its pattern.
        let (of_its, as_own) = if items.is_empty() {
            (" of its variance", " as its own")
        } else {
            ("", "")
        };
        let mut parts: Vec<String> = Vec::new();
        for other in layout.models.iter().filter(|m| m.name != model.name) {
            if let Some(share) = find(&named.name, &other.name) {
                parts.push(format!(
                    "{} ({}){} with {}",
                    percent(share.median),
                    percent_range(share.min, share.max),
                    if parts.is_empty() { of_its } else { "" },
                    other.name
                ));
            }
        }
        let own = find(&named.name, UNIQUE);
        let item = match (parts.is_empty(), own) {
            (true, None) => continue,
            (true, Some(own)) => format!(
                "{} kept {} ({}){of_its}{as_own}",
                named.label,
                percent(own.median),
                percent_range(own.min, own.max)
            ),
            (false, None) => format!("{} shared {}", named.label, parts.join(", ")),
            (false, Some(own)) => format!(
                "{} shared {} and kept {}{as_own}",
                named.label,
                parts.join(", "),
                percent(own.median)
            ),
        };
        items.push(item);
    }
    if items.is_empty() {
        return None;
    }
    Some(format!(
        "In the commonality analysis of the design with every model (each participant's mean over runs; median and range over participants), {}.",
        items.join("; ")
    ))
}

fn participants_with(report: &Report, test: impl Fn(&RunReport) -> bool) -> usize {
    let mut subjects: Vec<&str> = Vec::new();
    for run in report.runs.iter().filter(|r| test(r)) {
        if !subjects.contains(&run.subject.as_str()) {
            subjects.push(run.subject.as_str());
        }
    }
    subjects.len()
}

/// The separation results: per modulator and other model, the median (range) over
/// participants of the partial R².
fn separation_sentence(report: &Report, layout: &Layout) -> Option<String> {
    let items: Vec<String> = report
        .separation_summary
        .iter()
        .filter_map(|s| {
            let (Some(median), Some(low), Some(high)) =
                (s.partial_r2.median, s.partial_r2.min, s.partial_r2.max)
            else {
                return None;
            };
            let label = layout
                .modulators()
                .find(|(_, m)| m.name == s.regressor)
                .map_or(s.regressor.as_str(), |(_, m)| m.label.as_str());
            Some(format!(
                "{} on {}'s modulators {} ({})",
                label,
                s.models[1],
                percent(median),
                percent_range(low, high)
            ))
        })
        .collect();
    (!items.is_empty()).then(|| {
        format!(
            "Partial R² of each modulator on the other model's modulators (participant means over runs; median and range over participants): {}.",
            items.join("; ")
        )
    })
}
