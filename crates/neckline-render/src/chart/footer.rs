//! The footer: a rule, the caution wrapped to the picture's width, and one provenance line
//! (the version, then what the picture needs said: its input, how a value is defined).

use super::{FOOTER_TOP, SIZE, TEXT_LEFT, TEXT_WIDTH};
use crate::plot::{self, DrawResult};
use neckline_core::analysis::Analysis;
use neckline_core::CAUTION;
use plotters::coord::Shift;
use plotters::prelude::*;

/// Space between the lines of the caution, pixels.
const LINE: i32 = 17;

/// The provenance line: `neckline VERSION`, then `items`, apart by middle dots.
pub fn provenance(items: &[&str]) -> String {
    let mut parts = vec![format!("neckline {}", env!("CARGO_PKG_VERSION"))];
    parts.extend(items.iter().map(|s| s.to_string()));
    parts.join("  ·  ")
}

/// Draw the footer with the provenance line of `items` (see [`provenance`]), shortened to fit.
pub fn draw_footer<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    items: &[&str],
) -> DrawResult<DB> {
    let style = plot::text(13.0).color(&RGBColor(60, 60, 60));
    root.draw(&PathElement::new(
        vec![
            (TEXT_LEFT, FOOTER_TOP),
            (SIZE.0 as i32 - TEXT_LEFT, FOOTER_TOP),
        ],
        RGBColor(200, 200, 200).stroke_width(1),
    ))?;
    let mut y = FOOTER_TOP + 8;
    for line in plot::wrap_px(root, CAUTION, &style, TEXT_WIDTH) {
        root.draw_text(&line, &style, (TEXT_LEFT, y))?;
        y += LINE;
    }
    let prov = plot::fit_px(root, &provenance(items), &style, TEXT_WIDTH);
    root.draw_text(&prov, &style, (TEXT_LEFT, y))
}

/// The footer of a checked file's pictures: how the margin is defined, and the input file.
pub fn draw_analysis_footer<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    a: &Analysis,
) -> DrawResult<DB> {
    let input = a
        .input
        .file_name()
        .map_or_else(|| "-".into(), |n| n.to_string_lossy().into_owned());
    draw_footer(
        root,
        &[
            "margin = limit curve minus major strain, percentage points of engineering strain",
            &format!("input {input}"),
        ],
    )
}
