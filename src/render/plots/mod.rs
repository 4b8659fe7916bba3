//! The HTML report's figures, drawn with plotters onto SVG strings.
//!
//! Every figure function returns `Err(reason)` instead of panicking, so that the page
//! can say that one figure is missing and still show everything else. Axes, grids and
//! data shapes are drawn in data coordinates through a chart; labels and markers that
//! must sit a fixed number of pixels from a data point are drawn on the root area at
//! the pixel position the chart gives for that point.
//!
//! plotters' SVG backend escapes `<`, `>`, `&` and quotes in text and attributes, so
//! labels are passed to it as they are (escaping them here would escape them twice).
//!
//! One file per figure (`strip`, `bars`, `heatmap`), with the markers, legend and
//! palette they share; this file holds the drawing scaffold.

mod bars;
mod heatmap;
mod legend;
mod marks;
pub mod palette;
mod separation;
mod strip;
pub mod variants;

pub use bars::{ShareBar, SharePanel, model_pairs, share_bars, share_panels};
pub use heatmap::{correlation_map, diverging, worst_run};
pub use marks::Mark;
pub use separation::{SeparationRow, separation_rows, separation_strip};
pub use strip::{Dot, StripRow, Undefined, VifStrip, vif_strip, vif_strip_data};

use std::panic::{AssertUnwindSafe, catch_unwind};

use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use crate::report::Report;
use palette::INK;

type Area<'a> = DrawingArea<SVGBackend<'a>, Shift>;
type Drawn = Result<(), String>;

/// Any plotters error as a short reason for the page.
fn failed<E: std::fmt::Display>(error: E) -> String {
    format!("drawing failed: {error}")
}

/// Draws one SVG of the given size. A panic inside plotters (which its API allows on
/// degenerate geometry) is turned into an error: a page with one figure missing is
/// more use than no page.
fn draw_svg(size: (u32, u32), paint: impl FnOnce(&Area) -> Drawn) -> Result<String, String> {
    let outcome = catch_unwind(AssertUnwindSafe(|| {
        let mut svg = String::new();
        {
            let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
            paint(&root)?;
            root.present().map_err(failed)?;
        }
        Ok(svg)
    }));
    outcome.unwrap_or_else(|_| Err("the plotting library stopped on this figure".to_string()))
}

/// A text style of `px` CSS pixels (plotters writes `font-size` as size / 1.24).
fn text(px: f64) -> TextStyle<'static> {
    ("sans-serif", px * 1.24).into_font().color(&INK)
}

fn anchored(style: TextStyle<'static>, h: HPos, v: VPos) -> TextStyle<'static> {
    style.pos(Pos::new(h, v))
}

/// Rough width of a label in pixels at `px`, for sizing label areas (no font metrics
/// are available without a font library, so this errs on the wide side).
fn label_width(label: &str, px: f64) -> u32 {
    (label.chars().count() as f64 * px * 0.62).ceil() as u32
}

/// Participants in report order (the order of the subject summaries, then any others).
fn participants(report: &Report) -> Vec<String> {
    let mut labels: Vec<String> = report.subjects.iter().map(|s| s.subject.clone()).collect();
    for run in &report.runs {
        if !labels.contains(&run.subject) {
            labels.push(run.subject.clone());
        }
    }
    labels
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::study::Thresholds;

    #[test]
    fn degenerate_input_gives_a_reason_not_a_panic() {
        let strip = VifStrip::default();
        assert!(vif_strip(&strip, &Thresholds::default()).is_err());
        assert!(share_bars(&[]).is_err());
    }
}
