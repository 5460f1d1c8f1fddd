//! `compare-fld.svg` / `.png`: every tryout on one forming-limit diagram. Each location is an
//! arrow through its positions from the first tryout to the last, coloured by how its margin
//! changed between the last two; its marker at the arrow's head shows its zone now; the largest
//! losses carry their id.
//!
//! The limit curve is drawn through the limits `check` recorded at the measured locations of
//! the last tryout (`limit_major_eng_pct` against `minor_eng_pct`): exact at every location,
//! straight between them. The safety band is that line minus the band of the last summary.

use crate::chart::footer;
use crate::chart::frame::{Frame, Look};
use crate::chart::label::{label_box, Placer};
use crate::chart::legend::{Entries, Key, Legend, Row, LINES};
use crate::chart::{self, PANEL_LEFT, SIZE, TITLE_H};
use crate::plot::{self, marker, palette, zone_colour, zone_shape, DrawResult};
use neckline_core::compare::csv_out::latest;
use neckline_core::compare::tally::{Density, Grid};
use neckline_core::compare::{count, Change, Comparison, Status, Track};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// How many of the largest losses, and of the largest gains, carry their id (every newly
/// failed or marginal location does too).
pub const LABELLED: usize = 6;

/// Labels drawn at most when the comparison does not hold every location (the largest losses
/// and gains, then the newly failed or marginal, worst first): more would hide the picture.
/// compare.html lists every one up to its cap.
pub const LABELS_AT_SCALE: usize = 40;

/// The locations the pictures label: [`Comparison::labelled`], the first
/// [`LABELS_AT_SCALE`] of them beyond the locations drawn one by one.
pub fn labelled(c: &Comparison) -> Vec<&Track> {
    let mut v = c.labelled(LABELLED);
    if c.density.is_some() {
        v.truncate(LABELS_AT_SCALE);
    }
    v
}

/// Labelled locations listed in the legend at most.
const LEGEND_LABELS: usize = 16;

/// Colour of a change: blue improved, purple worsened, grey unchanged (Tol's bright scheme;
/// none of them a zone colour, so that a change never reads as a zone).
pub fn change_colour(c: Option<Change>) -> RGBColor {
    match c {
        Some(Change::Improved) => palette::BLUE,
        Some(Change::Worsened) => palette::PURPLE,
        _ => RGBColor(150, 150, 150),
    }
}

/// The diagram as SVG.
pub fn fld_svg(c: &Comparison) -> io::Result<String> {
    plot::render_svg(SIZE, |root| draw(root, c))
}

/// The diagram as PNG.
pub fn fld_png(c: &Comparison) -> io::Result<Vec<u8>> {
    plot::render_png(SIZE, |root| draw(root, c))
}

/// The limit line of the last tryout: (minor, limit major), engineering percent, by minor.
pub fn limit_samples(c: &Comparison) -> Vec<(f64, f64)> {
    c.tryouts
        .last()
        .map_or_else(Vec::new, |t| t.stats.limit.clone())
}

fn band(c: &Comparison) -> Option<f64> {
    c.tryouts.last()?.summary.as_ref()?.band
}

fn positions(t: &Track) -> Vec<(f64, f64)> {
    t.at.iter()
        .flatten()
        .map(|r| (r.minor_pct, r.major_pct))
        .collect()
}

fn ranges(c: &Comparison) -> ((f64, f64), (f64, f64)) {
    // Every location's every position lies within the extents of the tryouts' strains.
    let corners = c
        .tryouts
        .iter()
        .filter_map(|t| t.stats.strains)
        .flat_map(|((x0, x1), (y0, y1))| [(x0, y0), (x1, y1)]);
    let pts: Vec<(f64, f64)> = corners.chain(limit_samples(c)).collect();
    let lo_hi = |f: fn(&(f64, f64)) -> f64| {
        pts.iter()
            .map(f)
            .fold((0.0f64, 0.0f64), |(l, h), v| (l.min(v), h.max(v)))
    };
    let (x0, x1) = lo_hi(|p| p.0);
    let (y0, y1) = lo_hi(|p| p.1);
    let round = |lo: f64, hi: f64| ((lo / 5.0).floor() * 5.0, (hi / 5.0).ceil() * 5.0);
    (round(x0 - 4.0, x1 + 4.0), round(y0 - 4.0, y1 * 1.08 + 4.0))
}

/// Title lines: part, the tryouts, the curve.
pub fn title_lines(c: &Comparison, what: &str) -> (String, String, String) {
    let last = c
        .tryouts
        .last()
        .and_then(|t| t.summary.clone())
        .unwrap_or_default();
    let part = last.part.unwrap_or_else(|| "(part not named)".into());
    let labels: Vec<&str> = c.tryouts.iter().map(|t| t.label.as_str()).collect();
    let mut second = vec![labels.join(" → ")];
    if let Some(d) = last.die {
        second.push(format!("die {d}"));
    }
    second.push(format!(
        "{} in both of the last two",
        count(c.status_count(Status::Both), "location")
    ));
    let curve = last.curve.unwrap_or_else(|| "not recorded".into());
    (
        format!("{what}: {part}"),
        second.join("  ·  "),
        format!("Limit curve: {curve}"),
    )
}

/// The title lines, drawn.
pub fn draw_title<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    lines: &(String, String, String),
) -> DrawResult<DB> {
    chart::title::draw_title(root, [&lines.0, &lines.1, &lines.2])
}

/// The caution and what the picture compares, at the bottom.
pub fn draw_footer<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
) -> DrawResult<DB> {
    let (b, a) = c.labels();
    let change = format!(
        "change = margin in {a} minus margin in {b}, percentage points of engineering major \
         strain; beyond ±{} pp it counts",
        c.tolerance
    );
    footer::draw_footer(root, &[&change])
}

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, c: &Comparison) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let (xr, yr) = ranges(c);
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: "minor strain ε2, engineering %".into(),
        y_desc: "major strain ε1, engineering %".into(),
        look: Look::Diagram,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    let curve = limit_samples(c);
    if let Some(m) = band(c) {
        let b: Vec<(f64, f64)> = curve.iter().map(|p| (p.0, p.1 - m)).collect();
        for run in plot.runs(&b) {
            chart::BAND.draw(root, &run)?;
        }
    }
    for run in plot.runs(&curve) {
        chart::CURVE.draw(root, &run)?;
    }
    let mut placer = plot.placer();
    draw_tracks(root, c, &px, &mut placer)?;
    draw_loss_labels(root, c, &px, &mut placer)?;
    draw_title(
        root,
        &title_lines(c, "Tryout comparison on the forming-limit diagram"),
    )?;
    legend(c, !curve.is_empty(), band(c)).draw(root)?;
    draw_footer(root, c)
}

fn draw_tracks<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let order = [
        None,
        Some(Change::Unchanged),
        Some(Change::Improved),
        Some(Change::Worsened),
    ];
    let earlier = RGBColor(110, 110, 110);
    // Beyond the locations drawn one by one: the density of every location, and arrows for
    // the labelled ones only.
    let labelled = labelled(c);
    let drawn: Vec<&Track> = match &c.density {
        Some(d) => {
            draw_density(root, d, px)?;
            labelled
        }
        None => c.tracks.iter().collect(),
    };
    for want in order {
        for t in drawn.iter().filter(|t| t.change(c.tolerance) == want) {
            let pts: Vec<(i32, i32)> = positions(t).into_iter().map(px).collect();
            let colour = change_colour(want);
            if pts.len() >= 2 {
                let width = if want == Some(Change::Unchanged) {
                    1
                } else {
                    2
                };
                root.draw(&PathElement::new(pts.clone(), colour.stroke_width(width)))?;
                plot::arrowhead(root, pts[pts.len() - 2], pts[pts.len() - 1], colour)?;
                for p in &pts[..pts.len() - 1] {
                    root.draw(&Circle::new(*p, 2, earlier.filled()))?;
                }
            }
            let Some(now) = pts.last() else { continue };
            let last = latest(t);
            if t.after().is_some() {
                marker(
                    root,
                    zone_shape(last.zone),
                    *now,
                    4,
                    zone_colour(last.zone),
                    BLACK,
                )?;
            } else {
                // Not measured in the last tryout: a grey plus (no zone's shape) where it was
                // last seen.
                plot::plus(root, *now, 4, earlier.stroke_width(1))?;
            }
            placer.avoid(*now, 5);
        }
    }
    Ok(())
}

/// Shade of a cell holding `n` of at most `most` locations: 0.25 for one, 1 for the fullest
/// (on a logarithmic scale).
pub fn shade(n: u32, most: u32) -> f64 {
    let (n, most) = (n.max(1) as f64, most.max(2) as f64);
    0.25 + 0.75 * n.ln() / most.ln()
}

/// Each cell holding a location, in the colour of most of its changes, deeper for more.
fn draw_density<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    d: &Density,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
) -> DrawResult<DB> {
    let g: &Grid<[u32; 4]> = &d.fld;
    let most = g
        .cells
        .iter()
        .map(|c| c.iter().sum::<u32>())
        .max()
        .unwrap_or(1);
    let kinds = [
        None,
        Some(Change::Unchanged),
        Some(Change::Improved),
        Some(Change::Worsened),
    ];
    for (k, cell) in g.cells.iter().enumerate() {
        let n: u32 = cell.iter().sum();
        if n == 0 {
            continue;
        }
        let main = (0..4).max_by_key(|&i| (cell[i], i)).unwrap_or(0);
        let colour = change_colour(kinds[main]).mix(shade(n, most));
        let (a, b) = g.rect(k);
        let (p, q) = (px((a.0, b.1)), px((b.0, a.1)));
        root.draw(&Rectangle::new([p, q], colour.filled()))?;
    }
    Ok(())
}

fn draw_loss_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    px: &dyn Fn((f64, f64)) -> (i32, i32),
    placer: &mut Placer,
) -> DrawResult<DB> {
    let style = plot::bold(15.0);
    for t in labelled(c) {
        let Some(a) = t.after() else { continue };
        let (text, border) = super::record::label(t, c.tolerance);
        label_box(
            root,
            placer,
            px((a.minor_pct, a.major_pct)),
            &text,
            &style,
            border,
        )?;
    }
    Ok(())
}

/// The legend: changes, zones now, the lines, the largest losses.
fn legend(c: &Comparison, has_curve: bool, band: Option<f64>) -> Legend {
    let mut l = Legend::new(PANEL_LEFT, TITLE_H + 16);
    let (b, a) = c.labels();
    let counted = |text_dx| Entries {
        text_dx,
        size: 15.0,
        count_right: 220,
        step: 24,
    };
    l.heading(format!("Change {b} → {a}"), 16.0, 28);
    for ch in [Change::Worsened, Change::Improved, Change::Unchanged] {
        let key = Key::Arrow(change_colour(Some(ch)));
        l.push(Row::counted(
            key,
            ch.name(),
            c.change_count(ch),
            &counted(44),
        ));
    }
    let dot = Key::Circle {
        dx: 6,
        r: 2,
        style: RGBColor(110, 110, 110).filled(),
    };
    l.push(
        Row::new(24)
            .key(dot)
            .left("earlier position", plot::text(14.0), 44),
    );
    if c.density.is_some() {
        l.push(Row::text(
            "cells: every location now, in the colour",
            plot::text(14.0),
            20,
        ));
        l.push(Row::text(
            "of most of its changes, deeper for more;",
            plot::text(14.0),
            20,
        ));
        l.push(Row::text(
            "arrows: the labelled locations",
            plot::text(14.0),
            22,
        ));
    }
    l.gap(10);
    l.heading(format!("Zone in {a}"), 16.0, 26);
    let k = c.tryouts.len() - 1;
    for (zone, n) in c.zone_counts(k) {
        l.push(Row::counted(Key::zone(zone), zone.name(), n, &counted(28)));
    }
    l.gap(10);
    if has_curve {
        let line = |stroke| Key::Line { stroke, len: 40 };
        l.push(Row::entry(
            line(chart::CURVE),
            format!("limit curve ({a})"),
            &LINES,
        ));
        if let Some(m) = band {
            let text = format!("safety band, −{m:.1} pp");
            l.push(Row::entry(line(chart::BAND), text, &LINES));
        }
    }
    l.gap(12);
    let labelled = labelled(c);
    if labelled.is_empty() {
        return l;
    }
    l.heading("Labelled (margin change, pp)", 16.0, 26);
    for t in labelled.into_iter().take(LEGEND_LABELS) {
        let d = format!("{:+.1}", t.margin_change().unwrap_or(0.0));
        let now = t.after().map_or("", |r| r.zone.name());
        l.push(
            Row::new(21)
                .left(t.name(), plot::text(14.0), 0)
                .fit(110)
                .right(d, plot::bold(14.0), 165)
                .left(now, plot::text(13.0), 180)
                .down(1),
        );
    }
    l
}
