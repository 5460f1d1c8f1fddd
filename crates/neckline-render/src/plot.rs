//! The drawing primitives under every picture: the embedded font, the zone palette and marker
//! shapes (with the borderline ring, the arrowhead and the plus), strain-axis values and tick
//! labels, line clipping and dashing, text wrapping and fitting, and the SVG / PNG encoders.
//! The chart style built on them (frame, title, legend, footer, labels) is in the `chart`
//! module.

use neckline_core::assess::Zone;
use neckline_core::strain::{StrainMeasure, TrueStrain};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::{register_font, FontStyle};
use std::io::{self, Write};
use std::sync::Once;

/// The font family the pictures use. The embedded DejaVu Sans is registered under this name for
/// the PNG; an SVG viewer reads it as a CSS font list and falls back to any sans-serif font.
pub const FONT: &str = "DejaVu Sans, sans-serif";

/// Size of both pictures, pixels (SVG user units are the same).
pub const SIZE: (u32, u32) = (1200, 860);

/// Register the embedded DejaVu Sans (Bitstream Vera licence, shipped by the `dejavu` crate) with
/// plotters' `ab_glyph` text renderer. No system font or fontconfig is involved. Idempotent.
pub fn register_fonts() {
    static ONCE: Once = Once::new();
    ONCE.call_once(|| {
        // The bytes are a valid TrueType font compiled into the binary; a failure here would
        // show as missing text, which the PNG text test catches.
        let _ = register_font(FONT, FontStyle::Normal, dejavu::sans::regular());
        let _ = register_font(FONT, FontStyle::Bold, dejavu::sans::bold());
    });
}

/// A text style in the embedded font.
pub fn text(size: f64) -> TextStyle<'static> {
    TextStyle::from((FONT, size).into_font()).color(&BLACK)
}

/// A bold text style in the embedded font.
pub fn bold(size: f64) -> TextStyle<'static> {
    TextStyle::from((FONT, size, FontStyle::Bold).into_font()).color(&BLACK)
}

/// neckline's zone colours: Paul Tol's "bright" scheme (Tol 2021, "Colour Schemes",
/// SRON/EPS/TN/09-002), made to stay apart for colour-blind readers. The three zone colours
/// carry the meanings of the ISO 3864-1 safety colours: red danger, yellow warning, green
/// safe condition; the neutral zones are grey. Shape, not colour, is the first cue.
pub mod palette {
    use plotters::style::RGBColor;
    /// Red: danger (failed).
    pub const RED: RGBColor = RGBColor(0xEE, 0x66, 0x77);
    /// Yellow: warning (marginal).
    pub const YELLOW: RGBColor = RGBColor(0xCC, 0xBB, 0x44);
    /// Green: safe condition (safe).
    pub const GREEN: RGBColor = RGBColor(0x22, 0x88, 0x33);
    /// Grey: no verdict (uncovered).
    pub const GREY: RGBColor = RGBColor(0xBB, 0xBB, 0xBB);
    /// Dark grey: the neutral hollow markers (thickening, low-stretch).
    pub const NEUTRAL: RGBColor = RGBColor(0x44, 0x44, 0x44);
    /// Blue: not a zone (margin improved, in comparisons).
    pub const BLUE: RGBColor = RGBColor(0x44, 0x77, 0xAA);
    /// Purple: not a zone (margin worsened, in comparisons).
    pub const PURPLE: RGBColor = RGBColor(0xAA, 0x33, 0x77);
}

/// Colours of the Okabe-Ito set (Okabe & Ito 2008, "Color Universal Design", J*Fly), for
/// pictures of things that are not zones (observed conditions of a press-shop curve).
pub mod okabe_ito {
    use plotters::style::RGBColor;
    /// Vermillion.
    pub const VERMILLION: RGBColor = RGBColor(0xD5, 0x5E, 0x00);
    /// Orange.
    pub const ORANGE: RGBColor = RGBColor(0xE6, 0x9F, 0x00);
    /// Reddish purple.
    pub const PURPLE: RGBColor = RGBColor(0xCC, 0x79, 0xA7);
    /// Bluish green.
    pub const GREEN: RGBColor = RGBColor(0x00, 0x9E, 0x73);
}

/// The colour of a zone, the same on every picture and page.
pub fn zone_colour(z: Zone) -> RGBColor {
    use palette::*;
    match z {
        Zone::Failed => RED,
        Zone::Marginal => YELLOW,
        Zone::Uncovered => GREY,
        Zone::Thickening | Zone::LowStretch => NEUTRAL,
        Zone::Safe => GREEN,
    }
}

/// The colour as `#rrggbb`.
pub fn hex(c: RGBColor) -> String {
    format!("#{:02x}{:02x}{:02x}", c.0, c.1, c.2)
}

/// Marker shape of each zone: the first cue, so that zones differ in greyscale and for
/// colour-blind readers. The filled shapes follow the ISO 3864-1 sign shapes of their
/// meaning; the neutral zones are hollow.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// A filled disc crossed by a white bar (prohibition sign): failed.
    Barred,
    /// A filled triangle, point up (warning sign): marginal.
    Triangle,
    /// A filled diamond: uncovered.
    Diamond,
    /// A hollow triangle, point down: thickening.
    HollowTriangleDown,
    /// A hollow circle: low-stretch.
    Ring,
    /// A filled square (safe-condition sign): safe.
    Square,
}

impl Shape {
    /// Whether the shape is drawn as an outline only (in the neutral colour).
    pub fn hollow(self) -> bool {
        matches!(self, Shape::HollowTriangleDown | Shape::Ring)
    }
}

/// The shape of a zone's marker.
pub fn zone_shape(z: Zone) -> Shape {
    match z {
        Zone::Failed => Shape::Barred,
        Zone::Marginal => Shape::Triangle,
        Zone::Uncovered => Shape::Diamond,
        Zone::Thickening => Shape::HollowTriangleDown,
        Zone::LowStretch => Shape::Ring,
        Zone::Safe => Shape::Square,
    }
}

/// Result of drawing on an area.
pub type DrawResult<DB> = Result<(), DrawingAreaErrorKind<<DB as DrawingBackend>::ErrorType>>;

/// Draw a marker of `shape` centred at pixel `c` with half-size `r`: filled with `fill` and
/// outlined in `edge`; a hollow shape is an outline in `fill`.
pub fn marker<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    shape: Shape,
    c: (i32, i32),
    r: i32,
    fill: RGBColor,
    edge: RGBColor,
) -> DrawResult<DB> {
    let (x, y) = c;
    let outline = edge.stroke_width(1);
    match shape {
        Shape::Barred => {
            area.draw(&Circle::new((x, y), r + 1, fill.filled()))?;
            area.draw(&Circle::new((x, y), r + 1, outline))?;
            let k = (r as f64 * 0.7).round() as i32;
            area.draw(&PathElement::new(
                vec![(x - k, y - k), (x + k, y + k)],
                WHITE.stroke_width(2),
            ))
        }
        Shape::Triangle => {
            let pts = vec![(x, y - r - 2), (x + r + 2, y + r), (x - r - 2, y + r)];
            area.draw(&Polygon::new(pts.clone(), fill.filled()))?;
            area.draw(&PathElement::new(closed(pts), outline))
        }
        Shape::Diamond => {
            let pts = vec![
                (x, y - r - 1),
                (x + r + 1, y),
                (x, y + r + 1),
                (x - r - 1, y),
            ];
            area.draw(&Polygon::new(pts.clone(), fill.filled()))?;
            area.draw(&PathElement::new(closed(pts), outline))
        }
        Shape::Square => {
            let rr = r - 1;
            let corners = [(x - rr, y - rr), (x + rr, y + rr)];
            area.draw(&Rectangle::new(corners, fill.filled()))?;
            area.draw(&Rectangle::new(corners, outline))
        }
        Shape::HollowTriangleDown => {
            let pts = vec![(x, y + r + 1), (x + r + 1, y - r), (x - r - 1, y - r)];
            area.draw(&PathElement::new(closed(pts), fill.stroke_width(2)))
        }
        Shape::Ring => area.draw(&Circle::new((x, y), r, fill.stroke_width(2))),
    }
}

fn closed(mut pts: Vec<(i32, i32)>) -> Vec<(i32, i32)> {
    if let Some(&first) = pts.first() {
        pts.push(first);
    }
    pts
}

/// A dashed black ring of radius `r` round a borderline location's marker (its zone could
/// change within the reading error).
pub fn borderline_ring<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: (i32, i32),
    r: i32,
) -> DrawResult<DB> {
    let pts: Vec<(i32, i32)> = (0..=48)
        .map(|k| {
            let t = k as f64 / 48.0 * std::f64::consts::TAU;
            (
                c.0 + (r as f64 * t.cos()).round() as i32,
                c.1 + (r as f64 * t.sin()).round() as i32,
            )
        })
        .collect();
    for d in dashes(&pts, 4.0, 3.0) {
        root.draw(&PathElement::new(d, BLACK.stroke_width(1)))?;
    }
    Ok(())
}

/// An arrowhead at `to`, pointing away from `from`.
pub fn arrowhead<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    from: (i32, i32),
    to: (i32, i32),
    colour: RGBColor,
) -> DrawResult<DB> {
    let (dx, dy) = ((to.0 - from.0) as f64, (to.1 - from.1) as f64);
    let len = dx.hypot(dy);
    if len < 6.0 {
        return Ok(());
    }
    let (ux, uy) = (dx / len, dy / len);
    let back = (to.0 as f64 - 10.0 * ux, to.1 as f64 - 10.0 * uy);
    let side = |s: f64| {
        (
            (back.0 - 4.5 * s * uy).round() as i32,
            (back.1 + 4.5 * s * ux).round() as i32,
        )
    };
    root.draw(&Polygon::new(
        vec![to, side(1.0), side(-1.0)],
        colour.filled(),
    ))
}

/// A plus centred at `c` with arms `arm` pixels long: the mark of a location with no zone
/// (measured in one tryout only), a shape no zone uses.
pub fn plus<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: (i32, i32),
    arm: i32,
    style: ShapeStyle,
) -> DrawResult<DB> {
    root.draw(&PathElement::new(
        vec![(c.0 - arm, c.1), (c.0 + arm, c.1)],
        style,
    ))?;
    root.draw(&PathElement::new(
        vec![(c.0, c.1 - arm), (c.0, c.1 + arm)],
        style,
    ))
}

/// A true strain (fraction) as a diagram coordinate: percent in the axis `measure`.
pub fn axis_value(measure: StrainMeasure, true_strain: f64) -> f64 {
    measure.from_true(TrueStrain(true_strain)) * 100.0
}

/// A tick label: as many decimals as an axis spanning `span` needs (none from 20 up).
pub fn tick(v: f64, span: f64) -> String {
    let d = if span >= 20.0 {
        0
    } else if span >= 2.0 {
        1
    } else {
        2
    };
    let s = format!("{v:.d$}");
    // No "-0".
    if s.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        s.trim_start_matches('-').to_string()
    } else {
        s
    }
}

/// The axis title word for a measure.
pub fn measure_word(measure: StrainMeasure) -> &'static str {
    match measure {
        StrainMeasure::Engineering => "engineering",
        StrainMeasure::True => "true",
    }
}

/// Clip the segment `p`-`q` to the box `[x0, x1] × [y0, y1]` (Liang & Barsky 1984, Computer
/// Vision, Graphics and Image Processing 8(1)); `None` when it lies outside.
pub fn clip_segment(
    p: (f64, f64),
    q: (f64, f64),
    x: (f64, f64),
    y: (f64, f64),
) -> Option<((f64, f64), (f64, f64))> {
    let (dx, dy) = (q.0 - p.0, q.1 - p.1);
    let (mut t0, mut t1) = (0.0_f64, 1.0_f64);
    for (den, num) in [
        (-dx, p.0 - x.0),
        (dx, x.1 - p.0),
        (-dy, p.1 - y.0),
        (dy, y.1 - p.1),
    ] {
        if den.abs() < 1e-300 {
            if num < 0.0 {
                return None;
            }
        } else {
            let t = num / den;
            if den < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
        }
    }
    (t0 <= t1).then_some((
        (p.0 + t0 * dx, p.1 + t0 * dy),
        (p.0 + t1 * dx, p.1 + t1 * dy),
    ))
}

/// Clip a polyline to a box: the visible runs, each with at least two points.
pub fn clip_polyline(line: &[(f64, f64)], x: (f64, f64), y: (f64, f64)) -> Vec<Vec<(f64, f64)>> {
    let mut runs: Vec<Vec<(f64, f64)>> = Vec::new();
    let mut current: Vec<(f64, f64)> = Vec::new();
    for w in line.windows(2) {
        if !(w[0].0.is_finite() && w[0].1.is_finite() && w[1].0.is_finite() && w[1].1.is_finite()) {
            continue;
        }
        match clip_segment(w[0], w[1], x, y) {
            Some((a, b)) => {
                if current.last().is_none_or(|l| dist(*l, a) > 1e-9) {
                    if current.len() >= 2 {
                        runs.push(std::mem::take(&mut current));
                    }
                    current = vec![a];
                }
                current.push(b);
            }
            None => {
                if current.len() >= 2 {
                    runs.push(std::mem::take(&mut current));
                }
                current.clear();
            }
        }
    }
    if current.len() >= 2 {
        runs.push(current);
    }
    runs
}

fn dist(a: (f64, f64), b: (f64, f64)) -> f64 {
    (a.0 - b.0).hypot(a.1 - b.1)
}

/// Convex hull (Andrew's monotone chain, Andrew 1979, Inf. Process. Lett. 9(5)), closed.
pub fn hull(pts: &[(f64, f64)]) -> Vec<(f64, f64)> {
    let mut p = pts.to_vec();
    p.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
    p.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-12 && (a.1 - b.1).abs() < 1e-12);
    if p.len() < 3 {
        return p;
    }
    let cross = |o: (f64, f64), a: (f64, f64), b: (f64, f64)| {
        (a.0 - o.0) * (b.1 - o.1) - (a.1 - o.1) * (b.0 - o.0)
    };
    let mut h: Vec<(f64, f64)> = Vec::new();
    for pass in [p.clone(), p.iter().rev().copied().collect()] {
        let start = h.len();
        for q in pass {
            while h.len() >= start + 2 && cross(h[h.len() - 2], h[h.len() - 1], q) <= 0.0 {
                h.pop();
            }
            h.push(q);
        }
        h.pop();
    }
    h.push(h[0]);
    h
}

/// Cut a pixel polyline into dashes `on` pixels long with `off` pixel gaps.
pub fn dashes(path: &[(i32, i32)], on: f64, off: f64) -> Vec<Vec<(i32, i32)>> {
    let mut out = Vec::new();
    let mut current: Vec<(i32, i32)> = Vec::new();
    let (mut drawing, mut left) = (true, on);
    for w in path.windows(2) {
        let (a, b) = (
            (w[0].0 as f64, w[0].1 as f64),
            (w[1].0 as f64, w[1].1 as f64),
        );
        let len = dist(a, b);
        let mut done = 0.0;
        while done < len {
            let step = left.min(len - done);
            let t0 = done / len;
            let t1 = (done + step) / len;
            let at = |t: f64| {
                (
                    (a.0 + t * (b.0 - a.0)).round() as i32,
                    (a.1 + t * (b.1 - a.1)).round() as i32,
                )
            };
            if drawing {
                if current.is_empty() {
                    current.push(at(t0));
                }
                current.push(at(t1));
            }
            done += step;
            left -= step;
            if left <= 1e-9 {
                if drawing && current.len() >= 2 {
                    out.push(std::mem::take(&mut current));
                }
                current.clear();
                drawing = !drawing;
                left = if drawing { on } else { off };
            }
        }
    }
    if current.len() >= 2 {
        out.push(current);
    }
    out
}

/// A rectangle in pixels: left, top, right, bottom.
pub type Rect = (i32, i32, i32, i32);

/// Encode an RGB buffer as PNG.
pub fn write_png(rgb: &[u8], size: (u32, u32), out: &mut dyn Write) -> io::Result<()> {
    use image::ImageEncoder;
    image::codecs::png::PngEncoder::new(out)
        .write_image(rgb, size.0, size.1, image::ColorType::Rgb8)
        .map_err(io::Error::other)
}

/// Render `draw` to an SVG document.
pub fn render_svg(
    size: (u32, u32),
    draw: impl for<'b> FnOnce(&DrawingArea<SVGBackend<'b>, Shift>) -> DrawResult<SVGBackend<'b>>,
) -> io::Result<String> {
    register_fonts();
    let mut s = String::new();
    {
        let root = SVGBackend::with_string(&mut s, size).into_drawing_area();
        draw(&root).map_err(|e| io::Error::other(e.to_string()))?;
        root.present()
            .map_err(|e| io::Error::other(e.to_string()))?;
    }
    Ok(scale_font_sizes(&s, SVG_FONT_SCALE))
}

/// plotters lays text out with the glyph scale of `ab_glyph`, where a size `s` spans the font's
/// ascent-to-descent height, i.e. an em of `s / 1.164` for DejaVu Sans ((1901 + 483) / 2048
/// units, from the font's `hhea` table), but writes `font-size = s / 1.24` into SVG. Scaling the
/// SVG sizes by 1.24 / 1.164 makes SVG text as wide as the boxes laid out for it.
pub const SVG_FONT_SCALE: f64 = 1.24 / 1.164;

/// Multiply every `font-size="…"` in an SVG document by `k`.
pub fn scale_font_sizes(svg: &str, k: f64) -> String {
    const KEY: &str = "font-size=\"";
    let mut out = String::with_capacity(svg.len());
    let mut rest = svg;
    while let Some(i) = rest.find(KEY) {
        let (head, tail) = rest.split_at(i + KEY.len());
        out.push_str(head);
        let end = tail.find('"').unwrap_or(0);
        match tail[..end].parse::<f64>() {
            Ok(v) => out.push_str(&format!("{:.2}", v * k)),
            Err(_) => out.push_str(&tail[..end]),
        }
        rest = &tail[end..];
    }
    out.push_str(rest);
    out
}

/// Render `draw` to a PNG image.
pub fn render_png(
    size: (u32, u32),
    draw: impl for<'b> FnOnce(&DrawingArea<BitMapBackend<'b>, Shift>) -> DrawResult<BitMapBackend<'b>>,
) -> io::Result<Vec<u8>> {
    register_fonts();
    let mut rgb = vec![0u8; (size.0 * size.1 * 3) as usize];
    {
        let root = BitMapBackend::with_buffer(&mut rgb, size).into_drawing_area();
        draw(&root).map_err(|e| io::Error::other(e.to_string()))?;
        root.present()
            .map_err(|e| io::Error::other(e.to_string()))?;
    }
    let mut png = Vec::new();
    write_png(&rgb, size, &mut png)?;
    Ok(png)
}

/// Wrap `text` into lines of at most `width` pixels in `style`.
pub fn wrap_px<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    text: &str,
    style: &TextStyle,
    width: u32,
) -> Vec<String> {
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let trial = if line.is_empty() {
            word.to_string()
        } else {
            format!("{line} {word}")
        };
        let w = area.estimate_text_size(&trial, style).map_or(0, |s| s.0);
        if w > width && !line.is_empty() {
            lines.push(std::mem::replace(&mut line, word.to_string()));
        } else {
            line = trial;
        }
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// Shorten `text` with an ellipsis so that it fits `width` pixels.
pub fn fit_px<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    text: &str,
    style: &TextStyle,
    width: u32,
) -> String {
    let fits = |s: &str| {
        area.estimate_text_size(s, style)
            .map_or(true, |d| d.0 <= width)
    };
    // No glyph is narrower than a pixel, so more than `width` characters never fit: measure
    // only that many (a 5 MB id measured again for every character took hours).
    let chars: Vec<char> = text.chars().take(width as usize + 1).collect();
    if chars.len() <= width as usize && fits(text) {
        return text.to_string();
    }
    let mut n = chars.len();
    while n > 1 {
        n -= 1;
        let s: String = chars[..n].iter().collect::<String>() + "…";
        if fits(&s) {
            return s;
        }
    }
    "…".into()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Each zone's marker alone, 24 × 24 px, as greyscale (ITU-R BT.601 luma,
    /// Y = 0.299 R + 0.587 G + 0.114 B).
    fn grey_marker(z: Zone) -> Vec<u8> {
        let png = render_png((24, 24), |root| {
            root.fill(&WHITE)?;
            marker(root, zone_shape(z), (12, 12), 6, zone_colour(z), BLACK)
        })
        .unwrap();
        let img = image::load_from_memory(&png).unwrap().to_rgb8();
        img.pixels()
            .map(|p| {
                let [r, g, b] = p.0;
                (0.299 * f64::from(r) + 0.587 * f64::from(g) + 0.114 * f64::from(b)).round() as u8
            })
            .collect()
    }

    // Shape first: in greyscale (a black-and-white print), every zone's marker differs from
    // every other's in at least 20 pixels by more than a quarter of the grey range.
    #[test]
    fn zones_stay_apart_in_greyscale() {
        let greys: Vec<Vec<u8>> = Zone::ALL.iter().map(|z| grey_marker(*z)).collect();
        for i in 0..greys.len() {
            for j in i + 1..greys.len() {
                let differ = greys[i]
                    .iter()
                    .zip(&greys[j])
                    .filter(|(a, b)| a.abs_diff(**b) > 64)
                    .count();
                assert!(
                    differ >= 20,
                    "{} and {} differ in {differ} pixels only",
                    Zone::ALL[i],
                    Zone::ALL[j]
                );
            }
        }
    }

    // One zone, one colour, shared by all; the neutral zones are hollow.
    #[test]
    fn neutral_zones_are_hollow_and_grey() {
        for z in [Zone::Thickening, Zone::LowStretch] {
            assert!(zone_shape(z).hollow());
            assert_eq!(zone_colour(z), palette::NEUTRAL);
        }
        assert_eq!(zone_colour(Zone::Uncovered), palette::GREY);
        // Six zones, six different shapes: a set holds each shape once.
        let shapes: std::collections::HashSet<String> = Zone::ALL
            .iter()
            .map(|z| format!("{:?}", zone_shape(*z)))
            .collect();
        assert_eq!(shapes.len(), 6, "{shapes:?}");
    }

    #[test]
    fn clip_keeps_inside_part() {
        let s = clip_segment((-1.0, 0.5), (2.0, 0.5), (0.0, 1.0), (0.0, 1.0)).unwrap();
        assert!((s.0 .0 - 0.0).abs() < 1e-12 && (s.1 .0 - 1.0).abs() < 1e-12);
        assert!(clip_segment((-1.0, 2.0), (2.0, 2.0), (0.0, 1.0), (0.0, 1.0)).is_none());
    }

    #[test]
    fn hull_of_square_with_inner_point() {
        let h = hull(&[(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0), (0.5, 0.5)]);
        assert_eq!(h.len(), 5); // four corners, closed
        assert!(!h.contains(&(0.5, 0.5)));
    }
    #[test]
    fn dashes_alternate() {
        let d = dashes(&[(0, 0), (100, 0)], 10.0, 5.0);
        // 100 px of 10 on + 5 off: dashes start at 0, 15, 30, 45, 60, 75, 90 -> 7 dashes.
        assert_eq!(d.len(), 7);
        assert_eq!(d[1][0], (15, 0));
    }

    #[test]
    fn font_sizes_are_scaled() {
        let s = scale_font_sizes("<text font-size=\"10\" x=\"1\">a</text>", 1.5);
        assert_eq!(s, "<text font-size=\"15.00\" x=\"1\">a</text>");
    }
}
