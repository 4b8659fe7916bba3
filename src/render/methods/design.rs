//! The first paragraph: how the design matrices were built.

use super::layout::Layout;
use crate::design::RegressorKind;
use crate::render::numbers::prose_seconds;
use crate::render::words::{and_list as list, count};
use crate::report::Report;

pub(super) fn design_paragraph(report: &Report, layout: &Layout) -> String {
    let settings = &report.settings;
    let mut sentences: Vec<String> = Vec::new();

    let scans: Vec<usize> = report.runs.iter().map(|r| r.scans).collect();
    let volumes = match span(&scans) {
        Some((low, high)) if low == high => format!("{}, ", count(low, "volume", "volumes")),
        Some((low, high)) => format!("{low}–{high} volumes, "),
        None => String::new(),
    };
    let runs = if report.cohort.runs == 1 {
        "the single run".to_string()
    } else {
        format!("each of the {}", count(report.cohort.runs, "run", "runs"))
    };
    sentences.push(format!(
        "Design matrices were built for {runs} ({volumes}TR = {} s) of {}.",
        settings.tr,
        count(report.cohort.subjects, "participant", "participants"),
    ));

    let grid = format!("on a microtime grid of {} bins per TR", settings.microtime);
    let events = if layout.events.is_empty() {
        format!("The design had no event regressors; regressors were built {grid}")
    } else {
        let shapes: Vec<String> = layout
            .events
            .iter()
            .map(|e| event_shape(report, &e.name, &e.label))
            .collect();
        format!("Events were modelled {grid}: {}", list(&shapes))
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

    sentences.push(glms_and_noise(report));

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

/// "outcome as boxcars of 0.5–1.4 s (58–60 trials per run)", from every run's events.
fn event_shape(report: &Report, event: &str, label: &str) -> String {
    let summaries: Vec<_> = report
        .runs
        .iter()
        .flat_map(|r| r.events.iter())
        .filter(|e| e.event == event)
        .collect();
    let trials: Vec<usize> = summaries.iter().map(|e| e.trials).collect();
    let shortest = summaries
        .iter()
        .filter_map(|e| e.min_duration)
        .reduce(f64::min);
    let longest = summaries
        .iter()
        .filter_map(|e| e.max_duration)
        .reduce(f64::max);
    let shape = match (shortest, longest) {
        (_, Some(0.0)) => "as sticks".to_string(),
        (Some(low), Some(high)) if low == high => {
            format!("as boxcars of {} s", prose_seconds(high))
        }
        (Some(low), Some(high)) => format!(
            "as boxcars of {}–{} s",
            prose_seconds(low),
            prose_seconds(high)
        ),
        _ => "without trials".to_string(),
    };
    let per_run = match span(&trials) {
        Some((low, high)) if low == high => format!("{} per run", count(low, "trial", "trials")),
        Some((low, high)) => format!("{low}–{high} trials per run"),
        None => String::new(),
    };
    format!("{label} {shape} ({per_run})")
}

fn span(values: &[usize]) -> Option<(usize, usize)> {
    let low = values.iter().min()?;
    let high = values.iter().max()?;
    Some((*low, *high))
}

/// The GLMs each run was modelled in, and the noise model.
fn glms_and_noise(report: &Report) -> String {
    let settings = &report.settings;
    let described: Vec<String> = settings
        .glms
        .iter()
        .map(|g| {
            let models = if g.models.is_empty() {
                "the events alone".to_string()
            } else {
                format!("the modulators of {}", list(&g.models))
            };
            format!("\u{201c}{}\u{201d} ({models})", g.name)
        })
        .collect();
    let glms = match described.len() {
        1 => format!("Each run was modelled in one GLM, {}", described[0]),
        n => format!("Each run was modelled in {n} GLMs, {}", list(&described)),
    };
    let noise = match settings.noise.ar1 {
        Some(rho) => format!(
            "; the noise was modelled as first-order autoregressive with coefficient {rho}, and every column (the constant and cosines included) was prewhitened (Prais–Winsten) so that every diagnostic describes the generalized least-squares fit"
        ),
        None => "; the noise was treated as white (ordinary least squares)".to_string(),
    };
    format!("{glms}, each holding every event's regressors and any nuisance regressors{noise}.")
}
