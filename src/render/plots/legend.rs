//! The legend strip below a figure.

use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, VPos};

use super::marks::{Mark, draw_mark};
use super::palette::INK;
use super::{Area, Drawn, anchored, failed, label_width, text};

/// One entry of a legend strip.
pub(super) enum Key<'a> {
    Mark(Mark, &'a str),
    Swatch(RGBColor, &'a str),
    Line(RGBColor, bool, &'a str),
}

/// A legend in one row, left to right, on its own area below a chart.
pub(super) fn draw_legend(area: &Area, keys: &[Key]) -> Drawn {
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
