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

use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult, Placer, Rect, SIZE};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use neckline_core::point::PointResult;
use neckline_core::strain::StrainMeasure;
use neckline_core::summary::point_xy;
use neckline_core::CAUTION;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

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

/// Thinning iso-lines drawn, percent.
pub const THINNING_LINES: [f64; 3] = [10.0, 20.0, 30.0];

/// The diagram as an SVG document.
pub fn fld_svg(a: &Analysis, opts: &FldOptions) -> io::Result<String> {
    plot::render_svg(SIZE, |root| draw(root, a, opts))
}

/// The diagram as a PNG image.
pub fn fld_png(a: &Analysis, opts: &FldOptions) -> io::Result<Vec<u8>> {
    plot::render_png(SIZE, |root| draw(root, a, opts))
}

type Line = Vec<(f64, f64)>;

/// The limit curve in axis coordinates (percent of `measure`).
pub fn curve_line(a: &Analysis, measure: StrainMeasure) -> Line {
    a.curve
        .true_polyline(16)
        .iter()
        .map(|p| {
            (
                plot::axis_value(measure, p[0]),
                plot::axis_value(measure, p[1]),
            )
        })
        .collect()
}

/// The safety-band line: the curve's engineering major strain minus the margin, in axis
/// coordinates. Points where that would be no strain at all (e ≤ −1) are left out.
pub fn band_line(a: &Analysis, measure: StrainMeasure) -> Line {
    let m = a.settings.margin_pct / 100.0;
    a.curve
        .true_polyline(16)
        .iter()
        .filter_map(|p| {
            let e1 = p[1].exp() - 1.0 - m;
            (e1 > -1.0).then(|| {
                (
                    plot::axis_value(measure, p[0]),
                    plot::axis_value(measure, (1.0 + e1).ln()),
                )
            })
        })
        .collect()
}

/// A straight path in true strain, `(ε2, ε1) = s·(dir)`, for `s` in `0..=2`, in axis coordinates.
fn ray(dir: (f64, f64), measure: StrainMeasure) -> Line {
    (0..=400)
        .map(|k| {
            let s = k as f64 * 0.005;
            (
                plot::axis_value(measure, s * dir.0),
                plot::axis_value(measure, s * dir.1),
            )
        })
        .collect()
}

/// The reference strain paths with their labels.
pub fn reference_paths(measure: StrainMeasure) -> Vec<(&'static str, Line)> {
    vec![
        ("uniaxial β = −½", ray((-0.5, 1.0), measure)),
        ("plane strain β = 0", ray((0.0, 1.0), measure)),
        ("equibiaxial β = 1", ray((1.0, 1.0), measure)),
        ("constant thickness ε1 = −ε2", ray((-1.0, 1.0), measure)),
    ]
}

/// The thinning iso-line for `pct` percent: ε1 + ε2 = −ln(1 − pct/100), drawn from the
/// equibiaxial line (ε1 = ε2) towards negative minor strain, in axis coordinates.
pub fn thinning_line(pct: f64, measure: StrainMeasure) -> Line {
    let c = -(1.0 - pct / 100.0).ln();
    (0..=400)
        .map(|k| {
            let e2 = c / 2.0 - k as f64 * 0.005;
            (
                plot::axis_value(measure, e2),
                plot::axis_value(measure, c - e2),
            )
        })
        .collect()
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

const TITLE_H: i32 = 92;
const PLOT_RIGHT: i32 = 870;
const FOOTER_TOP: i32 = 800;
const PANEL_LEFT: i32 = 885;

fn draw<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
) -> DrawResult<DB> {
    root.fill(&WHITE)?;
    let m = opts.measure;
    let (xr, yr) = ranges(a, m);
    let area = root.clone().shrink(
        (0, TITLE_H),
        (PLOT_RIGHT as u32, (FOOTER_TOP - TITLE_H) as u32),
    );
    let mut chart = ChartBuilder::on(&area)
        .margin(12)
        .x_label_area_size(50)
        .y_label_area_size(62)
        .build_cartesian_2d(xr.0..xr.1, yr.0..yr.1)?;
    let word = plot::measure_word(m);
    chart
        .configure_mesh()
        .x_desc(format!("minor strain ε2, {word} %"))
        .y_desc(format!("major strain ε1, {word} %"))
        .axis_desc_style(plot::text(17.0))
        .label_style(plot::text(14.0))
        .x_label_formatter(&|v| plot::tick(*v, xr.1 - xr.0))
        .y_label_formatter(&|v| plot::tick(*v, yr.1 - yr.0))
        .light_line_style(RGBColor(240, 240, 240))
        .bold_line_style(RGBColor(215, 215, 215))
        .draw()?;
    let px = |p: (f64, f64)| chart.backend_coord(&p);
    let path_px = |line: &Line| -> Vec<Vec<(i32, i32)>> {
        plot::clip_polyline(line, xr, yr)
            .iter()
            .map(|run| run.iter().map(|p| px(*p)).collect())
            .collect()
    };
    let grey = RGBColor(120, 120, 120);
    let light = RGBColor(165, 165, 165);
    let mut line_labels: Vec<(String, (i32, i32), RGBColor)> = Vec::new();
    for pct in THINNING_LINES {
        let runs = path_px(&thinning_line(pct, m));
        for run in &runs {
            for d in plot::dashes(run, 3.0, 4.0) {
                root.draw(&PathElement::new(d, light.stroke_width(1)))?;
            }
        }
        if let Some(end) = runs.last().and_then(|r| r.last()) {
            line_labels.push((format!("{pct:.0} % thinning"), *end, grey));
        }
    }
    for (name, line) in reference_paths(m) {
        let runs = path_px(&line);
        for run in &runs {
            for d in plot::dashes(run, 10.0, 4.0) {
                root.draw(&PathElement::new(d, grey.stroke_width(1)))?;
            }
        }
        if let Some(end) = runs.last().and_then(|r| r.last()) {
            line_labels.push((name.to_string(), *end, grey));
        }
    }
    if let Some(max) = a.settings.max_thinning_pct.filter(|_| !opts.curve_only) {
        let runs = path_px(&thinning_line(max, m));
        for run in &runs {
            for d in plot::dashes(run, 14.0, 3.0) {
                root.draw(&PathElement::new(
                    d,
                    zone_colour(Zone::Failed).stroke_width(3),
                ))?;
            }
        }
        if let Some(end) = runs.last().and_then(|r| r.last()) {
            line_labels.push((
                format!("max thinning {} %", neckline_core::output::fmt_setting(max)),
                *end,
                BLACK,
            ));
        }
    }
    let band = if opts.curve_only {
        Vec::new()
    } else {
        path_px(&band_line(a, m))
    };
    for run in &band {
        for d in plot::dashes(run, 9.0, 6.0) {
            root.draw(&PathElement::new(d, BLACK.stroke_width(2)))?;
        }
    }
    let curve = path_px(&curve_line(a, m));
    for run in &curve {
        root.draw(&PathElement::new(run.clone(), BLACK.stroke_width(3)))?;
    }
    let plot_box = plot_rect(&chart);
    let mut placer = Placer::new((
        plot_box.0 + 2,
        plot_box.1 + 2,
        plot_box.2 - 2,
        plot_box.3 - 2,
    ));
    if draws_density(a, m) && !opts.curve_only {
        draw_density(root, a, &px, (xr.1 - xr.0).max(yr.1 - yr.0))?;
    }
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
    draw_line_labels(root, &line_labels, &mut placer)?;
    draw_title(root, a, m)?;
    draw_legend(root, a, opts)?;
    draw_footer(root, a)
}

fn plot_rect<DB: DrawingBackend>(
    chart: &ChartContext<
        DB,
        Cartesian2d<plotters::coord::types::RangedCoordf64, plotters::coord::types::RangedCoordf64>,
    >,
) -> Rect {
    let (xs, ys) = chart.plotting_area().get_pixel_range();
    (xs.start, ys.start, xs.end, ys.end)
}

/// Cells across the diagram's longer axis when locations are drawn as a density.
pub const DENSITY_CELLS: usize = 110;

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
    for p in a.points() {
        let (x, y) = point_xy(p, m);
        *kept.entry(bins.key(x, y)).or_default() += 1;
    }
    let quiet = [
        Zone::Uncovered,
        Zone::Thickening,
        Zone::LowStretch,
        Zone::Safe,
    ];
    let risk = [Zone::Failed, Zone::Marginal];
    // Per cell: key, quiet population and its main zone, at-risk overflow and its zone.
    type Shade = ((i64, i64), u32, Zone, u32, Zone);
    let cells: Vec<Shade> = bins
        .cells()
        .iter()
        .map(|(k, c)| {
            let n = |z: Zone| c.0[z as usize];
            let pop: u32 = quiet.iter().map(|z| n(*z)).sum();
            let top = *quiet.iter().max_by_key(|z| n(**z)).unwrap_or(&Zone::Safe);
            let over = risk.iter().map(|z| n(*z)).sum::<u32>() - kept.get(k).copied().unwrap_or(0);
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
        for p in a.points().iter().filter(|p| p.zone() == *zone) {
            let c = px(point_xy(p, m));
            marker(root, zone_shape(*zone), c, 5, zone_colour(*zone), BLACK)?;
            if p.judgement.borderline {
                borderline_ring(root, c, 11)?;
            }
            placer.obstacles.push((c.0 - 6, c.1 - 6, c.0 + 6, c.1 + 6));
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
    for d in plot::dashes(&pts, 4.0, 3.0) {
        root.draw(&PathElement::new(d, BLACK.stroke_width(1)))?;
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
        let (w, h) = root.estimate_text_size(&text, &style)?;
        let (w, h) = (w as i32 + 6, h as i32 + 4);
        let at = placer.place(c, w, h);
        leader(root, c, (at.0, at.1, at.0 + w, at.1 + h))?;
        root.draw(&Rectangle::new(
            [at, (at.0 + w, at.1 + h)],
            RGBColor(255, 255, 255).mix(0.85).filled(),
        ))?;
        root.draw(&Rectangle::new(
            [at, (at.0 + w, at.1 + h)],
            zone_colour(p.zone()).stroke_width(1),
        ))?;
        root.draw_text(&text, &style, (at.0 + 3, at.1 + 2))?;
    }
    Ok(())
}

/// A thin line from a marker to the nearest point of its label box.
fn leader<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    from: (i32, i32),
    r: Rect,
) -> DrawResult<DB> {
    let to = (from.0.clamp(r.0, r.2), from.1.clamp(r.1, r.3));
    if (to.0 - from.0).abs() + (to.1 - from.1).abs() > 8 {
        root.draw(&PathElement::new(vec![from, to], BLACK.stroke_width(1)))?;
    }
    Ok(())
}

fn draw_line_labels<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    labels: &[(String, (i32, i32), RGBColor)],
    placer: &mut Placer,
) -> DrawResult<DB> {
    for (text, anchor, colour) in labels {
        let style = plot::text(13.0).color(colour);
        let (w, h) = root.estimate_text_size(text, &style)?;
        let (w, h) = (w as i32 + 4, h as i32 + 2);
        let at = placer.place(*anchor, w, h);
        root.draw(&Rectangle::new(
            [at, (at.0 + w, at.1 + h)],
            WHITE.mix(0.8).filled(),
        ))?;
        root.draw_text(text, &style, (at.0 + 2, at.1 + 1))?;
    }
    Ok(())
}

/// Job and curve line of the title, shared with the map.
pub fn title_lines(a: &Analysis) -> (String, String, String) {
    let j = &a.job;
    let part = j.part.as_deref().unwrap_or("(part not named)");
    let mut second = Vec::new();
    if let Some(t) = &j.tryout {
        second.push(format!("tryout {t}"));
    }
    if let Some(m) = &j.material {
        second.push(m.clone());
    }
    if let Some(d) = &j.die {
        second.push(format!("die {d}"));
    }
    second.push(neckline_core::output::count_of(a.total(), "location"));
    let third = format!("Limit curve: {}, source: {}", a.curve.name, a.curve.source);
    (part.to_string(), second.join("  ·  "), third)
}

fn draw_title<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    m: StrainMeasure,
) -> DrawResult<DB> {
    let (part, second, third) = title_lines(a);
    let head = format!("Forming-limit diagram: {part}");
    let width = SIZE.0 - 30;
    let t1 = plot::fit_px(root, &head, &plot::bold(23.0), width);
    root.draw_text(&t1, &plot::bold(23.0), (15, 10))?;
    let t2 = plot::fit_px(root, &second, &plot::text(16.0), width);
    root.draw_text(&t2, &plot::text(16.0), (15, 40))?;
    let t3 = format!("{third}  ({} strain axes)", plot::measure_word(m));
    let t3 = plot::fit_px(root, &t3, &plot::text(14.0), width);
    root.draw_text(&t3, &plot::text(14.0), (15, 64))
}

fn draw_legend<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
) -> DrawResult<DB> {
    let x = PANEL_LEFT;
    let mut y = TITLE_H + 16;
    if !opts.curve_only {
        y = draw_zone_legend(root, a, opts, y)?;
    }
    root.draw_text("Lines", &plot::bold(16.0), (x, y))?;
    y += 26;
    let sample = |y: i32| vec![(x, y + 8), (x + 40, y + 8)];
    root.draw(&PathElement::new(sample(y), BLACK.stroke_width(3)))?;
    root.draw_text("limit curve", &plot::text(14.0), (x + 50, y))?;
    y += 22;
    if !opts.curve_only {
        for d in plot::dashes(&sample(y), 9.0, 6.0) {
            root.draw(&PathElement::new(d, BLACK.stroke_width(2)))?;
        }
        root.draw_text(&band_label(a, opts.measure), &plot::text(14.0), (x + 50, y))?;
        y += 22;
        if let Some(max) = a.settings.max_thinning_pct {
            for d in plot::dashes(&sample(y), 14.0, 3.0) {
                root.draw(&PathElement::new(
                    d,
                    zone_colour(Zone::Failed).stroke_width(3),
                ))?;
            }
            let t = format!("max thinning {} %", neckline_core::output::fmt_setting(max));
            root.draw_text(&t, &plot::text(14.0), (x + 50, y))?;
            y += 22;
        }
    }
    for d in plot::dashes(&sample(y), 10.0, 4.0) {
        root.draw(&PathElement::new(
            d,
            RGBColor(120, 120, 120).stroke_width(1),
        ))?;
    }
    root.draw_text("strain paths", &plot::text(14.0), (x + 50, y))?;
    y += 22;
    for d in plot::dashes(&sample(y), 3.0, 4.0) {
        root.draw(&PathElement::new(
            d,
            RGBColor(165, 165, 165).stroke_width(1),
        ))?;
    }
    root.draw_text("thinning iso-lines", &plot::text(14.0), (x + 50, y))?;
    if !a.summary.observed_failed.is_empty() && !opts.curve_only {
        y += 22;
        root.draw(&Circle::new((x + 20, y + 8), 8, BLACK.stroke_width(2)))?;
        root.draw_text("observed necked or split", &plot::text(14.0), (x + 50, y))?;
    }
    y += 34;
    if opts.curve_only {
        return Ok(());
    }
    let worst = a.worst(opts.labelled.max(1));
    if worst.is_empty() {
        return Ok(());
    }
    root.draw_text(
        "Worst: failed first, then margin",
        &plot::bold(15.0),
        (x, y),
    )?;
    y += 24;
    for p in worst {
        let text = worst_label(p, &a.settings, opts.measure);
        let text = plot::fit_px(root, &text, &plot::text(13.0), SIZE.0 - x as u32 - 40);
        marker(
            root,
            zone_shape(p.zone()),
            (x + 6, y + 8),
            5,
            zone_colour(p.zone()),
            BLACK,
        )?;
        root.draw_text(&text, &plot::text(13.0), (x + 18, y))?;
        y += 20;
    }
    Ok(())
}

/// The zones with their markers and counts; returns the next free line.
fn draw_zone_legend<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
    opts: &FldOptions,
    mut y: i32,
) -> Result<i32, DrawingAreaErrorKind<DB::ErrorType>> {
    let x = PANEL_LEFT;
    root.draw_text("Zones (locations)", &plot::bold(16.0), (x, y))?;
    y += 28;
    if draws_density(a, opts.measure) {
        let note = format!(
            "shaded cells: density of {} locations; markers: {} failed or marginal",
            a.total(),
            a.points().len()
        );
        for line in plot::wrap_px(root, &note, &plot::text(12.0), 300) {
            root.draw_text(&line, &plot::text(12.0), (x, y))?;
            y += 15;
        }
        y += 6;
    }
    for (zone, n) in a.counts() {
        marker(
            root,
            zone_shape(zone),
            (x + 10, y + 8),
            6,
            zone_colour(zone),
            BLACK,
        )?;
        root.draw_text(zone.name(), &plot::text(15.0), (x + 28, y))?;
        let count = n.to_string();
        let (w, _) = root.estimate_text_size(&count, &plot::bold(15.0))?;
        root.draw_text(&count, &plot::bold(15.0), (x + 200 - w as i32, y))?;
        y += 25;
    }
    if a.borderline().1 > 0 {
        borderline_ring(root, (x + 10, y + 8), 9)?;
        root.draw_text("borderline", &plot::text(15.0), (x + 28, y))?;
        let count = a.borderline().1.to_string();
        let (w, _) = root.estimate_text_size(&count, &plot::bold(15.0))?;
        root.draw_text(&count, &plot::bold(15.0), (x + 200 - w as i32, y))?;
        y += 25;
    }
    Ok(y + 12)
}

/// The caution and a provenance line at the bottom of a picture.
pub fn draw_footer<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
) -> DrawResult<DB> {
    let style = plot::text(13.0).color(&RGBColor(60, 60, 60));
    let mut y = FOOTER_TOP + 8;
    root.draw(&PathElement::new(
        vec![(15, FOOTER_TOP), (SIZE.0 as i32 - 15, FOOTER_TOP)],
        RGBColor(200, 200, 200).stroke_width(1),
    ))?;
    for line in plot::wrap_px(root, CAUTION, &style, SIZE.0 - 30) {
        root.draw_text(&line, &style, (15, y))?;
        y += 17;
    }
    let prov = format!(
        "neckline {}  ·  margin = limit curve minus major strain, percentage points of engineering strain  ·  input {}",
        env!("CARGO_PKG_VERSION"),
        a.input.file_name().map_or_else(|| "-".into(), |n| n.to_string_lossy().into_owned())
    );
    let prov = plot::fit_px(root, &prov, &style, SIZE.0 - 30);
    root.draw_text(&prov, &style, (15, y))
}

#[cfg(test)]
mod tests {
    use super::*;
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

    #[test]
    fn thinning_lines_hold_constant_thickness_product() {
        // t/t0 = 1/(λ1 λ2) by constant volume (any continuum mechanics text): on the 20 % line,
        // (1 + e1)(1 + e2) = 1 / 0.8 = 1.25 in engineering strain.
        for (x, y) in thinning_line(20.0, StrainMeasure::Engineering) {
            assert!(((1.0 + x / 100.0) * (1.0 + y / 100.0) - 1.25).abs() < 1e-9);
            assert!(y >= x - 1e-9, "major below minor at ({x}, {y})");
        }
    }

    #[test]
    fn reference_paths_have_their_strain_ratios() {
        // Uniaxial tension of an isotropic sheet: β = ε2/ε1 = −1/2 in true strain, i.e.
        // 1 + e2 = (1 + e1)^(−1/2) in engineering strain (FIELD notes §2, common practice).
        let paths = reference_paths(StrainMeasure::Engineering);
        for (x, y) in &paths[0].1[1..] {
            let beta = (1.0 + x / 100.0).ln() / (1.0 + y / 100.0).ln();
            assert!((beta + 0.5).abs() < 1e-9);
        }
        // Equibiaxial: e1 = e2.
        assert!(paths[2].1.iter().all(|(x, y)| (x - y).abs() < 1e-9));
    }

    #[test]
    fn band_is_curve_minus_margin_in_engineering_major() {
        let a = fixture::analysis(true);
        let c = curve_line(&a, StrainMeasure::Engineering);
        let b = band_line(&a, StrainMeasure::Engineering);
        assert_eq!(c.len(), b.len());
        for (p, q) in c.iter().zip(&b) {
            assert!((p.0 - q.0).abs() < 1e-9 && (p.1 - q.1 - 10.0).abs() < 1e-9);
        }
    }
}
