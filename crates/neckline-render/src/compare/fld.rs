//! `compare-fld.svg` / `.png`: every tryout on one forming-limit diagram. Each location is an
//! arrow through its positions from the first tryout to the last, coloured by how its margin
//! changed between the last two; its marker at the arrow's head shows its zone now; the largest
//! losses carry their id.
//!
//! The limit curve is drawn through the limits `check` recorded at the measured locations of
//! the last tryout (`limit_major_eng_pct` against `minor_eng_pct`): exact at every location,
//! straight between them. The safety band is that line minus the band of the last summary.

use crate::plot::{self, marker, palette, zone_colour, zone_shape, DrawResult, Placer};
use neckline_core::compare::csv_out::latest;
use neckline_core::compare::{count, Change, Comparison, Track};
use neckline_core::CAUTION;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// Size of both pictures, pixels.
pub const SIZE: (u32, u32) = plot::SIZE;
/// Bottom of the title band.
pub const TITLE_H: i32 = 92;
/// Right edge of the plot.
pub const PLOT_RIGHT: i32 = 870;
/// Top of the footer.
pub const FOOTER_TOP: i32 = 800;
/// Left edge of the legend panel.
pub const PANEL_LEFT: i32 = 885;
/// How many of the largest losses carry their id.
pub const LABELLED: usize = 6;

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
    let last = c.tryouts.last().map_or(&[][..], |t| &t.rows[..]);
    let mut v: Vec<(f64, f64)> = last
        .iter()
        .filter_map(|r| Some((r.minor_pct, r.limit_pct?)))
        .collect();
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    v.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-6);
    v
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
    let pts: Vec<(f64, f64)> = c
        .tracks
        .iter()
        .flat_map(positions)
        .chain(limit_samples(c))
        .collect();
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
        count(c.both().count(), "location")
    ));
    let curve = last.curve.unwrap_or_else(|| "not recorded".into());
    (
        format!("{what}: {part}"),
        second.join("  ·  "),
        format!("Limit curve: {curve}"),
    )
}

/// Draw the three title lines.
pub fn draw_title<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    lines: &(String, String, String),
) -> DrawResult<DB> {
    let width = SIZE.0 - 30;
    for (text, style, y) in [
        (&lines.0, plot::bold(23.0), 10),
        (&lines.1, plot::text(16.0), 40),
        (&lines.2, plot::text(14.0), 64),
    ] {
        let t = plot::fit_px(root, text, &style, width);
        root.draw_text(&t, &style, (15, y))?;
    }
    Ok(())
}

/// The caution and what the picture compares, at the bottom.
pub fn draw_footer<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
) -> DrawResult<DB> {
    let style = plot::text(13.0).color(&RGBColor(60, 60, 60));
    root.draw(&PathElement::new(
        vec![(15, FOOTER_TOP), (SIZE.0 as i32 - 15, FOOTER_TOP)],
        RGBColor(200, 200, 200).stroke_width(1),
    ))?;
    let mut y = FOOTER_TOP + 8;
    for line in plot::wrap_px(root, CAUTION, &style, SIZE.0 - 30) {
        root.draw_text(&line, &style, (15, y))?;
        y += 17;
    }
    let (b, a) = c.labels();
    let prov = format!(
        "neckline {}  ·  change = margin in {a} minus margin in {b}, percentage points of \
         engineering major strain; beyond ±{} pp it counts",
        env!("CARGO_PKG_VERSION"),
        c.tolerance
    );
    let prov = plot::fit_px(root, &prov, &style, SIZE.0 - 30);
    root.draw_text(&prov, &style, (15, y))
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

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, c: &Comparison) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let (xr, yr) = ranges(c);
    let area = root.clone().shrink(
        (0, TITLE_H),
        (PLOT_RIGHT as u32, (FOOTER_TOP - TITLE_H) as u32),
    );
    let mut chart = ChartBuilder::on(&area)
        .margin(12)
        .x_label_area_size(50)
        .y_label_area_size(62)
        .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
    chart
        .configure_mesh()
        .x_desc("minor strain ε2, engineering %")
        .y_desc("major strain ε1, engineering %")
        .axis_desc_style(plot::text(17.0))
        .label_style(plot::text(14.0))
        .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
        .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(215, 215, 215))
        .draw()?;
    let px = |p: (f64, f64)| chart.backend_coord(&p);
    let line_px = |line: &[(f64, f64)]| -> Vec<Vec<(i32, i32)>> {
        plot::clip_polyline(line, xr, yr)
            .iter()
            .map(|run| run.iter().map(|p| px(*p)).collect())
            .collect()
    };
    let curve = limit_samples(c);
    if let Some(m) = band(c) {
        let b: Vec<(f64, f64)> = curve.iter().map(|p| (p.0, p.1 - m)).collect();
        for run in line_px(&b) {
            for d in plot::dashes(&run, 9.0, 6.0) {
                root.draw(&PathElement::new(d, BLACK.stroke_width(2)))?;
            }
        }
    }
    for run in line_px(&curve) {
        root.draw(&PathElement::new(run, BLACK.stroke_width(3)))?;
    }
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    let mut placer = Placer::new((xs.start + 2, ys.start + 2, xs.end - 2, ys.end - 2));
    draw_tracks(root, c, &px, &mut placer)?;
    draw_loss_labels(root, c, &px, &mut placer)?;
    draw_title(
        root,
        &title_lines(c, "Tryout comparison on the forming-limit diagram"),
    )?;
    draw_legend(root, c, !curve.is_empty(), band(c))?;
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
    for want in order {
        for t in c.tracks.iter().filter(|t| t.change(c.tolerance) == want) {
            let pts: Vec<(i32, i32)> = positions(t).into_iter().map(px).collect();
            let colour = change_colour(want);
            if pts.len() >= 2 {
                let width = if want == Some(Change::Unchanged) {
                    1
                } else {
                    2
                };
                root.draw(&PathElement::new(pts.clone(), colour.stroke_width(width)))?;
                arrowhead(root, pts[pts.len() - 2], pts[pts.len() - 1], colour)?;
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
                let g = earlier.stroke_width(1);
                root.draw(&PathElement::new(
                    vec![(now.0 - 4, now.1), (now.0 + 4, now.1)],
                    g,
                ))?;
                root.draw(&PathElement::new(
                    vec![(now.0, now.1 - 4), (now.0, now.1 + 4)],
                    g,
                ))?;
            }
            placer
                .obstacles
                .push((now.0 - 5, now.1 - 5, now.0 + 5, now.1 + 5));
        }
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
    for t in c.losses().into_iter().take(LABELLED) {
        let Some(a) = t.after() else { continue };
        let text = format!("{} ({:+.1})", t.name(), t.margin_change().unwrap_or(0.0));
        let border = change_colour(Some(Change::Worsened));
        plot::label_box(
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

fn draw_legend<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    c: &Comparison,
    has_curve: bool,
    band: Option<f64>,
) -> DrawResult<DB> {
    let x = PANEL_LEFT;
    let mut y = TITLE_H + 16;
    let (b, a) = c.labels();
    root.draw_text(&format!("Change {b} → {a}"), &plot::bold(16.0), (x, y))?;
    y += 28;
    for ch in [Change::Worsened, Change::Improved, Change::Unchanged] {
        let colour = change_colour(Some(ch));
        root.draw(&PathElement::new(
            vec![(x, y + 8), (x + 30, y + 8)],
            colour.stroke_width(2),
        ))?;
        arrowhead(root, (x, y + 8), (x + 34, y + 8), colour)?;
        root.draw_text(ch.name(), &plot::text(15.0), (x + 44, y))?;
        let n = c.change_count(ch).to_string();
        let (w, _) = root.estimate_text_size(&n, &plot::bold(15.0))?;
        root.draw_text(&n, &plot::bold(15.0), (x + 220 - w as i32, y))?;
        y += 24;
    }
    root.draw(&Circle::new(
        (x + 6, y + 8),
        2,
        RGBColor(110, 110, 110).filled(),
    ))?;
    root.draw_text("earlier position", &plot::text(14.0), (x + 44, y))?;
    y += 34;
    root.draw_text(&format!("Zone in {a}"), &plot::bold(16.0), (x, y))?;
    y += 26;
    let k = c.tryouts.len() - 1;
    for (zone, n) in c.zone_counts(k) {
        marker(
            root,
            zone_shape(zone),
            (x + 10, y + 8),
            6,
            zone_colour(zone),
            BLACK,
        )?;
        root.draw_text(zone.name(), &plot::text(15.0), (x + 28, y))?;
        let n = n.to_string();
        let (w, _) = root.estimate_text_size(&n, &plot::bold(15.0))?;
        root.draw_text(&n, &plot::bold(15.0), (x + 220 - w as i32, y))?;
        y += 24;
    }
    y += 10;
    if has_curve {
        root.draw(&PathElement::new(
            vec![(x, y + 8), (x + 40, y + 8)],
            BLACK.stroke_width(3),
        ))?;
        root.draw_text(
            &format!("limit curve ({a})"),
            &plot::text(14.0),
            (x + 50, y),
        )?;
        y += 22;
        if let Some(m) = band {
            for d in plot::dashes(&[(x, y + 8), (x + 40, y + 8)], 9.0, 6.0) {
                root.draw(&PathElement::new(d, BLACK.stroke_width(2)))?;
            }
            root.draw_text(
                &format!("safety band, −{m:.1} pp"),
                &plot::text(14.0),
                (x + 50, y),
            )?;
            y += 22;
        }
    }
    y += 12;
    let losses = c.losses();
    if losses.is_empty() {
        return Ok(());
    }
    root.draw_text("Largest losses (margin, pp)", &plot::bold(16.0), (x, y))?;
    y += 26;
    for t in losses.into_iter().take(LABELLED) {
        let id = plot::fit_px(root, &t.name(), &plot::text(14.0), 110);
        root.draw_text(&id, &plot::text(14.0), (x, y))?;
        let d = format!("{:+.1}", t.margin_change().unwrap_or(0.0));
        let (w, _) = root.estimate_text_size(&d, &plot::bold(14.0))?;
        root.draw_text(&d, &plot::bold(14.0), (x + 165 - w as i32, y))?;
        let now = t.after().map_or("", |r| r.zone.name());
        root.draw_text(now, &plot::text(13.0), (x + 180, y + 1))?;
        y += 21;
    }
    Ok(())
}
