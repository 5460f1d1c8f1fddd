//! The one chart style every picture is drawn in: the page layout (title band, plot, legend
//! panel, footer), the line styles, and the pieces built on them: the [`frame`] (plot area,
//! axes, grid, tick labels, axis titles), the [`title`] lines, the [`legend`] drawn from a
//! list of entries, the [`footer`] (caution and provenance), [`label`] placement and the
//! part map's colour [`scale`].
//!
//! A change of style (a font size, a grid colour, a margin) is made here once. Fonts, the zone
//! palette, marker shapes, line geometry and the SVG / PNG encoders are in [`crate::plot`],
//! below this module; the pictures are above it.

pub mod footer;
pub mod frame;
pub mod label;
pub mod legend;
pub mod scale;
pub mod title;

use crate::plot::{self, DrawResult};
use plotters::coord::Shift;
use plotters::prelude::*;

pub use crate::plot::SIZE;

/// Bottom of the title band, pixels from the top.
pub const TITLE_H: i32 = 92;
/// Right edge of the plot (frame, tick labels and axis titles included).
pub const PLOT_RIGHT: i32 = 870;
/// Top of the footer.
pub const FOOTER_TOP: i32 = 800;
/// Left edge of the legend panel of the diagrams.
pub const PANEL_LEFT: i32 = 885;
/// Left edge of the legend panel of the part map (its colour bar needs the room).
pub const MAP_PANEL_LEFT: i32 = 895;
/// Left and right edge of the title and footer text.
pub const TEXT_LEFT: i32 = 15;
/// Width of the title and footer text.
pub const TEXT_WIDTH: u32 = SIZE.0 - 2 * TEXT_LEFT as u32;

/// Grey of the reference strain paths and their labels.
pub const GREY: RGBColor = RGBColor(120, 120, 120);
/// Light grey of the thinning iso-lines.
pub const LIGHT: RGBColor = RGBColor(165, 165, 165);

/// How a line is drawn: colour, width in pixels, and solid or dashed (`on`, `off` pixels).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stroke {
    /// Colour.
    pub colour: RGBColor,
    /// Width, pixels.
    pub width: u32,
    /// Dash and gap lengths, pixels; `None` for a solid line.
    pub dash: Option<(f64, f64)>,
}

impl Stroke {
    /// A solid line.
    pub const fn solid(colour: RGBColor, width: u32) -> Self {
        Stroke {
            colour,
            width,
            dash: None,
        }
    }

    /// A dashed line: `on` pixels drawn, `off` pixels left out.
    pub const fn dashed(colour: RGBColor, width: u32, on: f64, off: f64) -> Self {
        Stroke {
            colour,
            width,
            dash: Some((on, off)),
        }
    }

    /// Draw a pixel polyline in this stroke.
    pub fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        path: &[(i32, i32)],
    ) -> DrawResult<DB> {
        let style = self.colour.stroke_width(self.width);
        match self.dash {
            None => root.draw(&PathElement::new(path.to_vec(), style)),
            Some((on, off)) => {
                for d in plot::dashes(path, on, off) {
                    root.draw(&PathElement::new(d, style))?;
                }
                Ok(())
            }
        }
    }
}

/// The limit curve.
pub const CURVE: Stroke = Stroke::solid(BLACK, 3);
/// The safety band below the curve.
pub const BAND: Stroke = Stroke::dashed(BLACK, 2, 9.0, 6.0);
/// The reference strain paths.
pub const REFERENCE: Stroke = Stroke::dashed(GREY, 1, 10.0, 4.0);
/// The thinning iso-lines.
pub const THINNING: Stroke = Stroke::dashed(LIGHT, 1, 3.0, 4.0);

/// The colour of the maximum-thinning line and its label: Tol's indigo, outside the zone
/// palette, so that the line never reads as a zone (nor as a failure).
pub const MAX_THINNING_INK: RGBColor = RGBColor(0x33, 0x22, 0x88);

/// The maximum-thinning line: a heavy dotted line in its own colour, unlike any other line.
pub const MAX_THINNING: Stroke = Stroke::dashed(MAX_THINNING_INK, 3, 3.0, 5.0);

/// The part's outline on the map: a solid dark slate line, neither black (the curve) nor
/// dashed (the band and the reference paths), under the locations' colours.
pub const PART_EDGE: Stroke = Stroke::solid(RGBColor(0x44, 0x55, 0x66), 2);
