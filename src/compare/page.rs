//! `compare.html`: the review page. One self-contained, printable file: inline CSS and SVG
//! only, no script, nothing fetched. Each section starts on a new printed page; the paper size
//! is the printer's.

use super::fld::{change_colour, fld_svg, LABELLED};
use super::map::map_svg;
use super::{count, Change, Comparison, Matching, Status, Track};
use crate::analysis::CAUTION;
use crate::assess::Zone;
use crate::output::fmt_opt;
use crate::output::plot::{self, hex, marker, zone_colour, zone_shape};
use plotters::prelude::BLACK;
use std::fmt::Write as _;
use std::io;

/// Rows in the tables of losses and gains.
pub const TABLE_ROWS: usize = 15;

/// Escape text for HTML element content and attribute values.
pub fn escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for ch in s.chars() {
        match ch {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            ch => out.push(ch),
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
td.z { background: #fbf3d9; font-weight: bold; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
table.job th { width: 46mm; background: none; font-weight: normal; color: #555; }
.verdicts { display: flex; gap: 4mm; align-items: center; margin: 3mm 0; flex-wrap: wrap; }
.verdict { font-size: 13pt; font-weight: bold; padding: 1.2mm 4mm; border: 2.5px solid var(--ink); }
.v-fail { background: #fbe3d6; } .v-marginal { background: #fdf0cf; }
.v-incomplete { background: #f1e2ec; } .v-pass { background: #d8f0e8; }
.zone { white-space: nowrap; }
.zone svg { vertical-align: -1px; margin-right: 1.2mm; }
.chg { font-weight: bold; white-space: nowrap; }
.caution { border-left: 4px solid var(--ink); padding: 1.5mm 3mm; background: #f6f6f6; }
.warning { border-left: 4px solid #d55e00; padding: 1.5mm 3mm; background: #fbe9df; }
.note { color: #444; }
.ids { columns: 4 40mm; }
figure { margin: 0; }
figure svg { width: 100%; height: auto; display: block; }
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

/// Drop the XML namespace attribute: inside HTML it is implied, and the page names no address.
fn inline_svg(svg: &str) -> String {
    svg.replace(" xmlns=\"http://www.w3.org/2000/svg\"", "")
}

/// Small inline markers of each zone, drawn by the same code as the pictures.
struct Badges(Vec<String>);

impl Badges {
    fn new() -> io::Result<Self> {
        let mut v = Vec::new();
        for z in Zone::ALL {
            let svg = plot::render_svg((12, 12), |root| {
                marker(root, zone_shape(z), (6, 6), 4, zone_colour(z), BLACK)
            })?;
            v.push(inline_svg(&svg));
        }
        Ok(Badges(v))
    }

    fn zone(&self, z: Zone) -> String {
        let k = Zone::ALL.iter().position(|x| *x == z).unwrap_or(0);
        format!("<span class=\"zone\">{}{}</span>", self.0[k], z.name())
    }

    fn maybe(&self, z: Option<Zone>) -> String {
        z.map_or_else(|| "—".into(), |z| self.zone(z))
    }
}

fn row(label: &str, value: &str) -> String {
    format!("<tr><th>{}</th><td>{value}</td></tr>\n", escape(label))
}

fn text(v: &Option<String>) -> String {
    v.as_deref().map_or_else(|| "—".into(), escape)
}

fn header(c: &Comparison) -> String {
    let last = c
        .tryouts
        .last()
        .and_then(|t| t.summary.clone())
        .unwrap_or_default();
    let mut s = String::new();
    let part = last
        .part
        .clone()
        .unwrap_or_else(|| "(part not named)".into());
    let _ = writeln!(s, "<h1>Tryout comparison: {}</h1>", escape(&part));
    s.push_str("<table class=\"job\">\n");
    s.push_str(&row("Part", &text(&last.part)));
    s.push_str(&row("Die", &text(&last.die)));
    s.push_str(&row("Material", &text(&last.material)));
    for (k, t) in c.tryouts.iter().enumerate() {
        let sm = t.summary.clone().unwrap_or_default();
        let date = sm
            .date
            .map(|d| format!(", measured {}", escape(&d)))
            .unwrap_or_default();
        let part = match (&sm.part, &last.part) {
            (Some(p), Some(l)) if p != l => format!(", part {}", escape(p)),
            _ => String::new(),
        };
        s.push_str(&row(
            &format!("Tryout {}", k + 1),
            &format!(
                "<b>{}</b>{date}{part} — <code>{}</code>",
                escape(&t.label),
                escape(&t.path.display().to_string())
            ),
        ));
    }
    let curves: Vec<String> = c
        .tryouts
        .iter()
        .map(|t| {
            t.summary
                .as_ref()
                .and_then(|s| s.curve.clone())
                .unwrap_or_else(|| "not recorded".into())
        })
        .collect();
    let mut distinct = curves.clone();
    distinct.dedup();
    s.push_str(&row("Limit curve", &escape(&distinct.join(" / "))));
    let band = last.band.map_or_else(
        || "not recorded".into(),
        |b| format!("{b:.1} percentage points"),
    );
    s.push_str(&row("Safety band", &escape(&band)));
    let how = match c.matching {
        Matching::Id => "by location id".to_string(),
        Matching::Xy { within } => format!(
            "by position: nearest x, y within {within} {}, one to one, closest first",
            last.unit.clone().unwrap_or_default()
        ),
    };
    s.push_str(&row("Locations paired", &escape(&how)));
    s.push_str(&row(
        "Tolerance",
        &format!(
            "±{} percentage points of margin (of major strain where a margin is missing): \
             a smaller change counts as unchanged",
            c.tolerance
        ),
    ));
    s.push_str("</table>\n");
    s
}

fn verdicts(c: &Comparison) -> String {
    let mut s = String::from("<h2>Verdict</h2>\n<div class=\"verdicts\">");
    for (k, t) in c.tryouts.iter().enumerate() {
        if k > 0 {
            s.push_str("<span>→</span>");
        }
        let v = c.verdict(k);
        let _ = write!(
            s,
            "<span class=\"verdict v-{}\">{}: {}</span>",
            escape(&v),
            escape(&t.label),
            escape(&v.to_uppercase())
        );
    }
    s.push_str("</div>\n");
    let (b, a) = c.labels();
    let _ = writeln!(
        s,
        "<p>{} in both {} and {}; {} only in {}, {} only in {}.</p>",
        count(c.with_status(Status::Both).len(), "location"),
        escape(b),
        escape(a),
        c.with_status(Status::OnlyBefore).len(),
        escape(b),
        c.with_status(Status::OnlyAfter).len(),
        escape(a)
    );
    let _ = writeln!(
        s,
        "<p>Margin: <span class=\"chg\" style=\"color:{}\">{} improved</span>, \
         <span class=\"chg\" style=\"color:{}\">{} worsened</span>, {} unchanged. \
         {} newly failed or marginal, {} no longer failed or marginal.</p>",
        hex(change_colour(Some(Change::Improved))),
        c.change_count(Change::Improved),
        hex(change_colour(Some(Change::Worsened))),
        c.change_count(Change::Worsened),
        c.change_count(Change::Unchanged),
        count(c.newly_at_risk().len(), "location"),
        c.fixed().len()
    );
    s
}

fn warnings(c: &Comparison) -> String {
    c.warnings
        .iter()
        .map(|w| format!("<p class=\"warning\">Warning: {}</p>\n", escape(w)))
        .collect()
}

fn transitions(c: &Comparison, bd: &Badges) -> String {
    let (b, a) = c.labels();
    let mut s = format!(
        "<h3>Zone transitions</h3>\n<p class=\"note\">Rows: zone in {}; columns: zone in {}. \
         Shaded: a change of zone.</p>\n<table><thead><tr><th></th>",
        escape(b),
        escape(a)
    );
    for z in Zone::ALL {
        let _ = write!(s, "<th class=\"n\">{}</th>", bd.zone(z));
    }
    s.push_str("</tr></thead><tbody>\n");
    for from in Zone::ALL {
        let _ = write!(s, "<tr><th>{}</th>", bd.zone(from));
        for to in Zone::ALL {
            let n = c.transitions(from, to);
            let class = if n > 0 && from != to { "n z" } else { "n" };
            let _ = write!(s, "<td class=\"{class}\">{n}</td>");
        }
        s.push_str("</tr>\n");
    }
    s.push_str("</tbody></table>\n");
    s
}

const CHANGE_HEAD: &str = "<thead><tr><th>location</th><th>zone before</th><th>zone now</th>\
<th class=\"n\">margin before, pp</th><th class=\"n\">margin now, pp</th>\
<th class=\"n\">change, pp</th><th class=\"n\">major before, %</th><th class=\"n\">major now, %</th></tr></thead>";

fn change_table(c: &Comparison, v: &[&Track], bd: &Badges, empty: &str) -> String {
    if v.is_empty() {
        return format!("<p class=\"note\">{}</p>\n", escape(empty));
    }
    let mut s = format!("<table>{CHANGE_HEAD}<tbody>\n");
    for t in v {
        let (b, a) = (t.before(), t.after());
        let d = t.margin_change();
        let colour = hex(change_colour(t.change(c.tolerance)));
        let _ = writeln!(
            s,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td>\
             <td class=\"n chg\" style=\"color:{colour}\">{}</td><td class=\"n\">{}</td><td class=\"n\">{}</td></tr>",
            escape(&t.name()),
            bd.maybe(b.map(|r| r.zone)),
            bd.maybe(a.map(|r| r.zone)),
            fmt_opt(b.and_then(|r| r.margin_pct), 1),
            fmt_opt(a.and_then(|r| r.margin_pct), 1),
            d.map_or_else(String::new, |d| format!("{d:+.1}")),
            fmt_opt(b.map(|r| r.major_pct), 1),
            fmt_opt(a.map(|r| r.major_pct), 1),
        );
    }
    s.push_str("</tbody></table>\n");
    s
}

fn at_risk_section(c: &Comparison, bd: &Badges) -> String {
    let (b, a) = c.labels();
    let risk = c.newly_at_risk();
    let mut s = format!(
        "<h2>At risk now</h2>\n<h3>Newly failed or marginal in {} ({})</h3>\n",
        escape(a),
        risk.len()
    );
    s.push_str(&change_table(
        c,
        &risk,
        bd,
        &format!("No location is failed or marginal in {a} that was in a better zone in {b}."),
    ));
    let new_only = c.at_risk_only_after(true);
    if !new_only.is_empty() {
        let _ = writeln!(
            s,
            "<h3>Failed or marginal in {}, not measured in {} ({})</h3>",
            escape(a),
            escape(b),
            new_only.len()
        );
        s.push_str(&one_sided_table(&new_only, bd));
    }
    let fixed = c.fixed();
    let _ = writeln!(
        s,
        "<h3>Fixed: failed or marginal in {}, neither in {} ({})</h3>",
        escape(b),
        escape(a),
        fixed.len()
    );
    s.push_str(&change_table(
        c,
        &fixed,
        bd,
        "No location left the failed and marginal zones.",
    ));
    s
}

fn losses_gains(c: &Comparison, bd: &Badges) -> String {
    let mut s = String::from("<h2>Largest changes of margin</h2>\n");
    let losses = c.losses();
    let _ = writeln!(
        s,
        "<h3>Largest losses ({} of {})</h3>",
        losses.len().min(TABLE_ROWS),
        losses.len()
    );
    let shown: Vec<&Track> = losses.into_iter().take(TABLE_ROWS).collect();
    s.push_str(&change_table(
        c,
        &shown,
        bd,
        "No margin fell by more than the tolerance.",
    ));
    let gains = c.gains();
    let _ = writeln!(
        s,
        "<h3>Largest gains ({} of {})</h3>",
        gains.len().min(TABLE_ROWS),
        gains.len()
    );
    let shown: Vec<&Track> = gains.into_iter().take(TABLE_ROWS).collect();
    s.push_str(&change_table(
        c,
        &shown,
        bd,
        "No margin grew by more than the tolerance.",
    ));
    s
}

fn one_sided_table(v: &[&Track], bd: &Badges) -> String {
    let mut s = String::from(
        "<table><thead><tr><th>location</th><th>zone</th><th class=\"n\">margin, pp</th>\
         <th class=\"n\">major, %</th><th class=\"n\">x</th><th class=\"n\">y</th></tr></thead><tbody>\n",
    );
    for t in v {
        let r = super::csv_out::latest(t);
        let _ = writeln!(
            s,
            "<tr><td>{}</td><td>{}</td><td class=\"n\">{}</td><td class=\"n\">{:.1}</td>\
             <td class=\"n\">{}</td><td class=\"n\">{}</td></tr>",
            escape(&t.name()),
            bd.zone(r.zone),
            fmt_opt(r.margin_pct, 1),
            r.major_pct,
            fmt_opt(r.x, 1),
            fmt_opt(r.y, 1)
        );
    }
    s.push_str("</tbody></table>\n");
    s
}

fn one_sided(c: &Comparison, bd: &Badges) -> String {
    let (b, a) = c.labels();
    let mut s = String::from("<h2>Measured in one tryout only</h2>\n");
    let mut any = false;
    for (status, what) in [
        (Status::OnlyBefore, format!("Only in {b}")),
        (Status::OnlyAfter, format!("Only in {a}")),
        (Status::OnlyEarlier, "Only in earlier tryouts".to_string()),
    ] {
        let v = c.with_status(status);
        if v.is_empty() {
            continue;
        }
        any = true;
        let _ = writeln!(
            s,
            "<h3>{} ({})</h3>",
            escape(&what),
            count(v.len(), "location")
        );
        s.push_str(&one_sided_table(&v, bd));
    }
    if !any {
        let _ = writeln!(
            s,
            "<p>Every location of {} was measured in {} and the other way round.</p>",
            escape(b),
            escape(a)
        );
    }
    s
}

fn pictures(c: &Comparison) -> io::Result<(String, String)> {
    let (b, a) = c.labels();
    let fld = format!(
        "<h2>Forming-limit diagram: {} → {}</h2>\n<figure>{}</figure>\n<p class=\"note\">Each \
         arrow runs from a location's earlier strains to its strains in {}; colour: change of \
         margin; marker at the head: zone in {}; labelled: the {} largest losses (change in \
         percentage points).</p>\n",
        escape(b),
        escape(a),
        inline_svg(&fld_svg(c)?),
        escape(a),
        escape(a),
        LABELLED
    );
    let map = match map_svg(c)? {
        Some(svg) => format!(
            "<h2>Margin change on the part</h2>\n<figure>{}</figure>\n<p class=\"note\">Colour: \
             change of margin from {} to {}; shape: zone in {}.</p>\n",
            inline_svg(&svg),
            escape(b),
            escape(a),
            escape(a)
        ),
        None => "<h2>Margin change on the part</h2>\n<p class=\"note\">No map: no location \
                 carries x, y coordinates.</p>\n"
            .into(),
    };
    Ok((fld, map))
}

fn section(s: &mut String, id: &str, parts: &[&str]) {
    let _ = writeln!(s, "<section class=\"page\" id=\"{id}\">");
    for p in parts {
        s.push_str(p);
    }
    s.push_str("</section>\n");
}

/// The whole page.
pub fn page_html(c: &Comparison) -> io::Result<String> {
    let bd = Badges::new()?;
    let last = c
        .tryouts
        .last()
        .and_then(|t| t.summary.clone())
        .unwrap_or_default();
    let title = last.part.unwrap_or_else(|| "(part not named)".into());
    let caution = format!("<p class=\"caution\">{}</p>\n", escape(CAUTION));
    let (fld, map) = pictures(c)?;
    let mut s = String::new();
    let _ = write!(
        s,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <title>Tryout comparison: {}</title>\n<style>{CSS}</style>\n</head>\n<body>\n",
        escape(&title)
    );
    section(
        &mut s,
        "summary",
        &[
            &header(c),
            &warnings(c),
            &verdicts(c),
            &transitions(c, &bd),
            &caution,
        ],
    );
    section(&mut s, "at-risk", &[&at_risk_section(c, &bd)]);
    section(&mut s, "changes", &[&losses_gains(c, &bd)]);
    section(&mut s, "one-sided", &[&one_sided(c, &bd)]);
    section(&mut s, "diagram", &[&fld]);
    section(&mut s, "map", &[&map]);
    let foot = format!(
        "<h2>Caution</h2>\n{caution}<p class=\"note\">Margin: limit curve minus major strain, \
         percentage points of engineering major strain, as judged by <code>check</code> for \
         each tryout; a change of curve or safety band between tryouts changes every margin \
         (a warning above says so when the summaries show it). Written by neckline {}.</p>\n",
        env!("CARGO_PKG_VERSION")
    );
    section(&mut s, "caution", &[&foot]);
    s.push_str("</body>\n</html>\n");
    Ok(s)
}
