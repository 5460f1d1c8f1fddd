//! The pictures of a laboratory curve from test sections (`limit from-sections --plot DIR`):
//! one page of small multiples per geometry (each section's profile with the crack, the fit
//! windows and the fitted inverse parabolas), the curve with each geometry's points and scatter
//! bars, and the printable `sections.html` with the report's sign-off block.

use crate::chart::footer::draw_footer;
use crate::chart::legend::{Entries, Key, Legend, Row, LINES};
use crate::chart::title::draw_title;
use crate::chart::{self, Stroke, PANEL_LEFT, TITLE_H};
use crate::fld;
use crate::page;
use crate::plot::{self, okabe_ito};
use maud::html;
use neckline_core::limit::sections::{GeometryStats, LabWords, SectionResult, LAB_CURVE_WORDS};
use neckline_core::limit::LimitCurve;
use plotters::coord::Shift;
use plotters::prelude::*;
use std::io;

/// The major strain's points and fit (Okabe-Ito blue; Okabe & Ito 2008).
const MAJOR: RGBColor = RGBColor(0x00, 0x72, 0xB2);
/// The minor strain's points and fit (Okabe-Ito vermillion).
const MINOR: RGBColor = okabe_ito::VERMILLION;
/// The fit windows (a light Okabe-Ito sky blue).
const WINDOW: RGBColor = RGBColor(0xD6, 0xEC, 0xF8);
/// Columns of small multiples on a geometry's page.
const COLUMNS: usize = 3;
/// Height of one row of small multiples, pixels.
const ROW_H: u32 = 250;

/// The sections of one geometry, in file order.
pub fn of_geometry<'a>(results: &'a [SectionResult], geometry: &str) -> Vec<&'a SectionResult> {
    results
        .iter()
        .filter(|r| r.profile.key.geometry == geometry)
        .collect()
}

/// The size of a geometry's page of `n` sections.
fn profiles_size(n: usize) -> (u32, u32) {
    let rows = n.div_ceil(COLUMNS).max(1) as u32;
    (plot::SIZE.0, TITLE_H as u32 + rows * ROW_H + 70)
}

/// One geometry's sections as small multiples, SVG.
pub fn profiles_svg(geometry: &str, sections: &[&SectionResult]) -> io::Result<String> {
    plot::render_svg(profiles_size(sections.len()), |root| {
        draw_profiles(root, geometry, sections)
    })
}

/// One geometry's sections as small multiples, PNG.
pub fn profiles_png(geometry: &str, sections: &[&SectionResult]) -> io::Result<Vec<u8>> {
    plot::render_png(profiles_size(sections.len()), |root| {
        draw_profiles(root, geometry, sections)
    })
}

fn draw_profiles<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    geometry: &str,
    sections: &[&SectionResult],
) -> plot::DrawResult<DB> {
    root.fill(&WHITE)?;
    let valid = sections.iter().filter(|r| r.problems.is_empty()).count();
    draw_title(
        root,
        [
            &format!("Section profiles: geometry {geometry}"),
            &format!(
                "{} sections, {valid} valid  ·  true strain %  ·  blue major, vermillion minor; \
                 shaded: fit windows; dashed: crack; ◆ limit at the crack",
                sections.len()
            ),
            "position-dependent method after ISO 12004-2 (as neckline implements it)",
        ],
    )?;
    let (w, h) = root.dim_in_pixel();
    let body = root
        .clone()
        .shrink((0, TITLE_H), (w, h - TITLE_H as u32 - 40));
    let rows = sections.len().div_ceil(COLUMNS).max(1);
    let cells = body.split_evenly((rows, COLUMNS));
    for (cell, r) in cells.iter().zip(sections) {
        draw_section(cell, r)?;
    }
    let foot = root.clone().shrink((0, h as i32 - 36), (w, 36));
    foot.draw_text(
        &chart::footer::provenance(&[
            "each panel: geometry · specimen · section; a red title: a check failed",
        ]),
        &plot::text(13.0).color(&RGBColor(60, 60, 60)),
        (chart::TEXT_LEFT, 10),
    )
}

/// One section's panel.
fn draw_section<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    r: &SectionResult,
) -> plot::DrawResult<DB> {
    let p = &r.profile;
    let pct = |v: f64| 100.0 * v;
    let (mut x0, mut x1) = (f64::INFINITY, f64::NEG_INFINITY);
    for &x in p.x.iter().chain(&p.gaps) {
        x0 = x0.min(x);
        x1 = x1.max(x);
    }
    let (mut y0, mut y1) = (0.0f64, 1.0f64);
    for &v in p.major.iter().chain(&p.minor) {
        y0 = y0.min(pct(v));
        y1 = y1.max(pct(v));
    }
    if !x0.is_finite() {
        (x0, x1) = (0.0, 1.0);
    }
    let pad = 0.08 * (y1 - y0);
    let (y0, y1) = (y0 - pad, y1 + pad);
    let title_colour = if r.problems.is_empty() {
        BLACK
    } else {
        plot::palette::RED
    };
    let head = format!(
        "{} · {} · {}",
        p.key.geometry, p.key.specimen, p.key.section
    );
    let mut chart = ChartBuilder::on(area)
        .margin(6)
        .margin_right(18)
        .caption(head, plot::text(14.0).color(&title_colour))
        .x_label_area_size(22)
        .y_label_area_size(36)
        .build_cartesian_2d(x0..x1, y0..y1)?;
    chart
        .configure_mesh()
        .label_style(plot::text(11.0))
        .light_line_style(RGBColor(238, 238, 238))
        .bold_line_style(RGBColor(215, 215, 215))
        .x_labels(6)
        .y_labels(5)
        .draw()?;
    if let Some(f) = &r.fit {
        for (w, sign) in f.windows.iter().zip([-1.0, 1.0]) {
            if let Some(w) = w {
                let (a, b) = (f.crack + sign * w.from, f.crack + sign * w.to);
                chart.draw_series(std::iter::once(Rectangle::new(
                    [(a.min(b), y0), (a.max(b), y1)],
                    WINDOW.filled(),
                )))?;
            }
        }
        chart.draw_series(DashedLineSeries::new(
            [(f.crack, y0), (f.crack, y1)],
            4,
            3,
            BLACK.stroke_width(1),
        ))?;
    }
    chart.draw_series(
        p.x.iter()
            .zip(&p.minor)
            .map(|(&x, &v)| Circle::new((x, pct(v)), 2, MINOR.filled())),
    )?;
    chart.draw_series(
        p.x.iter()
            .zip(&p.major)
            .map(|(&x, &v)| Circle::new((x, pct(v)), 2, MAJOR.filled())),
    )?;
    chart.draw_series(
        p.gaps
            .iter()
            .map(|&x| Cross::new((x, y0 + 0.5 * pad), 3, BLACK.stroke_width(1))),
    )?;
    if let Some(f) = &r.fit {
        let reach = |k: usize| f.windows[k].map_or(0.0, |w| w.to);
        let (lo, hi) = (-reach(0), reach(1));
        let line = |g: &dyn Fn(f64) -> Option<f64>| -> Vec<(f64, f64)> {
            (0..=120)
                .filter_map(|k| {
                    let u = lo + (hi - lo) * k as f64 / 120.0;
                    g(u).map(|v| (f.crack + u, pct(v)))
                })
                .filter(|p| p.1 >= y0 && p.1 <= y1)
                .collect()
        };
        if let Some(m) = f.major {
            chart.draw_series(LineSeries::new(line(&|u| m.at(u)), MAJOR.stroke_width(2)))?;
        }
        if let Some(m) = f.minor {
            chart.draw_series(LineSeries::new(line(&|u| m.at(u)), MINOR.stroke_width(2)))?;
        }
        if let Some([e2, e1]) = f.limit {
            for (v, c) in [(e1, MAJOR), (e2, MINOR)] {
                let at = (f.crack, pct(v));
                let diamond = EmptyElement::at(at)
                    + Polygon::new(vec![(0, -6), (6, 0), (0, 6), (-6, 0)], c.filled())
                    + PathElement::new(
                        vec![(0, -6), (6, 0), (0, 6), (-6, 0), (0, -6)],
                        BLACK.stroke_width(1),
                    );
                chart.draw_series(std::iter::once(diamond))?;
            }
            let text = format!("ε1 {:.2}  ε2 {:.2}", pct(e1), pct(e2));
            chart.draw_series(std::iter::once(Text::new(
                text,
                (x0 + 0.03 * (x1 - x0), y1 - 0.06 * (y1 - y0)),
                plot::text(12.0),
            )))?;
        }
    }
    if let Some(first) = r.problems.first() {
        let words = first.to_string();
        let short: String = words.chars().take(60).collect();
        chart.draw_series(std::iter::once(Text::new(
            if words.len() > short.len() {
                format!("{short}…")
            } else {
                short
            },
            (x0 + 0.03 * (x1 - x0), y1 - 0.14 * (y1 - y0)),
            plot::text(11.0).color(&plot::palette::RED),
        )))?;
    }
    Ok(())
}

/// The curve with each geometry's points and scatter bars, SVG.
pub fn curve_svg(
    curve: &LimitCurve,
    stats: &[GeometryStats],
    results: &[SectionResult],
) -> io::Result<String> {
    let d = CurvePlot {
        curve,
        stats,
        results,
    };
    plot::render_svg(plot::SIZE, |root| d.draw(root))
}

/// The curve with each geometry's points and scatter bars, PNG.
pub fn curve_png(
    curve: &LimitCurve,
    stats: &[GeometryStats],
    results: &[SectionResult],
) -> io::Result<Vec<u8>> {
    let d = CurvePlot {
        curve,
        stats,
        results,
    };
    plot::render_png(plot::SIZE, |root| d.draw(root))
}

struct CurvePlot<'a> {
    curve: &'a LimitCurve,
    stats: &'a [GeometryStats],
    results: &'a [SectionResult],
}

/// One section's limit pair (a small grey dot).
const SECTION_DOT: RGBColor = RGBColor(150, 150, 150);
/// The scatter band of the curve (± one standard deviation of the major strain).
pub const SCATTER_FILL: RGBColor = RGBColor(0xDD, 0xDD, 0xDD);

impl CurvePlot<'_> {
    fn points_pct(&self) -> Vec<(f64, f64)> {
        self.curve
            .points
            .iter()
            .map(|p| (100.0 * p[0], 100.0 * p[1]))
            .collect()
    }

    fn ranges(&self) -> ((f64, f64), (f64, f64)) {
        let mut pts = self.points_pct();
        pts.extend(
            self.results
                .iter()
                .filter_map(|r| r.limit())
                .map(|l| (100.0 * l[0], 100.0 * l[1])),
        );
        let (mut x, mut y) = ((0.0f64, 0.0f64), (0.0f64, 0.0f64));
        for (a, b) in pts {
            x = (x.0.min(a), x.1.max(a));
            y = (y.0.min(b), y.1.max(b));
        }
        let out = |lo: f64, hi: f64| ((lo / 5.0).floor() * 5.0, (hi / 5.0).ceil() * 5.0);
        (out(x.0 - 5.0, x.1 + 5.0), out(y.0 - 3.0, y.1 * 1.1 + 3.0))
    }

    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> plot::DrawResult<DB> {
        root.fill(&WHITE)?;
        let (xr, yr) = self.ranges();
        let plot = fld::true_strain_frame(root, xr, yr)?;
        let px = |p: (f64, f64)| plot.px(p);
        let pts = self.points_pct();
        if let Some(sc) = &self.curve.scatter {
            let upper: Vec<(i32, i32)> = pts
                .iter()
                .zip(sc)
                .map(|(p, s)| px((p.0, p.1 + 100.0 * s[1])))
                .collect();
            let lower: Vec<(i32, i32)> = pts
                .iter()
                .zip(sc)
                .rev()
                .map(|(p, s)| px((p.0, p.1 - 100.0 * s[1])))
                .collect();
            let poly: Vec<(i32, i32)> = upper.into_iter().chain(lower).collect();
            root.draw(&Polygon::new(poly, SCATTER_FILL.filled()))?;
        }
        for r in self.results {
            if let Some(l) = r.limit() {
                root.draw(&Circle::new(
                    px((100.0 * l[0], 100.0 * l[1])),
                    3,
                    SECTION_DOT.filled(),
                ))?;
            }
        }
        for run in plot.runs(&pts) {
            chart::CURVE.draw(root, &run)?;
        }
        for g in self.stats.iter().filter(|g| g.used > 0) {
            let (x, y) = (100.0 * g.mean[0], 100.0 * g.mean[1]);
            let (sx, sy) = (100.0 * g.sd[0], 100.0 * g.sd[1]);
            for seg in [[(x - sx, y), (x + sx, y)], [(x, y - sy), (x, y + sy)]] {
                let (a, b) = (px(seg[0]), px(seg[1]));
                root.draw(&PathElement::new(vec![a, b], MAJOR.stroke_width(2)))?;
            }
            let c = px((x, y));
            root.draw(&Rectangle::new(
                [(c.0 - 5, c.1 - 5), (c.0 + 5, c.1 + 5)],
                MAJOR.filled(),
            ))?;
            root.draw(&Rectangle::new(
                [(c.0 - 5, c.1 - 5), (c.0 + 5, c.1 + 5)],
                BLACK.stroke_width(1),
            ))?;
            root.draw_text(&g.geometry, &plot::text(13.0), (c.0 + 8, c.1 - 20))?;
        }
        let used = self.stats.iter().filter(|g| g.used > 0).count();
        let sections: usize = self.stats.iter().map(|g| g.sections).sum();
        let valid: usize = self.stats.iter().map(|g| g.valid).sum();
        draw_title(
            root,
            [
                &format!("Forming-limit diagram: {}", self.curve.name),
                &format!(
                    "{used} geometries  ·  {sections} sections, {valid} valid{}",
                    self.curve
                        .material
                        .as_deref()
                        .map(|m| format!("  ·  {m}"))
                        .unwrap_or_default()
                ),
                "laboratory curve from test sections, after ISO 12004-2  (true strain axes)",
            ],
        )?;
        self.legend().draw(root)?;
        draw_footer(
            root,
            &["points: mean of each geometry's valid sections; bars and band: ± one standard deviation"],
        )
    }

    fn legend(&self) -> Legend {
        let mut l = Legend::new(PANEL_LEFT, TITLE_H + 16);
        l.heading("Curve and evidence", 16.0, 28);
        let line = |stroke: Stroke| Key::Line { stroke, len: 40 };
        let mean = Key::Marker {
            shape: plot::Shape::Square,
            fill: MAJOR,
            r: 5,
            dx: 20,
        };
        let dot = Key::Circle {
            dx: 20,
            r: 3,
            style: SECTION_DOT.filled(),
        };
        for (key, text) in [
            (line(chart::CURVE), "curve written (means)"),
            (mean, "geometry mean, ± 1 s.d. bars"),
            (
                Key::Patch(SCATTER_FILL.filled()),
                "± 1 s.d. of major strain",
            ),
            (dot, "one valid section"),
            (line(chart::REFERENCE), "strain paths"),
        ] {
            l.push(Row::entry(key, text, &Entries { step: 24, ..LINES }));
        }
        l.gap(12);
        l.heading("Geometries (true %)", 16.0, 24);
        let columns = [55, 115, 175, 225];
        let row = |cells: [String; 4], step| {
            cells
                .into_iter()
                .zip(columns)
                .fold(Row::new(step), |r, (text, at)| {
                    r.right(text, plot::text(13.0), at)
                })
        };
        l.push(row(["geom.", "minor", "major", "n"].map(String::from), 19));
        for g in self.stats {
            let cells = if g.used > 0 {
                [
                    g.geometry.clone(),
                    format!("{:.1}", 100.0 * g.mean[0]),
                    format!("{:.1}±{:.1}", 100.0 * g.mean[1], 100.0 * g.sd[1]),
                    format!("{}", g.used),
                ]
            } else {
                [g.geometry.clone(), "—".into(), "—".into(), "0".into()]
            };
            l.push(row(cells, 18));
        }
        l
    }
}

/// What the page says about the series besides the pictures.
pub struct SectionsPage<'a> {
    /// The curve as written and read back.
    pub curve: &'a LimitCurve,
    /// Per geometry.
    pub stats: &'a [GeometryStats],
    /// Every section.
    pub results: &'a [SectionResult],
    /// The file, its digest and the lab words.
    pub words: &'a LabWords,
    /// Warnings about the series.
    pub warnings: &'a [String],
    /// Rows rejected, as text.
    pub rejected: &'a [String],
}

/// The printable `sections.html`: the summary with the per-geometry table, the warnings and the
/// sign-off block, the curve, then a page of profiles per geometry.
pub fn sections_page(p: &SectionsPage<'_>) -> io::Result<String> {
    let curve = curve_svg(p.curve, p.stats, p.results)?;
    let mut geometry_pages = Vec::new();
    for g in p.stats {
        let mine = of_geometry(p.results, &g.geometry);
        geometry_pages.push((g.geometry.clone(), profiles_svg(&g.geometry, &mine)?));
    }
    let invalid: Vec<&SectionResult> = p
        .results
        .iter()
        .filter(|r| !r.problems.is_empty())
        .collect();
    let body = html! {
        (page::section("summary", html! {
            h1 { "Laboratory forming-limit curve from test sections" }
            p { b { (p.curve.name) } }
            p { "Data: " (p.words.file) " (SHA-256 " code { (p.words.sha256) } ")." }
            @for (what, v) in [("Laboratory", &p.words.lab), ("Material", &p.words.material), ("Lot", &p.words.lot)] {
                @if let Some(v) = v { p { (what) ": " (v) "." } }
            }
            p { "Method: " (LAB_CURVE_WORDS) ". Strains are true strains, percent." }
            table.zones {
                thead { tr {
                    th { "geometry" } th.n { "specimens" } th.n { "sections" } th.n { "valid" }
                    th.n { "used" } th.n { "minor ε2" } th.n { "s.d." } th.n { "major ε1" } th.n { "s.d." }
                } }
                tbody {
                    @for g in p.stats {
                        tr {
                            td { (g.geometry) } td.n { (g.specimens) } td.n { (g.sections) }
                            td.n { (g.valid) } td.n { (g.used) }
                            @if g.used > 0 {
                                td.n { (format!("{:.2}", 100.0 * g.mean[0])) }
                                td.n { (format!("{:.2}", 100.0 * g.sd[0])) }
                                td.n { (format!("{:.2}", 100.0 * g.mean[1])) }
                                td.n { (format!("{:.2}", 100.0 * g.sd[1])) }
                            } @else {
                                td.n { "—" } td.n { "—" } td.n { "—" } td.n { "—" }
                            }
                        }
                    }
                }
            }
            @if !p.warnings.is_empty() {
                h3 { "Warnings" }
                ul { @for w in p.warnings { li { (w) } } }
            }
            @if !invalid.is_empty() {
                h3 { "Sections left out" }
                ul { @for r in &invalid {
                    li { (r.profile.key) " (line " (r.profile.line) "): "
                        (r.problems.iter().map(|x| x.to_string()).collect::<Vec<_>>().join("; ")) }
                } }
            }
            @if !p.rejected.is_empty() {
                h3 { "Rows rejected" }
                ul { @for r in p.rejected { li { (r) } } }
            }
            (crate::report::signoff_block([None, None, None]))
            (page::caution())
        }))
        (page::section("curve", html! {
            h2 { "The curve" }
            (page::inline_svg(&curve))
        }))
        @for (g, svg) in &geometry_pages {
            (page::section(&format!("geometry-{g}"), html! {
                h2 { "Geometry " (g) }
                (page::inline_svg(svg))
            }))
        }
    };
    Ok(page::layout(
        &format!("Sections: {}", p.curve.name),
        &p.curve.name,
        "laboratory curve from sections",
        body,
    ))
}
