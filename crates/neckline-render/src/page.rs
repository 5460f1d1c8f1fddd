//! What the HTML pages share (report.html, compare.html): one layout and one stylesheet,
//! built with `maud`, which escapes every inserted text (no hand-written escape). Each page is
//! one self-contained file: inline CSS and SVG only, no script, nothing fetched. In print,
//! CSS paged media puts a running header and "page N of M" on every page.

use crate::plot::{self, marker, zone_colour, zone_shape};
use maud::{html, Markup, PreEscaped, DOCTYPE};
use neckline_core::assess::Zone;
use plotters::prelude::BLACK;
use std::io;

/// The stylesheet of every page.
pub const CSS: &str = r#"
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
td.z { background: #f3f3f3; font-weight: bold; }
thead { display: table-header-group; }
tr { break-inside: avoid; page-break-inside: avoid; }
table.job th { width: 46mm; background: none; font-weight: normal; color: #555; }
table.job2 { width: 100%; }
table.job2 th { width: 17%; background: none; font-weight: normal; color: #555; }
table.job2 td { width: 33%; }
.keep { break-inside: avoid; page-break-inside: avoid; }
.verdict { display: inline-block; font-size: 15pt; font-weight: bold; padding: 1.5mm 5mm;
           border: 2.5px solid var(--ink); margin: 3mm 0; }
.verdicts { display: flex; gap: 4mm; align-items: center; margin: 3mm 0; flex-wrap: wrap; }
.verdicts .verdict { font-size: 13pt; margin: 0; }
.v-fail { background: #f8d3d8; } .v-marginal { background: #f2ecc8; }
.v-incomplete { background: #e4e4e4; } .v-pass { background: #cfe6d2; }
.zone { white-space: nowrap; }
.zone svg { vertical-align: -1px; margin-right: 1.2mm; }
.chg { font-weight: bold; white-space: nowrap; }
.caution { border-left: 4px solid var(--ink); padding: 1.5mm 3mm; background: #f6f6f6; }
.warning { border-left: 4px solid #aa3377; padding: 1.5mm 3mm; background: #f4e3ec; }
.note { color: #444; }
.ids { columns: 4 40mm; margin: 1mm 0 2mm 6mm; }
table.signoff { width: 100%; margin-top: 4mm; }
table.signoff td, table.signoff th { border: 1px solid var(--ink); height: 8mm; }
table.signoff th { width: 24mm; }
table.points, table.worst { font-size: 8pt; }
section.follow { margin-top: 5mm; }
table.points td, table.points th, table.worst td, table.worst th { padding: 0.3mm 1.2mm; }
td.codes { white-space: nowrap; font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; }
table.points td, table.worst td { white-space: nowrap; }
.legend { font-size: 8pt; color: #444; }
.curvekind { margin: 2mm 0 1mm 0; }
.measurement .k { color: #555; }
table.digests { font-size: 7pt; width: 100%; }
table.digests td, table.digests th { padding: 0.2mm 1mm; }
table.digests code { font-size: 7pt; word-break: break-all; }
figure { margin: 0; }
figure svg { width: 100%; height: auto; display: block; }
code, .formula { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 9.5pt; }
@page { margin: 16mm 12mm 16mm 12mm; }
@media print {
  body { font-size: 9pt; line-height: 1.25; }
  h3 { margin: 2.5mm 0 1mm 0; }
  th, td { padding: 0.35mm 1.5mm; }
  table.points, table.worst { font-size: 7pt; }
  table.points td, table.points th, table.worst td, table.worst th { padding: 0.1mm 1mm; line-height: 1.15; }
  table.signoff td, table.signoff th { height: 6mm; }
  table.signoff { margin-top: 2mm; }
  .warning, .caution { padding: 1mm 2.5mm; }
  p { margin: 1mm 0; }
  .measurement, .curvekind { font-size: 8.5pt; }
  table.zones td, table.zones th, table.brief td, table.brief th { padding: 0.1mm 1.5mm; }
  h1 { font-size: 14pt; margin-bottom: 1mm; }
  .verdict { margin: 1mm 0; font-size: 13pt; padding: 1mm 4mm; }
  section.page { break-before: page; page-break-before: always; }
  section.page:first-of-type { break-before: auto; page-break-before: auto; }
}
@media screen {
  body { max-width: 1150px; margin: 0 auto; padding: 18px 22px; background: #fff; }
  section.page { border-bottom: 1px dashed var(--rule); padding-bottom: 14px; margin-bottom: 22px; }
}
"#;

/// `s` as a CSS string literal: quotes and backslashes escaped, line breaks and `<` written
/// as code points (so that the text can neither end the string nor the style element).
pub fn css_string(s: &str) -> String {
    let mut out = String::from("\"");
    for c in s.chars() {
        match c {
            '"' | '\\' => {
                out.push('\\');
                out.push(c);
            }
            '<' | '>' | '\n' | '\r' | '\u{0}'..='\u{1f}' => {
                out.push_str(&format!("\\{:x} ", c as u32));
            }
            c => out.push(c),
        }
    }
    out.push('"');
    out
}

/// Running header and page numbers of the printed page (CSS paged media margin boxes).
fn print_css(running: &str, corner: &str) -> String {
    format!(
        "@page {{ @top-left {{ content: {}; font-size: 8pt; color: #444; }}\n\
         @top-right {{ content: {}; font-size: 8pt; color: #444; }}\n\
         @bottom-right {{ content: \"page \" counter(page) \" of \" counter(pages); font-size: 8pt; }}\n\
         @bottom-left {{ content: {}; font-size: 7pt; color: #666; }} }}\n",
        css_string(running),
        css_string(corner),
        css_string("neckline: an aid to judgement; your own data and practice govern")
    )
}

/// A whole page: `title` in the window, `running` at the top of every printed page,
/// `corner` at its top right, `body` the sections.
pub fn layout(title: &str, running: &str, corner: &str, body: Markup) -> String {
    let page = html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                title { (title) }
                style { (PreEscaped(CSS)) (PreEscaped(print_css(running, corner))) }
            }
            body { (body) }
        }
    };
    page.into_string()
}

/// A section that follows the one before on the same printed page.
pub fn follow(id: &str, body: Markup) -> Markup {
    html! { section.follow id=(id) { (body) } }
}

/// A section that starts a new printed page.
pub fn section(id: &str, body: Markup) -> Markup {
    html! { section.page id=(id) { (body) } }
}

/// Drop the XML namespace attribute of a picture placed inside HTML (implied there; the page
/// then names no address at all).
pub fn inline_svg(svg: &str) -> Markup {
    PreEscaped(svg.replace(" xmlns=\"http://www.w3.org/2000/svg\"", ""))
}

/// Small inline markers of each zone, drawn by the same code as the pictures.
pub struct Badges(Vec<String>);

impl Badges {
    /// Draw the six markers.
    pub fn new() -> io::Result<Self> {
        let mut v = Vec::new();
        for z in Zone::ALL {
            let svg = plot::render_svg((14, 14), |root| {
                marker(root, zone_shape(z), (7, 7), 4, zone_colour(z), BLACK)
            })?;
            v.push(
                svg.replace(" xmlns=\"http://www.w3.org/2000/svg\"", "")
                    .replace('\n', ""),
            );
        }
        Ok(Badges(v))
    }

    /// A zone's marker and name.
    pub fn zone(&self, z: Zone) -> Markup {
        let k = Zone::ALL.iter().position(|x| *x == z).unwrap_or(0);
        html! { span.zone { (PreEscaped(&self.0[k])) (z.name()) } }
    }

    /// A zone's marker and name, or a dash.
    pub fn maybe(&self, z: Option<Zone>) -> Markup {
        match z {
            Some(z) => self.zone(z),
            None => html! { "—" },
        }
    }
}

/// The caution box.
pub fn caution() -> Markup {
    html! { p.caution { (neckline_core::CAUTION) } }
}

#[cfg(test)]
mod tests {
    use super::*;

    // CSS 2.1 §4.1.3 (strings and escapes): a backslash escapes a quote or a backslash, and
    // `\` followed by hex digits and a space is a code point.
    #[test]
    fn css_strings_cannot_escape() {
        assert_eq!(css_string("a\"b\\c"), "\"a\\\"b\\\\c\"");
        assert_eq!(css_string("</style>"), "\"\\3c /style\\3e \"");
        assert_eq!(css_string("x\ny"), "\"x\\a y\"");
    }

    #[test]
    fn layout_escapes_inserted_text() {
        let page = layout("<T> & co", "<run>", "c", html! { p { ("<b>x</b>") } });
        assert!(page.contains("<title>&lt;T&gt; &amp; co</title>"));
        assert!(page.contains("<p>&lt;b&gt;x&lt;/b&gt;</p>"));
        assert!(!page.contains("<run>"));
    }
}
