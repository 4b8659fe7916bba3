//! The forecast's figures: per task variant (in ranking order), each focus regressor's
//! VIF median over the simulated runs with its 10–90% range; and, in `statuses`, the
//! participants' statuses per variant.
//!
//! Regressors are told apart by marker shape as well as colour, so the figure survives
//! colour-blind reading and greyscale printing. A spread value that is undefined (exact
//! dependencies in that share of runs) is never drawn as a number: a missing median
//! leaves the mark out and says so in the row, a missing 90th percentile turns the
//! whisker into a dashed line that runs off the right edge.

mod keys;
mod statuses;

pub use statuses::{StatusRow, status_bars, status_rows};

use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::palette::{EMBER, INK, STONE};
use super::strip::threshold_lines;
use super::{Area, Drawn, anchored, draw_svg, failed, label_width, text};
use crate::forecast::report::ForecastReport;
use crate::forecast::summary::Spread;
use crate::render::numbers::axis_vif as vif_tick;
use crate::study::Thresholds;
use keys::{Entry, draw_legend, draw_shape, legend_layout, shape_colour};

/// One regressor's spread on one variant, with values that cannot go on a log axis
/// (non-finite, not positive) already turned into `None`.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Whisker {
    pub median: Option<f64>,
    pub p10: Option<f64>,
    pub p90: Option<f64>,
}

impl Whisker {
    fn of(spread: &Spread) -> Whisker {
        let keep = |v: Option<f64>| v.filter(|v| v.is_finite() && *v > 0.0);
        Whisker {
            median: keep(spread.median),
            p10: keep(spread.p10),
            p90: keep(spread.p90),
        }
    }
}

#[derive(Debug, Clone)]
pub struct VariantRow {
    /// "rank. name", as the ranking table shows it.
    pub label: String,
    /// Aligned with [`VariantVifs::regressors`]; `None` when the variant lacks it.
    pub whiskers: Vec<Option<Whisker>>,
}

#[derive(Debug, Clone, Default)]
pub struct VariantVifs {
    pub regressors: Vec<String>,
    pub rows: Vec<VariantRow>,
}

impl VariantVifs {
    /// (variant label, regressor) pairs drawn without a mark: median undefined or absent.
    pub fn unmarked(&self) -> Vec<(String, String)> {
        self.pairs(|w| w.is_none_or(|w| w.median.is_none()))
    }

    /// Pairs whose median is drawn but whose 90th percentile is undefined.
    pub fn open_ended(&self) -> Vec<(String, String)> {
        self.pairs(|w| w.is_some_and(|w| w.median.is_some() && w.p90.is_none()))
    }

    fn pairs(&self, keep: impl Fn(Option<&Whisker>) -> bool) -> Vec<(String, String)> {
        let mut out = Vec::new();
        for row in &self.rows {
            for (name, whisker) in self.regressors.iter().zip(&row.whiskers) {
                if keep(whisker.as_ref()) {
                    out.push((row.label.clone(), name.clone()));
                }
            }
        }
        out
    }
}

/// The figure's data, variants in ranking order (the order the reader decides in).
pub fn variant_vifs_data(report: &ForecastReport) -> VariantVifs {
    // Every GLM that holds a focus regressor (as the first variant lists them).
    let keys: Vec<(String, String)> = report
        .variants
        .first()
        .map(|v| {
            v.regressors
                .iter()
                .filter(|r| report.forecast.focus.contains(&r.regressor))
                .map(|r| (r.glm.clone(), r.regressor.clone()))
                .collect()
        })
        .unwrap_or_default();
    let several_glms = keys.iter().any(|k| k.0 != keys[0].0);
    let regressors = keys
        .iter()
        .map(|(glm, name)| {
            if several_glms {
                format!("{glm} · {name}")
            } else {
                name.clone()
            }
        })
        .collect();
    let rows = report
        .ranking
        .iter()
        .filter_map(|entry| {
            let variant = report.variants.iter().find(|v| v.name == entry.variant)?;
            let whiskers = keys
                .iter()
                .map(|(glm, name)| {
                    let found = variant
                        .regressors
                        .iter()
                        .find(|r| &r.glm == glm && &r.regressor == name);
                    found.map(|r| Whisker::of(&r.vif))
                })
                .collect();
            Some(VariantRow {
                label: format!("{}. {}", entry.rank, variant.name),
                whiskers,
            })
        })
        .collect();
    VariantVifs { regressors, rows }
}

/// Pixels per regressor line within a variant's row, and the row's padding.
const LINE: f64 = 16.0;
const PAD: f64 = 14.0;

pub fn variant_vifs(data: &VariantVifs, thresholds: &Thresholds) -> Result<String, String> {
    if data.rows.is_empty() || data.regressors.is_empty() {
        return Err("no variants or no focus regressors to show".to_string());
    }
    let row_height = (data.regressors.len() as f64 * LINE + PAD).max(30.0);
    let plot_height = row_height * data.rows.len() as f64;
    let left = data
        .rows
        .iter()
        .map(|r| label_width(&r.label, 13.0))
        .max()
        .unwrap_or(80)
        .clamp(80, 320)
        + 16;
    let width = 1000u32;
    let (top, bottom) = (28u32, 44u32);

    let mut entries: Vec<(Entry, String)> = data
        .regressors
        .iter()
        .enumerate()
        .map(|(i, name)| (Entry::Shape(i), name.clone()))
        .collect();
    let caution = format!("caution threshold {}", vif_tick(thresholds.vif_caution));
    let severe = format!("severe threshold {}", vif_tick(thresholds.vif_severe));
    entries.push((Entry::Threshold(EMBER, true), caution));
    entries.push((Entry::Threshold(INK, false), severe));
    if !data.open_ended().is_empty() {
        let label = "90th percentile undefined (runs off the edge)".to_string();
        entries.push((Entry::OpenWhisker, label));
    }
    let labels: Vec<String> = entries.iter().map(|(_, l)| l.clone()).collect();
    let (_, legend_lines) = legend_layout(&labels, width as i32);
    let legend = 24 * legend_lines as u32 + 4;
    let height = plot_height.ceil() as u32 + top + bottom + legend;

    let values = data
        .rows
        .iter()
        .flat_map(|r| r.whiskers.iter().flatten())
        .flat_map(|w| [w.p10, w.median, w.p90].into_iter().flatten());
    let (low, high) = values.fold((1.0f64, thresholds.vif_severe), |(lo, hi), v| {
        (lo.min(v), hi.max(v))
    });
    let x_range = (low.max(1e-3) * 0.85)..(high.max(low * 2.0) * 1.8);

    draw_svg((width, height), |root| {
        let (chart_area, legend_area) = root.split_vertically(height - legend);
        let mut chart = ChartBuilder::on(&chart_area)
            .margin_top(top)
            .margin_right(40)
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
            .x_desc("VIF (log scale): median over the simulated runs, whisker 10–90%")
            .light_line_style(TRANSPARENT)
            .bold_line_style(STONE.mix(0.3))
            .axis_style(INK)
            .label_style(text(12.0))
            .axis_desc_style(text(13.0))
            .draw()
            .map_err(failed)?;
        // Rows run top-down; the chart's y (in pixels) grows upwards.
        let y_of = |from_top: f64| plot_height - from_top;
        let note_style = anchored(text(12.0), HPos::Left, VPos::Center);
        for (r, row) in data.rows.iter().enumerate() {
            let row_top = r as f64 * row_height;
            if r > 0 {
                let edge = [(x_range.start, y_of(row_top)), (x_range.end, y_of(row_top))];
                chart
                    .draw_series(LineSeries::new(edge, STONE.mix(0.35)))
                    .map_err(failed)?;
            }
            let middle = chart.backend_coord(&(x_range.start, y_of(row_top + row_height / 2.0)));
            let label_style = anchored(text(13.0), HPos::Right, VPos::Center);
            root.draw_text(&row.label, &label_style, (middle.0 - 8, middle.1))
                .map_err(failed)?;
            for (j, whisker) in row.whiskers.iter().enumerate() {
                let y = y_of(row_top + PAD / 2.0 + LINE * (j as f64 + 0.5));
                let name = &data.regressors[j];
                let Some(w) = whisker.filter(|w| w.median.is_some()) else {
                    // Said in the row, so that a gap never reads as a good value.
                    let (x, py) = chart.backend_coord(&(x_range.start, y));
                    let note = format!("{name}: median undefined — no mark");
                    root.draw_text(&note, &note_style, (x + 8, py))
                        .map_err(failed)?;
                    continue;
                };
                let px = |x: f64, y: f64| chart.backend_coord(&(x, y));
                draw_whisker(root, &px, w, y, j, x_range.end)?;
            }
        }
        threshold_lines(root, &mut chart, thresholds, plot_height)?;
        draw_legend(&legend_area, &entries, width as i32)
    })
}

/// The 10–90% line with end caps (an open, dashed end when the 90th percentile is
/// undefined), then the median's marker on top.
/// `px` maps a (VIF, y) point of the chart to the root's pixels.
fn draw_whisker(
    root: &Area,
    px: &dyn Fn(f64, f64) -> (i32, i32),
    w: Whisker,
    y: f64,
    index: usize,
    edge: f64,
) -> Drawn {
    let colour = shape_colour(index);
    let median = w.median.unwrap_or(edge);
    let low = w.p10.unwrap_or(median);
    let from = px(low, y);
    let to = px(w.p90.unwrap_or(edge), y);
    if w.p90.is_some() {
        root.draw(&PathElement::new(vec![from, to], colour.stroke_width(2)))
            .map_err(failed)?;
        let cap = vec![(to.0, to.1 - 4), (to.0, to.1 + 4)];
        root.draw(&PathElement::new(cap, colour.stroke_width(2)))
            .map_err(failed)?;
    } else {
        let line = DashedPathElement::new(vec![from, to], 3, 3, colour.stroke_width(2));
        root.draw(&line).map_err(failed)?;
    }
    let cap = vec![(from.0, from.1 - 4), (from.0, from.1 + 4)];
    root.draw(&PathElement::new(cap, colour.stroke_width(2)))
        .map_err(failed)?;
    draw_shape(root, px(median, y), index)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn data(median: Option<f64>, p90: Option<f64>) -> VariantVifs {
        let whisker = Whisker {
            median,
            p10: median.map(|m| m / 2.0),
            p90,
        };
        VariantVifs {
            regressors: vec!["a_pe".into(), "b_pe".into()],
            rows: vec![VariantRow {
                label: "1. as planned".into(),
                whiskers: vec![Some(whisker), None],
            }],
        }
    }

    #[test]
    fn undefined_values_are_named_not_drawn() {
        let plot = data(Some(4.0), None);
        assert_eq!(plot.unmarked().len(), 1, "the absent regressor");
        assert_eq!(plot.open_ended().len(), 1);
        let svg = variant_vifs(&plot, &Thresholds::default()).expect("drawn");
        assert!(svg.contains("median undefined"));
        assert!(svg.contains("90th percentile undefined"));
        assert!(!svg.to_lowercase().contains("nan"));
    }

    #[test]
    fn empty_input_is_a_reason() {
        assert!(variant_vifs(&VariantVifs::default(), &Thresholds::default()).is_err());
        let all_defined = data(Some(20.0), Some(40.0));
        assert!(variant_vifs(&all_defined, &Thresholds::default()).is_ok());
    }
}
