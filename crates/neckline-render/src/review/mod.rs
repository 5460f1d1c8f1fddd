//! `review.html`: the interactive review page. The forming-limit diagram and the part map side
//! by side and linked (hover, click, box selection, zoom and pan, zone toggles, id search, a
//! sortable table of the selection), drawn on canvas by a hand-written script ([`SCRIPT`]) with
//! no library and nothing fetched: one self-contained file that opens from disk and can be
//! mailed.
//!
//! The page's data is what the static pictures are drawn from (the [`Analysis`]'s bounded
//! summary, or a [`Comparison`]), embedded compactly: numeric columns as base64 of
//! little-endian `f32` (drawing precision; the exact values are in points.csv), small integers
//! as base64 bytes, ids as one joined string. Up to [`neckline_core::summary::KEEP_ALL`]
//! locations every one is a point; above that the page holds density cells for the diagram and
//! the map (at most [`FINE_CELLS`] across) with every failed and marginal location the summary
//! kept and the worst drawn as points, so that the file stays small whatever the size.
//!
//! The zone code (shapes first, colours second), the line styles and the map's margin scale
//! are those of the static pictures ([`crate::plot`], [`crate::chart`], [`crate::map`]),
//! passed to the script as data, never copied into it.
//!
//! [`Analysis`]: neckline_core::analysis::Analysis
//! [`Comparison`]: neckline_core::compare::Comparison

mod check;
mod compare;

pub use check::review_html;
pub use compare::compare_review_html;

use crate::chart::{self, Stroke};
use crate::plot::{self, hex, zone_colour, zone_shape, Shape};
use neckline_core::assess::Zone;
use std::fmt::Write as _;

/// The page's script: canvas drawing, linking, selection and the `window.neckline` hook.
pub const SCRIPT: &str = include_str!("review.js");
/// The page's stylesheet.
pub const STYLE: &str = include_str!("review.css");

/// Cells across the longer side of the diagram and the map that the page holds at most (the
/// page shows coarser cells when zoomed out, and these when zoomed in).
pub const FINE_CELLS: usize = 480;

/// Steps of the map's green ramp beyond the safety band.
pub const RAMP_STEPS: usize = 32;

/// A JSON string literal, safe inside a `<script>` element (`<` is escaped so no `</script>`
/// can close it).
pub fn json_str(s: &str) -> String {
    let mut o = String::with_capacity(s.len() + 2);
    o.push('"');
    for c in s.chars() {
        match c {
            '"' => o.push_str("\\\""),
            '\\' => o.push_str("\\\\"),
            '\n' => o.push_str("\\n"),
            '\r' => o.push_str("\\r"),
            '\t' => o.push_str("\\t"),
            '<' => o.push_str("\\u003c"),
            '>' => o.push_str("\\u003e"),
            '&' => o.push_str("\\u0026"),
            '\u{2028}' => o.push_str("\\u2028"),
            '\u{2029}' => o.push_str("\\u2029"),
            c if (c as u32) < 0x20 => {
                let _ = write!(o, "\\u{:04x}", c as u32);
            }
            c => o.push(c),
        }
    }
    o.push('"');
    o
}

/// A number for the page's JSON: finite values with up to `decimals` decimals (trailing zeros
/// dropped), `null` otherwise.
pub fn json_num(v: f64, decimals: usize) -> String {
    if !v.is_finite() {
        return "null".into();
    }
    let t = format!("{v:.decimals$}");
    let t = if t.contains('.') {
        t.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        t
    };
    if t == "-0" {
        "0".into()
    } else {
        t
    }
}

/// Standard base64 (RFC 4648 §4, with padding) of `bytes`.
pub fn base64(bytes: &[u8]) -> String {
    const ABC: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut o = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for chunk in bytes.chunks(3) {
        let b = [
            chunk[0],
            chunk.get(1).copied().unwrap_or(0),
            chunk.get(2).copied().unwrap_or(0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for k in 0..4 {
            if k <= chunk.len() {
                o.push(ABC[((n >> (18 - 6 * k)) & 63) as usize] as char);
            } else {
                o.push('=');
            }
        }
    }
    o
}

/// A column of numbers as base64 of little-endian `f32` (`NaN` where there is no value).
pub fn f32_column(values: impl IntoIterator<Item = Option<f64>>) -> String {
    let bytes: Vec<u8> = values
        .into_iter()
        .flat_map(|v| (v.unwrap_or(f64::NAN) as f32).to_le_bytes())
        .collect();
    json_str(&base64(&bytes))
}

/// A column of integers as base64 of little-endian `i32`.
pub fn i32_column(values: impl IntoIterator<Item = i64>) -> String {
    let bytes: Vec<u8> = values
        .into_iter()
        .flat_map(|v| (v.clamp(i64::from(i32::MIN), i64::from(i32::MAX)) as i32).to_le_bytes())
        .collect();
    json_str(&base64(&bytes))
}

/// A column of small integers as base64 bytes.
pub fn u8_column(values: impl IntoIterator<Item = u8>) -> String {
    let bytes: Vec<u8> = values.into_iter().collect();
    json_str(&base64(&bytes))
}

/// Ids joined by newlines (a newline in an id is shown as a space).
pub fn ids_column<'a>(ids: impl IntoIterator<Item = &'a str>) -> String {
    let joined: Vec<String> = ids
        .into_iter()
        .map(|s| s.replace(['\n', '\r'], " "))
        .collect();
    json_str(&joined.join("\n"))
}

fn shape_name(s: Shape) -> &'static str {
    match s {
        Shape::Barred => "barred",
        Shape::Triangle => "triangle",
        Shape::Diamond => "diamond",
        Shape::HollowTriangleDown => "hollow-triangle-down",
        Shape::Ring => "ring",
        Shape::Square => "square",
    }
}

/// The zone code of every picture: name, colour and marker shape per zone, in
/// [`Zone::ALL`] order.
pub fn zones_json() -> String {
    let items: Vec<String> = Zone::ALL
        .iter()
        .map(|z| {
            format!(
                "{{\"name\":{},\"colour\":\"{}\",\"shape\":\"{}\",\"hollow\":{}}}",
                json_str(z.name()),
                hex(zone_colour(*z)),
                shape_name(zone_shape(*z)),
                zone_shape(*z).hollow()
            )
        })
        .collect();
    format!("[{}]", items.join(","))
}

fn stroke_json(s: &Stroke) -> String {
    let dash = s.dash.map_or_else(
        || "null".to_string(),
        |(on, off)| format!("[{},{}]", json_num(on, 2), json_num(off, 2)),
    );
    format!(
        "{{\"colour\":\"{}\",\"width\":{},\"dash\":{dash}}}",
        hex(s.colour),
        s.width
    )
}

/// The line styles of the diagram: those of [`crate::chart`].
pub fn strokes_json() -> String {
    format!(
        "{{\"curve\":{},\"band\":{},\"reference\":{},\"thinning\":{},\"maxThinning\":{},\"grey\":\"{}\"}}",
        stroke_json(&chart::CURVE),
        stroke_json(&chart::BAND),
        stroke_json(&chart::REFERENCE),
        stroke_json(&chart::THINNING),
        stroke_json(&chart::MAX_THINNING),
        hex(chart::GREY)
    )
}

/// The colours of things that are not zones (changes in a comparison): those of [`plot::palette`].
pub fn change_colours_json() -> String {
    format!(
        "{{\"improved\":\"{}\",\"worsened\":\"{}\",\"unchanged\":\"{}\"}}",
        hex(plot::palette::BLUE),
        hex(plot::palette::PURPLE),
        hex(chart::GREY)
    )
}

/// A line of the diagram (axis coordinates) as `{"name", "kind", "x": [..], "y": [..]}`,
/// rounded to 0.01 % (well below a pixel).
pub fn line_json(name: &str, kind: &str, pts: &[(f64, f64)]) -> String {
    let xs: Vec<String> = pts.iter().map(|p| json_num(p.0, 2)).collect();
    let ys: Vec<String> = pts.iter().map(|p| json_num(p.1, 2)).collect();
    format!(
        "{{\"name\":{},\"kind\":\"{kind}\",\"x\":[{}],\"y\":[{}]}}",
        json_str(name),
        xs.join(","),
        ys.join(",")
    )
}

/// The whole page: the data as one JSON object, the stylesheet and the script inline.
/// A content security policy forbids every fetch, so the page cannot reach the network.
pub fn page(title: &str, data: &str) -> String {
    let mut o = String::with_capacity(data.len() + SCRIPT.len() + STYLE.len() + 4096);
    o.push_str("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n");
    o.push_str(
        "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; \
         script-src 'unsafe-inline'; style-src 'unsafe-inline'; img-src data:\">\n",
    );
    o.push_str("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n");
    let _ = writeln!(o, "<title>{}</title>", escape_html(title));
    let _ = writeln!(o, "<style>\n{STYLE}</style>\n</head>\n<body>");
    o.push_str(
        "<noscript><p>This review page draws with JavaScript: allow scripts for this file, or \
         read report.html, fld.svg and map.svg.</p></noscript>\n",
    );
    o.push_str("<script type=\"application/json\" id=\"neckline-data\">");
    o.push_str(data);
    o.push_str("</script>\n<script>\n");
    o.push_str(SCRIPT);
    o.push_str("</script>\n</body>\n</html>\n");
    o
}

/// Text escaped for HTML.
pub fn escape_html(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn base64_matches_the_rfc_vectors() {
        // RFC 4648 §10 test vectors.
        for (plain, coded) in [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ] {
            assert_eq!(base64(plain.as_bytes()), coded);
        }
    }

    #[test]
    fn f32_column_is_little_endian_ieee754() {
        // 1.0f32 is 0x3F800000 (IEEE 754 binary32), little-endian bytes 00 00 80 3F.
        assert_eq!(f32_column([Some(1.0)]), "\"AACAPw==\"");
        // A missing value is a quiet NaN (0x7FC00000).
        assert_eq!(f32_column([None]), "\"AADAfw==\"");
    }

    #[test]
    fn json_strings_cannot_close_the_script() {
        let s = json_str("a</script><b>\"\\\n");
        assert!(!s.contains('<') && !s.contains('>'));
        assert_eq!(s, "\"a\\u003c/script\\u003e\\u003cb\\u003e\\\"\\\\\\n\"");
        assert_eq!(json_num(-0.0001, 2), "0");
        assert_eq!(json_num(12.50, 2), "12.5");
        assert_eq!(json_num(f64::NAN, 2), "null");
    }
}
