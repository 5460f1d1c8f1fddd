//! The path diagram (`peps.svg`, `peps.png`) of a multi-stage file, in the shop's words: each
//! location's accumulated effective strain ε̄ (von Mises, plane stress, incompressible; percent)
//! against the strain ratio β = dε2/dε1 of its last increment, after each stage, the stages
//! marked and joined. The limit is the effective-strain criterion of Stoughton & Yoon 2012
//! (Int. J. Solids Struct. 49, "polar effective plastic strain"): a point (ε2, ε1) of the limit
//! curve, reached on a straight path, is the limit ε̄* = ε̄(ε2, ε1) for β = ε2/ε1; the safety
//! band is mapped the same way.

use crate::chart::footer::draw_analysis_footer;
use crate::chart::frame::{Frame, Look};
use crate::chart::label::Label;
use crate::chart::legend::{Key, Legend, Row, COUNTED};
use crate::chart::title::PATH_TITLE;
use crate::chart::{self, PANEL_LEFT, SIZE};
use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use neckline_core::path::{increment_effective, PathJudgement};
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// The x range's bounds: β beyond these (a last increment close to pure ε2) is drawn at the edge.
const BETA_MIN: f64 = -1.0;
const BETA_MAX: f64 = 1.2;

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

/// Strain ratio β = dε2/dε1 of an increment `[Δε2, Δε1]` (common practice: −½ uniaxial
/// tension, 0 plane strain, 1 equibiaxial), kept within the diagram's range; `None` when the
/// increment does not stretch along ε1.
pub fn beta(d: [f64; 2]) -> Option<f64> {
    (d[1] > 1e-12).then(|| (d[0] / d[1]).clamp(BETA_MIN, BETA_MAX))
}

/// A true-strain point `[ε2, ε1]` reached on a straight path: (β, ε̄ in percent), with
/// ε̄ = (2/√3) √(ε1² + ε1 ε2 + ε2²) (von Mises, plane stress, incompressible; Hill 1950).
pub fn straight(p: [f64; 2]) -> Option<(f64, f64)> {
    Some((beta(p)?, 100.0 * increment_effective(p)))
}

/// The limit curve, mapped.
pub fn curve_line(a: &Analysis) -> Vec<(f64, f64)> {
    a.curve
        .true_polyline(16)
        .into_iter()
        .filter_map(straight)
        .collect()
}

/// The safety band, mapped.
pub fn band_line(a: &Analysis) -> Vec<(f64, f64)> {
    let m = a.settings.margin_pct / 100.0;
    a.curve
        .true_polyline(16)
        .into_iter()
        .filter_map(|[e2, e1]| {
            let e = e1.exp() - 1.0 - m;
            (e > -1.0).then(|| straight([e2, (1.0 + e).ln()]))?
        })
        .collect()
}

/// A location's stages: after each one, (β of the increment into it, ε̄ accumulated so far, %).
/// The last point is the judged one (the judgement's ε̄ and direction, noise filtered); stages
/// whose increment does not stretch along ε1 are left out.
pub fn stage_points(j: &PathJudgement) -> Vec<(f64, f64)> {
    let mut out = Vec::new();
    let (mut prev, mut acc) = ([0.0, 0.0], 0.0);
    let n = j.stages.len();
    for s in j.stages.iter().take(n.saturating_sub(1)) {
        let d = [s[0] - prev[0], s[1] - prev[1]];
        acc += increment_effective(d);
        if let Some(b) = beta(d) {
            out.push((b, 100.0 * acc));
        }
        prev = *s;
    }
    if let Some(t) = j.angle_deg {
        let t = t.to_radians();
        if let Some(b) = beta([t.cos(), t.sin()]) {
            out.push((b, 100.0 * j.effective));
        }
    }
    out
}

/// A location on the diagram: its zone, its stages' points and its id.
type Located = (Zone, Vec<(f64, f64)>, String);

fn draw<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, a: &Analysis) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let pts: Vec<Located> = a
        .points()
        .iter()
        .filter_map(|p| {
            let s = stage_points(p.path.as_ref()?);
            (!s.is_empty()).then(|| (p.zone(), s, p.input.id.clone()))
        })
        .collect();
    let curve = curve_line(a);
    let all = curve.iter().chain(pts.iter().flat_map(|p| p.1.iter()));
    let (mut x0, mut x1, mut y1) = (-0.6f64, 1.05f64, 10.0f64);
    for &(x, y) in all {
        if x.is_finite() && y.is_finite() {
            (x0, x1, y1) = (x0.min(x), x1.max(x), y1.max(y));
        }
    }
    let (xr, yr) = ((x0 - 0.05, x1 + 0.05), (0.0, y1 * 1.1 + 2.0));
    let plot = Frame {
        x: xr,
        y: yr,
        x_desc: "β = dε2/dε1 of the last strain increment  (−0.5 uniaxial, 0 plane strain, 1 equibiaxial)".into(),
        y_desc: "accumulated effective strain (von Mises), %".into(),
        look: Look::Diagram,
    }
    .draw(root)?;
    let px = |p: (f64, f64)| plot.px(p);
    let mut placer = plot.placer();
    for (_, s, _) in &pts {
        for p in s {
            placer.avoid(px(*p), 6);
        }
    }
    let mut line_labels = Vec::new();
    for (name, b) in [
        ("uniaxial", -0.5f64),
        ("plane strain", 0.0),
        ("equibiaxial", 1.0),
    ] {
        for run in plot.runs(&[(b, yr.0), (b, yr.1)]) {
            chart::REFERENCE.draw(root, &run)?;
            if let Some(top) = run.iter().min_by_key(|p| p.1) {
                line_labels.push((name, (top.0, top.1 + 10)));
            }
        }
    }
    let band: Vec<(i32, i32)> = band_line(a).into_iter().map(px).collect();
    chart::BAND.draw(root, &band)?;
    let line: Vec<(i32, i32)> = curve.iter().map(|p| px(*p)).collect();
    chart::CURVE.draw(root, &line)?;
    for zone in Zone::ALL.iter().rev() {
        for (_, s, _) in pts.iter().filter(|p| p.0 == *zone) {
            let joined: Vec<(i32, i32)> = s.iter().map(|p| px(*p)).collect();
            let colour = zone_colour(*zone);
            root.draw(&PathElement::new(joined.clone(), colour.stroke_width(1)))?;
            let (last, before) = joined.split_last().expect("not empty");
            for c in before {
                root.draw(&Circle::new(*c, 3, colour.filled()))?;
                root.draw(&Circle::new(*c, 3, BLACK.stroke_width(1)))?;
            }
            marker(root, zone_shape(*zone), *last, 5, colour, BLACK)?;
        }
    }
    let grey = plot::text(13.0).color(&chart::GREY);
    for (name, at) in line_labels {
        Label::LINE.draw(root, &mut placer, at, name, &grey)?;
    }
    for id in a.summary.hidden.items.iter().take(8) {
        if let Some((zone, s, _)) = pts.iter().find(|p| &p.2 == id) {
            let c = px(*s.last().expect("not empty"));
            Label::boxed(zone_colour(*zone)).draw(root, &mut placer, c, id, &plot::bold(14.0))?;
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
            &format!("Effective strain path diagram: {part}"),
            &second,
            "Each location after each stage: accumulated effective strain against the direction (β) of the last increment",
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
        "solid: limit curve on straight paths",
        &band,
        "small dots: earlier stages, joined",
        "large marker: after the last stage",
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

    // On a straight path β = ε2/ε1 and ε̄ = (2/√3) √(ε1² + ε1ε2 + ε2²) (von Mises, plane
    // stress; Hill 1950): plane strain ε̄ = (2/√3) ε1, equibiaxial ε̄ = 2ε1, uniaxial β = −½
    // and ε̄ = ε1.
    #[test]
    fn straight_paths_map_to_their_ratio_and_effective_strain() {
        let (b, e) = straight([0.0, 0.3]).unwrap();
        assert!(b.abs() < 1e-9 && (e - 100.0 * 0.3 * 2.0 / 3f64.sqrt()).abs() < 1e-9);
        let (b, e) = straight([0.1, 0.1]).unwrap();
        assert!((b - 1.0).abs() < 1e-9 && (e - 20.0).abs() < 1e-9);
        let (b, e) = straight([-0.1, 0.2]).unwrap();
        assert!((b + 0.5).abs() < 1e-9 && (e - 20.0).abs() < 1e-9);
        assert!(straight([0.1, -0.1]).is_none());
    }
}
