//! The part map draws nothing of the part outside its plot area, at any size: read back from
//! the SVG, every cell, marker and outline segment lies inside the plot area's box, and the
//! shapes outside it (the colour bar, the legend's keys, tick marks) are exactly those of the
//! same map drawn with no location at all.

use neckline_core::analysis::{Analysis, Context, Lengths};
use neckline_core::assess::Settings;
use neckline_core::limit::LimitCurve;
use neckline_core::measure::{read_measurements_from, ColumnMap};
use neckline_core::output::fixture;
use neckline_core::point::state_of;
use neckline_core::summary::Bins;
use neckline_core::units::LengthUnit;
use neckline_render::chart::frame::{Look, MARGIN, X_LABEL_AREA};
use neckline_render::chart::{FOOTER_TOP, PLOT_RIGHT, TITLE_H};
use neckline_render::map::{map_svg, MapValue};
use std::path::Path;

/// An invented part: a 600 × 400 rectangle centred on the origin (so that both signs of x and
/// y occur) with a round hole of radius 60, sampled on a square lattice to about `n` points.
/// The strains vary over the part so that every zone colour occurs.
fn field_csv(n: usize, from: usize, to: usize) -> String {
    let (h, nx, _) = lattice(n);
    let mut s = String::from("id,major,minor,x,y\n");
    for k in from..to {
        let (x, y) = ((k % nx) as f64 * h - 300.0, (k / nx) as f64 * h - 200.0);
        if x.hypot(y - 40.0) < 60.0 {
            continue;
        }
        let e1 = 5.0 + 40.0 * ((x / 300.0).powi(2) + (y / 200.0).powi(2)) / 2.0;
        let e2 = -10.0 + 20.0 * (x / 300.0);
        let (d1, d2) = (2.5 * (1.0 + e1 / 100.0), 2.5 * (1.0 + e2.min(e1) / 100.0));
        s.push_str(&format!("P{k},{d1:.4},{d2:.4},{x:.3},{y:.3}\n"));
    }
    s
}

/// The lattice's pitch and its points across and up for about `n` points on the part.
fn lattice(n: usize) -> (f64, usize, usize) {
    let area = 600.0 * 400.0 - std::f64::consts::PI * 60.0 * 60.0;
    let h = (area / n as f64).sqrt();
    (h, (600.0 / h) as usize + 1, (400.0 / h) as usize + 1)
}

/// The field judged and folded chunk by chunk into one analysis (as `check` does, never
/// holding every location).
fn analysis(n: usize) -> Analysis {
    let curve = LimitCurve::parse(fixture::CURVE_TOML, Path::new("curve.toml")).unwrap();
    let lengths = Lengths {
        unit: LengthUnit::Mm,
        d0: Some(2.5),
        t0: Some(0.8),
    };
    let ctx = Context {
        curve,
        settings: Settings::default(),
        lengths,
        strain_input: false,
        true_input: false,
    };
    let file = Path::new("field.csv");
    let mut a = Analysis::new(
        file.to_path_buf(),
        fixture::job(),
        ctx.clone(),
        Default::default(),
        &[],
    );
    let (_, nx, ny) = lattice(n);
    let chunk = 50_000;
    for from in (0..nx * ny).step_by(chunk) {
        let text = field_csv(n, from, (from + chunk).min(nx * ny));
        let set = read_measurements_from(text.as_bytes(), file, &ColumnMap::default()).unwrap();
        for m in set.points {
            a.summary
                .fold(ctx.judge(state_of(m, file, &lengths).unwrap()));
        }
    }
    a.finish();
    a
}

/// The plot area's box in pixels: the frame's margin, the y tick labels' band and the x tick
/// labels' band taken off the plot's share of the picture (see `chart::frame`).
fn plot_box() -> (f64, f64, f64, f64) {
    (
        f64::from(MARGIN + Look::Map.y_label_area()),
        f64::from(TITLE_H + MARGIN),
        f64::from(PLOT_RIGHT - MARGIN),
        f64::from(FOOTER_TOP - MARGIN - X_LABEL_AREA),
    )
}

/// The value of attribute `name` in one SVG element.
fn attr<'a>(el: &'a str, name: &str) -> Option<&'a str> {
    let at = el.find(&format!(" {name}=\""))? + name.len() + 3;
    el[at..].split('"').next()
}

fn num(el: &str, name: &str) -> f64 {
    attr(el, name).and_then(|v| v.parse().ok()).unwrap_or(0.0)
}

/// Every shape of the SVG (rectangles, circles, polygons, polylines) with its box in pixels.
fn shapes(svg: &str) -> Vec<(String, [f64; 4])> {
    let mut v = Vec::new();
    for part in svg.split('<').skip(1) {
        let el = part.split('>').next().unwrap_or("");
        let name = el.split_whitespace().next().unwrap_or("");
        let b = match name {
            "rect" => {
                let (x, y) = (num(el, "x"), num(el, "y"));
                [x, y, x + num(el, "width"), y + num(el, "height")]
            }
            "circle" => {
                let (x, y, r) = (num(el, "cx"), num(el, "cy"), num(el, "r"));
                [x - r, y - r, x + r, y + r]
            }
            "polygon" | "polyline" => {
                let pts: Vec<(f64, f64)> = attr(el, "points")
                    .unwrap_or("")
                    .split_whitespace()
                    .filter_map(|p| {
                        let (x, y) = p.split_once(',')?;
                        Some((x.parse().ok()?, y.parse().ok()?))
                    })
                    .collect();
                pts.iter()
                    .fold([f64::MAX, f64::MAX, f64::MIN, f64::MIN], |b, &(x, y)| {
                        [b[0].min(x), b[1].min(y), b[2].max(x), b[3].max(y)]
                    })
            }
            _ => continue,
        };
        v.push((el.to_string(), b));
    }
    v
}

fn inside(b: [f64; 4], r: (f64, f64, f64, f64)) -> bool {
    b[0] >= r.0 - 0.5 && b[1] >= r.1 - 0.5 && b[2] <= r.2 + 0.5 && b[3] <= r.3 + 0.5
}

/// The shapes drawn wholly or partly outside the plot area, sorted.
fn outside(svg: &str) -> Vec<String> {
    let r = plot_box();
    let mut v: Vec<String> = shapes(svg)
        .into_iter()
        .filter(|(_, b)| !inside(*b, r))
        .map(|(el, _)| el)
        .collect();
    v.sort();
    v
}

fn check_map(n: usize) {
    let a = analysis(n);
    assert!(a.total() > n / 2, "{} locations for {n}", a.total());
    let svg = map_svg(&a, MapValue::Margin).unwrap().unwrap();
    // The same map with no location: its axes, colour bar and legend only.
    let mut empty = a.clone();
    empty.summary.map = Bins::new(0.01, 40_000);
    empty.summary.kept.clear();
    empty.summary.worst.clear();
    let bare = map_svg(&empty, MapValue::Margin).unwrap().unwrap();
    let (got, want) = (outside(&svg), outside(&bare));
    // The legend's keys and the colour bar are outside the plot area: the comparison is not
    // of two empty lists.
    assert!(want.len() > 10, "{n} points: {} shapes outside", want.len());
    let extra: Vec<&String> = got.iter().filter(|e| !want.contains(e)).collect();
    assert!(
        extra.is_empty() && got.len() == want.len(),
        "{n} points: {} shapes outside the plot area {:?} that the bare map has not, e.g. {:?}",
        extra.len(),
        plot_box(),
        extra.iter().take(5).collect::<Vec<_>>()
    );
    // And the part was drawn: cells or markers inside the plot area, and its outline.
    let r = plot_box();
    let drawn = shapes(&svg)
        .iter()
        .filter(|(el, b)| inside(*b, r) && !el.starts_with("polyline"))
        .count();
    assert!(
        drawn > 50,
        "{n} points: only {drawn} shapes in the plot area"
    );
    let edge = "stroke=\"#445566\"";
    let edges = shapes(&svg)
        .iter()
        .filter(|(el, b)| el.contains(edge) && inside(*b, r))
        .count();
    assert!(edges >= 1, "{n} points: the outline was not drawn");
    assert!(svg.contains("outline: traced from the points"));
}

#[test]
fn a_hundred_points_stay_in_the_plot_area() {
    check_map(100);
}

#[test]
fn ninety_thousand_points_stay_in_the_plot_area() {
    check_map(90_000);
}

#[test]
fn three_hundred_thousand_points_stay_in_the_plot_area() {
    check_map(300_000);
}
