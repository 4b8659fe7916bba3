//! The models' separation: for each modulator and other model, one row; each mark is a
//! participant's partial R² of the modulator on the other model's modulators (mean over
//! their runs). Linear axis from 0 to 100%: near 100%, the other model predicts nearly
//! the same signal on that modulator.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::legend::{Key, draw_legend};
use super::marks::{Mark, draw_mark};
use super::palette::{INK, MIST, STONE};
use super::{anchored, draw_svg, failed, label_width, text};
use crate::report::Report;

/// One row of the figure: its label and the participants' values.
#[derive(Debug, Clone, PartialEq)]
pub struct SeparationRow {
    pub label: String,
    pub values: Vec<f64>,
}

/// The rows, in the order of the report's separation summary.
pub fn separation_rows(report: &Report) -> Vec<SeparationRow> {
    report
        .separation_summary
        .iter()
        .map(|s| SeparationRow {
            label: format!("{} vs {}", s.regressor, s.models[1]),
            values: report
                .participant_separations
                .iter()
                .filter(|p| p.models == s.models && p.regressor == s.regressor)
                .filter_map(|p| p.partial_r2)
                .collect(),
        })
        .collect()
}

const ROW: f64 = 34.0;

pub fn separation_strip(rows: &[SeparationRow]) -> Result<String, String> {
    if rows.is_empty() {
        return Err("fewer than two models: nothing to separate".to_string());
    }
    let plot_height = rows.len() as f64 * ROW;
    let left = rows
        .iter()
        .map(|r| label_width(&r.label, 13.0))
        .max()
        .unwrap_or(60)
        .clamp(60, 360)
        + 16;
    let (width, legend, top, bottom) = (1000u32, 30u32, 16u32, 44u32);
    let height = plot_height.ceil() as u32 + top + bottom + legend;
    draw_svg((width, height), |root| {
        let (chart_area, legend_area) = root.split_vertically(height - legend);
        let mut chart = ChartBuilder::on(&chart_area)
            .margin_top(top)
            .margin_right(40)
            .x_label_area_size(bottom)
            .y_label_area_size(left)
            .build_cartesian_2d(0.0..1.0, 0.0..plot_height)
            .map_err(failed)?;
        chart
            .configure_mesh()
            .disable_y_mesh()
            .y_labels(0)
            .x_labels(11)
            .x_label_formatter(&|v| format!("{:.0}%", v * 100.0))
            .x_desc("partial R² on the other model's modulators (participant's mean over runs)")
            .light_line_style(MIST.mix(0.6))
            .bold_line_style(MIST)
            .axis_style(INK)
            .label_style(text(12.0))
            .axis_desc_style(text(13.0))
            .draw()
            .map_err(failed)?;
        let y_of = |pixels_from_top: f64| plot_height - pixels_from_top;
        for (index, row) in rows.iter().enumerate() {
            let row_top = index as f64 * ROW;
            chart
                .draw_series(LineSeries::new(
                    [(0.0, y_of(row_top)), (1.0, y_of(row_top))],
                    STONE.mix(0.35),
                ))
                .map_err(failed)?;
            let (lx, ly) = chart.backend_coord(&(0.0, y_of(row_top + ROW / 2.0)));
            root.draw_text(
                &row.label,
                &anchored(text(13.0), HPos::Right, VPos::Center),
                (lx - 8, ly),
            )
            .map_err(failed)?;
            // A small deterministic spread so that equal values stay visible.
            let spread = [0.0, -5.0, 5.0, -10.0, 10.0];
            for (k, value) in row.values.iter().enumerate() {
                let y = y_of(row_top + ROW / 2.0 + spread[k % spread.len()]);
                let at = chart.backend_coord(&(value.clamp(0.0, 1.0), y));
                draw_mark(root, at, Mark::Ok)?;
            }
        }
        draw_legend(&legend_area, &[Key::Mark(Mark::Ok, "one participant")])
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_are_drawn_and_nothing_to_separate_is_said() {
        assert!(separation_strip(&[]).is_err());
        let svg = separation_strip(&[SeparationRow {
            label: "a:pe vs b".into(),
            values: vec![0.2, 0.95, 0.97],
        }])
        .expect("drawn");
        assert!(svg.contains("a:pe vs b"));
    }
}
