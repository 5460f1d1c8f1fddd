//! The press-shop curve's picture: the curve from `limit from-parts` on a diagram in true strain,
//! with the circles by observed condition, the overlap band at each knot and the reference
//! strain paths, in the plotting style of the forming-limit diagram.

use crate::fld;
use crate::plot;
use neckline_core::condition::Condition;
use neckline_core::limit::from_parts::{Band, PartCircle, PartsFit};
use neckline_core::limit::writer::{SHOP_CURVE_WORDS, TOOL_VERSION};
use neckline_core::limit::LimitCurve;
use neckline_core::output::input_name;
use neckline_core::strain::StrainMeasure;
use neckline_core::CAUTION;
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
            .chain(self.fit.knots.iter().copied().zip(self.fit.majors.clone()));
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
        let area = root.clone().shrink((0, 92), (870, 708));
        let mut chart = ChartBuilder::on(&area)
            .margin(12)
            .x_label_area_size(50)
            .y_label_area_size(62)
            .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
        chart
            .configure_mesh()
            .x_desc("minor strain ε2, true %")
            .y_desc("major strain ε1, true %")
            .axis_desc_style(plot::text(17.0))
            .label_style(plot::text(14.0))
            .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
            .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
            .light_line_style(RGBColor(240, 240, 240))
            .bold_line_style(RGBColor(215, 215, 215))
            .draw()?;
        let px = |p: (f64, f64)| chart.backend_coord(&p);
        let grey = RGBColor(120, 120, 120);
        for (_, line) in fld::reference_paths(StrainMeasure::True) {
            for run in plot::clip_polyline(&line, xr, yr) {
                let run: Vec<_> = run.iter().map(|p| px(*p)).collect();
                for d in plot::dashes(&run, 10.0, 4.0) {
                    root.draw(&PathElement::new(d, grey.stroke_width(1)))?;
                }
            }
        }
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
        self.draw_legend(root)?;
        self.draw_footer(root)
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

    /// The fitted curve: solid between knots that both have safe and necked-or-split circles
    /// near them, dashed where a knot has one kind only (the curve is carried there by the
    /// smoothness penalty, not bracketed by evidence).
    fn draw_curve<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
        px: &dyn Fn((f64, f64)) -> (i32, i32),
        xr: (f64, f64),
        yr: (f64, f64),
    ) -> plot::DrawResult<DB> {
        let o = &self.fit.overlap;
        for w in o.windows(2) {
            let piece = [
                (100.0 * w[0].minor, 100.0 * w[0].major),
                (100.0 * w[1].minor, 100.0 * w[1].major),
            ];
            let bracketed = w.iter().all(|r| r.band != Band::OneSided);
            for run in plot::clip_polyline(&piece, xr, yr) {
                let run: Vec<_> = run.iter().map(|p| px(*p)).collect();
                if bracketed {
                    root.draw(&PathElement::new(run, BLACK.stroke_width(3)))?;
                } else {
                    for d in plot::dashes(&run, 8.0, 5.0) {
                        root.draw(&PathElement::new(d, BLACK.stroke_width(3)))?;
                    }
                }
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
        let width = plot::SIZE.0 - 30;
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
        for (text, style, y) in [
            (head, plot::bold(23.0), 10),
            (second, plot::text(16.0), 40),
            (third, plot::text(14.0), 64),
        ] {
            let t = plot::fit_px(root, &text, &style, width);
            root.draw_text(&t, &style, (15, y))?;
        }
        Ok(())
    }

    fn draw_legend<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
    ) -> plot::DrawResult<DB> {
        let x = 885;
        let mut y = 108;
        root.draw_text("Circles (condition)", &plot::bold(16.0), (x, y))?;
        y += 28;
        let n = self.fit.counts;
        for (c, count) in [
            (Condition::Safe, n.safe),
            (Condition::Necked, n.necked),
            (Condition::Split, n.split),
        ] {
            let (shape, colour) = condition_style(c);
            plot::marker(root, shape, (x + 10, y + 8), 6, colour, BLACK)?;
            root.draw_text(c.name(), &plot::text(15.0), (x + 28, y))?;
            let count = count.to_string();
            let (w, _) = root.estimate_text_size(&count, &plot::bold(15.0))?;
            root.draw_text(&count, &plot::bold(15.0), (x + 200 - w as i32, y))?;
            y += 25;
        }
        y += 12;
        root.draw_text("Curve and overlap", &plot::bold(16.0), (x, y))?;
        y += 26;
        let sample = |y: i32| vec![(x, y + 8), (x + 40, y + 8)];
        root.draw(&PathElement::new(sample(y), BLACK.stroke_width(3)))?;
        root.draw_text("fitted curve, □ knots", &plot::text(14.0), (x + 50, y))?;
        y += 22;
        for d in plot::dashes(&sample(y), 8.0, 5.0) {
            root.draw(&PathElement::new(d, BLACK.stroke_width(3)))?;
        }
        root.draw_text("one kind of circle only", &plot::text(14.0), (x + 50, y))?;
        y += 24;
        root.draw(&Circle::new((x + 20, y + 8), 10, BLACK.stroke_width(2)))?;
        root.draw_text("circle on the wrong side", &plot::text(14.0), (x + 50, y))?;
        y += 26;
        let mix = plot::okabe_ito::PURPLE;
        root.draw(&Rectangle::new(
            [(x + 11, y), (x + 29, y + 16)],
            mix.mix(0.45).filled(),
        ))?;
        root.draw_text(
            "overlap: safe and necked mix",
            &plot::text(14.0),
            (x + 50, y),
        )?;
        y += 24;
        root.draw(&Rectangle::new(
            [(x + 11, y), (x + 29, y + 16)],
            mix.stroke_width(2),
        ))?;
        root.draw_text("gap: they do not mix", &plot::text(14.0), (x + 50, y))?;
        y += 24;
        for d in plot::dashes(&sample(y), 10.0, 4.0) {
            root.draw(&PathElement::new(
                d,
                RGBColor(120, 120, 120).stroke_width(1),
            ))?;
        }
        root.draw_text("strain paths", &plot::text(14.0), (x + 50, y))?;
        y += 36;
        root.draw_text("Knots (true %)", &plot::bold(16.0), (x, y))?;
        y += 24;
        let right = |root: &DrawingArea<DB, plotters::coord::Shift>, text: &str, at: (i32, i32)| {
            let (w, _) = root.estimate_text_size(text, &plot::text(13.0))?;
            root.draw_text(text, &plot::text(13.0), (at.0 - w as i32, at.1))
        };
        let columns = [x + 45, x + 110, x + 200];
        for (text, at) in ["minor", "curve", "wrong side"].iter().zip(columns) {
            right(root, text, (at, y))?;
        }
        y += 19;
        for r in &self.fit.overlap {
            let cells = [
                format!("{:.1}", 100.0 * r.minor),
                format!("{:.1}", 100.0 * r.major),
                r.wrong_side().to_string(),
            ];
            for (text, at) in cells.iter().zip(columns) {
                right(root, text, (at, y))?;
            }
            y += 18;
        }
        Ok(())
    }

    fn draw_footer<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, plotters::coord::Shift>,
    ) -> plot::DrawResult<DB> {
        let top = 800;
        let style = plot::text(13.0).color(&RGBColor(60, 60, 60));
        root.draw(&PathElement::new(
            vec![(15, top), (plot::SIZE.0 as i32 - 15, top)],
            RGBColor(200, 200, 200).stroke_width(1),
        ))?;
        let mut y = top + 8;
        for line in plot::wrap_px(root, CAUTION, &style, plot::SIZE.0 - 30) {
            root.draw_text(&line, &style, (15, y))?;
            y += 17;
        }
        let prov = format!(
            "neckline {TOOL_VERSION}  ·  input {}  ·  band and wrong side per knot: circles \
             nearest that knot",
            input_name(self.input)
        );
        let prov = plot::fit_px(root, &prov, &style, plot::SIZE.0 - 30);
        root.draw_text(&prov, &style, (15, y))
    }
}
