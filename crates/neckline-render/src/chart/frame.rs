//! The frame of a picture: the plot area left of the legend panel and between the title band
//! and the footer, with its axes, grid lines, tick labels and axis titles.

use super::label::Placer;
use super::{FOOTER_TOP, PLOT_RIGHT, TITLE_H};
use crate::plot::{self, Rect};
use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

/// Space between the plot area's box and the frame, pixels.
pub const MARGIN: i32 = 12;
/// Height of the band below the plot for the x tick labels and the axis title.
pub const X_LABEL_AREA: i32 = 50;

/// Which of the two kinds of frame: a strain diagram or a part map.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Look {
    /// A diagram of strains (forming-limit, path and press-shop diagrams).
    Diagram,
    /// A map of the part (lengths on both axes, at equal scale): wider y tick labels and a
    /// lighter grid, so that the colours of the locations stand out.
    Map,
}

impl Look {
    /// Width of the band left of the plot for the y tick labels and the axis title.
    pub fn y_label_area(self) -> i32 {
        match self {
            Look::Diagram => 62,
            Look::Map => 70,
        }
    }

    /// Colours of the light (minor) and bold (major) grid lines.
    pub fn grid(self) -> (RGBColor, RGBColor) {
        match self {
            Look::Diagram => (RGBColor(240, 240, 240), RGBColor(215, 215, 215)),
            Look::Map => (RGBColor(244, 244, 244), RGBColor(220, 220, 220)),
        }
    }

    /// Size of the plot area inside the frame, pixels (width, height).
    pub fn plot_size(self) -> (f64, f64) {
        (
            (PLOT_RIGHT - 2 * MARGIN - self.y_label_area()) as f64,
            (FOOTER_TOP - TITLE_H - 2 * MARGIN - X_LABEL_AREA) as f64,
        )
    }
}

/// What a frame shows: the axis ranges and titles.
#[derive(Debug, Clone, PartialEq)]
pub struct Frame {
    /// Range of the x axis.
    pub x: (f64, f64),
    /// Range of the y axis.
    pub y: (f64, f64),
    /// Title of the x axis.
    pub x_desc: String,
    /// Title of the y axis.
    pub y_desc: String,
    /// Diagram or map.
    pub look: Look,
}

/// Coordinates of a plot area: x and y, both continuous.
pub type Coords = Cartesian2d<RangedCoordf64, RangedCoordf64>;

/// The plot area a frame was drawn round: maps data coordinates to pixels.
pub struct Plot<DB: DrawingBackend> {
    area: DrawingArea<DB, Coords>,
    /// Range of the x axis.
    pub x: (f64, f64),
    /// Range of the y axis.
    pub y: (f64, f64),
}

impl Frame {
    /// Draw the frame (axes, grid, tick labels, axis titles) on `root` and return its plot area.
    pub fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
    ) -> Result<Plot<DB>, DrawingAreaErrorKind<DB::ErrorType>> {
        let (xr, yr) = (self.x, self.y);
        let area = root.clone().shrink(
            (0, TITLE_H),
            (PLOT_RIGHT as u32, (FOOTER_TOP - TITLE_H) as u32),
        );
        let mut chart = ChartBuilder::on(&area)
            .margin(MARGIN)
            .x_label_area_size(X_LABEL_AREA)
            .y_label_area_size(self.look.y_label_area())
            .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
        let (light, bold) = self.look.grid();
        chart
            .configure_mesh()
            .x_desc(self.x_desc.as_str())
            .y_desc(self.y_desc.as_str())
            .axis_desc_style(plot::text(17.0))
            .label_style(plot::text(14.0))
            .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
            .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
            .light_line_style(light)
            .bold_line_style(bold)
            .draw()?;
        Ok(Plot {
            area: chart.plotting_area().clone(),
            x: xr,
            y: yr,
        })
    }
}

/// Ranges with equal scale on both axes for a plot `w × h` pixels holding `pts`.
pub fn equal_ranges(pts: &[(f64, f64)], w: f64, h: f64) -> ((f64, f64), (f64, f64)) {
    let fold = |f: fn(&(f64, f64)) -> f64| {
        pts.iter()
            .map(f)
            .fold((f64::INFINITY, f64::NEG_INFINITY), |(l, h), v| {
                (l.min(v), h.max(v))
            })
    };
    let (x0, x1) = fold(|p| p.0);
    let (y0, y1) = fold(|p| p.1);
    let pad = 0.06 * (x1 - x0).max(y1 - y0).max(1.0);
    let (x0, x1, y0, y1) = (x0 - pad, x1 + pad, y0 - pad, y1 + pad);
    let per_px = ((x1 - x0) / w).max((y1 - y0) / h);
    let (cx, cy) = ((x0 + x1) / 2.0, (y0 + y1) / 2.0);
    let (hw, hh) = (per_px * w / 2.0, per_px * h / 2.0);
    ((cx - hw, cx + hw), (cy - hh, cy + hh))
}

impl<DB: DrawingBackend> Plot<DB> {
    /// The pixel of a point in data coordinates.
    pub fn px(&self, p: (f64, f64)) -> (i32, i32) {
        self.area.map_coordinate(&p)
    }

    /// The plot area's box in pixels.
    pub fn rect(&self) -> Rect {
        let (xs, ys) = self.area.get_pixel_range();
        (xs.start, ys.start, xs.end, ys.end)
    }

    /// A label placer for labels inside the plot area (2 px in from its box).
    pub fn placer(&self) -> Placer {
        let r = self.rect();
        Placer::new((r.0 + 2, r.1 + 2, r.2 - 2, r.3 - 2))
    }

    /// A line in data coordinates clipped to the axis ranges: its visible runs, in pixels.
    pub fn runs(&self, line: &[(f64, f64)]) -> Vec<Vec<(i32, i32)>> {
        plot::clip_polyline(line, self.x, self.y)
            .iter()
            .map(|run| run.iter().map(|p| self.px(*p)).collect())
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn equal_ranges_have_equal_scale() {
        let ((x0, x1), (y0, y1)) = equal_ranges(&[(0.0, 0.0), (1000.0, 200.0)], 700.0, 600.0);
        let (sx, sy) = ((x1 - x0) / 700.0, (y1 - y0) / 600.0);
        assert!((sx - sy).abs() < 1e-9 * sx, "{sx} {sy}");
        assert!(x0 < 0.0 && x1 > 1000.0 && y0 < 0.0 && y1 > 200.0);
    }
}
