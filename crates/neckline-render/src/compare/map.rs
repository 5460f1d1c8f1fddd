//! `compare-map.svg` / `.png`: the margin change between the last two tryouts at each
//! location's place on the part (its latest `x, y`), on a diverging colour scale (loss red,
//! gain blue, within the tolerance grey), shaped by the zone in the last tryout; the largest
//! losses carry their id. Locations measured in one tryout only are open grey rings.

use super::fld::{draw_footer, draw_title, labelled, title_lines};
use crate::chart::frame::{Frame, Look};
use crate::chart::label::{label_box, Placer};
use crate::chart::legend::{Key, Legend, Row};
use crate::chart::{PANEL_LEFT, SIZE, TITLE_H};
use crate::plot::{self, marker, zone_shape, DrawResult};
use neckline_core::compare::csv_out::latest;
use neckline_core::compare::tally::{Grid, MapCell};
use neckline_core::compare::{Comparison, Track};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// Locations with a position, and that position (the latest measured).
pub fn placed(c: &Comparison) -> Vec<(&Track, (f64, f64))> {
    c.tracks
        .iter()
        .filter_map(|t| Some((t, latest(t).xy()?)))
        .collect()
}

/// Whether any location has `x, y` (then the map is drawn).
pub fn has_places(c: &Comparison) -> bool {
    match c.density.as_ref().and_then(|d| d.map.as_ref()) {
        Some(g) => g.cells.iter().any(|k| k.count > 0),
        None => !placed(c).is_empty(),
    }
}

/// The map as SVG, or `None` when no location has `x, y`.
pub fn map_svg(c: &Comparison) -> io::Result<Option<String>> {
    if !has_places(c) {
        return Ok(None);
    }
    plot::render_svg(SIZE, |root| draw(root, c)).map(Some)
}

/// The map as PNG, or `None` when no location has `x, y`.
pub fn map_png(c: &Comparison) -> io::Result<Option<Vec<u8>>> {
    if !has_places(c) {
        return Ok(None);
    }
    plot::render_png(SIZE, |root| draw(root, c)).map(Some)
}

/// Diverging colour scale of margin change, `−reach ..= reach` percentage points. Colours from
/// the ColorBrewer RdBu scheme (Brewer, colorbrewer2.org, marked safe for colour-blind readers):
/// light to dark red for losses, light to dark blue for gains; within the tolerance, grey.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChangeScale {
    /// Largest change shown at full colour, pp.
    pub reach: f64,
    /// Changes within ± this are grey.
    pub tolerance: f64,
}

type Rgb = (u8, u8, u8);
const LOSS: (Rgb, Rgb) = ((0xfd, 0xdb, 0xc7), (0xb2, 0x18, 0x2b));
const GAIN: (Rgb, Rgb) = ((0xd1, 0xe5, 0xf0), (0x21, 0x66, 0xac));
const WITHIN: RGBColor = RGBColor(0xbd, 0xbd, 0xbd);
/// The plus of a location measured in one of the two tryouts only.
const ONE_ONLY: ShapeStyle = ShapeStyle {
    color: RGBAColor(120, 120, 120, 1.0),
    filled: false,
    stroke_width: 2,
};

impl ChangeScale {
    /// A scale that holds every change of `c`, at least ±5 pp, in steps of 5.
    pub fn of(c: &Comparison) -> Self {
        let most = c.counts.most_change.max(5.0);
        ChangeScale {
            reach: (most / 5.0).ceil() * 5.0,
            tolerance: c.tolerance,
        }
    }

    /// The colour of a change.
    pub fn colour(&self, d: f64) -> RGBColor {
        if d.abs() <= self.tolerance + 1e-9 {
            return WITHIN;
        }
        let (a, b) = if d < 0.0 { LOSS } else { GAIN };
        let span = (self.reach - self.tolerance).max(1e-9);
        let t = ((d.abs() - self.tolerance) / span).clamp(0.0, 1.0);
        let mix = |x: u8, y: u8| (x as f64 + t * (y as f64 - x as f64)).round() as u8;
        RGBColor(mix(a.0, b.0), mix(a.1, b.1), mix(a.2, b.2))
    }
}

/// Ranges with equal scale on both axes for a plot `w × h` pixels holding `pts`: those of
/// [`crate::chart::frame::equal_ranges`], but with the padding added to the span rather than to
/// the ends, which can round differently in the last bit (kept, so that the map stays as drawn).
fn equal_ranges(pts: &[(f64, f64)], w: f64, h: f64) -> ((f64, f64), (f64, f64)) {
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
    let per_px = ((x1 - x0 + 2.0 * pad) / w).max((y1 - y0 + 2.0 * pad) / h);
    let (cx, cy) = ((x0 + x1) / 2.0, (y0 + y1) / 2.0);
    let (hw, hh) = (per_px * w / 2.0, per_px * h / 2.0);
    ((cx - hw, cx + hw), (cy - hh, cy + hh))
}

fn unit(c: &Comparison) -> String {
    c.tryouts
        .last()
        .and_then(|t| t.summary.as_ref())
        .and_then(|s| s.unit.clone())
        .unwrap_or_else(|| "length unit of the files".into())
}

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, c: &Comparison) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let grid = c.density.as_ref().and_then(|d| d.map.as_ref());
    // Beyond the locations drawn one by one: cells, and markers for the labelled ones only.
    let at: Vec<(&Track, (f64, f64))> = match grid {
        Some(_) => labelled(c)
            .into_iter()
            .filter_map(|t| Some((t, latest(t).xy()?)))
            .collect(),
        None => placed(c),
    };
    let pts: Vec<(f64, f64)> = match grid {
        Some(g) => vec![(g.x.0, g.y.0), (g.x.1, g.y.1)],
        None => at.iter().map(|(_, xy)| *xy).collect(),
    };
    let (plot_w, plot_h) = Look::Map.plot_size();
    let (xr, yr) = equal_ranges(&pts, plot_w, plot_h);
    let u = unit(c);
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: format!("x, {u}"),
        y_desc: format!("y, {u}"),
        look: Look::Map,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    let scale = ChangeScale::of(c);
    let mut placer = plot.placer();
    if let Some(g) = grid {
        draw_cells(root, g, &scale, &px)?;
    }
    // Largest changes last, so that they are on top.
    let mut order = at.clone();
    order.sort_by(|a, b| {
        let k = |t: &Track| t.margin_change().map_or(-1.0, f64::abs);
        k(a.0).total_cmp(&k(b.0))
    });
    for (t, xy) in &order {
        let p = px(*xy);
        placer.avoid(p, 8);
        let Some(after) = t.after().filter(|_| t.before().is_some()) else {
            // Measured in one tryout only: a grey plus, a shape no zone uses.
            plot::plus(root, p, 6, ONE_ONLY)?;
            continue;
        };
        let shape = zone_shape(after.zone);
        // Hollow shapes keep their neutral zone colour: one zone, one colour.
        let fill = if shape.hollow() {
            crate::plot::zone_colour(after.zone)
        } else {
            t.margin_change().map_or(WITHIN, |d| scale.colour(d))
        };
        marker(root, shape, p, 7, fill, BLACK)?;
    }
    draw_labels(root, c, &px, &mut placer)?;
    draw_title(root, &title_lines(c, "Margin change on the part"))?;
    draw_scale(root, c, &scale)?;
    draw_footer(root, c)
}

/// The colour of a cell: its largest loss beyond the tolerance, else its largest gain, else
/// within; a cell of locations measured in one tryout only is the grey of those.
pub fn cell_colour(k: &MapCell, scale: &ChangeScale) -> RGBColor {
    if k.both == 0 {
        RGBColor(200, 200, 200)
    } else if k.lowest < -scale.tolerance {
        scale.colour(k.lowest)
    } else {
        scale.colour(k.highest)
    }
}

fn draw_cells<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    g: &Grid<MapCell>,
    scale: &ChangeScale,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
) -> DrawResult<DB> {
    for (k, cell) in g.cells.iter().enumerate() {
        if cell.count == 0 {
            continue;
        }
        let (a, b) = g.rect(k);
        let (p, q) = (px((a.0, b.1)), px((b.0, a.1)));
        root.draw(&Rectangle::new([p, q], cell_colour(cell, scale).filled()))?;
    }
    Ok(())
}

fn draw_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let style = plot::bold(15.0);
    let shown = labelled(c)
        .into_iter()
        .filter_map(|t| Some((t, latest(t).xy()?)));
    for (t, xy) in shown {
        let (text, border) = super::record::label(t, c.tolerance);
        label_box(root, placer, px(xy), &text, &style, border)?;
    }
    Ok(())
}

fn draw_scale<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    s: &ChangeScale,
) -> DrawResult<DB> {
    let x = PANEL_LEFT;
    let y = TITLE_H + 16;
    let (b, a) = c.labels();
    root.draw_text(
        &format!("Margin change {b} → {a}, pp"),
        &plot::bold(16.0),
        (x, y),
    )?;
    let (top, height) = (y + 30, 300);
    for k in 0..height {
        let d = s.reach - 2.0 * s.reach * k as f64 / (height - 1) as f64;
        root.draw(&Rectangle::new(
            [(x, top + k), (x + 26, top + k + 1)],
            s.colour(d).filled(),
        ))?;
    }
    root.draw(&Rectangle::new(
        [(x, top), (x + 26, top + height)],
        BLACK.stroke_width(1),
    ))?;
    let at = |d: f64| top + ((s.reach - d) / (2.0 * s.reach) * (height - 1) as f64).round() as i32;
    let ticks = [
        s.reach,
        s.reach / 2.0,
        s.tolerance,
        0.0,
        -s.tolerance,
        -s.reach / 2.0,
        -s.reach,
    ];
    let mut last_y: Option<i32> = None;
    for d in ticks {
        let ty = at(d);
        if last_y.is_some_and(|l| (ty - l).abs() < 14) {
            continue;
        }
        last_y = Some(ty);
        root.draw(&PathElement::new(
            vec![(x + 26, ty), (x + 33, ty)],
            BLACK.stroke_width(1),
        ))?;
        let label = if d.abs() < 1e-9 {
            "0".to_string()
        } else if (d - d.round()).abs() < 1e-9 {
            format!("{d:+.0}")
        } else {
            format!("{d:+.1}")
        };
        root.draw_text(&label, &plot::text(14.0), (x + 38, ty - 8))?;
    }
    for (text, dy) in [("gain (safer now)", 0), ("loss", height - 16)] {
        root.draw_text(text, &plot::text(14.0), (x + 100, top + dy))?;
    }
    let mut l = Legend::new(x, top + height + 24);
    let text = || plot::text(14.0);
    l.push(Row::text(
        format!("grey: within ±{} pp", c.tolerance),
        text(),
        22,
    ));
    let plus = Key::Plus {
        dx: 8,
        arm: 6,
        style: ONE_ONLY,
    };
    l.push(
        Row::new(32)
            .key(plus)
            .left("measured in one of the two only", text(), 24),
    );
    if c.density.is_some() {
        l.push(Row::text(
            "cells: the largest loss of their locations,",
            text(),
            20,
        ));
        l.push(Row::text(
            "else the largest gain; shapes: the labelled",
            text(),
            22,
        ));
    }
    l.heading(format!("Shape: zone in {a}"), 16.0, 26);
    let k = c.tryouts.len() - 1;
    for (zone, n) in c.zone_counts(k).into_iter().filter(|(_, n)| *n > 0) {
        let shape = zone_shape(zone);
        let fill = if shape.hollow() {
            plot::zone_colour(zone)
        } else {
            WITHIN
        };
        let key = Key::Marker {
            shape,
            fill,
            r: 6,
            dx: 10,
        };
        l.push(
            Row::new(22)
                .key(key)
                .left(format!("{zone} ({n})"), text(), 28),
        );
    }
    l.draw(root)
}
