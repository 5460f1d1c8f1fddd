//! `report.html`: one self-contained, printable file. Inline CSS and SVG only: no script, no
//! font, image or style sheet fetched from anywhere. Print CSS leaves the paper size to the
//! printer (A4 or Letter) and keeps every section within the smaller printable area of the two;
//! each section starts on a new page. Every text comes from the same [`Analysis`] as the CSV.

use super::fld::{self, FldOptions};
use super::plot::{hex, zone_colour, zone_shape, Shape};
use super::{fmt_opt, map};
use crate::analysis::{Analysis, PointResult, Verdict, CAUTION};
use crate::assess::Zone;
use std::fmt::Write as _;
use std::io::{self, Write};

/// Rows in the worst-locations table.
pub const WORST_ROWS: usize = 15;

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}

const CSS: &str = r#"
:root { --ink: #1a1a1a; --rule: #c8c8c8; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; color: var(--ink);
       font-size: 10.5pt; line-height: 1.35; margin: 0; }
h1 { font-size: 17pt; margin: 0 0 2mm 0; }
h2 { font-size: 13pt; margin: 0 0 3mm 0; border-bottom: 1.5px solid var(--ink); padding-bottom: 1mm; }
h3 { font-size: 11pt; margin: 4mm 0 2mm 0; }
p { margin: 1.5mm 0; }
table { border-collapse: collapse; margin: 2mm 0; }
th, td { border-bottom: 1px solid var(--rule); padding: 0.6mm 2mm; text-align: left; vertical-align: top; }
th { background: #f0f0f0; }
td.n, th.n { text-align: right; font-variant-numeric: tabular-nums; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
table.job th { width: 42mm; background: none; font-weight: normal; color: #555; }
.verdict { display: inline-block; font-size: 15pt; font-weight: bold; padding: 1.5mm 5mm;
           border: 2.5px solid var(--ink); margin: 3mm 0; }
.v-fail { background: #fbe3d6; } .v-marginal { background: #fdf0cf; }
.v-incomplete { background: #f1e2ec; } .v-pass { background: #d8f0e8; }
.zone { white-space: nowrap; }
.zone svg { vertical-align: -1px; margin-right: 1.2mm; }
.caution { border-left: 4px solid var(--ink); padding: 1.5mm 3mm; background: #f6f6f6; }
.note { color: #444; }
figure { margin: 0; }
figure svg { width: 100%; height: auto; display: block; }
table.points { font-size: 8pt; }
table.points td, table.points th { padding: 0.3mm 1.2mm; }
code, .formula { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 9.5pt; }
@page { margin: 12mm 12mm 14mm 12mm; }
@media print {
  body { font-size: 9.5pt; }
  section.page { break-before: page; page-break-before: always; }
  section.page:first-of-type { break-before: auto; page-break-before: auto; }
  figure svg { max-height: 200mm; }
}
@media screen {
  body { max-width: 1150px; margin: 0 auto; padding: 18px 22px; background: #fff; }
  section.page { border-bottom: 1px dashed var(--rule); padding-bottom: 14px; margin-bottom: 22px; }
}
"#;

/// A small inline SVG of a zone's marker, for tables.
pub fn zone_badge(z: Zone) -> String {
    let c = hex(zone_colour(z));
    let shape = match zone_shape(z) {
        Shape::Cross => format!(
            "<path d=\"M2 2L10 10M2 10L10 2\" stroke=\"{c}\" stroke-width=\"2.6\"/>"
        ),
        Shape::Triangle => format!("<path d=\"M6 1L11 11H1Z\" fill=\"{c}\" stroke=\"#000\" stroke-width=\"0.7\"/>"),
        Shape::Diamond => format!("<path d=\"M6 1L11 6L6 11L1 6Z\" fill=\"none\" stroke=\"{c}\" stroke-width=\"2\"/>"),
        Shape::Square => format!("<rect x=\"2\" y=\"2\" width=\"8\" height=\"8\" fill=\"{c}\" stroke=\"#000\" stroke-width=\"0.7\"/>"),
        Shape::TriangleDown => format!("<path d=\"M6 11L11 1H1Z\" fill=\"{c}\" stroke=\"#000\" stroke-width=\"0.7\"/>"),
        Shape::Disc => format!("<circle cx=\"6\" cy=\"6\" r=\"4.5\" fill=\"{c}\" stroke=\"#000\" stroke-width=\"0.7\"/>"),
    };
    format!(
        "<span class=\"zone\"><svg width=\"12\" height=\"12\" viewBox=\"0 0 12 12\" aria-hidden=\"true\">{shape}</svg>{}</span>",
        z.name()
    )
}

/// Drop the XML namespace attribute: inside HTML it is implied, and the report then names no
/// address at all.
fn inline_svg(svg: &str) -> String {
    svg.replace(" xmlns=\"http://www.w3.org/2000/svg\"", "")
}

fn row(label: &str, value: &str) -> String {
    format!(
        "<tr><th>{}</th><td>{}</td></tr>\n",
        escape(label),
        escape(value)
    )
}

fn or_dash(v: &Option<String>) -> String {
    v.clone().unwrap_or_else(|| "—".into())
}

fn length(v: Option<f64>, a: &Analysis) -> String {
    v.map_or_else(|| "—".into(), |x| format!("{x} {}", a.lengths.unit.name()))
}

fn header(a: &Analysis) -> String {
    let j = &a.job;
    let mut s = String::new();
    let part = j.part.as_deref().unwrap_or("(part not named)");
    let _ = writeln!(s, "<h1>Forming-limit check: {}</h1>", escape(part));
    if let Some(c) = &j.company {
        let _ = writeln!(s, "<p class=\"note\">{}</p>", escape(c));
    }
    s.push_str("<table class=\"job\">\n");
    for (label, value) in [
        ("Part", or_dash(&j.part)),
        ("Die", or_dash(&j.die)),
        ("Tryout", or_dash(&j.tryout)),
        ("Material", or_dash(&j.material)),
        ("Lot", or_dash(&j.lot)),
        ("Initial thickness t0", length(a.lengths.t0, a)),
        ("Circle diameter d0", length(a.lengths.d0, a)),
        ("Date", or_dash(&j.date)),
        ("Measured by", or_dash(&j.measured_by)),
        ("Measurement file", file_name(a)),
    ] {
        s.push_str(&row(label, &value));
    }
    s.push_str("</table>\n");
    s
}

fn file_name(a: &Analysis) -> String {
    a.input.file_name().map_or_else(
        || a.input.display().to_string(),
        |n| n.to_string_lossy().into_owned(),
    )
}

fn verdict_text(v: Verdict) -> &'static str {
    match v {
        Verdict::Fail => {
            "at least one location is on or above the limit curve (or past the thinning limit)"
        }
        Verdict::Marginal => "no failure, but at least one location is inside the safety band",
        Verdict::Incomplete => {
            "no failure or marginal location, but some locations lie outside the curve's range or \
             some rows were rejected"
        }
        Verdict::Pass => "every location judged; none failed or marginal",
    }
}

fn zone_meaning(z: Zone, a: &Analysis) -> String {
    let st = &a.settings;
    match z {
        Zone::Failed => match st.max_thinning_pct {
            Some(t) => format!("on or above the curve, or thinning ≥ {t:.1} %"),
            None => "on or above the curve".into(),
        },
        Zone::Marginal => format!("within {:.1} pp below the curve", st.margin_pct),
        Zone::Uncovered => "minor strain outside the curve's range: no verdict".into(),
        Zone::Thickening => "ε1 + ε2 < 0: thicker than before, wrinkle tendency".into(),
        Zone::LowStretch => format!("major strain below {:.1} %", st.low_stretch_pct),
        Zone::Safe => "none of the above".into(),
    }
}

fn verdict(a: &Analysis) -> String {
    let v = a.verdict();
    let mut s = format!(
        "<div class=\"verdict v-{}\">Verdict: {}</div>\n<p>{}.</p>\n",
        v.name(),
        v.name().to_uppercase(),
        verdict_text(v)
    );
    let _ = writeln!(
        s,
        "<p>{} judged, {} rejected.</p>",
        super::terminal::count_of(a.total(), "location"),
        super::terminal::count_of(a.rejected_total(), "row")
    );
    s.push_str("<table class=\"zones\"><thead><tr><th>zone</th><th class=\"n\">locations</th><th>meaning</th></tr></thead><tbody>\n");
    for (z, n) in a.counts() {
        let _ = writeln!(
            s,
            "<tr><td>{}</td><td class=\"n\">{n}</td><td>{}</td></tr>",
            zone_badge(z),
            escape(&zone_meaning(z, a))
        );
    }
    s.push_str("</tbody></table>\n");
    s.push_str(&worst_brief(a));
    if a.rejected_total() > 0 {
        s.push_str("<h3>Rejected rows (not judged)</h3>\n<ul>\n");
        for r in a.rejected().iter().take(REJECTED_ROWS) {
            let _ = writeln!(
                s,
                "<li>line {}: {}</li>",
                fmt_line(r.location.line),
                escape(&r.reason)
            );
        }
        if a.rejected_total() > REJECTED_ROWS {
            let _ = writeln!(
                s,
                "<li>... and {} more: see summary.json</li>",
                a.rejected_total() - REJECTED_ROWS
            );
        }
        s.push_str("</ul>\n");
    }
    for note in crate::output::notes(a) {
        let _ = writeln!(
            s,
            "<p class=\"note\">{} {}</p>",
            escape(&note.text),
            escape(&note.ids.join(", "))
        );
    }
    for w in &a.warnings {
        let _ = writeln!(s, "<p class=\"note\">Warning: {}</p>", escape(w));
    }
    s
}

/// Rows of the short worst list on the first page.
pub const WORST_BRIEF: usize = 5;

fn worst_brief(a: &Analysis) -> String {
    let worst = a.worst(WORST_BRIEF);
    if worst.is_empty() {
        return String::new();
    }
    let mut s = String::from(
        "<h3>Worst locations</h3>\n<table class=\"brief\"><thead><tr><th>id</th>\
         <th class=\"n\">margin pp</th><th class=\"n\">major %</th><th class=\"n\">minor %</th>\
         <th class=\"n\">thinning %</th><th class=\"n\">x</th><th class=\"n\">y</th><th>zone</th>\
         </tr></thead><tbody>\n",
    );
    for p in worst {
        let _ = writeln!(
            s,
            "<tr><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{:.1}</td><td class=\"n\">{:.1}</td>\
             <td class=\"n\">{:.1}</td><td class=\"n\">{}</td><td class=\"n\">{}</td><td>{}</td></tr>",
            escape(&p.input.id),
            fmt_opt(p.judgement.margin_pct, 1),
            p.strain.eng.major.percent(),
            p.strain.eng.minor.percent(),
            p.strain.thinning * 100.0,
            fmt_opt(p.input.x, 1),
            fmt_opt(p.input.y, 1),
            zone_badge(p.zone())
        );
    }
    s.push_str("</tbody></table>\n");
    s
}

fn fmt_line(l: Option<u64>) -> String {
    l.map_or_else(|| "?".into(), |l| l.to_string())
}

const POINT_HEAD: &str = "<thead><tr><th>id</th><th class=\"n\">major %</th><th class=\"n\">minor %</th>\
<th class=\"n\">ε1 true %</th><th class=\"n\">ε2 true %</th><th class=\"n\">thinning %</th>\
<th class=\"n\">β</th><th class=\"n\">limit %</th><th class=\"n\">margin pp</th>\
<th class=\"n\">limit use %</th><th class=\"n\">x</th><th class=\"n\">y</th><th>zone</th></tr></thead>";

fn point_row(p: &PointResult) -> String {
    let s = &p.strain;
    let j = &p.judgement;
    let cells = [
        format!("{:.1}", s.eng.major.percent()),
        format!("{:.1}", s.eng.minor.percent()),
        format!("{:.1}", s.true_strain.major.percent()),
        format!("{:.1}", s.true_strain.minor.percent()),
        format!("{:.1}", s.thinning * 100.0),
        fmt_opt(s.beta, 2),
        fmt_opt(j.limit_major.map(|l| l.percent()), 1),
        fmt_opt(j.margin_pct, 1),
        fmt_opt(j.limit_use_pct, 0),
        fmt_opt(p.input.x, 1),
        fmt_opt(p.input.y, 1),
    ];
    let mut r = format!("<tr><td>{}</td>", escape(&p.input.id));
    for c in cells {
        let _ = write!(r, "<td class=\"n\">{c}</td>");
    }
    let _ = writeln!(r, "<td>{}</td></tr>", zone_badge(p.zone()));
    r
}

fn points_table(points: &[&PointResult], class: &str) -> String {
    let mut s = format!("<table class=\"{class}\">{POINT_HEAD}<tbody>\n");
    for p in points {
        s.push_str(&point_row(p));
    }
    s.push_str("</tbody></table>\n");
    s
}

fn curve_section(a: &Analysis) -> String {
    let c = &a.curve;
    let mut s = String::from("<h2>Limit curve</h2>\n<table class=\"job\">\n");
    s.push_str(&row("Name", &c.name));
    s.push_str(&row("Source", &c.source));
    s.push_str(&row("Material", &or_dash(&c.material)));
    s.push_str(&row(
        "Thickness",
        &c.thickness_mm
            .map_or_else(|| "—".into(), |t| format!("{t} mm")),
    ));
    s.push_str(&row("Strain measure of the points", c.measure.name()));
    s.push_str("</table>\n<table><thead><tr><th class=\"n\">minor %</th><th class=\"n\">major %</th></tr></thead><tbody>\n");
    for p in &c.points {
        let _ = writeln!(
            s,
            "<tr><td class=\"n\">{:.2}</td><td class=\"n\">{:.2}</td></tr>",
            p[0] * 100.0,
            p[1] * 100.0
        );
    }
    s.push_str("</tbody></table>\n");
    s
}

fn settings_section(a: &Analysis) -> String {
    let st = &a.settings;
    let mut s = String::from("<h2>Settings</h2>\n<table class=\"job\">\n");
    s.push_str(&row(
        "Safety band",
        &format!(
            "{:.1} percentage points of engineering major strain",
            st.margin_pct
        ),
    ));
    s.push_str(&row(
        "Low stretch below",
        &format!("{:.1} % engineering major strain", st.low_stretch_pct),
    ));
    s.push_str(&row(
        "Maximum thinning",
        &st.max_thinning_pct
            .map_or_else(|| "not checked".into(), |t| format!("{t:.1} %")),
    ));
    s.push_str(&row("Length unit", a.lengths.unit.name()));
    s.push_str("</table>\n");
    s
}

const METHOD: &str = r#"<h2>Method</h2>
<p>Each etched circle of initial diameter d0 was measured as an ellipse with axes d1 ≥ d2.</p>
<table>
<tr><td>stretches</td><td class="formula">λ1 = d1/d0, λ2 = d2/d0</td></tr>
<tr><td>engineering strain</td><td class="formula">e = λ − 1</td></tr>
<tr><td>true strain</td><td class="formula">ε = ln λ</td></tr>
<tr><td>thickness strain (constant volume)</td><td class="formula">ε3 = −(ε1 + ε2)</td></tr>
<tr><td>thinning</td><td class="formula">1 − t/t0 = 1 − exp(ε3)</td></tr>
<tr><td>strain ratio</td><td class="formula">β = ε2/ε1</td></tr>
<tr><td>margin (vertical)</td><td class="formula">e1,limit(ε2) − e1, percentage points</td></tr>
<tr><td>limit use (along the strain path)</td><td class="formula">100 · |(ε2, ε1)| / |curve point on the same ray|</td></tr>
</table>
<p>Strain formulas: any continuum mechanics text (for example Marciniak, Duncan &amp; Hu,
<i>Mechanics of Sheet Metal Forming</i>, 2002). Zones are given in the order failed, marginal,
uncovered, thickening, low-stretch, safe; the first that applies wins. The safety band and the
low-stretch threshold are common press-shop practice; the user's own values govern.</p>
<p>Diagram lines: strain paths uniaxial tension β = −½, plane strain β = 0, equibiaxial β = 1,
constant thickness ε1 = −ε2; thinning iso-lines ε1 + ε2 = −ln(1 − s) for s = 10, 20, 30 %.
A strain-based limit curve holds for straight (proportional) strain paths only.</p>
"#;

/// The whole report as a string.
pub fn report_html(a: &Analysis, opts: &FldOptions, value: map::MapValue) -> io::Result<String> {
    let title = a.job.part.as_deref().unwrap_or("(part not named)");
    let fld_svg = fld::fld_svg(a, opts)?;
    let map_svg = map::map_svg(a, value)?;
    let mut s = String::new();
    let _ = write!(
        s,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>Forming-limit check: {}</title>\n<style>{CSS}</style>\n</head>\n<body>\n",
        escape(title)
    );
    section(&mut s, "summary", &[&header(a), &verdict(a), &caution()]);
    let fig = format!(
        "<h2>Forming-limit diagram</h2>\n<figure>{}</figure>\n<p class=\"note\">Labelled: the {} \
         locations with the smallest margin; the number in brackets is the margin in percentage \
         points of engineering major strain (negative = above the curve).</p>\n",
        inline_svg(&fld_svg),
        opts.labelled
    );
    section(&mut s, "diagram", &[&fig]);
    let map_html = match &map_svg {
        Some(svg) => format!(
            "<h2>Part map</h2>\n<figure>{}</figure>\n<p class=\"note\">Colour: margin to the \
             limit curve; shape: zone; labelled: the {} locations with the smallest margin.</p>\n",
            inline_svg(svg),
            map::LABELLED
        ),
        None => "<h2>Part map</h2>\n<p class=\"note\">No map: no location carries x, y coordinates.</p>\n".into(),
    };
    section(&mut s, "map", &[&map_html]);
    let worst = a.worst(WORST_ROWS);
    let worst_html = format!(
        "<h2>Worst locations</h2>\n<p>The {} locations with the smallest margin to the limit curve, smallest first.</p>\n{}",
        worst.len(),
        points_table(&worst, "worst")
    );
    section(&mut s, "worst", &[&worst_html]);
    let all_html = all_locations(a);
    section(&mut s, "points", &[&all_html]);
    section(&mut s, "curve", &[&curve_section(a), &settings_section(a)]);
    section(
        &mut s,
        "method",
        &[METHOD, "<h2>Caution</h2>\n", &caution(), &provenance(a)],
    );
    s.push_str("</body>\n</html>\n");
    Ok(s)
}

/// Rows of the all-locations table at most: a longer table is for points.csv, not for paper.
pub const TABLE_ROWS: usize = 500;
/// Rejected rows listed at most.
pub const REJECTED_ROWS: usize = 50;

fn all_locations(a: &Analysis) -> String {
    let kept: Vec<&PointResult> = a.points().iter().take(TABLE_ROWS).collect();
    let what = if a.summary.complete {
        "locations in file order"
    } else {
        "failed or marginal locations in file order"
    };
    let mut s = format!(
        "<h2>All locations</h2>\n<p>{} {what}. Strains in percent; margin in percentage points of engineering major strain.",
        kept.len()
    );
    if kept.len() < a.total() {
        let _ = write!(
            s,
            " The table stops here: all {} locations are in points.csv.",
            a.total()
        );
    }
    s.push_str("</p>\n");
    s.push_str(&points_table(&kept, "points"));
    s
}

fn caution() -> String {
    format!("<p class=\"caution\">{}</p>\n", escape(CAUTION))
}

fn provenance(a: &Analysis) -> String {
    format!(
        "<p class=\"note\">Written by neckline {} from {}.</p>\n",
        env!("CARGO_PKG_VERSION"),
        escape(&file_name(a))
    )
}

fn section(s: &mut String, id: &str, parts: &[&str]) {
    let _ = writeln!(s, "<section class=\"page\" id=\"{id}\">");
    for p in parts {
        s.push_str(p);
    }
    s.push_str("</section>\n");
}

/// Write the report with the diagram's default axes.
pub fn write_report(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    out.write_all(report_html(a, &FldOptions::default(), map::MapValue::Margin)?.as_bytes())
}

/// The readable text of a report (tags, style and pictures removed, entities decoded, blank
/// lines dropped): what a reader sees, for review and snapshot tests.
pub fn visible_text(html: &str) -> String {
    let mut s = html.to_string();
    for tag in ["style", "svg"] {
        while let Some(start) = s.find(&format!("<{tag}")) {
            let close = format!("</{tag}>");
            let Some(end) = s[start..].find(&close) else {
                break;
            };
            s.replace_range(start..start + end + close.len(), " ");
        }
    }
    let mut out = String::new();
    let mut in_tag = false;
    for c in s.chars() {
        match c {
            '<' => in_tag = true,
            '>' => {
                in_tag = false;
                out.push(' ');
            }
            c if !in_tag => out.push(c),
            _ => {}
        }
    }
    let decoded = out
        .replace("&lt;", "<")
        .replace("&gt;", ">")
        .replace("&quot;", "\"")
        .replace("&#39;", "'")
        .replace("&amp;", "&");
    decoded
        .lines()
        .map(|l| l.split_whitespace().collect::<Vec<_>>().join(" "))
        .filter(|l| !l.is_empty())
        .collect::<Vec<_>>()
        .join("\n")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escapes_markup() {
        assert_eq!(
            escape("<a href='x'>&\"</a>"),
            "&lt;a href=&#39;x&#39;&gt;&amp;&quot;&lt;/a&gt;"
        );
    }

    #[test]
    fn visible_text_drops_tags_style_and_svg() {
        let t = visible_text("<style>p{}</style><p>a &amp; b</p><svg><text>x</text></svg><p>c</p>");
        assert_eq!(t, "a & b c");
    }
}

#[cfg(test)]
mod render_tests {
    use super::*;
    use crate::output::{fixture, points_csv};

    fn report() -> (Analysis, String) {
        let a = fixture::analysis(true);
        let html = report_html(&a, &FldOptions::default(), map::MapValue::Margin).unwrap();
        (a, html)
    }

    #[test]
    fn text_content_snapshot() {
        let (_, html) = report();
        let text = visible_text(&html).replace(env!("CARGO_PKG_VERSION"), "VERSION");
        insta::assert_snapshot!(text);
    }

    #[test]
    fn self_contained_and_escaped() {
        let (_, html) = report();
        for bad in [
            "http://", "https://", "src=", "href=", "@import", "url(", "<script", "<link",
        ] {
            assert!(!html.contains(bad), "report contains `{bad}`");
        }
        assert!(!html.contains("<LH>"));
        assert!(html.contains("TP-1 test panel &lt;LH&gt; &amp; co (invented)"));
        assert_eq!(html.matches("<section class=\"page\"").count(), 7);
        assert_eq!(
            html.matches("<svg width=\"1200\"").count(),
            2,
            "diagram and map inline"
        );
        assert!(html.contains(&escape(CAUTION)));
    }

    #[test]
    fn tables_agree_with_points_csv() {
        let (a, html) = report();
        let layout = points_csv::Layout::default();
        let csv = points_csv::table(&layout, a.points());
        let mut r = csv::Reader::from_reader(csv.as_bytes());
        let head = r.headers().unwrap().clone();
        let col = |name: &str| head.iter().position(|h| h == name).unwrap();
        let (id, margin, zone) = (col("id"), col("margin_pct"), col("zone"));
        let text = visible_text(&html);
        for rec in r.records() {
            let rec = rec.unwrap();
            // The points-table line of this id (the last one: after the worst table).
            let line = text
                .lines()
                .rfind(|l| l.starts_with(&format!("{} ", &rec[id])))
                .unwrap_or_else(|| panic!("{} not in the report", &rec[id]));
            let cells: Vec<&str> = line.split(' ').collect();
            assert_eq!(cells.last().copied(), Some(&rec[zone]), "{line}");
            match rec[margin].parse::<f64>() {
                // id, 5 strains, beta, limit, margin, use, x, y, zone: margin is the 9th cell;
                // the CSV has 3 decimals and the report 1, so they agree to 0.05 pp.
                Ok(m) => {
                    let shown: f64 = cells[8].parse().unwrap();
                    assert!((shown - m).abs() <= 0.05 + 1e-9, "{line} vs {m}");
                }
                // No margin: limit, margin and use are empty.
                Err(_) => assert_eq!(cells.len(), 10, "{line}"),
            }
        }
    }

    #[test]
    fn no_map_note_without_positions() {
        let a = fixture::analysis(false);
        let html = report_html(&a, &FldOptions::default(), map::MapValue::Margin).unwrap();
        assert!(html.contains("No map: no location carries x, y coordinates."));
        assert_eq!(html.matches("<svg width=\"1200\"").count(), 1);
    }
}
