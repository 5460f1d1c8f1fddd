//! The forming-limit diagram (`fld.svg`, `fld.png`): minor strain across, major strain up, in
//! engineering percent (or true strain on request), with the limit curve, the safety band,
//! reference strain paths, thinning iso-lines, every location marked by zone, the worst labelled.
//!
//! Lines drawn, all from true strains ε1 ≥ ε2 mapped to the axis measure
//! (engineering e = exp ε − 1; any continuum mechanics text):
//! - reference strain paths through the origin: uniaxial tension β = ε2/ε1 = −1/2, plane strain
//!   β = 0, equibiaxial β = 1, constant thickness ε1 = −ε2 (common practice on press-shop FLDs);
//! - thinning iso-lines: thinning s = 1 − t/t0 = 1 − exp(−(ε1 + ε2)), so
//!   ε1 + ε2 = −ln(1 − s) (plastic incompressibility);
//! - the safety band: the curve's engineering major strain minus the margin setting.

use crate::chart::footer::draw_analysis_footer;
use crate::chart::frame::{Frame, Look};
use crate::chart::label::{Label, Leader, Placer};
use crate::chart::legend::{Key, Legend, Row, COUNTED, LINES};
use crate::chart::title::{draw_title, job_lines};
use crate::chart::{self, Stroke, PANEL_LEFT, SIZE, TITLE_H};
use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use neckline_core::point::PointResult;
use neckline_core::strain::StrainMeasure;
use neckline_core::summary::point_xy;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

mod lines;
pub use lines::{
    band_line, curve_line, reference_paths, scatter_band, thinning_line, true_strain_frame, Line,
    THINNING_LINES,
};

/// What the diagram shows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FldOptions {
    /// Strain measure of both axes.
    pub measure: StrainMeasure,
    /// How many of the worst locations carry their id.
    pub labelled: usize,
    /// Only the curve(s) and the reference lines: no locations, zone legend or safety band
    /// (a curve drawn on its own, `limit --plot`).
    pub curve_only: bool,
}

impl Default for FldOptions {
    fn default() -> Self {
        FldOptions {
            measure: StrainMeasure::Engineering,
            labelled: 6,
            curve_only: false,
        }
    }
}

/// The safety band's label in the measure plotted: the band is set in percentage points of
/// engineering major strain, so on true-strain axes it is drawn converted and says so.
pub fn band_label(a: &Analysis, m: StrainMeasure) -> String {
    let b = neckline_core::output::fmt_setting(a.settings.margin_pct);
    match m {
        StrainMeasure::Engineering => format!("safety band −{b} pp"),
        StrainMeasure::True => format!("safety band −{b} pp eng. (in true strain)"),
    }
}

/// A margin in the measure plotted, percentage points: the engineering margin itself, or on
/// true-strain axes `ln(1 + e1,limit) − ln(1 + e1)` (same sign: ln is increasing).
pub fn margin_in(p: &PointResult, m: StrainMeasure) -> Option<f64> {
    let lim = p.judgement.limit_major?;
    match m {
        StrainMeasure::Engineering => p.judgement.margin_pct,
        StrainMeasure::True => {
            Some(100.0 * ((1.0 + lim.value()).ln() - p.strain.true_strain.major.value()))
        }
    }
}

/// The diagram as an SVG document.
pub fn fld_svg(a: &Analysis, opts: &FldOptions) -> io::Result<String> {
    plot::render_svg(SIZE, |root| draw(root, a, opts))
}

/// The diagram as a PNG image.
pub fn fld_png(a: &Analysis, opts: &FldOptions) -> io::Result<Vec<u8>> {
    plot::render_png(SIZE, |root| draw(root, a, opts))
}

fn round_out(lo: f64, hi: f64, step: f64) -> (f64, f64) {
    ((lo / step).floor() * step, (hi / step).ceil() * step)
}

/// Axis ranges that hold every location and the whole curve, with some air.
pub fn ranges(a: &Analysis, measure: StrainMeasure) -> ((f64, f64), (f64, f64)) {
    let extent: Vec<(f64, f64)> = match a.summary.extent {
        Some(e) if a.summary.view.measure == measure => vec![(e[0], e[1]), (e[2], e[3])],
        _ => a.points().iter().map(|p| point_xy(p, measure)).collect(),
    };
    let pts: Vec<(f64, f64)> = extent
        .into_iter()
        .chain(curve_line(a, measure))
        .filter(|p| p.0.is_finite() && p.1.is_finite())
        .collect();
    let fold = |f: fn(&(f64, f64)) -> f64, init: f64, pick: fn(f64, f64) -> f64| {
        pts.iter().map(f).fold(init, pick)
    };
    let x = round_out(
        fold(|p| p.0, 0.0, f64::min) - 4.0,
        fold(|p| p.0, 0.0, f64::max) + 4.0,
        5.0,
    );
    let y = round_out(
        fold(|p| p.1, 0.0, f64::min) - 4.0,
        fold(|p| p.1, 0.0, f64::max) * 1.08 + 4.0,
        5.0,
    );
    (x, y)
}

fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let m = opts.measure;
    let (xr, yr) = ranges(a, m);
    let word = plot::measure_word(m);
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: format!("minor strain ε2, {word} %"),
        y_desc: format!("major strain ε1, {word} %"),
        look: Look::Diagram,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    // The density goes first: every line (the curve and the band above all) is drawn over it.
    if draws_density(a, m) && !opts.curve_only {
        draw_density(root, a, &px, (xr.1 - xr.0).max(yr.1 - yr.0))?;
    }
    let mut line_labels: Vec<(String, (i32, i32), RGBColor)> = Vec::new();
    let stroke = |line: &Line, stroke: Stroke| -> Result<_, DrawingAreaErrorKind<DB::ErrorType>> {
        let runs = plot.runs(line);
        for run in &runs {
            stroke.draw(root, run)?;
        }
        Ok(runs.last().and_then(|r| r.last()).copied())
    };
    for pct in THINNING_LINES {
        if let Some(end) = stroke(&thinning_line(pct, m), chart::THINNING)? {
            line_labels.push((format!("{pct:.0} % thinning"), end, chart::GREY));
        }
    }
    for (name, line) in reference_paths(m) {
        if let Some(end) = stroke(&line, chart::REFERENCE)? {
            line_labels.push((name.to_string(), end, chart::GREY));
        }
    }
    if let Some(max) = a.settings.max_thinning_pct.filter(|_| !opts.curve_only) {
        if let Some(end) = stroke(&thinning_line(max, m), chart::MAX_THINNING)? {
            line_labels.push((max_thinning_label(max), end, chart::MAX_THINNING_INK));
        }
    }
    let band = if opts.curve_only {
        Vec::new()
    } else {
        plot.runs(&band_line(a, m))
    };
    for run in &band {
        chart::BAND.draw(root, run)?;
    }
    if let Some(outline) = scatter_band(a, m) {
        let clipped: Vec<(f64, f64)> = outline
            .iter()
            .map(|p| (p.0.clamp(xr.0, xr.1), p.1.clamp(yr.0, yr.1)))
            .collect();
        let poly: Vec<(i32, i32)> = clipped.iter().map(|p| px(*p)).collect();
        root.draw(&Polygon::new(poly, SCATTER.filled()))?;
    }
    let curve = plot.runs(&curve_line(a, m));
    for run in &curve {
        chart::CURVE.draw(root, run)?;
    }
    let mut placer = plot.placer();
    if !opts.curve_only {
        draw_points(root, a, m, &px, &mut placer)?;
        draw_paths(root, a, opts, &px)?;
        draw_observed(root, a, m, &px)?;
        draw_worst_labels(root, a, opts, &px, &mut placer)?;
    }
    if let Some(end) = curve.first().and_then(|r| r.iter().min_by_key(|p| p.1)) {
        line_labels.push(("limit curve".into(), *end, BLACK));
    }
    if let Some(end) = band.last().and_then(|r| r.last()) {
        line_labels.push((band_label(a, m), *end, BLACK));
    }
    for (text, anchor, colour) in &line_labels {
        let style = plot::text(13.0).color(colour);
        Label::LINE.draw(root, &mut placer, *anchor, text, &style)?;
    }
    let (part, second, third) = job_lines(a);
    let third = format!("{third}  ({word} strain axes)");
    draw_title(
        root,
        [&format!("Forming-limit diagram: {part}"), &second, &third],
    )?;
    legend(root, a, opts).draw(root)?;
    draw_analysis_footer(root, a)
}

/// The fill of a laboratory curve's scatter band (a light grey under the curve).
const SCATTER: RGBColor = RGBColor(0xDD, 0xDD, 0xDD);

/// The label of the maximum-thinning line.
fn max_thinning_label(max: f64) -> String {
    format!("max thinning {} %", neckline_core::output::fmt_setting(max))
}

/// Cells across the diagram's longer axis when locations are drawn as a density.
pub const DENSITY_CELLS: usize = 110;

/// The locations the diagram marks: every one while the file is small, else the worst and a
/// sample spread over the diagram ([`neckline_core::summary::Summary::markers`]).
pub fn markers(a: &Analysis) -> Vec<&PointResult> {
    a.summary.markers()
}

/// Whether the diagram draws a density (too many locations for a marker each).
pub fn draws_density(a: &Analysis, m: StrainMeasure) -> bool {
    !a.summary.complete && a.summary.view.measure == m
}

/// The density of the locations not drawn as markers: each cell in the colour of the zone
/// most of its locations are in, more opaque the more there are (logarithmic). Failed and
/// marginal locations beyond the markers' cap get cells of their own colour on top.
fn draw_density<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    span: f64,
) -> DrawResult<DB> {
    let mut bins = a.summary.density.clone();
    bins.coarsen_to(span, DENSITY_CELLS);
    let m = a.summary.view.measure;
    let mut kept: std::collections::HashMap<(i64, i64), u32> = Default::default();
    let risk = [Zone::Failed, Zone::Marginal];
    for p in markers(a).into_iter().filter(|p| risk.contains(&p.zone())) {
        let (x, y) = point_xy(p, m);
        *kept.entry(bins.key(x, y)).or_default() += 1;
    }
    let quiet = [
        Zone::Uncovered,
        Zone::Thickening,
        Zone::LowStretch,
        Zone::Safe,
    ];
    // Per cell: key, quiet population and its main zone, at-risk overflow and its zone.
    type Shade = ((i64, i64), u32, Zone, u32, Zone);
    let cells: Vec<Shade> = bins
        .cells()
        .iter()
        .map(|(k, c)| {
            let n = |z: Zone| c.0[z as usize];
            let pop: u32 = quiet.iter().map(|z| n(*z)).sum();
            let top = *quiet.iter().max_by_key(|z| n(**z)).unwrap_or(&Zone::Safe);
            let over = risk
                .iter()
                .map(|z| n(*z))
                .sum::<u32>()
                .saturating_sub(kept.get(k).copied().unwrap_or(0));
            let rz = if n(Zone::Failed) > 0 {
                Zone::Failed
            } else {
                Zone::Marginal
            };
            (*k, pop, top, over, rz)
        })
        .collect();
    let most = cells.iter().map(|c| c.1.max(c.3)).max().unwrap_or(1).max(1) as f64;
    let size = bins.size();
    for risky in [false, true] {
        for (k, pop, top, over, rz) in &cells {
            let (n, z) = if risky { (*over, *rz) } else { (*pop, *top) };
            if n == 0 {
                continue;
            }
            let (x0, y0) = bins.corner(*k);
            let (a0, b0) = px((x0, y0 + size));
            let (a1, b1) = px((x0 + size, y0));
            let alpha = 0.25 + 0.7 * (1.0 + n as f64).ln() / (1.0 + most).ln();
            root.draw(&Rectangle::new(
                [(a0, b0), (a1.max(a0 + 1), b1.max(b0 + 1))],
                zone_colour(z).mix(alpha).filled(),
            ))?;
        }
    }
    Ok(())
}

fn draw_points<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    m: StrainMeasure,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    // Best zones first, so that the worst are drawn on top.
    for zone in Zone::ALL.iter().rev() {
        for p in markers(a).into_iter().filter(|p| p.zone() == *zone) {
            let c = px(point_xy(p, m));
            marker(root, zone_shape(*zone), c, 5, zone_colour(*zone), BLACK)?;
            if p.judgement.borderline {
                plot::borderline_ring(root, c, 11)?;
            }
            placer.avoid(c, 6);
        }
    }
    Ok(())
}

/// A ring round each location observed necked or split on the part, in its zone's colour.
fn draw_observed<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    m: StrainMeasure,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
) -> DrawResult<DB> {
    for p in &a.summary.observed_failed {
        let c = px(point_xy(p, m));
        root.draw(&Circle::new(c, 10, zone_colour(p.zone()).stroke_width(2)))?;
    }
    Ok(())
}

/// The strain path of each labelled worst location measured after several stages: a line from
/// the origin through its strains after each stage, a dot at each stage.
fn draw_paths<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
) -> DrawResult<DB> {
    let ink = RGBColor(60, 60, 60);
    for p in a.worst(opts.labelled) {
        let Some(j) = &p.path else { continue };
        let mut line = vec![px((0.0, 0.0))];
        for s in &j.stages {
            let at = (
                plot::axis_value(opts.measure, s[0]),
                plot::axis_value(opts.measure, s[1]),
            );
            line.push(px(at));
        }
        root.draw(&PathElement::new(line.clone(), ink.stroke_width(2)))?;
        for c in &line[1..] {
            root.draw(&Circle::new(*c, 3, ink.filled()))?;
        }
    }
    Ok(())
}

/// Label text of a worst location: its id and why it is in its zone; a margin is in the
/// measure plotted and never printed across its zone's edges (see [`neckline_core::output::fmt_margin`]).
pub fn worst_label(
    p: &PointResult,
    st: &neckline_core::assess::Settings,
    m: StrainMeasure,
) -> String {
    use neckline_core::assess::Reason;
    let id = &p.input.id;
    match (p.judgement.reason, margin_in(p, m)) {
        (Reason::Curve | Reason::Band | Reason::None, Some(mg)) => match m {
            StrainMeasure::Engineering => {
                format!(
                    "{id} ({} pp)",
                    neckline_core::output::fmt_margin(mg, st.margin_pct)
                )
            }
            // On true axes only the curve is an edge of the same value (0).
            StrainMeasure::True => format!(
                "{id} ({} pp true)",
                neckline_core::output::fmt_against(mg, &[(0.0, true)], 1)
            ),
        },
        _ => format!("{id}: {}", neckline_core::output::reason_text(p, st)),
    }
}

fn draw_worst_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let style = plot::bold(15.0);
    for p in a.worst(opts.labelled) {
        let c = px(point_xy(p, opts.measure));
        let text = worst_label(p, &a.settings, opts.measure);
        let label = Label::boxed(zone_colour(p.zone())).leader(Leader::Beyond(8));
        label.draw(root, placer, c, &text, &style)?;
    }
    Ok(())
}

/// The legend: zones with their counts, the lines, the worst locations.
fn legend<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
) -> Legend {
    let x = PANEL_LEFT;
    let mut l = Legend::new(x, TITLE_H + 16);
    if !opts.curve_only {
        l.heading("Zones (locations)", 16.0, 28);
        if draws_density(a, opts.measure) {
            let note = format!(
                "shaded cells: density of {} locations; markers: {} failed or marginal",
                a.total(),
                markers(a).len()
            );
            l.note(root, &note, plot::text(12.0), 300, 15).gap(6);
        }
        for (zone, n) in a.counts() {
            l.push(Row::counted(Key::zone(zone), zone.name(), n, &COUNTED));
        }
        let borderline = a.borderline().1;
        if borderline > 0 {
            let ring = Key::Borderline { at: (10, 8), r: 9 };
            l.push(Row::counted(ring, "borderline", borderline, &COUNTED));
        }
        l.gap(12);
    }
    l.heading("Lines", 16.0, 26);
    let line =
        |stroke: Stroke, text: String| Row::entry(Key::Line { stroke, len: 40 }, text, &LINES);
    l.push(line(chart::CURVE, "limit curve".into()));
    if a.curve.scatter.is_some() {
        l.push(Row::entry(
            Key::Patch(SCATTER.filled()),
            "curve scatter (± 1 s.d.)",
            &LINES,
        ));
    }
    if !opts.curve_only {
        l.push(line(chart::BAND, band_label(a, opts.measure)));
        if let Some(max) = a.settings.max_thinning_pct {
            l.push(line(chart::MAX_THINNING, max_thinning_label(max)));
        }
    }
    l.push(line(chart::REFERENCE, "strain paths".into()));
    l.push(line(chart::THINNING, "thinning iso-lines".into()));
    if !a.summary.observed_failed.is_empty() && !opts.curve_only {
        let ring = Key::Circle {
            dx: 20,
            r: 8,
            style: BLACK.stroke_width(2),
        };
        l.push(Row::entry(ring, "observed necked or split", &LINES));
    }
    l.gap(12);
    let worst = a.worst(opts.labelled.max(1));
    if opts.curve_only || worst.is_empty() {
        return l;
    }
    l.heading("Worst: failed first, then margin", 15.0, 24);
    for p in worst {
        let key = Key::Marker {
            shape: zone_shape(p.zone()),
            fill: zone_colour(p.zone()),
            r: 5,
            dx: 6,
        };
        let text = worst_label(p, &a.settings, opts.measure);
        l.push(
            Row::new(20)
                .key(key)
                .left(text, plot::text(13.0), 18)
                .fit(SIZE.0 - x as u32 - 40),
        );
    }
    l
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chart::FOOTER_TOP;
    use crate::plot::hex;
    use neckline_core::output::fixture;

    /// Markers of each zone in an SVG diagram, in [`Zone::ALL`] order (legend markers
    /// included), told apart by their element and fill or stroke: a greyscale reader sees the
    /// same distinct shapes.
    fn marker_counts(svg: &str) -> Vec<usize> {
        let count = |tag: &str, needle: &str| {
            svg.split('<')
                .filter(|e| e.starts_with(tag) && e.contains(needle))
                .count()
        };
        Zone::ALL
            .iter()
            .map(|z| {
                let c = hex(zone_colour(*z)).to_uppercase();
                match zone_shape(*z) {
                    plot::Shape::Barred => {
                        count("circle", &format!("fill=\"{c}\" stroke=\"none\""))
                    }
                    plot::Shape::Square => count("rect", &format!("fill=\"{c}\" stroke=\"none\"")),
                    plot::Shape::Triangle | plot::Shape::Diamond => {
                        count("polygon", &format!("fill=\"{c}\""))
                    }
                    plot::Shape::HollowTriangleDown => {
                        count("polyline", &format!("stroke=\"{c}\" stroke-width=\"2\""))
                    }
                    plot::Shape::Ring => {
                        count("circle", &format!("stroke=\"{c}\" stroke-width=\"2\""))
                    }
                }
            })
            .collect()
    }

    #[test]
    fn svg_holds_curve_every_point_and_labels() {
        let a = fixture::analysis(true);
        let svg = fld_svg(&a, &FldOptions::default()).unwrap();
        // The curve: one black 3-px polyline with every vertex of the true-strain polyline
        // (the axis ranges are built to hold the whole curve, so nothing is clipped).
        let n = a.curve.true_polyline(16).len();
        let curve = svg
            .lines()
            .find(|l| {
                l.contains("stroke=\"#000000\" stroke-width=\"3\"") && l.matches(',').count() > 2
            })
            .expect("curve polyline");
        assert_eq!(curve.matches(',').count(), n, "{curve}");
        // Every point, by zone, +1 for the zone legend's marker, + the worst list's markers.
        let opts = FldOptions::default();
        let expected: Vec<usize> = a
            .counts()
            .iter()
            .map(|(z, n)| {
                n + 1
                    + a.worst(opts.labelled)
                        .iter()
                        .filter(|p| p.zone() == *z)
                        .count()
            })
            .collect();
        assert_eq!(marker_counts(&svg), expected);
        for text in [
            "Forming-limit diagram: TP-1 test panel &lt;LH&gt; &amp; co (invented)",
            "tryout T1",
            "test curve (invented)",
            "limit curve",
            "safety band −10 pp",
            "max thinning 25 %",
            "uniaxial β = −½",
            "plane strain β = 0",
            "equibiaxial β = 1",
            "constant thickness ε1 = −ε2",
            "10 % thinning",
            "20 % thinning",
            "30 % thinning",
            "minor strain ε2, engineering %",
            "Caution: neckline is an aid to judgement.",
        ] {
            assert!(svg.contains(text), "missing `{text}`");
        }
        for p in a.worst(FldOptions::default().labelled) {
            assert!(
                svg.contains(&worst_label(p, &a.settings, StrainMeasure::Engineering)),
                "worst {} not labelled",
                p.input.id
            );
        }
        for (z, n) in a.counts() {
            assert!(svg.contains(z.name()), "legend lacks {z}");
            assert!(
                svg.contains(&format!(">\n{n}\n<")),
                "legend lacks count {n}"
            );
        }
    }

    #[test]
    fn png_has_expected_size_and_text_in_title() {
        let a = fixture::analysis(true);
        let png = fld_png(&a, &FldOptions::default()).unwrap();
        let img = image::load_from_memory(&png).unwrap().to_rgb8();
        assert_eq!((img.width(), img.height()), SIZE);
        // Text pixels in the title band (above the plot): dark pixels exist there only if the
        // embedded font was found and rasterised.
        let dark = |x0: u32, x1: u32, y0: u32, y1: u32| {
            (y0..y1)
                .flat_map(|y| (x0..x1).map(move |x| (x, y)))
                .filter(|&(x, y)| img.get_pixel(x, y).0.iter().all(|&c| c < 100))
                .count()
        };
        let title = dark(0, SIZE.0, 0, TITLE_H as u32);
        assert!(title > 2000, "only {title} dark pixels in the title band");
        // ... and the band is mostly white, so it is text, not a filled block.
        assert!(title < (SIZE.0 * TITLE_H as u32) as usize / 5, "{title}");
        // The footer holds the caution.
        assert!(dark(0, SIZE.0, FOOTER_TOP as u32, SIZE.1) > 500);
    }

    #[test]
    fn true_strain_axes_on_request() {
        let a = fixture::analysis(true);
        let opts = FldOptions {
            measure: StrainMeasure::True,
            ..FldOptions::default()
        };
        let svg = fld_svg(&a, &opts).unwrap();
        assert!(svg.contains("major strain ε1, true %"));
        // A point at engineering (38 %, −5 %) sits at true (32.2 %, −5.13 %): ln 1.38, ln 0.95.
        let p = a.points().iter().find(|p| p.input.id == "F1").unwrap();
        let (x, y) = point_xy(p, StrainMeasure::True);
        assert!((y - 100.0 * 1.38f64.ln()).abs() < 1e-9 && (x - 100.0 * 0.95f64.ln()).abs() < 1e-9);
    }
}
