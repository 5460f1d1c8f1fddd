//! The press-shop curve's picture: the curve from `limit from-parts` on a diagram in true strain,
//! with the circles by observed condition, the overlap band at each knot and the reference
//! strain paths, in the plotting style of the forming-limit diagram.

use crate::chart::footer::draw_footer;
use crate::chart::legend::{Entries, Key, Legend, Row, COUNTED, LINES};
use crate::chart::title::draw_title;
use crate::chart::{self, Stroke, PANEL_LEFT, TITLE_H};
use crate::fld;
use crate::plot;
use neckline_core::condition::Condition;
use neckline_core::limit::from_parts::{Band, PartCircle, PartsFit};
use neckline_core::limit::writer::SHOP_CURVE_WORDS;
use neckline_core::limit::LimitCurve;
use neckline_core::output::input_name;
use plotters::prelude::*;
use std::io;
use std::path::Path;

/// The picture as SVG.
pub fn parts_svg(
    curve: &LimitCurve,
    fit: &PartsFit,
    circles: &[PartCircle],
    input: &Path,
) -> io::Result<String> {
    let draw = PartsPlot {
        curve,
        fit,
        circles,
        input,
    };
    plot::render_svg(plot::SIZE, |root| draw.draw(root))
}

/// The picture as PNG bytes.
pub fn parts_png(
    curve: &LimitCurve,
    fit: &PartsFit,
    circles: &[PartCircle],
    input: &Path,
) -> io::Result<Vec<u8>> {
    let draw = PartsPlot {
        curve,
        fit,
        circles,
        input,
    };
    plot::render_png(plot::SIZE, |root| draw.draw(root))
}

/// How a condition is drawn: colour and marker shape (the shape carries the meaning where
/// colour cannot; Okabe-Ito colours as on the diagram of `check`).
fn condition_style(c: Condition) -> (plot::Shape, RGBColor) {
    use plot::okabe_ito::*;
    match c {
        Condition::Safe => (plot::Shape::Square, GREEN),
        Condition::Necked => (plot::Shape::Triangle, ORANGE),
        Condition::Split => (plot::Shape::Barred, VERMILLION),
    }
}

/// The written curve beyond its supported range (a knot with one kind of circle only).
const ONE_SIDED: Stroke = Stroke::dashed(BLACK, 3, 8.0, 5.0);
/// The 50 % line, the fitted boundary (information: the written curve lies below it).
/// Okabe-Ito blue (Okabe & Ito 2008).
const MEDIAN: Stroke = Stroke::solid(RGBColor(0x00, 0x72, 0xB2), 2);

struct PartsPlot<'a> {
    curve: &'a LimitCurve,
    fit: &'a PartsFit,
    circles: &'a [PartCircle],
    input: &'a Path,
}

impl PartsPlot<'_> {
    /// Axis ranges (true strain, percent) holding every circle and the curve, with some air.
    fn ranges(&self) -> ((f64, f64), (f64, f64)) {
        let pts = self
            .circles
            .iter()
            .map(|c| (c.minor, c.major))
            .chain(self.fit.knots.iter().copied().zip(self.fit.majors.clone()))
            .chain(
                self.fit
                    .knots
                    .iter()
                    .copied()
                    .zip(self.fit.conservative.clone()),
            );
        let (mut x, mut y) = ((0.0f64, 0.0f64), (0.0f64, 0.0f64));
        for (a, b) in pts {
            x = (x.0.min(100.0 * a), x.1.max(100.0 * a));
            y = (y.0.min(100.0 * b), y.1.max(100.0 * b));
        }
        let out = |lo: f64, hi: f64| ((lo / 5.0).floor() * 5.0, (hi / 5.0).ceil() * 5.0);
        (out(x.0 - 3.0, x.1 + 3.0), out(y.0 - 3.0, y.1 * 1.05 + 3.0))
    }

    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
    ) -> plot::DrawResult<DB> {
        root.fill(&WHITE)?;
        let (xr, yr) = self.ranges();
        let plot = fld::true_strain_frame(root, xr, yr)?;
        let px = |p: (f64, f64)| plot.px(p);
        self.draw_bands(root, &px)?;
        self.draw_curve(root, &px, xr, yr)?;
        for c in Condition::ALL {
            let (shape, colour) = condition_style(c);
            for p in self.circles.iter().filter(|p| p.condition == c) {
                let at = px((100.0 * p.minor, 100.0 * p.major));
                plot::marker(root, shape, at, 5, colour, BLACK)?;
                if self.wrong_side(p) {
                    root.draw(&Circle::new(at, 10, BLACK.stroke_width(2)))?;
                }
            }
        }
        self.draw_title(root)?;
        self.legend().draw(root)?;
        let input = format!("input {}", input_name(self.input));
        draw_footer(
            root,
            &[
                &input,
                "band and wrong side per knot: circles nearest that knot",
            ],
        )
    }

    /// Whether a circle lies on the wrong side of the fitted curve.
    fn wrong_side(&self, p: &PartCircle) -> bool {
        let d = p.major - self.fit.major_at(p.minor);
        if p.condition.failed() {
            d < 0.0
        } else {
            d >= 0.0
        }
    }

    /// The 50 % line thin, and the written curve: solid over its supported range (the knots
    /// whose nearest circles are of both kinds), dashed beyond it (carried there by the
    /// smoothness penalty, not bracketed by evidence).
    fn draw_curve<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
        px: &dyn Fn((f64, f64)) -> (i32, i32),
        xr: (f64, f64),
        yr: (f64, f64),
    ) -> plot::DrawResult<DB> {
        let f = self.fit;
        let median: Vec<(f64, f64)> = f.median_pct().iter().map(|p| (p[0], p[1])).collect();
        for run in plot::clip_polyline(&median, xr, yr) {
            let run: Vec<_> = run.iter().map(|p| px(*p)).collect();
            MEDIAN.draw(root, &run)?;
        }
        let inside = |x: f64| {
            f.supported
                .is_some_and(|(lo, hi)| x >= lo - 1e-12 && x <= hi + 1e-12)
        };
        for k in 1..f.knots.len() {
            let piece = [
                (100.0 * f.knots[k - 1], 100.0 * f.conservative[k - 1]),
                (100.0 * f.knots[k], 100.0 * f.conservative[k]),
            ];
            let bracketed = inside(f.knots[k - 1]) && inside(f.knots[k]);
            let stroke = if bracketed { chart::CURVE } else { ONE_SIDED };
            for run in plot::clip_polyline(&piece, xr, yr) {
                let run: Vec<_> = run.iter().map(|p| px(*p)).collect();
                stroke.draw(root, &run)?;
            }
        }
        Ok(())
    }

    /// At each knot, a translucent bar over the band where safe and necked circles mix, or an
    /// outlined bar over the gap between them.
    fn draw_bands<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
        px: &dyn Fn((f64, f64)) -> (i32, i32),
    ) -> plot::DrawResult<DB> {
        let mix = plot::okabe_ito::PURPLE;
        for r in &self.fit.overlap {
            let x = 100.0 * r.minor;
            match r.band {
                Band::Mix(lo, hi) => {
                    let (a, b) = (px((x, 100.0 * lo)), px((x, 100.0 * hi)));
                    root.draw(&Rectangle::new(
                        [(a.0 - 9, a.1 + 1), (b.0 + 9, b.1 - 1)],
                        mix.mix(0.45).filled(),
                    ))?;
                }
                Band::Gap(lo, hi) => {
                    let (a, b) = (px((x, 100.0 * lo)), px((x, 100.0 * hi)));
                    root.draw(&Rectangle::new(
                        [(a.0 - 9, a.1 + 1), (b.0 + 9, b.1 - 1)],
                        mix.stroke_width(2),
                    ))?;
                }
                Band::OneSided => {}
            }
            let k = px((x, 100.0 * r.major));
            root.draw(&Rectangle::new(
                [(k.0 - 3, k.1 - 3), (k.0 + 3, k.1 + 3)],
                WHITE.filled(),
            ))?;
            root.draw(&Rectangle::new(
                [(k.0 - 3, k.1 - 3), (k.0 + 3, k.1 + 3)],
                BLACK.stroke_width(1),
            ))?;
        }
        Ok(())
    }

    fn draw_title<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
    ) -> plot::DrawResult<DB> {
        let n = self.fit.counts;
        let head = format!("Forming-limit diagram: {}", self.curve.name);
        let second = format!(
            "{} circles: {} safe, {} necked, {} split  ·  {} on the wrong side  ·  boundary \
             width s = {:.2} %{}",
            n.safe + n.failed(),
            n.safe,
            n.necked,
            n.split,
            self.fit.wrong_side(),
            100.0 * self.fit.scale,
            self.curve
                .material
                .as_deref()
                .map(|m| format!("  ·  {m}"))
                .unwrap_or_default()
        );
        let third = format!("{SHOP_CURVE_WORDS}  (true strain axes)");
        draw_title(root, [&head, &second, &third])
    }

    /// The legend: circles by condition, the curve and its overlap bars, the knots.
    fn legend(&self) -> Legend {
        let mut l = Legend::new(PANEL_LEFT, TITLE_H + 16);
        l.heading("Circles (condition)", 16.0, 28);
        let n = self.fit.counts;
        for (c, count) in [
            (Condition::Safe, n.safe),
            (Condition::Necked, n.necked),
            (Condition::Split, n.split),
        ] {
            let (shape, fill) = condition_style(c);
            let key = Key::Marker {
                shape,
                fill,
                r: 6,
                dx: 10,
            };
            l.push(Row::counted(key, c.name(), count, &COUNTED));
        }
        l.gap(12);
        l.heading("Curve and overlap", 16.0, 26);
        let mix = plot::okabe_ito::PURPLE;
        let line = |stroke| Key::Line { stroke, len: 40 };
        let ring = Key::Circle {
            dx: 20,
            r: 10,
            style: BLACK.stroke_width(2),
        };
        for (key, text, step) in [
            (line(chart::CURVE), "curve written (lower bound)", 22),
            (line(ONE_SIDED), "beyond supported range", 24),
            (line(MEDIAN), "50 % line, □ knots", 24),
            (ring, "circle on the wrong side", 26),
            (
                Key::Patch(mix.mix(0.45).filled()),
                "overlap: safe and necked mix",
                24,
            ),
            (Key::Patch(mix.stroke_width(2)), "gap: they do not mix", 24),
            (line(chart::REFERENCE), "strain paths", 24),
        ] {
            l.push(Row::entry(key, text, &Entries { step, ..LINES }));
        }
        l.gap(12);
        l.heading("Knots (true %)", 16.0, 24);
        let columns = [45, 110, 200];
        let row = |cells: [String; 3], step| {
            cells
                .into_iter()
                .zip(columns)
                .fold(Row::new(step), |r, (text, at)| {
                    r.right(text, plot::text(13.0), at)
                })
        };
        l.push(row(["minor", "50 %", "written"].map(String::from), 19));
        for (r, c) in self.fit.overlap.iter().zip(&self.fit.conservative) {
            let cells = [
                format!("{:.1}", 100.0 * r.minor),
                format!("{:.1}", 100.0 * r.major),
                format!("{:.1}", 100.0 * c),
            ];
            l.push(row(cells, 18));
        }
        l
    }
}
