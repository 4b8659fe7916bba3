//! Figure 1: each regressor of interest's VIF across participants.

use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::legend::{Key, draw_legend};
use super::marks::{Mark, draw_mark};
use super::palette::{EMBER, INK, MIST, STONE};
use super::{anchored, draw_svg, failed, label_width, text};
use crate::render::numbers::axis_vif;
use crate::render::words::count;
use crate::report::Report;
use crate::screen::vif_status;
use crate::study::Thresholds;

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

/// A participant with an undefined VIF in some run gets no dot for that regressor (a
/// dot for the defined runs would understate the problem); they are listed instead.
pub fn vif_strip_data(report: &Report) -> VifStrip {
    let mut strip = VifStrip::default();
    let several_glms = report.settings.glms.len() > 1;
    for cell in &report.participant_vifs {
        let label = if several_glms {
            format!("{} · {}", cell.glm, cell.regressor)
        } else {
            cell.regressor.clone()
        };
        if strip.rows.last().is_none_or(|row| row.regressor != label) {
            strip.rows.push(StripRow {
                regressor: label,
                dots: Vec::new(),
                undefined: Vec::new(),
            });
        }
        let Some(row) = strip.rows.last_mut() else {
            continue;
        };
        if !cell.undefined_runs.is_empty() {
            row.undefined.push(Undefined {
                subject: cell.subject.clone(),
                every_run: cell.undefined_runs.len() == cell.runs,
                runs: cell.undefined_runs.clone(),
            });
        } else if let Some(vif) = cell.worst {
            row.dots.push(Dot {
                subject: cell.subject.clone(),
                vif,
            });
        }
    }
    strip
}

fn vif_mark(vif: f64, thresholds: &Thresholds) -> Mark {
    Mark::of(vif_status(Some(vif), thresholds))
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
            .x_label_formatter(&|v| axis_vif(*v))
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
                let note = format!(
                    "VIF undefined for {} (see below)",
                    count(row.undefined.len(), "participant", "participants")
                );
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

        threshold_lines(root, &mut chart, thresholds, plot_height)?;

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
            axis_vif(thresholds.vif_caution),
            axis_vif(thresholds.vif_severe)
        );
        let severe = format!("severe: VIF ≥ {}", axis_vif(thresholds.vif_severe));
        let ok = format!("below {}", axis_vif(thresholds.vif_caution));
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

/// A chart with a log-scaled VIF axis across and rows stacked down.
pub(super) type VifChart<'a, 'b> =
    ChartContext<'a, SVGBackend<'b>, Cartesian2d<LogCoord<f64>, RangedCoordf64>>;

/// The caution (dashed, ember) and severe (solid, ink) threshold lines, each labelled
/// with its value. The caution label ends left of its line and the severe label starts
/// right of its line, so the two never collide however close the thresholds are.
pub(super) fn threshold_lines(
    root: &super::Area,
    chart: &mut VifChart<'_, '_>,
    thresholds: &Thresholds,
    plot_height: f64,
) -> super::Drawn {
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
        let note = format!("{label} {}", axis_vif(value));
        let style = anchored(text(13.0), side, VPos::Bottom);
        root.draw_text(&note, &style, (x + shift, y - 4))
            .map_err(failed)?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ticks_are_plain_numbers() {
        assert_eq!(axis_vif(5.0), "5");
        assert_eq!(axis_vif(2.5), "2.5");
        assert_eq!(axis_vif(1000.0), "1000");
        assert_eq!(axis_vif(f64::NAN), "");
    }
}
