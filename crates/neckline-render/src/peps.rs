//! The polar effective plastic strain diagram (`peps.svg`, `peps.png`) of a multi-stage file,
//! in the published method's polar form (Stoughton & Yoon 2012, Int. J. Solids Struct. 49):
//! each location at its accumulated effective strain ε̄ along the direction θ of its last strain
//! increment (x = ε̄ cos θ, y = ε̄ sin θ, percent); the limit curve mapped point by point (a point
//! (ε2, ε1) of the curve, reached on a straight path, sits at its effective strain along
//! θ = atan2(ε1, ε2)); the safety band mapped the same way.

use crate::fld::draw_footer;
use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult, SIZE};
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
    let area = root.clone().shrink((0, 92), (870, 708));
    let mut chart = ChartBuilder::on(&area)
        .margin(12)
        .x_label_area_size(50)
        .y_label_area_size(62)
        .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
    chart
        .configure_mesh()
        .x_desc("effective strain × cos θ, %  (θ: direction of the last strain increment)")
        .y_desc("effective strain × sin θ, %")
        .axis_desc_style(plot::text(17.0))
        .label_style(plot::text(14.0))
        .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
        .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(215, 215, 215))
        .draw()?;
    let px = |p: (f64, f64)| chart.backend_coord(&p);
    let grey = RGBColor(120, 120, 120);
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
        for run in plot::clip_polyline(&ray, xr, yr) {
            let run: Vec<(i32, i32)> = run.into_iter().map(px).collect();
            for d in plot::dashes(&run, 10.0, 4.0) {
                root.draw(&PathElement::new(d, grey.stroke_width(1)))?;
            }
            if let Some(end) = run.last() {
                root.draw_text(name, &plot::text(13.0).color(&grey), (end.0 + 4, end.1))?;
            }
        }
    }
    let band: Vec<(i32, i32)> = band_line(a).into_iter().map(px).collect();
    for d in plot::dashes(&band, 9.0, 6.0) {
        root.draw(&PathElement::new(d, BLACK.stroke_width(2)))?;
    }
    let line: Vec<(i32, i32)> = curve.iter().map(|p| px(*p)).collect();
    root.draw(&PathElement::new(line, BLACK.stroke_width(3)))?;
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
    root.draw_text(
        &format!("Polar effective plastic strain diagram: {part}"),
        &plot::bold(23.0),
        (15, 10),
    )?;
    root.draw_text(
        &format!(
            "stages {}  ·  {} judged along their paths  ·  limit curve \"{}\" and its safety band, mapped",
            a.stages.join(" → "),
            neckline_core::output::count_of(a.summary.paths, "location"),
            a.curve.name
        ),
        &plot::text(15.0),
        (15, 42),
    )?;
    root.draw_text(
        "Each location: its accumulated effective strain (von Mises) along the direction of its last increment",
        &plot::text(14.0),
        (15, 66),
    )?;
    let x = 885;
    let mut y = 110;
    root.draw_text("Zones (locations)", &plot::bold(16.0), (x, y))?;
    y += 28;
    for (zone, n) in a.counts() {
        marker(
            root,
            zone_shape(zone),
            (x + 10, y + 8),
            6,
            zone_colour(zone),
            BLACK,
        )?;
        root.draw_text(
            &format!("{}  {n}", zone.name()),
            &plot::text(15.0),
            (x + 28, y),
        )?;
        y += 25;
    }
    y += 12;
    root.draw_text("solid: limit curve, mapped", &plot::text(14.0), (x, y))?;
    y += 20;
    root.draw_text(
        &format!(
            "dashed: safety band −{:.0} pp, mapped",
            a.settings.margin_pct
        ),
        &plot::text(14.0),
        (x, y),
    )?;
    y += 20;
    root.draw_text(
        "labelled: hidden by the strain curve",
        &plot::text(14.0),
        (x, y),
    )?;
    draw_footer(root, a)
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
