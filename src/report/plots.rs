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

use std::panic::{AssertUnwindSafe, catch_unwind};

use plotters::coord::Shift;
use plotters::coord::types::RangedCoordf64;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

use super::Report;
use super::model::RunReport;
use crate::design::RegressorKind;
use crate::partition::cohort::UNIQUE;
use crate::screen::Status;
use crate::study::Thresholds;

/// Our palette. The three data colours differ strongly in lightness (dark, mid, light),
/// so they stay apart for colour-blind readers and in a greyscale print; grey is kept
/// for scaffolding (grid, missing values) and never carries a result on its own.
pub mod palette {
    use plotters::style::RGBColor;

    /// Dark blue-black: text, axes, the "own share" and "severe" marks.
    pub const INK: RGBColor = RGBColor(0x1d, 0x2b, 0x3f);
    /// Mid orange: the "caution" marks and the share held with the other model.
    pub const EMBER: RGBColor = RGBColor(0xd9, 0x7b, 0x29);
    /// Light sand: the share held only with the rest of the design.
    pub const SAND: RGBColor = RGBColor(0xea, 0xdc, 0xb5);
    /// Neutral grey: grid lines, separators, missing cells.
    pub const STONE: RGBColor = RGBColor(0x8a, 0x8f, 0x96);
    /// Pale grey: the fill of cells without a value.
    pub const MIST: RGBColor = RGBColor(0xdd, 0xdf, 0xe2);
    /// The negative end of the correlation scale (dark slate blue).
    pub const COLD: RGBColor = RGBColor(0x23, 0x4e, 0x7a);
    /// The positive end of the correlation scale (light amber; lighter than `COLD`).
    pub const WARM: RGBColor = RGBColor(0xe8, 0x9a, 0x3c);
}

use palette::{COLD, EMBER, INK, MIST, SAND, STONE, WARM};

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

// ---------------------------------------------------------------------------------
// Markers: status is told by shape as well as colour.

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mark {
    /// Hollow circle: below the caution threshold.
    Ok,
    /// Orange triangle with a dark outline: caution.
    Caution,
    /// Filled dark square: severe.
    Severe,
}

impl Mark {
    pub fn of(status: Status) -> Mark {
        match status {
            Status::Ok => Mark::Ok,
            Status::Caution => Mark::Caution,
            Status::Severe => Mark::Severe,
        }
    }
}

fn draw_mark(area: &Area, at: (i32, i32), mark: Mark) -> Drawn {
    match mark {
        Mark::Ok => area
            .draw(&Circle::new(at, 4, INK.stroke_width(1)))
            .map_err(failed),
        Mark::Caution => {
            let triangle = TriangleMarker::new(at, 6, EMBER.filled());
            area.draw(&triangle).map_err(failed)?;
            let outline = TriangleMarker::new(at, 6, INK.stroke_width(1));
            area.draw(&outline).map_err(failed)
        }
        Mark::Severe => {
            let (x, y) = at;
            let square = Rectangle::new([(x - 4, y - 4), (x + 4, y + 4)], INK.filled());
            area.draw(&square).map_err(failed)
        }
    }
}

/// One entry of a legend strip.
enum Key<'a> {
    Mark(Mark, &'a str),
    Swatch(RGBColor, &'a str),
    Line(RGBColor, bool, &'a str),
}

/// A legend in one row, left to right, on its own area below a chart.
fn draw_legend(area: &Area, keys: &[Key]) -> Drawn {
    let style = anchored(text(13.0), HPos::Left, VPos::Center);
    let (mut x, y) = (12, 12);
    for key in keys {
        let label = match key {
            Key::Mark(mark, label) => {
                draw_mark(area, (x + 6, y), *mark)?;
                label
            }
            Key::Swatch(colour, label) => {
                let swatch = Rectangle::new([(x, y - 6), (x + 14, y + 6)], colour.filled());
                area.draw(&swatch).map_err(failed)?;
                let edge = Rectangle::new([(x, y - 6), (x + 14, y + 6)], INK.stroke_width(1));
                area.draw(&edge).map_err(failed)?;
                label
            }
            Key::Line(colour, dashed, label) => {
                let points = [(x, y), (x + 16, y)];
                if *dashed {
                    let line = DashedPathElement::new(points, 4, 3, colour.stroke_width(2));
                    area.draw(&line).map_err(failed)?;
                } else {
                    let line = PathElement::new(points.to_vec(), colour.stroke_width(2));
                    area.draw(&line).map_err(failed)?;
                }
                label
            }
        };
        area.draw_text(label, &style, (x + 20, y)).map_err(failed)?;
        x += 20 + label_width(label, 13.0) as i32 + 18;
    }
    Ok(())
}

// ---------------------------------------------------------------------------------
// Figure 1: each regressor of interest's VIF across participants.

/// One participant's worst VIF for one regressor over their runs.
#[derive(Debug, Clone)]
pub struct Dot {
    pub subject: String,
    pub vif: f64,
}

#[derive(Debug, Clone)]
pub struct StripRow {
    pub regressor: String,
    pub dots: Vec<Dot>,
    /// Participants without a dot because the VIF was undefined in some run.
    pub undefined: Vec<Undefined>,
}

/// A participant whose VIF for a regressor was undefined in at least one run.
#[derive(Debug, Clone)]
pub struct Undefined {
    pub subject: String,
    pub runs: Vec<String>,
    /// Undefined in every run of the participant that has the regressor.
    pub every_run: bool,
}

#[derive(Debug, Clone, Default)]
pub struct VifStrip {
    pub rows: Vec<StripRow>,
}

/// Onset and modulator regressors in the order they first appear in the runs.
fn regressors_of_interest(report: &Report) -> Vec<String> {
    let mut names: Vec<String> = Vec::new();
    for run in &report.runs {
        for entry in &run.regressors {
            let regressor = &entry.regressor;
            if regressor.kind.of_interest() && !names.contains(&regressor.name) {
                names.push(regressor.name.clone());
            }
        }
    }
    names
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

/// A participant with an undefined VIF in some run gets no dot for that regressor (a
/// dot for the defined runs would understate the problem); they are listed instead.
pub fn vif_strip_data(report: &Report) -> VifStrip {
    let subjects = participants(report);
    let mut strip = VifStrip::default();
    for name in regressors_of_interest(report) {
        let mut dots = Vec::new();
        let mut undefined = Vec::new();
        for subject in &subjects {
            let mut worst: Option<f64> = None;
            let mut undefined_runs = Vec::new();
            let mut runs_with_it = 0;
            for run in report.runs.iter().filter(|r| &r.subject == subject) {
                let Some(index) = run.regressors.iter().position(|e| e.regressor.name == name)
                else {
                    continue;
                };
                runs_with_it += 1;
                match run.vif.get(index).copied().flatten() {
                    Some(v) if v.is_finite() && v > 0.0 => {
                        worst = Some(worst.map_or(v, |w| w.max(v)));
                    }
                    _ => undefined_runs.push(run.run.clone()),
                }
            }
            if !undefined_runs.is_empty() {
                undefined.push(Undefined {
                    subject: subject.clone(),
                    every_run: undefined_runs.len() == runs_with_it,
                    runs: undefined_runs,
                });
            } else if let Some(vif) = worst {
                dots.push(Dot {
                    subject: subject.clone(),
                    vif,
                });
            }
        }
        strip.rows.push(StripRow {
            regressor: name,
            dots,
            undefined,
        });
    }
    strip
}

fn vif_mark(vif: f64, thresholds: &Thresholds) -> Mark {
    if vif >= thresholds.vif_severe {
        Mark::Severe
    } else if vif >= thresholds.vif_caution {
        Mark::Caution
    } else {
        Mark::Ok
    }
}

/// Axis tick text for a log-scaled VIF axis.
fn vif_tick(value: f64) -> String {
    if !value.is_finite() {
        String::new()
    } else if value >= 1e5 {
        format!("{value:.0e}")
    } else if value >= 10.0 || (value - value.round()).abs() < 1e-9 {
        format!("{value:.0}")
    } else {
        format!("{value:.1}")
    }
}

/// Vertical layout of one strip row, in pixels from the top of the plotting area.
struct RowLayout {
    top: f64,
    height: f64,
}

/// Pixels per stacked label of a flagged participant.
const LABEL_STEP: f64 = 14.0;

/// Flagged dots get a line each (so their labels never overlap); the others share a
/// narrow band in the middle of the row.
fn strip_layout(strip: &VifStrip, thresholds: &Thresholds) -> Vec<RowLayout> {
    let mut top = 0.0;
    strip
        .rows
        .iter()
        .map(|row| {
            let flagged = row
                .dots
                .iter()
                .filter(|d| d.vif >= thresholds.vif_caution)
                .count();
            let height = (flagged as f64 * LABEL_STEP + 16.0).max(34.0);
            let layout = RowLayout { top, height };
            top += height;
            layout
        })
        .collect()
}

/// Where (in pixels from the row's top) each dot of a row goes, aligned with `row.dots`.
fn dot_offsets(row: &StripRow, layout: &RowLayout, thresholds: &Thresholds) -> Vec<f64> {
    let mut order: Vec<usize> = (0..row.dots.len()).collect();
    order.sort_by(|&a, &b| row.dots[b].vif.total_cmp(&row.dots[a].vif));
    let mut offsets = vec![layout.height / 2.0; row.dots.len()];
    let mut line = 0.0;
    let mut calm = 0usize;
    for index in order {
        if row.dots[index].vif >= thresholds.vif_caution {
            offsets[index] = 8.0 + LABEL_STEP * (line + 0.5);
            line += 1.0;
        } else {
            // A small deterministic spread so that equal values stay visible.
            let spread = [0.0, -4.0, 4.0, -8.0, 8.0];
            offsets[index] = layout.height / 2.0 + spread[calm % spread.len()];
            calm += 1;
        }
    }
    offsets
}

pub fn vif_strip(strip: &VifStrip, thresholds: &Thresholds) -> Result<String, String> {
    if strip.rows.is_empty() {
        return Err("no onset or modulator regressors to show".to_string());
    }
    let layouts = strip_layout(strip, thresholds);
    let plot_height: f64 = layouts.iter().map(|l| l.height).sum();
    let left = strip
        .rows
        .iter()
        .map(|r| label_width(&r.regressor, 13.0))
        .max()
        .unwrap_or(60)
        .clamp(60, 300)
        + 16;
    let (width, legend) = (1000u32, 30u32);
    let (top, bottom) = (28u32, 44u32);
    let height = plot_height.ceil() as u32 + top + bottom + legend;

    let values = strip.rows.iter().flat_map(|r| r.dots.iter().map(|d| d.vif));
    let (low, high) = values.fold((1.0f64, thresholds.vif_severe), |(lo, hi), v| {
        (lo.min(v), hi.max(v))
    });
    let x_range = (low.max(1e-3) * 0.9)..(high * 2.0);

    draw_svg((width, height), |root| {
        let (chart_area, legend_area) = root.split_vertically(height - legend);
        let mut chart = ChartBuilder::on(&chart_area)
            .margin_top(top)
            .margin_right(70)
            .x_label_area_size(bottom)
            .y_label_area_size(left)
            .build_cartesian_2d(x_range.clone().log_scale(), 0.0..plot_height)
            .map_err(failed)?;
        chart
            .configure_mesh()
            .disable_y_mesh()
            .y_labels(0)
            .x_labels(12)
            .x_label_formatter(&|v| vif_tick(*v))
            .x_desc("VIF (log scale): the participant's largest value over their runs")
            .light_line_style(MIST.mix(0.6))
            .bold_line_style(MIST)
            .axis_style(INK)
            .label_style(text(12.0))
            .axis_desc_style(text(13.0))
            .draw()
            .map_err(failed)?;

        // The row of a regressor runs top-down; the chart's y grows upwards.
        let y_of = |pixels_from_top: f64| plot_height - pixels_from_top;

        for (row, layout) in strip.rows.iter().zip(&layouts) {
            let separator = LineSeries::new(
                [
                    (x_range.start, y_of(layout.top)),
                    (x_range.end, y_of(layout.top)),
                ],
                STONE.mix(0.35),
            );
            chart.draw_series(separator).map_err(failed)?;
            let (lx, ly) =
                chart.backend_coord(&(x_range.start, y_of(layout.top + layout.height / 2.0)));
            root.draw_text(
                &row.regressor,
                &anchored(text(13.0), HPos::Right, VPos::Center),
                (lx - 8, ly),
            )
            .map_err(failed)?;
            if !row.undefined.is_empty() {
                // Said inside the row, so that an empty row does not read as "no problem".
                let note = match row.undefined.len() {
                    1 => "VIF undefined for 1 participant (see below)".to_string(),
                    n => format!("VIF undefined for {n} participants (see below)"),
                };
                // Bottom right: the flagged labels stack from the top with the highest
                // VIF (furthest right) first, so this corner is the one left free.
                let (rx, ry) =
                    chart.backend_coord(&(x_range.end, y_of(layout.top + layout.height)));
                root.draw_text(
                    &note,
                    &anchored(text(12.0), HPos::Right, VPos::Bottom),
                    (rx - 8, ry - 3),
                )
                .map_err(failed)?;
            }
        }

        // The caution label ends left of its line and the severe label starts right of
        // its line, so the two never collide however close the thresholds are.
        for (value, colour, dashed, label, side, shift) in [
            (
                thresholds.vif_caution,
                EMBER,
                true,
                "caution",
                HPos::Right,
                -4,
            ),
            (thresholds.vif_severe, INK, false, "severe", HPos::Left, 4),
        ] {
            let line = [(value, 0.0), (value, plot_height)];
            if dashed {
                let series = DashedLineSeries::new(line, 5, 4, colour.stroke_width(2));
                chart.draw_series(series).map_err(failed)?;
            } else {
                chart
                    .draw_series(LineSeries::new(line, colour.stroke_width(2)))
                    .map_err(failed)?;
            }
            let (x, y) = chart.backend_coord(&(value, plot_height));
            let note = format!("{label} {}", vif_tick(value));
            root.draw_text(
                &note,
                &anchored(text(13.0), side, VPos::Bottom),
                (x + shift, y - 4),
            )
            .map_err(failed)?;
        }

        let label_style = anchored(text(12.0), HPos::Left, VPos::Center);
        for (row, layout) in strip.rows.iter().zip(&layouts) {
            let offsets = dot_offsets(row, layout, thresholds);
            for (dot, offset) in row.dots.iter().zip(offsets) {
                let at = chart.backend_coord(&(dot.vif, y_of(layout.top + offset)));
                let mark = vif_mark(dot.vif, thresholds);
                draw_mark(root, at, mark)?;
                if mark != Mark::Ok {
                    root.draw_text(&dot.subject, &label_style, (at.0 + 8, at.1))
                        .map_err(failed)?;
                }
            }
        }

        let caution = format!(
            "caution: {} ≤ VIF < {}",
            vif_tick(thresholds.vif_caution),
            vif_tick(thresholds.vif_severe)
        );
        let severe = format!("severe: VIF ≥ {}", vif_tick(thresholds.vif_severe));
        let ok = format!("below {}", vif_tick(thresholds.vif_caution));
        draw_legend(
            &legend_area,
            &[
                Key::Mark(Mark::Ok, &ok),
                Key::Mark(Mark::Caution, &caution),
                Key::Mark(Mark::Severe, &severe),
                Key::Line(EMBER, true, "caution threshold"),
                Key::Line(INK, false, "severe threshold"),
            ],
        )
    })
}

// ---------------------------------------------------------------------------------
// Figure 2: own and shared shares of each modulator, per participant, for a model pair.

/// Every pair of models, in the order the models first appear.
pub fn model_pairs(report: &Report) -> Vec<(String, String)> {
    let mut models: Vec<String> = Vec::new();
    for run in &report.runs {
        for entry in &run.regressors {
            if entry.regressor.kind != RegressorKind::Modulator {
                continue;
            }
            if let Some(model) = &entry.regressor.model {
                if !models.contains(model) {
                    models.push(model.clone());
                }
            }
        }
    }
    let mut pairs = Vec::new();
    for (i, first) in models.iter().enumerate() {
        for second in &models[i + 1..] {
            pairs.push((first.clone(), second.clone()));
        }
    }
    pairs
}

/// One participant's bar: three parts that do not overlap and add up to 1.
#[derive(Debug, Clone, PartialEq)]
pub struct ShareBar {
    pub subject: String,
    /// The modulator's own share (1/VIF), mean over runs.
    pub own: f64,
    /// Shared with the other model (parts also shared with the task or nuisance included).
    pub other: f64,
    /// Shared only with the rest of the design: the own model's other modulators, the
    /// task's timing, nuisance regressors.
    pub rest: f64,
    /// The raw means did not fit in [0, 1] (negative commonality components, i.e.
    /// suppression) and were clipped for drawing.
    pub clipped: bool,
}

#[derive(Debug, Clone)]
pub struct SharePanel {
    pub regressor: String,
    pub model: String,
    pub other_model: String,
    pub bars: Vec<ShareBar>,
}

/// The bar parts from the participant means. The shares with the other model include
/// every commonality component that contains it, so own + other ≤ 1 up to suppression;
/// the rest is what remains of the variance the other regressors explain.
fn share_bar(subject: &str, own: f64, other: f64) -> ShareBar {
    let own_clipped = own.clamp(0.0, 1.0);
    let other_clipped = other.clamp(0.0, 1.0 - own_clipped);
    let rest = (1.0 - own_clipped - other_clipped).max(0.0);
    let clipped = (own - own_clipped).abs() > 1e-9 || (other - other_clipped).abs() > 1e-9;
    ShareBar {
        subject: subject.to_string(),
        own: own_clipped,
        other: other_clipped,
        rest,
        clipped,
    }
}

pub fn share_panels(report: &Report, pair: &(String, String)) -> Vec<SharePanel> {
    let subjects = participants(report);
    let mut panels: Vec<SharePanel> = Vec::new();
    for share in &report.subject_partition {
        let Some(model) = &share.model else { continue };
        let other = if model == &pair.0 {
            &pair.1
        } else if model == &pair.1 {
            &pair.0
        } else {
            continue;
        };
        if !panels.iter().any(|p| p.regressor == share.regressor) {
            panels.push(SharePanel {
                regressor: share.regressor.clone(),
                model: model.clone(),
                other_model: other.clone(),
                bars: Vec::new(),
            });
        }
    }
    for panel in &mut panels {
        for subject in &subjects {
            let mean_of = |part: &str| {
                report
                    .subject_partition
                    .iter()
                    .find(|s| {
                        &s.subject == subject && s.regressor == panel.regressor && s.part == part
                    })
                    .map(|s| s.mean)
                    .filter(|m| m.is_finite())
            };
            // A participant whose own share is undefined in every run has no bar.
            if let Some(own) = mean_of(UNIQUE) {
                let other = mean_of(&panel.other_model).unwrap_or(0.0);
                panel.bars.push(share_bar(subject, own, other));
            }
        }
    }
    panels
}

const PANEL_COLUMNS: usize = 3;
const BAR_STEP: f64 = 16.0;

pub fn share_bars(panels: &[SharePanel]) -> Result<String, String> {
    if panels.is_empty() {
        return Err("no modulator of these models has a defined partition".to_string());
    }
    let bars = panels
        .iter()
        .map(|p| p.bars.len())
        .max()
        .unwrap_or(0)
        .max(1);
    let columns = panels.len().min(PANEL_COLUMNS);
    let rows = panels.len().div_ceil(columns);
    let left = panels
        .iter()
        .flat_map(|p| p.bars.iter().map(|b| label_width(&b.subject, 11.5)))
        .max()
        .unwrap_or(20)
        .clamp(20, 160)
        + 10;
    let panel_height = (bars as f64 * BAR_STEP) as u32 + 78;
    let (width, legend) = (1000u32, 30u32);
    let height = panel_height * rows as u32 + legend;

    draw_svg((width, height), |root| {
        let (grid, legend_area) = root.split_vertically(height - legend);
        let cells = grid.split_evenly((rows, columns));
        for (panel, cell) in panels.iter().zip(&cells) {
            draw_share_panel(root, cell, panel, bars, left)?;
        }
        draw_legend(
            &legend_area,
            &[
                Key::Swatch(INK, "own share (1/VIF)"),
                Key::Swatch(EMBER, "shared with the other model"),
                Key::Swatch(SAND, "shared only with the rest of the design"),
            ],
        )
    })
}

fn draw_share_panel(root: &Area, cell: &Area, panel: &SharePanel, bars: usize, left: u32) -> Drawn {
    let title = format!("{} · other model: {}", panel.regressor, panel.other_model);
    let mut chart = ChartBuilder::on(cell)
        .caption(title, text(13.5))
        .margin(8)
        .margin_right(14)
        .x_label_area_size(34)
        .y_label_area_size(left)
        .build_cartesian_2d(0.0..1.0, 0.0..bars as f64)
        .map_err(failed)?;
    chart
        .configure_mesh()
        .disable_y_mesh()
        .y_labels(0)
        .x_labels(5)
        .x_label_formatter(&|v| format!("{:.0}%", v * 100.0))
        .x_desc("share of the modulator's variance")
        .light_line_style(TRANSPARENT)
        .bold_line_style(MIST)
        .axis_style(INK)
        .label_style(text(11.5))
        .axis_desc_style(text(12.0))
        .draw()
        .map_err(failed)?;

    let label_style = anchored(text(11.5), HPos::Right, VPos::Center);
    for (slot, bar) in panel.bars.iter().enumerate() {
        // The first participant at the top.
        let top = bars as f64 - slot as f64;
        let bottom = top - 1.0;
        let parts = [
            (0.0, bar.own, INK),
            (bar.own, bar.own + bar.other, EMBER),
            (bar.own + bar.other, bar.own + bar.other + bar.rest, SAND),
        ];
        let rectangles =
            parts
                .into_iter()
                .filter(|(from, to, _)| to > from)
                .map(|(from, to, colour)| {
                    let mut rectangle =
                        Rectangle::new([(from, top), (to, bottom)], colour.filled());
                    rectangle.set_margin(2, 2, 0, 0);
                    rectangle
                });
        chart.draw_series(rectangles).map_err(failed)?;
        let (x, y) = chart.backend_coord(&(0.0, top - 0.5));
        let label = if bar.clipped {
            format!("{}*", bar.subject)
        } else {
            bar.subject.clone()
        };
        root.draw_text(&label, &label_style, (x - 6, y))
            .map_err(failed)?;
    }
    Ok(())
}

// ---------------------------------------------------------------------------------
// Figure 3: the correlation matrix of one run's filtered design.

/// The participant with the highest worst VIF, and the run it came from. Participants
/// with an undefined VIF only come first when nobody has a defined one.
pub fn worst_run(report: &Report) -> Option<&RunReport> {
    let worst = report
        .subjects
        .iter()
        .filter(|s| s.worst_vif.is_some_and(f64::is_finite))
        .max_by(|a, b| {
            let (va, vb) = (a.worst_vif.unwrap_or(0.0), b.worst_vif.unwrap_or(0.0));
            va.total_cmp(&vb)
        })
        .or_else(|| report.subjects.iter().max_by_key(|s| s.status));
    let Some(worst) = worst else {
        return report.runs.first();
    };
    let of_subject = |r: &&RunReport| r.subject == worst.subject;
    report
        .runs
        .iter()
        .filter(of_subject)
        .find(|r| Some(&r.run) == worst.worst_run.as_ref())
        .or_else(|| report.runs.iter().find(of_subject))
}

/// Linear blend of two colours, `t` in [0, 1].
fn blend(from: RGBColor, to: RGBColor, t: f64) -> RGBColor {
    let t = t.clamp(0.0, 1.0);
    let mix = |a: u8, b: u8| (a as f64 + (b as f64 - a as f64) * t).round() as u8;
    RGBColor(mix(from.0, to.0), mix(from.1, to.1), mix(from.2, to.2))
}

/// The diverging scale: −1 slate blue, 0 white, +1 amber.
pub fn diverging(r: f64) -> RGBColor {
    if r < 0.0 {
        blend(WHITE, COLD, -r)
    } else {
        blend(WHITE, WARM, r)
    }
}

/// Dark cells take white text.
fn needs_light_text(fill: RGBColor) -> bool {
    0.299 * fill.0 as f64 + 0.587 * fill.1 as f64 + 0.114 * (fill.2 as f64) < 140.0
}

/// Two decimals, more near ±1 so that a near-copy (.998) is not shown as an exact one;
/// leading zeros dropped and a true minus sign, to fit small cells.
fn correlation_text(r: f64, diagonal: bool) -> String {
    // No "−.00": a value that rounds to zero is shown unsigned.
    let r = if r.abs() < 0.005 { 0.0 } else { r };
    let text = if diagonal && (r - 1.0).abs() < 5e-3 {
        "1".to_string()
    } else if r.abs() >= 0.9995 {
        format!("{r:.4}")
    } else if r.abs() >= 0.995 {
        format!("{r:.3}")
    } else {
        format!("{r:.2}")
    };
    text.replace("0.", ".").replace('-', "\u{2212}")
}

pub fn correlation_map(run: &RunReport) -> Result<String, String> {
    let names: Vec<&str> = run
        .regressors
        .iter()
        .map(|e| e.regressor.name.as_str())
        .collect();
    let n = names.len();
    if n == 0 {
        return Err("the run has no regressors".to_string());
    }
    let cell = (640 / n as u32).clamp(18, 64);
    let value_px = (cell as f64 * 0.3).clamp(8.0, 13.0);
    let names_px = 12.0;
    let label = names
        .iter()
        .map(|name| label_width(name, names_px))
        .max()
        .unwrap_or(40)
        .clamp(40, 320)
        + 12;
    let (scale_width, margin) = (90u32, 10u32);
    let side = cell * n as u32;
    let width = label + side + scale_width + 2 * margin;
    let height = side + label + 2 * margin;

    draw_svg((width, height), |root| {
        let (matrix_area, scale_area) = root.split_horizontally(width - scale_width);
        let mut chart = ChartBuilder::on(&matrix_area)
            .margin(margin)
            .x_label_area_size(label)
            .y_label_area_size(label)
            .build_cartesian_2d(0.0..n as f64, 0.0..n as f64)
            .map_err(failed)?;
        chart
            .configure_mesh()
            .disable_mesh()
            .x_labels(0)
            .y_labels(0)
            .axis_style(INK)
            .draw()
            .map_err(failed)?;

        let values_style = |fill| anchored(text(value_px), HPos::Center, VPos::Center).color(fill);
        for (row, values) in names
            .iter()
            .enumerate()
            .map(|(i, _)| (i, run.correlation.get(i)))
        {
            // Row 0 at the top.
            let (top, bottom) = ((n - row) as f64, (n - row - 1) as f64);
            for column in 0..n {
                let (left, right) = (column as f64, column as f64 + 1.0);
                let value = values
                    .and_then(|v| v.get(column).copied().flatten())
                    .filter(|r| r.is_finite());
                let fill = value.map_or(MIST, diverging);
                let rectangle = Rectangle::new([(left, top), (right, bottom)], fill.filled());
                chart
                    .draw_series(std::iter::once(rectangle))
                    .map_err(failed)?;
                let centre = chart.backend_coord(&(left + 0.5, bottom + 0.5));
                match value {
                    Some(r) => {
                        let style = if needs_light_text(fill) {
                            values_style(&WHITE)
                        } else {
                            values_style(&INK)
                        };
                        root.draw_text(&correlation_text(r, row == column), &style, centre)
                            .map_err(failed)?
                    }
                    None => {
                        draw_hatch(&mut chart, left, bottom)?;
                        root.draw_text("n/a", &values_style(&INK), centre)
                            .map_err(failed)?
                    }
                }
            }
        }
        let grid = (0..=n).flat_map(|k| {
            let k = k as f64;
            [
                PathElement::new(vec![(k, 0.0), (k, n as f64)], WHITE.stroke_width(1)),
                PathElement::new(vec![(0.0, k), (n as f64, k)], WHITE.stroke_width(1)),
            ]
        });
        chart.draw_series(grid).map_err(failed)?;

        let left_style = anchored(text(names_px), HPos::Right, VPos::Center);
        let bottom_style =
            anchored(text(names_px), HPos::Right, VPos::Center).transform(FontTransform::Rotate270);
        for (index, name) in names.iter().enumerate() {
            let (x, y) = chart.backend_coord(&(0.0, (n - index) as f64 - 0.5));
            root.draw_text(name, &left_style, (x - 6, y))
                .map_err(failed)?;
            let (x, y) = chart.backend_coord(&(index as f64 + 0.5, 0.0));
            root.draw_text(name, &bottom_style, (x, y + 6))
                .map_err(failed)?;
        }
        draw_colour_scale(&scale_area, margin, side)
    })
}

/// Diagonal lines across a cell without a value, so that "missing" does not depend on
/// telling grey from a pale colour.
fn draw_hatch<DB: DrawingBackend>(
    chart: &mut ChartContext<DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    left: f64,
    bottom: f64,
) -> Drawn {
    let lines = [0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 1.75].map(|k: f64| {
        let start = if k <= 1.0 {
            (left, bottom + k)
        } else {
            (left + k - 1.0, bottom + 1.0)
        };
        let end = if k <= 1.0 {
            (left + k, bottom)
        } else {
            (left + 1.0, bottom + k - 1.0)
        };
        PathElement::new(vec![start, end], STONE.stroke_width(1))
    });
    chart
        .draw_series(lines)
        .map_err(|e| failed(e.to_string()))?;
    Ok(())
}

fn draw_colour_scale(area: &Area, margin: u32, side: u32) -> Drawn {
    let mut chart = ChartBuilder::on(area)
        .margin_top(margin)
        .margin_bottom(area.dim_in_pixel().1.saturating_sub(margin + side.max(120)))
        .margin_left(12)
        .y_label_area_size(0)
        .right_y_label_area_size(44)
        .build_cartesian_2d(0.0..1.0, -1.0..1.0)
        .map_err(failed)?;
    chart
        .configure_mesh()
        .disable_mesh()
        .disable_x_axis()
        .y_labels(5)
        .y_label_formatter(&|v| format!("{v:.1}").replace('-', "\u{2212}"))
        .label_style(text(12.0))
        .axis_style(INK)
        .draw()
        .map_err(failed)?;
    let steps = 80;
    let bands = (0..steps).map(|k| {
        let from = -1.0 + 2.0 * k as f64 / steps as f64;
        let to = from + 2.0 / steps as f64;
        Rectangle::new(
            [(0.0, from), (1.0, to)],
            diverging((from + to) / 2.0).filled(),
        )
    });
    chart.draw_series(bands).map_err(failed)?;
    chart
        .draw_series(std::iter::once(Rectangle::new(
            [(0.0, -1.0), (1.0, 1.0)],
            INK.stroke_width(1),
        )))
        .map_err(failed)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bars_add_up_to_one_and_say_when_clipped() {
        let bar = share_bar("01", 0.2, 0.7);
        assert!((bar.own + bar.other + bar.rest - 1.0).abs() < 1e-12);
        assert!(!bar.clipped);
        let bar = share_bar("02", 0.4, 0.8);
        assert!((bar.own + bar.other + bar.rest - 1.0).abs() < 1e-12);
        assert!(bar.clipped);
        assert_eq!(bar.rest, 0.0);
    }

    #[test]
    fn diverging_scale_is_white_in_the_middle_and_darker_below() {
        assert_eq!(diverging(0.0), WHITE);
        assert_eq!(diverging(-1.0), COLD);
        assert_eq!(diverging(1.0), WARM);
        let luma = |c: RGBColor| 0.299 * c.0 as f64 + 0.587 * c.1 as f64 + 0.114 * c.2 as f64;
        assert!(luma(COLD) + 60.0 < luma(WARM));
    }

    #[test]
    fn ticks_are_plain_numbers() {
        assert_eq!(vif_tick(5.0), "5");
        assert_eq!(vif_tick(2.5), "2.5");
        assert_eq!(vif_tick(1000.0), "1000");
        assert_eq!(vif_tick(f64::NAN), "");
    }

    #[test]
    fn near_copies_are_not_shown_as_exact() {
        assert_eq!(correlation_text(1.0, true), "1");
        assert_eq!(correlation_text(0.998, false), ".998");
        assert_eq!(correlation_text(0.99981, false), ".9998");
        assert_eq!(correlation_text(-0.35, false), "\u{2212}.35");
        assert_eq!(correlation_text(-0.001, false), ".00");
    }

    #[test]
    fn cells_without_a_value_are_hatched_and_marked() {
        let report = match crate::demo::check_demo(Default::default()) {
            Ok(report) => report,
            Err(error) => panic!("the demo study should check: {error}"),
        };
        let Some(run) = worst_run(&report) else {
            panic!("the demo has runs");
        };
        let mut run = run.clone();
        for row in &mut run.correlation {
            row[2] = None;
        }
        run.correlation[2] = vec![None; run.regressors.len()];
        let svg = match correlation_map(&run) {
            Ok(svg) => svg,
            Err(reason) => panic!("the map should draw: {reason}"),
        };
        assert!(svg.contains("n/a"));
        assert!(svg.starts_with("<svg"));
    }

    #[test]
    fn degenerate_input_gives_a_reason_not_a_panic() {
        let strip = VifStrip::default();
        assert!(vif_strip(&strip, &Thresholds::default()).is_err());
        assert!(share_bars(&[]).is_err());
    }
}
