//! The participants' statuses per task variant: one stacked bar per variant (ranking
//! order) of the shares of simulated participants whose worst run is ok, caution or
//! severe. The three fills differ in lightness and each wide enough segment carries its
//! percentage, so the bars read without colour.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::cohort::StatusCounts;
use crate::forecast::report::ForecastReport;
use crate::render::plots::legend::{Key, draw_legend};
use crate::render::plots::palette::{EMBER, INK, MIST, SAND};
use crate::render::plots::{anchored, draw_svg, failed, label_width, text};

#[derive(Debug, Clone, PartialEq)]
pub struct StatusRow {
    /// "rank. name", as in the ranking table.
    pub label: String,
    pub counts: StatusCounts,
}

pub fn status_rows(report: &ForecastReport) -> Vec<StatusRow> {
    report
        .ranking
        .iter()
        .filter_map(|entry| {
            let v = report.variants.iter().find(|v| v.name == entry.variant)?;
            Some(StatusRow {
                label: format!("{}. {}", entry.rank, v.name),
                counts: v.participants,
            })
        })
        .collect()
}

const BAR: f64 = 26.0;

pub fn status_bars(rows: &[StatusRow]) -> Result<String, String> {
    if rows.iter().all(|r| r.counts.total() == 0) {
        return Err("no simulated participants to show".to_string());
    }
    let left = rows
        .iter()
        .map(|r| label_width(&r.label, 13.0))
        .max()
        .unwrap_or(80)
        .clamp(80, 320)
        + 16;
    let plot_height = BAR * rows.len() as f64;
    let (width, legend, bottom, top) = (1000u32, 30u32, 44u32, 10u32);
    let height = plot_height.ceil() as u32 + legend + bottom + top;
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
            .x_labels(6)
            .x_label_formatter(&|v| format!("{:.0}%", v * 100.0))
            .x_desc("share of simulated participants, by the status of their worst run")
            .light_line_style(TRANSPARENT)
            .bold_line_style(MIST)
            .axis_style(INK)
            .label_style(text(12.0))
            .axis_desc_style(text(13.0))
            .draw()
            .map_err(failed)?;
        let label_style = anchored(text(13.0), HPos::Right, VPos::Center);
        for (slot, row) in rows.iter().enumerate() {
            let top = plot_height - slot as f64 * BAR;
            let bottom = top - BAR;
            let counts = &row.counts;
            let (ok, caution) = (counts.share(counts.ok), counts.share(counts.caution));
            let severe = counts.share(counts.severe);
            let parts = [
                (0.0, ok, SAND, false),
                (ok, ok + caution, EMBER, false),
                (ok + caution, ok + caution + severe, INK, true),
            ];
            for (from, to, fill, on_dark) in parts.into_iter().filter(|(f, t, ..)| t > f) {
                let mut bar = Rectangle::new([(from, top), (to, bottom)], fill.filled());
                bar.set_margin(3, 3, 0, 0);
                chart.draw_series([bar]).map_err(failed)?;
                let (x0, y) = chart.backend_coord(&(from, top - BAR / 2.0));
                let (x1, _) = chart.backend_coord(&(to, top - BAR / 2.0));
                let share = format!("{:.0}%", (to - from) * 100.0);
                if x1 - x0 > label_width(&share, 12.0) as i32 + 8 {
                    let ink = if on_dark {
                        text(12.0).color(&WHITE)
                    } else {
                        text(12.0)
                    };
                    let style = anchored(ink, HPos::Center, VPos::Center);
                    root.draw_text(&share, &style, ((x0 + x1) / 2, y))
                        .map_err(failed)?;
                }
            }
            let (x, y) = chart.backend_coord(&(0.0, top - BAR / 2.0));
            root.draw_text(&row.label, &label_style, (x - 8, y))
                .map_err(failed)?;
        }
        draw_legend(
            &legend_area,
            &[
                Key::Swatch(SAND, "ok"),
                Key::Swatch(EMBER, "caution"),
                Key::Swatch(INK, "severe"),
            ],
        )
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bars_need_participants() {
        assert!(status_bars(&[]).is_err());
        let row = StatusRow {
            label: "1. as planned".into(),
            counts: StatusCounts {
                ok: 3,
                caution: 1,
                severe: 0,
            },
        };
        let svg = status_bars(&[row]).expect("drawn");
        assert!(svg.contains("75%"));
    }
}
