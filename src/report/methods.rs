//! `--format methods`: paragraphs for a paper's methods section.
//!
//! Plain text, one paragraph per line and a blank line between paragraphs, so that it
//! pastes cleanly into a word processor. Every number is read from the report; what only
//! the researcher can say (what was done with flagged participants) is left as a clearly
//! marked placeholder.

use super::Report;
use super::model::RunReport;
use crate::design::RegressorKind;
use crate::partition::cohort::UNIQUE;

/// The placeholder's fixed opening, so that users (and tests) can search for it.
pub const PLACEHOLDER_START: &str = "[STATE WHAT WAS DONE";

pub fn render(report: &Report) -> String {
    let layout = Layout::of(report);
    let paragraphs = [
        design_paragraph(report, &layout),
        diagnostics_paragraph(report, &layout),
        results_paragraph(report, &layout),
        closing_paragraph(report, &layout),
    ];
    let mut text = paragraphs.join("\n\n");
    text.push('\n');
    text
}

/// A regressor as it appears in the text.
struct Named {
    /// The regressor's name in the report.
    name: String,
    /// What the text calls it: the trial-table column when that is unambiguous.
    label: String,
    event: Option<String>,
}

struct ModelInfo {
    name: String,
    modulators: Vec<Named>,
}

/// The regressors of the study, gathered over all runs in order of first appearance.
struct Layout {
    events: Vec<Named>,
    models: Vec<ModelInfo>,
    nuisance: Vec<String>,
}

impl Layout {
    fn of(report: &Report) -> Self {
        let mut events: Vec<Named> = Vec::new();
        let mut modulators: Vec<(String, Named, Option<String>)> = Vec::new();
        let mut nuisance: Vec<String> = Vec::new();
        for run in &report.runs {
            for entry in &run.regressors {
                let regressor = &entry.regressor;
                match regressor.kind {
                    RegressorKind::Onset => {
                        if !events.iter().any(|e| e.name == regressor.name) {
                            events.push(Named {
                                name: regressor.name.clone(),
                                label: regressor
                                    .event
                                    .clone()
                                    .unwrap_or_else(|| regressor.name.clone()),
                                event: regressor.event.clone(),
                            });
                        }
                    }
                    RegressorKind::Modulator => {
                        if !modulators.iter().any(|(_, m, _)| m.name == regressor.name) {
                            let model = regressor.model.clone().unwrap_or_default();
                            modulators.push((
                                model,
                                Named {
                                    name: regressor.name.clone(),
                                    label: regressor.name.clone(),
                                    event: regressor.event.clone(),
                                },
                                regressor.column.clone(),
                            ));
                        }
                    }
                    RegressorKind::Nuisance => {
                        if !nuisance.contains(&regressor.name) {
                            nuisance.push(regressor.name.clone());
                        }
                    }
                    RegressorKind::Derivative => {}
                }
            }
        }
        // A modulator is called by its column when no other modulator uses that column.
        let columns: Vec<Option<String>> = modulators.iter().map(|(_, _, c)| c.clone()).collect();
        let mut models: Vec<ModelInfo> = Vec::new();
        for (model, mut named, column) in modulators {
            if let Some(column) = column {
                let uses = columns
                    .iter()
                    .filter(|c| c.as_deref() == Some(column.as_str()))
                    .count();
                if uses == 1 {
                    named.label = column;
                }
            }
            match models.iter_mut().find(|m| m.name == model) {
                Some(found) => found.modulators.push(named),
                None => models.push(ModelInfo {
                    name: model,
                    modulators: vec![named],
                }),
            }
        }
        Layout {
            events,
            models,
            nuisance,
        }
    }

    fn modulators(&self) -> impl Iterator<Item = (&ModelInfo, &Named)> {
        self.models
            .iter()
            .flat_map(|model| model.modulators.iter().map(move |m| (model, m)))
    }

    fn has_modulators(&self) -> bool {
        self.models.iter().any(|m| !m.modulators.is_empty())
    }
}

fn design_paragraph(report: &Report, layout: &Layout) -> String {
    let settings = &report.settings;
    let mut sentences: Vec<String> = Vec::new();

    let scans: Vec<usize> = report.runs.iter().map(|r| r.scans).collect();
    let volumes = match span(&scans) {
        Some((low, high)) if low == high => format!("{}, ", count(low, "volume", "volumes")),
        Some((low, high)) => format!("{low}–{high} volumes, "),
        None => String::new(),
    };
    sentences.push(format!(
        "Design matrices were built for each of the {} ({volumes}TR = {} s) of {}.",
        count(report.cohort.runs, "run", "runs"),
        settings.tr,
        count(report.cohort.subjects, "participant", "participants"),
    ));

    let grid = format!("on a microtime grid of {} bins per TR", settings.microtime);
    let events = if layout.events.is_empty() {
        format!("The design had no event regressors; regressors were built {grid}")
    } else {
        let names: Vec<String> = layout.events.iter().map(|e| e.label.clone()).collect();
        format!(
            "Events ({}) were modelled as sticks, or boxcars of their stated durations, {grid}",
            list(&names)
        )
    };
    if layout.has_modulators() {
        let per_model: Vec<String> = layout
            .models
            .iter()
            .map(|model| {
                let items: Vec<String> = model
                    .modulators
                    .iter()
                    .map(|m| match &m.event {
                        Some(event) => format!("{} ({event})", m.label),
                        None => m.label.clone(),
                    })
                    .collect();
                format!("{} of the {} model", list(&items), model.name)
            })
            .collect();
        let centring = if settings.centring {
            "each mean-centred within run and event type before convolution"
        } else {
            "entered without mean-centring"
        };
        sentences.push(format!(
            "{events}; the parametric modulators were {}, {centring}.",
            list(&per_model)
        ));
    } else {
        sentences.push(format!("{events}; there were no parametric modulators."));
    }

    let derivative = if settings.hrf.derivative {
        ", each with its temporal derivative as an additional regressor,"
    } else {
        ""
    };
    let drift = if settings.high_pass > 0.0 {
        let cosines: Vec<usize> = report
            .runs
            .iter()
            .map(|r| r.drift_columns.saturating_sub(1))
            .collect();
        let per_run = match span(&cosines) {
            Some((low, high)) if low == high => {
                format!(" ({} per run)", count(low, "cosine", "cosines"))
            }
            Some((low, high)) => format!(" ({low}–{high} cosines per run)"),
            None => String::new(),
        };
        format!(
            "a discrete cosine basis implemented a {} s high-pass filter{per_run}",
            settings.high_pass
        )
    } else {
        "no high-pass filter was applied (the constant was the only drift term)".to_string()
    };
    sentences.push(format!(
        "Regressors were convolved with the canonical double-gamma haemodynamic response function (Friston et al., 1998){derivative} and sampled {}; {drift}.",
        sample_point(settings.reference)
    ));

    let nuisance: Vec<usize> = report
        .runs
        .iter()
        .map(|r| {
            r.regressors
                .iter()
                .filter(|e| e.regressor.kind == RegressorKind::Nuisance)
                .count()
        })
        .collect();
    sentences.push(match span(&nuisance) {
        Some((_, 0)) | None => "No nuisance regressors were included.".to_string(),
        Some((low, high)) => {
            let how_many = if low == high {
                count(low, "nuisance regressor", "nuisance regressors")
            } else {
                format!("{low}–{high} nuisance regressors")
            };
            let names = if layout.nuisance.len() <= 8 {
                format!(" ({})", list(&layout.nuisance))
            } else {
                String::new()
            };
            format!("Each run also had {how_many}{names}.")
        }
    });
    sentences.push("All diagnostics were computed on the filtered design, after the constant and the drift basis had been projected out of every regressor.".to_string());
    sentences.join(" ")
}

fn diagnostics_paragraph(report: &Report, layout: &Layout) -> String {
    let settings = &report.settings;
    let thresholds = &settings.thresholds;
    let mut sentences: Vec<String> = Vec::new();

    let mut tools = vec![
        "variance inflation factors (VIF = 1/(1 − R²))".to_string(),
        "condition indices and variance-decomposition proportions (Belsley, Kuh & Welsch, 1980)"
            .to_string(),
    ];
    if layout.has_modulators() {
        tools.push(
            "the generalized VIF of each model's set of modulators (Fox & Monette, 1992)"
                .to_string(),
        );
        tools.push("commonality analysis of each modulator's unique and shared variance (Mood, 1969; Seibold & McPhee, 1979; Nimon et al., 2008)".to_string());
    }
    sentences.push(format!(
        "Redundancy was quantified per run with {}.",
        list(&tools)
    ));
    sentences.push(format!(
        "A column whose residual on the preceding columns had less than {} of its unit length was treated as exactly dependent (severe).",
        tolerance(settings.dependency_tolerance)
    ));
    sentences.push(format!(
        "Following common-practice rules of thumb, an event or modulator VIF ≥ {} marked caution and ≥ {} severe; a condition index ≥ {} with two or more proportions ≥ 0.5 marked a near-dependency (after Belsley et al., 1980; severe from {}); a participant took the worst status of their runs.",
        thresholds.vif_caution,
        thresholds.vif_severe,
        thresholds.condition_index,
        thresholds.condition_index_severe
    ));
    if settings.orthogonalisation == "serial" {
        sentences.push("Diagnostics were also computed with the modulators serially orthogonalised, which assigns shared variance rather than removing it (Mumford, Poline & Poldrack, 2015); statuses refer to the design as written.".to_string());
    }
    sentences.join(" ")
}

fn results_paragraph(report: &Report, layout: &Layout) -> String {
    let mut sentences: Vec<String> = Vec::new();
    let runs = &report.runs;

    // VIFs over runs: the modulators, or the event regressors if there are none.
    let (what, regressors): (&str, Vec<&Named>) = if layout.has_modulators() {
        ("modulator", layout.modulators().map(|(_, m)| m).collect())
    } else {
        ("event-regressor", layout.events.iter().collect())
    };
    if !regressors.is_empty() && !runs.is_empty() {
        let items: Vec<String> = regressors
            .iter()
            .map(|named| vif_summary(runs, named))
            .collect();
        sentences.push(format!(
            "Over runs, {what} VIFs had median (range): {}.",
            items.join("; ")
        ));
    }

    let cohort = &report.cohort;
    sentences.push(if cohort.ok == cohort.subjects {
        format!(
            "None of the {} reached caution or severe status.",
            count(cohort.subjects, "participant", "participants")
        )
    } else {
        format!(
            "Of the {}, {} reached severe status, {} caution and {} neither.",
            count(cohort.subjects, "participant", "participants"),
            cohort.severe,
            cohort.caution,
            cohort.ok
        )
    });

    if let Some(shares) = share_sentence(report, layout) {
        sentences.push(shares);
    }

    let exact = participants_with(report, |run| {
        run.flags.iter().any(|f| f.code == "exact_dependency")
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

fn closing_paragraph(report: &Report, layout: &Layout) -> String {
    let cohort = &report.cohort;
    let flagged = cohort.caution + cohort.severe;
    let placeholder = if flagged == 0 {
        format!(
            "{PLACEHOLDER_START}: no participant was flagged; state any exclusions for other reasons, or delete this sentence]"
        )
    } else {
        format!(
            "{PLACEHOLDER_START} WITH THE {flagged} FLAGGED {}: excluded / kept / modelled separately, and why]",
            if flagged == 1 {
                "PARTICIPANT"
            } else {
                "PARTICIPANTS"
            }
        )
    };
    let mut caveat = "These thresholds are rules of thumb: a high VIF costs precision but does not by itself invalidate a design (O'Brien, 2007). The statistics describe the design, not the data, and do not show which model is true".to_string();
    if layout.models.len() > 1 {
        caveat.push_str("; where modulators share most of their variance, comparing the models' estimates cannot decide between them");
    }
    caveat.push('.');
    format!("{placeholder} {caveat}")
}

/// "label median (min–max)", with the runs in which the VIF was undefined.
fn vif_summary(runs: &[RunReport], named: &Named) -> String {
    let mut values: Vec<f64> = Vec::new();
    let mut undefined = 0usize;
    for run in runs {
        let Some(index) = run
            .regressors
            .iter()
            .position(|e| e.regressor.name == named.name)
        else {
            continue;
        };
        match run.vif.get(index).copied().flatten() {
            Some(v) if v.is_finite() => values.push(v),
            _ => undefined += 1,
        }
    }
    values.sort_by(f64::total_cmp);
    let undefined_note = |all: bool| {
        if all {
            format!("undefined in all {}", count(undefined, "run", "runs"))
        } else {
            format!("undefined in {}", count(undefined, "run", "runs"))
        }
    };
    match (median(&values), values.first(), values.last()) {
        (Some(mid), Some(&low), Some(&high)) => {
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
        "In the commonality analysis (each participant's mean over runs; median and range over participants), {}.",
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

/// Where in the TR the scans are sampled.
fn sample_point(reference: f64) -> String {
    if reference == 0.0 {
        "at the start of each volume".to_string()
    } else if reference == 0.5 {
        "at the middle of each TR".to_string()
    } else {
        format!("{reference}·TR after the start of each volume")
    }
}

/// The dependency tolerance as written in a paper: 10^-6 rather than 0.000001.
fn tolerance(value: f64) -> String {
    if value > 0.0 && value.is_finite() {
        let exponent = value.log10();
        if (exponent - exponent.round()).abs() < 1e-9 {
            return format!("10^{}", exponent.round() as i64);
        }
    }
    format!("{value:e}")
}

fn median(sorted: &[f64]) -> Option<f64> {
    let n = sorted.len();
    match n {
        0 => None,
        _ if n % 2 == 1 => Some(sorted[n / 2]),
        _ => Some((sorted[n / 2 - 1] + sorted[n / 2]) / 2.0),
    }
}

fn span(values: &[usize]) -> Option<(usize, usize)> {
    let low = values.iter().min()?;
    let high = values.iter().max()?;
    Some((*low, *high))
}

/// VIFs: two significant digits below 10, whole numbers from 10 on (1.2, 6.1, 15, 3150).
fn vif(value: f64) -> String {
    if value < 9.95 {
        format!("{value:.1}")
    } else {
        format!("{value:.0}")
    }
}

/// A share as a percentage: whole percent, with more digits near 0% and 100% so that a
/// small share is not shown as none and a large one not as all.
fn percent(share: f64) -> String {
    format!("{}%", percent_number(share))
}

fn percent_range(low: f64, high: f64) -> String {
    if low < 0.0 {
        format!("{} to {}", percent(low), percent(high))
    } else {
        format!("{}–{}%", percent_number(low), percent_number(high))
    }
}

fn percent_number(share: f64) -> String {
    let p = share * 100.0;
    let size = p.abs();
    if size == 0.0 || size == 100.0 {
        return format!("{p:.0}");
    }
    if size < 1.0 {
        for digits in 1..=2 {
            let text = format!("{p:.digits$}");
            if !text
                .trim_start_matches('-')
                .trim_start_matches(['0', '.'])
                .is_empty()
            {
                return text;
            }
        }
        return if p < 0.0 {
            "-<0.01".to_string()
        } else {
            "<0.01".to_string()
        };
    }
    if size > 99.0 && size < 100.0 {
        for digits in 1..=2 {
            let text = format!("{size:.digits$}");
            if !text.starts_with("100") {
                return if p < 0.0 { format!("-{text}") } else { text };
            }
        }
        return if p < 0.0 {
            "-99.99".to_string()
        } else {
            ">99.99".to_string()
        };
    }
    format!("{p:.0}")
}

fn count(n: usize, one: &str, many: &str) -> String {
    if n == 1 {
        format!("1 {one}")
    } else {
        format!("{n} {many}")
    }
}

/// "a", "a and b", "a, b and c".
fn list(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [rest @ .., last] => format!("{} and {last}", rest.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn vifs_are_rounded_as_documented() {
        assert_eq!(vif(1.2345), "1.2");
        assert_eq!(vif(6.13), "6.1");
        assert_eq!(vif(9.96), "10");
        assert_eq!(vif(15.2), "15");
        assert_eq!(vif(3150.4), "3150");
    }

    #[test]
    fn shares_keep_digits_near_the_ends() {
        assert_eq!(percent(0.391), "39%");
        assert_eq!(percent(0.002), "0.2%");
        assert_eq!(percent(0.0003), "0.03%");
        assert_eq!(percent(0.00001), "<0.01%");
        assert_eq!(percent(0.9976), "99.8%");
        assert_eq!(percent(0.99996), ">99.99%"); // 99.996 rounds to 100.00
        assert_eq!(percent(0.9996), "99.96%");
        assert_eq!(percent(1.0), "100%");
        assert_eq!(percent(0.0), "0%");
        assert_eq!(percent(-0.02), "-2%");
        assert_eq!(percent_range(0.2, 0.9976), "20–99.8%");
        assert_eq!(percent_range(-0.02, 0.4), "-2% to 40%");
    }

    #[test]
    fn lists_read_as_english() {
        let items = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        assert_eq!(list(&items(&[])), "");
        assert_eq!(list(&items(&["a"])), "a");
        assert_eq!(list(&items(&["a", "b"])), "a and b");
        assert_eq!(list(&items(&["a", "b", "c"])), "a, b and c");
    }

    #[test]
    fn tolerance_is_written_as_a_power_of_ten() {
        assert_eq!(tolerance(1e-6), "10^-6");
        assert_eq!(tolerance(2.5e-7), "2.5e-7");
    }
}
