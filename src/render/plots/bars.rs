//! Figure 2: own and shared shares of each modulator, per participant, for a model pair.

use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::legend::{Key, draw_legend};
use super::palette::{EMBER, INK, MIST, SAND};
use super::{Area, Drawn, anchored, draw_svg, failed, label_width, participants, text};
use crate::cohort::partition::UNIQUE;
use crate::design::RegressorKind;
use crate::report::Report;

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
}
