//! Figure 3: the correlation matrix of one run's filtered design.

use plotters::coord::types::RangedCoordf64;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::palette::{COLD, INK, MIST, STONE, WARM};
use super::{Area, Drawn, anchored, draw_svg, failed, label_width, text};
use crate::render::numbers::correlation_cell;
use crate::report::Report;
use crate::report::RunReport;

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
                        root.draw_text(&correlation_cell(r, row == column), &style, centre)
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
    fn diverging_scale_is_white_in_the_middle_and_darker_below() {
        assert_eq!(diverging(0.0), WHITE);
        assert_eq!(diverging(-1.0), COLD);
        assert_eq!(diverging(1.0), WARM);
        let luma = |c: RGBColor| 0.299 * c.0 as f64 + 0.587 * c.1 as f64 + 0.114 * c.2 as f64;
        assert!(luma(COLD) + 60.0 < luma(WARM));
    }

    #[test]
    fn near_copies_are_not_shown_as_exact() {
        assert_eq!(correlation_cell(1.0, true), "1");
        assert_eq!(correlation_cell(0.998, false), ".998");
        assert_eq!(correlation_cell(0.99981, false), ".9998");
        assert_eq!(correlation_cell(-0.35, false), "\u{2212}.35");
        assert_eq!(correlation_cell(-0.001, false), ".00");
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
}
