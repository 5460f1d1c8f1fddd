//! `compare-map.svg` / `.png`: the margin change between the last two tryouts at each
//! location's place on the part (its latest `x, y`), on a diverging colour scale (loss red,
//! gain blue, within the tolerance grey), shaped by the zone in the last tryout; the largest
//! losses carry their id. Locations measured in one tryout only are open grey rings.

use super::fld::{
    draw_footer, draw_title, title_lines, FOOTER_TOP, LABELLED, PANEL_LEFT, PLOT_RIGHT, SIZE,
    TITLE_H,
};
use crate::plot::{self, marker, zone_shape, DrawResult, Placer};
use neckline_core::compare::csv_out::latest;
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

/// The map as SVG, or `None` when no location has `x, y`.
pub fn map_svg(c: &Comparison) -> io::Result<Option<String>> {
    if placed(c).is_empty() {
        return Ok(None);
    }
    plot::render_svg(SIZE, |root| draw(root, c)).map(Some)
}

/// The map as PNG, or `None` when no location has `x, y`.
pub fn map_png(c: &Comparison) -> io::Result<Option<Vec<u8>>> {
    if placed(c).is_empty() {
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

impl ChangeScale {
    /// A scale that holds every change of `c`, at least ±5 pp, in steps of 5.
    pub fn of(c: &Comparison) -> Self {
        let most = c
            .both()
            .filter_map(Track::margin_change)
            .fold(5.0f64, |m, d| m.max(d.abs()));
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

/// Ranges with equal scale on both axes for a plot `w × h` pixels holding `pts`.
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

const MARGIN: i32 = 12;
const X_LABEL: i32 = 50;
const Y_LABEL: i32 = 70;

fn unit(c: &Comparison) -> String {
    c.tryouts
        .last()
        .and_then(|t| t.summary.as_ref())
        .and_then(|s| s.unit.clone())
        .unwrap_or_else(|| "length unit of the files".into())
}

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, c: &Comparison) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let at = placed(c);
    let pts: Vec<(f64, f64)> = at.iter().map(|(_, xy)| *xy).collect();
    let plot_w = (PLOT_RIGHT - 2 * MARGIN - Y_LABEL) as f64;
    let plot_h = (FOOTER_TOP - TITLE_H - 2 * MARGIN - X_LABEL) as f64;
    let (xr, yr) = equal_ranges(&pts, plot_w, plot_h);
    let area = root.clone().shrink(
        (0, TITLE_H),
        (PLOT_RIGHT as u32, (FOOTER_TOP - TITLE_H) as u32),
    );
    let mut chart = ChartBuilder::on(&area)
        .margin(MARGIN)
        .x_label_area_size(X_LABEL)
        .y_label_area_size(Y_LABEL)
        .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
    let u = unit(c);
    chart
        .configure_mesh()
        .x_desc(format!("x, {u}"))
        .y_desc(format!("y, {u}"))
        .axis_desc_style(plot::text(17.0))
        .label_style(plot::text(14.0))
        .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
        .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
        .light_line_style(RGBColor(244, 244, 244))
        .bold_line_style(RGBColor(220, 220, 220))
        .draw()?;
    let px = |p: (f64, f64)| chart.backend_coord(&p);
    let scale = ChangeScale::of(c);
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    let mut placer = Placer::new((xs.start + 2, ys.start + 2, xs.end - 2, ys.end - 2));
    // Largest changes last, so that they are on top.
    let mut order = at.clone();
    order.sort_by(|a, b| {
        let k = |t: &Track| t.margin_change().map_or(-1.0, f64::abs);
        k(a.0).total_cmp(&k(b.0))
    });
    for (t, xy) in &order {
        let p = px(*xy);
        placer.obstacles.push((p.0 - 8, p.1 - 8, p.0 + 8, p.1 + 8));
        let Some(after) = t.after().filter(|_| t.before().is_some()) else {
            // Measured in one tryout only: a grey plus, a shape no zone uses.
            let g = RGBColor(120, 120, 120).stroke_width(2);
            root.draw(&PathElement::new(vec![(p.0 - 6, p.1), (p.0 + 6, p.1)], g))?;
            root.draw(&PathElement::new(vec![(p.0, p.1 - 6), (p.0, p.1 + 6)], g))?;
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

fn draw_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let style = plot::bold(15.0);
    let shown = c
        .losses()
        .into_iter()
        .filter_map(|t| Some((t, latest(t).xy()?)))
        .take(LABELLED);
    for (t, xy) in shown {
        let text = format!("{} ({:+.1})", t.name(), t.margin_change().unwrap_or(0.0));
        plot::label_box(root, placer, px(xy), &text, &style, BLACK)?;
    }
    Ok(())
}

fn draw_scale<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    s: &ChangeScale,
) -> DrawResult<DB> {
    let x = PANEL_LEFT;
    let mut y = TITLE_H + 16;
    let (b, a) = c.labels();
    root.draw_text(
        &format!("Margin change {b} → {a}, pp"),
        &plot::bold(16.0),
        (x, y),
    )?;
    y += 30;
    let (top, height) = (y, 300);
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
    y = top + height + 24;
    let note = format!("grey: within ±{} pp", c.tolerance);
    root.draw_text(&note, &plot::text(14.0), (x, y))?;
    y += 22;
    let g = RGBColor(120, 120, 120).stroke_width(2);
    root.draw(&PathElement::new(vec![(x + 2, y + 8), (x + 14, y + 8)], g))?;
    root.draw(&PathElement::new(vec![(x + 8, y + 2), (x + 8, y + 14)], g))?;
    root.draw_text(
        "measured in one of the two only",
        &plot::text(14.0),
        (x + 24, y),
    )?;
    y += 32;
    root.draw_text(&format!("Shape: zone in {a}"), &plot::bold(16.0), (x, y))?;
    y += 26;
    let k = c.tryouts.len() - 1;
    for (zone, n) in c.zone_counts(k).into_iter().filter(|(_, n)| *n > 0) {
        let shape = zone_shape(zone);
        let fill = if shape.hollow() {
            plot::zone_colour(zone)
        } else {
            WITHIN
        };
        marker(root, shape, (x + 10, y + 8), 6, fill, BLACK)?;
        root.draw_text(&format!("{zone} ({n})"), &plot::text(14.0), (x + 28, y))?;
        y += 22;
    }
    Ok(())
}
