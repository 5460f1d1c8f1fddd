//! The vertical colour bar of the part map's legend panel: its heading, the colours from the
//! low end (bottom) to the high end (top), a frame, ticks, and heavy marks at the values that
//! carry a meaning (zone boundaries, the maximum thinning).

use super::{MAP_PANEL_LEFT, TITLE_H};
use crate::plot::{self, DrawResult};
use plotters::coord::Shift;
use plotters::prelude::*;

/// A colour bar for values `lo ..= hi`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ColourBar {
    /// Left edge, pixels.
    pub left: i32,
    /// Top (the high end), pixels.
    pub top: i32,
    /// Bottom (the low end), pixels.
    pub bottom: i32,
    /// Width, pixels.
    pub width: i32,
    /// Value at the bottom.
    pub lo: f64,
    /// Value at the top.
    pub hi: f64,
}

impl ColourBar {
    /// The part map's bar for `lo ..= hi`, below its heading in the legend panel.
    pub fn map(lo: f64, hi: f64) -> Self {
        ColourBar {
            left: MAP_PANEL_LEFT,
            top: TITLE_H + 44,
            bottom: TITLE_H + 364,
            width: 26,
            lo,
            hi,
        }
    }

    /// The pixel row of value `v`.
    pub fn y_of(&self, v: f64) -> i32 {
        let (top, bottom) = (self.top, self.bottom);
        bottom - ((v - self.lo) / (self.hi - self.lo) * (bottom - top) as f64).round() as i32
    }

    /// Step between ticks: 10 on a long scale, else 5.
    pub fn step(&self) -> f64 {
        if self.hi - self.lo > 60.0 {
            10.0
        } else {
            5.0
        }
    }

    /// Draw the heading, the colours (one pixel row each) and the frame.
    pub fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        heading: &str,
        colour: impl Fn(f64) -> RGBColor,
    ) -> DrawResult<DB> {
        let (x, w, top, bottom) = (self.left, self.width, self.top, self.bottom);
        root.draw_text(heading, &plot::bold(16.0), (x, TITLE_H + 16))?;
        for y in top..=bottom {
            let v = self.lo + (bottom - y) as f64 / (bottom - top) as f64 * (self.hi - self.lo);
            root.draw(&PathElement::new(
                vec![(x, y), (x + w, y)],
                colour(v).stroke_width(1),
            ))?;
        }
        root.draw(&Rectangle::new(
            [(x, top), (x + w, bottom)],
            BLACK.stroke_width(1),
        ))
    }

    /// A tick at `v` with its value.
    pub fn tick<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        v: f64,
    ) -> DrawResult<DB> {
        let (x, w, y) = (self.left, self.width, self.y_of(v));
        root.draw(&PathElement::new(
            vec![(x + w, y), (x + w + 5, y)],
            BLACK.stroke_width(1),
        ))?;
        root.draw_text(&format!("{v:.0}"), &plot::text(13.0), (x + w + 8, y - 7))
    }

    /// A heavy mark across the bar at `v`, with `text` in bold beside it.
    pub fn mark<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        v: f64,
        text: &str,
    ) -> DrawResult<DB> {
        let (x, w, y) = (self.left, self.width, self.y_of(v));
        root.draw(&PathElement::new(
            vec![(x - 6, y), (x + w + 40, y)],
            BLACK.stroke_width(3),
        ))?;
        root.draw_text(text, &plot::bold(13.0), (x + w + 46, y - 8))
    }

    /// Left edge of the marks' texts.
    pub fn text_left(&self) -> i32 {
        self.left + self.width + 46
    }
}
