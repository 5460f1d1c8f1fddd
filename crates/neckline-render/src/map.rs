//! The part map (`map.svg`, `map.png`): every location with `x, y` (or the coordinates of the
//! chosen plane) at its place on the part, coloured by its vertical margin on a continuous
//! scale whose zone boundaries (0 = on the curve, the margin setting = edge of the safety band)
//! are marked (or by its thinning or major strain), shaped by zone, the worst labelled, axes in
//! the job's length unit at equal scale. A large file is drawn as a raster of cells, each
//! coloured by the worst value in it, with the worst locations marked.

use crate::chart::footer::draw_analysis_footer;
use crate::chart::frame::Plot;
use crate::chart::frame::{equal_ranges, Frame, Look};
use crate::chart::label::{label_box, Placer};
use crate::chart::legend::{Key, Legend, Row};
use crate::chart::scale::ColourBar;
use crate::chart::title::{draw_title, job_lines};
use crate::chart::{MAP_PANEL_LEFT as PANEL_LEFT, PART_EDGE, SIZE, TITLE_H};
use crate::fld::worst_label;
use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use neckline_core::hotspot::HotSpot;
use neckline_core::part_outline::{OutlineSource, PartOutline};
use neckline_core::point::PointResult;
use neckline_core::summary::MapPlane;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// How many locations carry their id at least (the worst of each hot spot, then the worst).
pub const LABELLED: usize = 6;

/// Hot spots whose worst location is labelled, at most.
pub const HOT_SPOTS_LABELLED: usize = 8;

/// What the map colours each location (or cell) by.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum MapValue {
    /// The vertical margin to the limit curve, pp (the worst = the smallest).
    #[default]
    Margin,
    /// The thinning, percent of t0 (the worst = the largest).
    Thinning,
    /// The engineering major strain, percent (the worst = the largest).
    Major,
}

/// Cells across the map's longer side when a large file is drawn as a raster.
pub const RASTER_CELLS: usize = 120;

/// Kept locations that have coordinates in the map's plane, with their position.
pub fn placed(a: &Analysis) -> Vec<(&PointResult, (f64, f64))> {
    let plane = a.summary.view.plane;
    a.points()
        .iter()
        .filter_map(|p| Some((p, plane.coords(p)?)))
        .collect()
}

/// The map as SVG, or `None` when no location has coordinates in the map's plane.
pub fn map_svg(a: &Analysis, value: MapValue) -> io::Result<Option<String>> {
    if a.summary.placed == 0 {
        return Ok(None);
    }
    plot::render_svg(SIZE, |root| draw(root, a, value)).map(Some)
}

/// The map as PNG, or `None` when no location has coordinates in the map's plane.
pub fn map_png(a: &Analysis, value: MapValue) -> io::Result<Option<Vec<u8>>> {
    if a.summary.placed == 0 {
        return Ok(None);
    }
    plot::render_png(SIZE, |root| draw(root, a, value)).map(Some)
}

/// A one-hue scale for thinning or major strain: light (low) to dark (high).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Ramp {
    /// Low end.
    pub lo: f64,
    /// High end.
    pub hi: f64,
}

/// Light to dark blue (ColorBrewer "Blues", Brewer, colorbrewer2.org): one hue, and not a zone
/// colour, so a thinning or major-strain map never reads as zones.
const RAMP: (Rgb, Rgb) = ((0xde, 0xeb, 0xf7), (0x08, 0x30, 0x6b));

impl Ramp {
    /// The colour of `v`.
    pub fn colour(&self, v: f64) -> RGBColor {
        let t = if self.hi > self.lo {
            ((v - self.lo) / (self.hi - self.lo)).clamp(0.0, 1.0)
        } else {
            1.0
        };
        let (a, b) = RAMP;
        let mix = |x: u8, y: u8| (x as f64 + t * (y as f64 - x as f64)).round() as u8;
        RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
    }
}

/// The colour of one value on the map's scale.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Scale {
    /// Margin, pp.
    Margin(MarginScale),
    /// Thinning or major strain, percent.
    Ramp(Ramp),
}

impl Scale {
    fn of(a: &Analysis, value: MapValue) -> Self {
        let hi = |v: f64| ((v.max(5.0)) / 5.0).ceil() * 5.0;
        match value {
            MapValue::Margin => Scale::Margin(MarginScale::of(a)),
            MapValue::Thinning => {
                let top = a
                    .summary
                    .map
                    .cells()
                    .values()
                    .map(|c| c.thinning)
                    .fold(0f32, f32::max);
                let top = a
                    .settings
                    .max_thinning_pct
                    .map_or(top as f64, |m| m.max(top as f64));
                Scale::Ramp(Ramp {
                    lo: 0.0,
                    hi: hi(top),
                })
            }
            MapValue::Major => {
                let top = a
                    .summary
                    .map
                    .cells()
                    .values()
                    .map(|c| c.major)
                    .fold(0f32, f32::max);
                Scale::Ramp(Ramp {
                    lo: 0.0,
                    hi: hi(top as f64),
                })
            }
        }
    }

    fn colour(&self, v: Option<f64>) -> RGBColor {
        match (self, v) {
            (_, None) => plot::palette::GREY,
            (Scale::Margin(s), Some(v)) => s.colour(v),
            (Scale::Ramp(r), Some(v)) => r.colour(v),
        }
    }
}

/// The value a location is coloured by.
fn value_of(p: &PointResult, value: MapValue) -> Option<f64> {
    match value {
        MapValue::Margin => neckline_core::summary::map_margin(p),
        MapValue::Thinning => Some(p.strain.thinning * 100.0),
        MapValue::Major => Some(p.strain.eng.major.percent()),
    }
}

/// The value a cell is coloured by.
fn cell_value(c: &neckline_core::summary::MapCell, value: MapValue) -> Option<f64> {
    match value {
        MapValue::Margin => c.margin.map(f64::from),
        MapValue::Thinning => Some(f64::from(c.thinning)),
        MapValue::Major => Some(f64::from(c.major)),
    }
}

/// The colour scale: margins from `lo` to `hi` percentage points. At and below 0 (on the
/// curve) a ramp of its own from the failed red to a near-black red at `lo`: deeper past the
/// curve is darker, and darker than any other colour of the scale, so that it reads in
/// greyscale too; the marginal yellow up to the band edge; beyond the edge a single-hue green
/// ramp, light at the edge and dark far from it (the safe hue: further from the curve is
/// darker). A change of zone shows as a change of hue.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MarginScale {
    /// Low end, pp.
    pub lo: f64,
    /// The safety band, pp.
    pub band: f64,
    /// High end, pp.
    pub hi: f64,
}

type Rgb = (u8, u8, u8);
/// Light to dark green, ending at the safe zone's green.
const BEYOND: (Rgb, Rgb) = ((0xd4, 0xec, 0xd6), (0x22, 0x88, 0x33));

/// The failed red to a near-black red (luminance 145 to 27 of 255 by ITU-R BT.601 weights;
/// the darkest green of the scale is 96).
const PAST: (Rgb, Rgb) = ((0xee, 0x66, 0x77), (0x40, 0x08, 0x12));

fn mix(ends: (Rgb, Rgb), t: f64) -> RGBColor {
    let (a, b) = ends;
    let m = |x: u8, y: u8| (x as f64 + t * (y as f64 - x as f64)).round() as u8;
    RGBColor(m(a.0, b.0), m(a.1, b.1), m(a.2, b.2))
}

impl MarginScale {
    /// A scale that holds every margin of `a`, at least `−band/2 ..= 3·band`.
    pub fn of(a: &Analysis) -> Self {
        let band = a.settings.margin_pct.max(1.0);
        let (lo, hi) = a
            .summary
            .margins
            .map_or((-band / 2.0, 3.0 * band), |(l, h)| {
                (l.min(-band / 2.0), h.max(3.0 * band))
            });
        MarginScale {
            lo: (lo / 5.0).floor() * 5.0,
            band,
            hi: (hi / 5.0).ceil() * 5.0,
        }
    }

    /// The colour of a margin.
    pub fn colour(&self, m: f64) -> RGBColor {
        use neckline_core::assess::ROUND_OFF_PP;
        if m <= ROUND_OFF_PP {
            let t = if self.lo < 0.0 {
                (m / self.lo).clamp(0.0, 1.0)
            } else {
                0.0
            };
            return mix(PAST, t);
        }
        if m < self.band - ROUND_OFF_PP {
            return zone_colour(Zone::Marginal);
        }
        let m = m.clamp(self.band, self.hi);
        let t = if self.hi > self.band {
            (m - self.band) / (self.hi - self.band)
        } else {
            1.0
        };
        mix(BEYOND, t)
    }
}

fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    value: MapValue,
) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let at = placed(a);
    let mut pts: Vec<(f64, f64)> = at.iter().map(|(_, xy)| *xy).collect();
    if let Some(e) = a.summary.map_extent {
        pts.extend([(e[0], e[1]), (e[2], e[3])]);
    }
    let outline = part_outline(a);
    // A drawn outline is shown whole; a traced one lies within a cell or two of the locations.
    if let Some(o) = outline.filter(|o| o.source != OutlineSource::Traced) {
        pts.extend(o.rings.iter().flatten());
    }
    let (plot_w, plot_h) = Look::Map.plot_size();
    let (xr, yr) = equal_ranges(&pts, plot_w, plot_h);
    let unit = a.lengths.unit.name();
    let (u, v) = a.summary.view.plane.axes();
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: format!("{u}, {unit}"),
        y_desc: format!("{v}, {unit}"),
        look: Look::Map,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    let scale = Scale::of(a, value);
    let mut placer = plot.placer();
    if a.summary.complete {
        if let Some(o) = outline {
            draw_outline(root, &plot, o)?;
        }
        let mut order = at.clone();
        order.sort_by_key(|(p, _)| std::cmp::Reverse(p.zone()));
        for (p, xy) in &order {
            draw_marker(root, p, px(*xy), &scale, value, &mut placer)?;
        }
    } else {
        draw_raster(
            root,
            a,
            value,
            &scale,
            &px,
            (xr.1 - xr.0).max(yr.1 - yr.0),
            plot.rect(),
        )?;
        if let Some(o) = outline {
            draw_outline(root, &plot, o)?;
        }
        let plane = a.summary.view.plane;
        for p in a.worst(MARKED_IN_RASTER).into_iter().rev() {
            if let Some(xy) = plane.coords(p) {
                draw_marker(root, p, px(xy), &scale, value, &mut placer)?;
            }
        }
    }
    let plane = a.summary.view.plane;
    for p in &a.summary.observed_failed {
        if let Some(xy) = plane.coords(p) {
            root.draw(&Circle::new(px(xy), 12, BLACK.stroke_width(2)))?;
        }
    }
    let spots = neckline_core::hotspot::hot_spots(a, RASTER_CELLS);
    if !a.summary.complete {
        for s in spots.iter().take(HOT_SPOTS_LABELLED) {
            let Some(p) = s.worst.as_ref() else {
                continue;
            };
            if let Some(xy) = plane.coords(p) {
                draw_marker(root, p, px(xy), &scale, value, &mut placer)?;
            }
        }
    }
    draw_worst(root, a, &spots, &px, &mut placer)?;
    draw_map_title(root, a, value)?;
    match scale {
        Scale::Margin(s) => draw_scale(root, &s)?,
        Scale::Ramp(r) => draw_ramp(root, &r, value, a.settings.max_thinning_pct)?,
    }
    shapes_legend(a).draw(root)?;
    draw_analysis_footer(root, a)
}

/// The part's outline to draw: a file's only on the x-y plane it is written in.
fn part_outline(a: &Analysis) -> Option<&PartOutline> {
    let o = a.outline.as_ref()?;
    (o.source == OutlineSource::Traced || a.summary.view.plane == MapPlane::Xy).then_some(o)
}

/// Each ring of the outline, closed, cut to the plot area.
fn draw_outline<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    plot: &Plot<DB>,
    o: &PartOutline,
) -> DrawResult<DB> {
    for ring in &o.rings {
        let closed: Vec<(f64, f64)> = ring.iter().chain(ring.first()).copied().collect();
        for run in plot.runs(&closed) {
            PART_EDGE.draw(root, &run)?;
        }
    }
    Ok(())
}

/// The worst locations marked on top of a raster map.
pub const MARKED_IN_RASTER: usize = 30;

fn draw_marker<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    p: &PointResult,
    c: (i32, i32),
    scale: &Scale,
    value: MapValue,
    placer: &mut Placer,
) -> DrawResult<DB> {
    // A location failed by thinning keeps a positive margin: it is coloured as failed all the
    // same (see `map_margin`), so that no failed location looks safe on the map.
    let shape = zone_shape(p.zone());
    // Hollow (neutral) shapes keep their zone colour: one zone, one colour.
    let fill = if shape.hollow() {
        zone_colour(p.zone())
    } else {
        scale.colour(value_of(p, value))
    };
    marker(root, shape, c, 7, fill, BLACK)?;
    if p.judgement.borderline {
        plot::borderline_ring(root, c, 13)?;
    }
    placer.avoid(c, 8);
    Ok(())
}

/// Cells of the part, each coloured by the worst value of its locations.
fn draw_raster<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    value: MapValue,
    scale: &Scale,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    span: f64,
    clip: plot::Rect,
) -> DrawResult<DB> {
    let mut bins = a.summary.map.clone();
    bins.coarsen_to(span, RASTER_CELLS);
    let size = bins.size();
    for (k, c) in bins.cells() {
        let (x0, y0) = bins.corner(*k);
        let (a0, b0) = px((x0, y0 + size));
        let (a1, b1) = px((x0 + size, y0));
        // At least one pixel, then cut to the plot area: a cell astride its edge is drawn
        // only inside it, a cell wholly outside not at all.
        let (a1, b1) = (a1.max(a0 + 1), b1.max(b0 + 1));
        let (a0, b0) = (a0.max(clip.0), b0.max(clip.1));
        let (a1, b1) = (a1.min(clip.2), b1.min(clip.3));
        if a1 <= a0 || b1 <= b0 {
            continue;
        }
        root.draw(&Rectangle::new(
            [(a0, b0), (a1, b1)],
            scale.colour(cell_value(c, value)).filled(),
        ))?;
    }
    Ok(())
}

/// The colour bar of a thinning or major-strain map.
fn draw_ramp<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    r: &Ramp,
    value: MapValue,
    max_thinning: Option<f64>,
) -> DrawResult<DB> {
    let bar = ColourBar::map(r.lo, r.hi);
    let title = match value {
        MapValue::Thinning => "Thinning, %",
        _ => "Major strain, eng. %",
    };
    bar.draw(root, title, |v| r.colour(v))?;
    let mut v = r.lo;
    while v <= r.hi + 1e-9 {
        bar.tick(root, v)?;
        v += bar.step();
    }
    if let (MapValue::Thinning, Some(m)) = (value, max_thinning) {
        bar.mark(root, m, &format!("{m:.0}: max thinning"))?;
    }
    Ok(())
}

/// The locations the map labels: the worst of each hot spot, largest first (at most
/// [`HOT_SPOTS_LABELLED`]), then the worst locations up to [`LABELLED`] labels in all.
pub fn labelled<'a>(a: &'a Analysis, spots: &'a [HotSpot]) -> Vec<&'a PointResult> {
    let plane = a.summary.view.plane;
    let mut v: Vec<&PointResult> = spots
        .iter()
        .filter_map(|s| s.worst.as_ref())
        .take(HOT_SPOTS_LABELLED)
        .collect();
    for p in a.worst(neckline_core::summary::WORST_KEPT) {
        if v.len() >= LABELLED.max(v.len()) {
            break;
        }
        if plane.coords(p).is_some() && !v.iter().any(|q| q.input.id == p.input.id) {
            v.push(p);
        }
    }
    v.retain(|p| plane.coords(p).is_some());
    v
}

fn draw_worst<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    spots: &[HotSpot],
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let style = plot::bold(15.0);
    let plane = a.summary.view.plane;
    let shown = labelled(a, spots)
        .into_iter()
        .filter_map(|p| Some((p, plane.coords(p)?)));
    for (p, xy) in shown {
        let text = worst_label(
            p,
            &a.settings,
            neckline_core::strain::StrainMeasure::Engineering,
        );
        label_box(root, placer, px(xy), &text, &style, BLACK)?;
    }
    Ok(())
}

fn draw_map_title<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    value: MapValue,
) -> DrawResult<DB> {
    let (part, second, _) = job_lines(a);
    let missing = a.total() - a.summary.placed;
    let mut t3 = match value {
        MapValue::Margin => format!(
            "Colour: margin to the limit curve \"{}\" (pp of engineering major strain)",
            a.curve.name
        ),
        MapValue::Thinning => "Colour: thinning, percent of t0".to_string(),
        MapValue::Major => "Colour: major strain, engineering percent".to_string(),
    };
    if !a.summary.complete {
        t3.push_str(&format!(
            "; cells show the worst of their {} locations",
            a.summary.placed
        ));
    }
    t3.push_str("; equal scale on both axes");
    if missing > 0 {
        let (u, v) = a.summary.view.plane.axes();
        t3.push_str(&format!(
            "; {} without {u}, {v} not shown",
            neckline_core::output::count_of(missing, "location")
        ));
    }
    draw_title(root, [&format!("Part map: {part}"), &second, &t3])
}

/// The vertical colour bar with its ticks and the zone boundaries.
fn draw_scale<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    s: &MarginScale,
) -> DrawResult<DB> {
    let bar = ColourBar::map(s.lo, s.hi);
    bar.draw(root, "Margin, pp", |m| s.colour(m))?;
    let step = bar.step();
    let mut m = (s.lo / step).ceil() * step;
    while m <= s.hi + 1e-9 {
        // The boundaries carry their own label below.
        if (m - 0.0).abs() > 1e-9 && (m - s.band).abs() > 1e-9 {
            bar.tick(root, m)?;
        }
        m += step;
    }
    for (v, label) in [(0.0, "on the curve"), (s.band, "band edge")] {
        bar.mark(root, v, &format!("{v:.0}: {label}"))?;
    }
    let mid = |a: f64, b: f64| bar.y_of((a + b) / 2.0) - 7;
    let zone_text = plot::text(13.0).color(&RGBColor(70, 70, 70));
    let x = bar.text_left();
    let failed = mid(s.lo, 0.0).max(bar.y_of(0.0) + 10);
    root.draw_text("failed", &zone_text, (x, failed))?;
    root.draw_text("marginal", &zone_text, (x, mid(0.0, s.band)))?;
    root.draw_text("beyond the band", &zone_text, (x, mid(s.band, s.hi)))?;
    Ok(())
}

/// The legend below the colour bar: shape = zone, with the counts, and the other marks.
fn shapes_legend(a: &Analysis) -> Legend {
    let mut l = Legend::new(PANEL_LEFT, TITLE_H + 390);
    l.heading("Shape = zone (locations)", 16.0, 26);
    for (zone, n) in a.counts() {
        let text = format!("{}  {n}", zone.name());
        l.push(
            Row::new(22)
                .key(Key::zone(zone))
                .left(text, plot::text(14.0), 28),
        );
    }
    l.gap(8);
    let small = || plot::text(13.0);
    l.push(Row::text("grey fill: no margin (uncovered)", small(), 18));
    if a.borderline().1 > 0 {
        let ring = Key::Borderline { at: (6, 7), r: 7 };
        l.push(
            Row::new(18)
                .key(ring)
                .left("dashed ring: borderline", small(), 18),
        );
    }
    l.push(Row::text(
        "labelled: the worst of each hot spot",
        small(),
        18,
    ));
    if !a.summary.complete {
        l.push(Row::text(
            "cells: the worst value of their locations",
            small(),
            18,
        ));
    }
    if let Some(o) = part_outline(a) {
        let key = Key::Line {
            stroke: PART_EDGE,
            len: 22,
        };
        let width = SIZE.0 - (PANEL_LEFT + 28) as u32 - 10;
        l.push(
            Row::new(18)
                .key(key)
                .left(o.describe(), small(), 28)
                .fit(width),
        );
    }
    l
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scale_hits_its_anchors() {
        let s = MarginScale {
            lo: -10.0,
            band: 10.0,
            hi: 40.0,
        };
        // At and below 0 a ramp from the failed red to near-black; marginal its zone colour;
        // beyond the band a green ramp.
        assert_eq!(s.colour(0.0), zone_colour(Zone::Failed)); // on the curve: failed
        assert_eq!(s.colour(-10.0), RGBColor(0x40, 0x08, 0x12)); // the deepest: darkest
                                                                 // Greyscale: luma Y' = 0.299 R + 0.587 G + 0.114 B (ITU-R BT.601); deeper past the curve
                                                                 // is darker, and the deepest darker than any other colour of the scale.
        let luma =
            |c: RGBColor| 0.299 * f64::from(c.0) + 0.587 * f64::from(c.1) + 0.114 * f64::from(c.2);
        let ramp: Vec<f64> = (0..=10).map(|k| luma(s.colour(-f64::from(k)))).collect();
        assert!(ramp.windows(2).all(|w| w[1] < w[0]), "{ramp:?}");
        let others = (1..=40).map(|m| luma(s.colour(f64::from(m))));
        assert!(others.fold(f64::INFINITY, f64::min) > ramp[10] + 50.0);
        assert_eq!(s.colour(0.01), zone_colour(Zone::Marginal)); // just below: marginal
        assert_eq!(s.colour(9.99), zone_colour(Zone::Marginal));
        assert_eq!(s.colour(10.0), RGBColor(0xd4, 0xec, 0xd6)); // band edge: light green
        assert_eq!(s.colour(99.0), zone_colour(Zone::Safe)); // far beyond: the safe green
    }
}

#[cfg(test)]
mod render_tests {
    use super::*;
    use neckline_core::output::fixture;

    #[test]
    fn no_positions_no_map() {
        let a = fixture::analysis(false);
        assert!(map_svg(&a, MapValue::Margin).unwrap().is_none());
        assert!(map_png(&a, MapValue::Margin).unwrap().is_none());
    }

    #[test]
    fn svg_holds_every_location_and_the_scale() {
        let a = fixture::analysis(true);
        let svg = map_svg(&a, MapValue::Margin).unwrap().unwrap();
        let count = |needle: &str| svg.matches(needle).count();
        let n = |z: Zone| a.count(z);
        // Marker primitives at the map's size (r = 7) against the zone counts; the legend's
        // markers are drawn at r = 6. Failed: a disc of r + 1 = 8 with a white bar.
        assert_eq!(count("r=\"8\" opacity=\"1\" fill=\"#"), n(Zone::Failed));
        assert_eq!(
            count("width=\"12\" height=\"12\" opacity=\"1\" fill=\"#"),
            n(Zone::Safe)
        );
        assert_eq!(
            count("<polygon"),
            n(Zone::Marginal) + n(Zone::Uncovered) + 2,
            "triangles and diamonds, legend included"
        );
        // Hollow neutral shapes: rings (low-stretch) and triangles pointing down (thickening).
        assert_eq!(
            count("r=\"7\" opacity=\"1\" fill=\"none\" stroke=\"#444444\""),
            n(Zone::LowStretch)
        );
        for text in [
            "Part map: TP-1 test panel &lt;LH&gt; &amp; co (invented)",
            "x, mm",
            "y, mm",
            "0: on the curve",
            "10: band edge",
            "Margin, pp",
            "Caution: neckline is an aid to judgement.",
        ] {
            assert!(svg.contains(text), "missing `{text}`");
        }
        for p in a.worst(LABELLED) {
            assert!(
                svg.contains(&worst_label(
                    p,
                    &a.settings,
                    neckline_core::strain::StrainMeasure::Engineering
                )),
                "worst {} not labelled",
                p.input.id
            );
        }
    }

    #[test]
    fn png_has_expected_size_and_text_in_title() {
        let a = fixture::analysis(true);
        let img = image::load_from_memory(&map_png(&a, MapValue::Margin).unwrap().unwrap())
            .unwrap()
            .to_rgb8();
        assert_eq!((img.width(), img.height()), SIZE);
        let dark = (0..TITLE_H as u32)
            .flat_map(|y| (0..SIZE.0).map(move |x| (x, y)))
            .filter(|&(x, y)| img.get_pixel(x, y).0.iter().all(|&c| c < 100))
            .count();
        assert!(dark > 2000, "only {dark} dark pixels in the title band");
    }
}
