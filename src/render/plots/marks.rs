//! Markers: status is told by shape as well as colour.

use plotters::prelude::*;

use super::palette::{EMBER, INK};
use super::{Area, Drawn, failed};
use crate::screen::Status;

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

pub(super) fn draw_mark(area: &Area, at: (i32, i32), mark: Mark) -> Drawn {
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
