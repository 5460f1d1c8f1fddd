//! The title band: three lines (what and which part, the job, the curve or what is shown), in
//! falling sizes at the top left.

use super::{TEXT_LEFT, TEXT_WIDTH};
use crate::plot::{self, DrawResult};
use neckline_core::analysis::Analysis;
use plotters::coord::Shift;
use plotters::prelude::*;

/// One title line's font size, weight and top.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Row {
    /// Font size.
    pub size: f64,
    /// Bold or regular.
    pub bold: bool,
    /// Top of the line, pixels.
    pub y: i32,
}

/// How the three lines are set.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Layout {
    /// The three lines, first the heading.
    pub rows: [Row; 3],
    /// Whether a line too long for the picture is shortened with an ellipsis.
    pub fit: bool,
}

/// The title of every picture but the path diagram.
pub const TITLE: Layout = Layout {
    rows: [
        Row {
            size: 23.0,
            bold: true,
            y: 10,
        },
        Row {
            size: 16.0,
            bold: false,
            y: 40,
        },
        Row {
            size: 14.0,
            bold: false,
            y: 64,
        },
    ],
    fit: true,
};

/// The path diagram's title: a smaller second line, the lines as they come.
pub const PATH_TITLE: Layout = Layout {
    rows: [
        Row {
            size: 23.0,
            bold: true,
            y: 10,
        },
        Row {
            size: 15.0,
            bold: false,
            y: 42,
        },
        Row {
            size: 14.0,
            bold: false,
            y: 66,
        },
    ],
    fit: false,
};

impl Layout {
    /// Draw the three lines.
    pub fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        lines: [&str; 3],
    ) -> DrawResult<DB> {
        for (text, row) in lines.iter().zip(self.rows) {
            let style = if row.bold {
                plot::bold(row.size)
            } else {
                plot::text(row.size)
            };
            if self.fit {
                let t = plot::fit_px(root, text, &style, TEXT_WIDTH);
                root.draw_text(&t, &style, (TEXT_LEFT, row.y))?;
            } else {
                root.draw_text(text, &style, (TEXT_LEFT, row.y))?;
            }
        }
        Ok(())
    }
}

/// Draw the three title lines in the usual layout.
pub fn draw_title<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    lines: [&str; 3],
) -> DrawResult<DB> {
    TITLE.draw(root, lines)
}

/// The part, the job line (tryout, material, die, how many locations) and the curve line of a
/// checked file's pictures.
pub fn job_lines(a: &Analysis) -> (String, String, String) {
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
