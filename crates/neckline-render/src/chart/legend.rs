//! The legend panel right of the plot, drawn from a list of rows: headings, entries (a key
//! drawn in the row's left slot, a text and perhaps a count), notes and small tables. The
//! rows' tops are laid out once, from the panel's top down, and then drawn.

use crate::plot::{self, marker, zone_colour, zone_shape, DrawResult, Shape};
use neckline_core::assess::Zone;
use plotters::coord::Shift;
use plotters::prelude::*;

use super::Stroke;

/// What a row shows in its left slot. Offsets are from the row's left edge and top; most keys
/// sit on the row's middle line, 8 px down.
#[derive(Debug, Clone, Copy)]
pub enum Key {
    /// A marker of `shape` with half-size `r`, centred `dx` right, filled with `fill`.
    Marker {
        /// Shape.
        shape: Shape,
        /// Fill (the outline of a hollow shape).
        fill: RGBColor,
        /// Half-size, pixels.
        r: i32,
        /// Centre, pixels right of the row's left edge.
        dx: i32,
    },
    /// A sample of a line, `len` pixels long from the row's left edge.
    Line {
        /// How the line is drawn.
        stroke: Stroke,
        /// Length, pixels.
        len: i32,
    },
    /// An arrow (30 px shaft of width 2, head at 34 px) in a colour.
    Arrow(RGBColor),
    /// A circle of radius `r` centred `dx` right, filled or outlined as `style` says.
    Circle {
        /// Centre, pixels right of the row's left edge.
        dx: i32,
        /// Radius, pixels.
        r: i32,
        /// Fill or outline.
        style: ShapeStyle,
    },
    /// The dashed borderline ring of radius `r` centred at `at` (right, down).
    Borderline {
        /// Centre, pixels right of and below the row's top left.
        at: (i32, i32),
        /// Radius, pixels.
        r: i32,
    },
    /// An 18 × 16 px patch, 11 px in, filled or outlined as `style` says.
    Patch(ShapeStyle),
    /// A plus with arms `arm` pixels long centred `dx` right.
    Plus {
        /// Centre, pixels right of the row's left edge.
        dx: i32,
        /// Arm length, pixels.
        arm: i32,
        /// Line style.
        style: ShapeStyle,
    },
}

impl Key {
    /// A zone's marker as every zone legend shows it: half-size 6, centred 10 px in.
    pub fn zone(z: Zone) -> Self {
        Key::Marker {
            shape: zone_shape(z),
            fill: zone_colour(z),
            r: 6,
            dx: 10,
        }
    }

    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        x: i32,
        y: i32,
    ) -> DrawResult<DB> {
        match *self {
            Key::Marker { shape, fill, r, dx } => {
                marker(root, shape, (x + dx, y + 8), r, fill, BLACK)
            }
            Key::Line { stroke, len } => stroke.draw(root, &[(x, y + 8), (x + len, y + 8)]),
            Key::Arrow(colour) => {
                root.draw(&PathElement::new(
                    vec![(x, y + 8), (x + 30, y + 8)],
                    colour.stroke_width(2),
                ))?;
                plot::arrowhead(root, (x, y + 8), (x + 34, y + 8), colour)
            }
            Key::Circle { dx, r, style } => root.draw(&Circle::new((x + dx, y + 8), r, style)),
            Key::Borderline { at, r } => plot::borderline_ring(root, (x + at.0, y + at.1), r),
            Key::Patch(style) => root.draw(&Rectangle::new([(x + 11, y), (x + 29, y + 16)], style)),
            Key::Plus { dx, arm, style } => plot::plus(root, (x + dx, y + 8), arm, style),
        }
    }
}

/// A text in a row.
#[derive(Clone)]
pub struct Cell {
    text: String,
    style: TextStyle<'static>,
    /// Left edge (or right edge, when `right`), pixels from the row's left edge.
    dx: i32,
    /// Pixels below the row's top.
    dy: i32,
    right: bool,
    /// Shorten the text with an ellipsis to this many pixels.
    fit: Option<u32>,
}

/// One row of the legend: perhaps a key, its texts, and how far down the next row starts.
#[derive(Clone)]
pub struct Row {
    key: Option<Key>,
    cells: Vec<Cell>,
    step: i32,
}

/// How the entries of a group are set: where the text starts, its size, where a count ends
/// and the height of a row.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Entries {
    /// Left edge of the text, pixels from the row's left edge.
    pub text_dx: i32,
    /// Font size of the text (and of the bold count).
    pub size: f64,
    /// Right edge of the count, pixels from the row's left edge.
    pub count_right: i32,
    /// Height of a row.
    pub step: i32,
}

/// Zone or condition rows of the diagrams: marker, name, count.
pub const COUNTED: Entries = Entries {
    text_dx: 28,
    size: 15.0,
    count_right: 200,
    step: 25,
};

/// Line rows: a 40 px line sample, then the text.
pub const LINES: Entries = Entries {
    text_dx: 50,
    size: 14.0,
    count_right: 200,
    step: 22,
};

impl Row {
    /// An empty row `step` pixels high (a gap, or a row to fill).
    pub fn new(step: i32) -> Self {
        Row {
            key: None,
            cells: Vec::new(),
            step,
        }
    }

    /// An entry: `key` and `text`, set as `e` says.
    pub fn entry(key: Key, text: impl Into<String>, e: &Entries) -> Self {
        Row::new(e.step)
            .key(key)
            .left(text, plot::text(e.size), e.text_dx)
    }

    /// An entry with a count right-aligned in bold.
    pub fn counted(key: Key, text: impl Into<String>, count: usize, e: &Entries) -> Self {
        Row::entry(key, text, e).right(count.to_string(), plot::bold(e.size), e.count_right)
    }

    /// A line of text alone at the row's left edge.
    pub fn text(text: impl Into<String>, style: TextStyle<'static>, step: i32) -> Self {
        Row::new(step).left(text, style, 0)
    }

    /// The key in the row's left slot.
    pub fn key(mut self, key: Key) -> Self {
        self.key = Some(key);
        self
    }

    /// A text with its left edge `dx` in.
    pub fn left(mut self, text: impl Into<String>, style: TextStyle<'static>, dx: i32) -> Self {
        self.cells.push(Cell {
            text: text.into(),
            style,
            dx,
            dy: 0,
            right: false,
            fit: None,
        });
        self
    }

    /// A text with its right edge `dx` in.
    pub fn right(self, text: impl Into<String>, style: TextStyle<'static>, dx: i32) -> Self {
        self.left(text, style, dx).last(|c| c.right = true)
    }

    /// The last text moved `dy` pixels down.
    pub fn down(self, dy: i32) -> Self {
        self.last(|c| c.dy = dy)
    }

    /// The last text shortened to `width` pixels.
    pub fn fit(self, width: u32) -> Self {
        self.last(|c| c.fit = Some(width))
    }

    /// Another height.
    pub fn step(mut self, step: i32) -> Self {
        self.step = step;
        self
    }

    fn last(mut self, f: impl FnOnce(&mut Cell)) -> Self {
        if let Some(c) = self.cells.last_mut() {
            f(c);
        }
        self
    }

    fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        x: i32,
        y: i32,
    ) -> DrawResult<DB> {
        if let Some(k) = &self.key {
            k.draw(root, x, y)?;
        }
        for c in &self.cells {
            let text = match c.fit {
                Some(w) => plot::fit_px(root, &c.text, &c.style, w),
                None => c.text.clone(),
            };
            let left = if c.right {
                let (w, _) = root.estimate_text_size(&text, &c.style)?;
                x + c.dx - w as i32
            } else {
                x + c.dx
            };
            root.draw_text(&text, &c.style, (left, y + c.dy))?;
        }
        Ok(())
    }
}

/// A legend: rows from `top` down at `left`.
#[derive(Clone)]
pub struct Legend {
    /// Left edge, pixels.
    pub left: i32,
    /// Top of the first row, pixels.
    pub top: i32,
    rows: Vec<Row>,
}

impl Legend {
    /// An empty legend at (`left`, `top`).
    pub fn new(left: i32, top: i32) -> Self {
        Legend {
            left,
            top,
            rows: Vec::new(),
        }
    }

    /// Add a row.
    pub fn push(&mut self, row: Row) -> &mut Self {
        self.rows.push(row);
        self
    }

    /// A bold heading of font size `size`, `step` pixels above the next row.
    pub fn heading(&mut self, text: impl Into<String>, size: f64, step: i32) -> &mut Self {
        self.push(Row::text(text, plot::bold(size), step))
    }

    /// Empty space.
    pub fn gap(&mut self, step: i32) -> &mut Self {
        self.push(Row::new(step))
    }

    /// A note wrapped to `width` pixels, one row of `step` pixels a line.
    pub fn note<DB: DrawingBackend>(
        &mut self,
        root: &DrawingArea<DB, Shift>,
        text: &str,
        style: TextStyle<'static>,
        width: u32,
        step: i32,
    ) -> &mut Self {
        for line in plot::wrap_px(root, text, &style, width) {
            self.push(Row::text(line, style.clone(), step));
        }
        self
    }

    /// The top of each row, pixels.
    pub fn layout(&self) -> Vec<i32> {
        self.rows
            .iter()
            .scan(self.top, |y, r| {
                let at = *y;
                *y += r.step;
                Some(at)
            })
            .collect()
    }

    /// Below the last row: where anything drawn after the legend may start.
    pub fn bottom(&self) -> i32 {
        self.top + self.rows.iter().map(|r| r.step).sum::<i32>()
    }

    /// Draw every row.
    pub fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> DrawResult<DB> {
        for (row, y) in self.rows.iter().zip(self.layout()) {
            row.draw(root, self.left, y)?;
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Rows stack: each starts where the one above ends.
    #[test]
    fn rows_are_laid_out_top_down() {
        let mut l = Legend::new(885, 108);
        l.heading("Zones", 16.0, 28);
        for z in Zone::ALL {
            l.push(Row::counted(Key::zone(z), z.name(), 1, &COUNTED));
        }
        l.gap(12);
        let tops = l.layout();
        assert_eq!(tops[0], 108);
        assert_eq!(tops[1], 136);
        assert_eq!(tops[6], 136 + 5 * 25);
        assert_eq!(l.bottom(), 136 + 6 * 25 + 12);
    }
}
