//! The polar effective plastic strain diagram (`peps.svg`, `peps.png`) of a multi-stage file,
//! in the published method's polar form (Stoughton & Yoon 2012, Int. J. Solids Struct. 49):
//! each location at its accumulated effective strain ε̄ along the direction θ of its last strain
//! increment (x = ε̄ cos θ, y = ε̄ sin θ, percent); the limit curve mapped point by point (a point
//! (ε2, ε1) of the curve, reached on a straight path, sits at its effective strain along
//! θ = atan2(ε1, ε2)); the safety band mapped the same way.

use crate::chart::footer::draw_analysis_footer;
use crate::chart::frame::{Frame, Look};
use crate::chart::legend::{Key, Legend, Row, COUNTED};
use crate::chart::title::PATH_TITLE;
use crate::chart::{self, PANEL_LEFT, SIZE};
use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use neckline_core::path::increment_effective;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// The diagram as SVG, or `None` when no location was judged along a path.
pub fn peps_svg(a: &Analysis) -> io::Result<Option<String>> {
    if a.summary.paths == 0 {
        return Ok(None);
    }
    plot::render_svg(SIZE, |root| draw(root, a)).map(Some)
}

/// The diagram as PNG, or `None` when no location was judged along a path.
pub fn peps_png(a: &Analysis) -> io::Result<Option<Vec<u8>>> {
    if a.summary.paths == 0 {
        return Ok(None);
    }
    plot::render_png(SIZE, |root| draw(root, a)).map(Some)
}

/// A true-strain point `[ε2, ε1]` reached on a straight path, in the polar form (percent).
pub fn polar(p: [f64; 2]) -> (f64, f64) {
    let r = 100.0 * increment_effective(p);
    let t = p[1].atan2(p[0]);
    (r * t.cos(), r * t.sin())
}

/// The limit curve in the polar form.
pub fn curve_line(a: &Analysis) -> Vec<(f64, f64)> {
    a.curve.true_polyline(16).into_iter().map(polar).collect()
}

/// The safety band in the polar form.
pub fn band_line(a: &Analysis) -> Vec<(f64, f64)> {
    let m = a.settings.margin_pct / 100.0;
    a.curve
        .true_polyline(16)
        .into_iter()
        .filter_map(|[e2, e1]| {
            let e = e1.exp() - 1.0 - m;
            (e > -1.0).then(|| polar([e2, (1.0 + e).ln()]))
        })
        .collect()
}

/// Where a location sits: ε̄ along θ.
fn location(j: &neckline_core::path::PathJudgement) -> Option<(f64, f64)> {
    let t = j.angle_deg?.to_radians();
    let r = 100.0 * j.effective;
    Some((r * t.cos(), r * t.sin()))
}

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, a: &Analysis) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let pts: Vec<(Zone, (f64, f64), String)> = a
        .points()
        .iter()
        .filter_map(|p| {
            let j = p.path.as_ref()?;
            Some((p.zone(), location(j)?, p.input.id.clone()))
        })
        .collect();
    let curve = curve_line(a);
    let all = curve.iter().chain(pts.iter().map(|p| &p.1));
    let (mut x0, mut x1, mut y1) = (-5.0f64, 5.0f64, 10.0f64);
    for &(x, y) in all {
        if x.is_finite() && y.is_finite() {
            (x0, x1, y1) = (x0.min(x), x1.max(x), y1.max(y));
        }
    }
    let (xr, yr) = ((x0 - 5.0, x1 + 5.0), (-5.0, y1 * 1.1 + 5.0));
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: "effective strain × cos θ, %  (θ: direction of the last strain increment)".into(),
        y_desc: "effective strain × sin θ, %".into(),
        look: Look::Diagram,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    for (name, deg) in [
        ("equibiaxial θ = 45°", 45.0f64),
        ("plane strain θ = 90°", 90.0),
        ("uniaxial θ = 116.6°", 116.565),
    ] {
        let t = deg.to_radians();
        let ray: Vec<(f64, f64)> = (0..=200)
            .map(|k| {
                let r = k as f64 * yr.1 / 200.0;
                (r * t.cos(), r * t.sin())
            })
            .collect();
        for run in plot.runs(&ray) {
            chart::REFERENCE.draw(root, &run)?;
            if let Some(end) = run.last() {
                let style = plot::text(13.0).color(&chart::GREY);
                root.draw_text(name, &style, (end.0 + 4, end.1))?;
            }
        }
    }
    let band: Vec<(i32, i32)> = band_line(a).into_iter().map(px).collect();
    chart::BAND.draw(root, &band)?;
    let line: Vec<(i32, i32)> = curve.iter().map(|p| px(*p)).collect();
    chart::CURVE.draw(root, &line)?;
    for zone in Zone::ALL.iter().rev() {
        for (_, xy, _) in pts.iter().filter(|p| p.0 == *zone) {
            marker(
                root,
                zone_shape(*zone),
                px(*xy),
                5,
                zone_colour(*zone),
                BLACK,
            )?;
        }
    }
    for id in a.summary.hidden.items.iter().take(8) {
        if let Some((_, xy, _)) = pts.iter().find(|p| &p.2 == id) {
            let c = px(*xy);
            root.draw_text(id, &plot::bold(14.0), (c.0 + 8, c.1 - 18))?;
        }
    }
    let part = a.job.part.as_deref().unwrap_or("(part not named)");
    let second = format!(
        "stages {}  ·  {} judged along their paths  ·  limit curve \"{}\" and its safety band, mapped",
        a.stages.join(" → "),
        neckline_core::output::count_of(a.summary.paths, "location"),
        a.curve.name
    );
    PATH_TITLE.draw(
        root,
        [
            &format!("Polar effective plastic strain diagram: {part}"),
            &second,
            "Each location: its accumulated effective strain (von Mises) along the direction of its last increment",
        ],
    )?;
    let mut l = Legend::new(PANEL_LEFT, 110);
    l.heading("Zones (locations)", 16.0, 28);
    for (zone, n) in a.counts() {
        let text = format!("{}  {n}", zone.name());
        l.push(Row::entry(Key::zone(zone), text, &COUNTED));
    }
    l.gap(12);
    let band = format!(
        "dashed: safety band −{:.0} pp, mapped",
        a.settings.margin_pct
    );
    for text in [
        "solid: limit curve, mapped",
        &band,
        "labelled: hidden by the strain curve",
    ] {
        l.push(Row::text(text, plot::text(14.0), 20));
    }
    l.draw(root)?;
    draw_analysis_footer(root, a)
}

#[cfg(test)]
mod tests {
    use super::*;

    // A point reached on a straight path sits at its effective strain along its own direction:
    // plane strain ε1 at θ = 90°, radius (2/√3) ε1 (von Mises, plane stress).
    #[test]
    fn straight_paths_map_to_their_effective_strain() {
        let (x, y) = polar([0.0, 0.3]);
        assert!(x.abs() < 1e-9);
        assert!((y - 100.0 * 0.3 * 2.0 / 3f64.sqrt()).abs() < 1e-9);
        // Equibiaxial: θ = 45°, ε̄ = 2ε1.
        let (x, y) = polar([0.1, 0.1]);
        assert!((x - y).abs() < 1e-9 && (x.hypot(y) - 20.0).abs() < 1e-9);
    }
}
