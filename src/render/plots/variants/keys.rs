//! The markers and the wrapping legend of the variant figure. Six shape-and-colour
//! pairs, so that regressors stay apart for colour-blind readers and in greyscale; the
//! shapes are not the study report's status marks (status is read off the threshold
//! lines here).

use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use crate::render::plots::palette::{COLD, EMBER, INK};
use crate::render::plots::{Area, Drawn, anchored, failed, label_width, text};

/// Marker `index` (cycling through six shape-and-colour pairs) centred at `at`.
pub(super) fn draw_shape(area: &Area, at: (i32, i32), index: usize) -> Drawn {
    let (x, y) = at;
    let outline = INK.stroke_width(1);
    match index % 6 {
        0 => area.draw(&Circle::new(at, 5, INK.filled())).map_err(failed),
        1 => {
            let diamond = vec![(x, y - 6), (x + 6, y), (x, y + 6), (x - 6, y)];
            area.draw(&Polygon::new(diamond.clone(), EMBER.filled()))
                .map_err(failed)?;
            let mut closed = diamond.clone();
            closed.push(diamond[0]);
            area.draw(&PathElement::new(closed, outline))
                .map_err(failed)
        }
        2 => area
            .draw(&Cross::new(at, 5, COLD.stroke_width(2)))
            .map_err(failed),
        3 => {
            let square = Rectangle::new([(x - 5, y - 5), (x + 5, y + 5)], INK.stroke_width(2));
            area.draw(&square).map_err(failed)
        }
        4 => {
            area.draw(&TriangleMarker::new(at, 6, EMBER.filled()))
                .map_err(failed)?;
            area.draw(&TriangleMarker::new(at, 6, outline))
                .map_err(failed)
        }
        _ => {
            let style = COLD.stroke_width(2);
            area.draw(&PathElement::new(vec![(x - 6, y), (x + 6, y)], style))
                .map_err(failed)?;
            area.draw(&PathElement::new(vec![(x, y - 6), (x, y + 6)], style))
                .map_err(failed)
        }
    }
}

pub(super) fn shape_colour(index: usize) -> RGBColor {
    [INK, EMBER, COLD][index % 6 % 3]
}

/// One legend entry: what to draw before its label.
pub(super) enum Entry {
    Shape(usize),
    Threshold(RGBColor, bool),
    OpenWhisker,
}

/// Legend entries laid out left to right, wrapping onto new lines of 24 px; returns
/// each entry's top-left position and the number of lines.
pub(super) fn legend_layout(labels: &[String], width: i32) -> (Vec<(i32, i32)>, i32) {
    let (mut x, mut y) = (12, 12);
    let mut at = Vec::new();
    for label in labels {
        let w = 24 + label_width(label, 13.0) as i32 + 18;
        if x > 12 && x + w > width - 12 {
            x = 12;
            y += 24;
        }
        at.push((x, y));
        x += w;
    }
    (at, (y - 12) / 24 + 1)
}

pub(super) fn draw_legend(area: &Area, entries: &[(Entry, String)], width: i32) -> Drawn {
    let labels: Vec<String> = entries.iter().map(|(_, l)| l.clone()).collect();
    let (positions, _) = legend_layout(&labels, width);
    let style = anchored(text(13.0), HPos::Left, VPos::Center);
    for ((entry, label), (x, y)) in entries.iter().zip(positions) {
        let line = vec![(x, y), (x + 18, y)];
        match entry {
            Entry::Shape(index) => {
                let colour = shape_colour(*index).stroke_width(1);
                area.draw(&PathElement::new(line, colour)).map_err(failed)?;
                draw_shape(area, (x + 9, y), *index)?;
            }
            Entry::Threshold(colour, true) => {
                let dashes = DashedPathElement::new(line, 4, 3, colour.stroke_width(2));
                area.draw(&dashes).map_err(failed)?;
            }
            Entry::Threshold(colour, false) => {
                area.draw(&PathElement::new(line, colour.stroke_width(2)))
                    .map_err(failed)?;
            }
            Entry::OpenWhisker => {
                let dashes = DashedPathElement::new(line, 3, 3, INK.stroke_width(1));
                area.draw(&dashes).map_err(failed)?;
            }
        }
        area.draw_text(label, &style, (x + 24, y)).map_err(failed)?;
    }
    Ok(())
}
