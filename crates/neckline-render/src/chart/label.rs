//! Labels inside the plot area: a placer that keeps them apart and off the markers, and the
//! label drawn in a white box near its anchor.

use crate::plot::{DrawResult, Rect};
use plotters::coord::Shift;
use plotters::prelude::*;

fn overlaps(a: Rect, b: Rect) -> bool {
    a.0 < b.2 && b.0 < a.2 && a.1 < b.3 && b.1 < a.3
}

/// Places text labels near anchors so that they overlap neither each other nor the obstacles.
#[derive(Debug, Default)]
pub struct Placer {
    /// Rectangles that hold a label.
    pub labels: Vec<Rect>,
    /// Rectangles to avoid if possible (markers, legend).
    pub obstacles: Vec<Rect>,
    /// Where labels may go.
    pub bounds: Rect,
}

impl Placer {
    /// A placer for labels inside `bounds`.
    pub fn new(bounds: Rect) -> Self {
        Placer {
            bounds,
            ..Default::default()
        }
    }

    /// Keep labels off a square of half-size `r` round the marker at `c`.
    pub fn avoid(&mut self, c: (i32, i32), r: i32) {
        self.obstacles.push((c.0 - r, c.1 - r, c.0 + r, c.1 + r));
    }

    /// Find the top-left corner for a `w × h` label near `anchor`: candidate positions around it
    /// at growing distances; first free of labels and obstacles, else free of labels, else the
    /// first candidate. The chosen box is remembered.
    pub fn place(&mut self, anchor: (i32, i32), w: i32, h: i32) -> (i32, i32) {
        let candidates = candidates(anchor, w, h);
        let inside = |r: Rect| {
            r.0 >= self.bounds.0
                && r.1 >= self.bounds.1
                && r.2 <= self.bounds.2
                && r.3 <= self.bounds.3
        };
        let free = |r: Rect, list: &[Rect]| list.iter().all(|o| !overlaps(r, *o));
        let boxed = |c: (i32, i32)| (c.0, c.1, c.0 + w, c.1 + h);
        let pick = candidates
            .iter()
            .copied()
            .find(|c| {
                let r = boxed(*c);
                inside(r) && free(r, &self.labels) && free(r, &self.obstacles)
            })
            .or_else(|| {
                candidates.iter().copied().find(|c| {
                    let r = boxed(*c);
                    inside(r) && free(r, &self.labels)
                })
            })
            .or_else(|| {
                // Farther out, ring by ring, until a place free of other labels is found: a
                // long leader is better than two labels on one another.
                far_candidates(anchor, w, h).into_iter().find(|c| {
                    let r = boxed(*c);
                    inside(r) && free(r, &self.labels)
                })
            })
            .unwrap_or(candidates[0]);
        self.labels.push(boxed(pick));
        PLACED.with(|p| p.borrow_mut().push(boxed(pick)));
        pick
    }
}

thread_local! {
    /// Every label box placed on this thread since the last [`take_placed`].
    static PLACED: std::cell::RefCell<Vec<Rect>> = const { std::cell::RefCell::new(Vec::new()) };
}

/// The label boxes placed on this thread since the last call (for tests that check that the
/// labels of a picture overlap nowhere).
pub fn take_placed() -> Vec<Rect> {
    PLACED.with(|p| std::mem::take(&mut *p.borrow_mut()))
}

/// Whether two boxes overlap.
pub fn boxes_overlap(a: Rect, b: Rect) -> bool {
    overlaps(a, b)
}

fn far_candidates(anchor: (i32, i32), w: i32, h: i32) -> Vec<(i32, i32)> {
    let (x, y) = anchor;
    let mut out = Vec::new();
    for d in (130..=1400).step_by(20) {
        for k in 0..24 {
            let t = f64::from(k) * std::f64::consts::TAU / 24.0;
            let cx = x + (f64::from(d) * t.cos()) as i32;
            let cy = y + (f64::from(d) * t.sin()) as i32;
            out.push((cx - w / 2, cy - h / 2));
        }
    }
    out
}

fn candidates(anchor: (i32, i32), w: i32, h: i32) -> Vec<(i32, i32)> {
    let (x, y) = anchor;
    let mut out = Vec::new();
    for d in [8, 18, 32, 50, 75, 105] {
        out.extend([
            (x + d, y - h - d / 2),
            (x + d, y + d / 2),
            (x - w - d, y - h - d / 2),
            (x - w - d, y + d / 2),
            (x - w / 2, y - h - d),
            (x - w / 2, y + d),
            (x + d, y - h / 2),
            (x - w - d, y - h / 2),
        ]);
    }
    out
}

/// Whether a thin line joins a label to its anchor.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Leader {
    /// No line (labels of lines, placed at the line's end).
    None,
    /// Always a line, from the anchor to the nearest point of the box.
    Always,
    /// A line only when the box is more than this many pixels (across plus down) away.
    Beyond(i32),
}

/// How a label is drawn: padding round the text, the box, its frame and its leader.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Label {
    /// Padding added to the text's width and height, pixels (half of it on each side).
    pub pad: (i32, i32),
    /// Opacity of the white box.
    pub opacity: f64,
    /// Colour of the box's frame; `None` for no frame.
    pub border: Option<RGBColor>,
    /// The line to the anchor.
    pub leader: Leader,
}

impl Label {
    /// A location's label: a framed white box with a leader from the marker.
    pub const fn boxed(border: RGBColor) -> Self {
        Label {
            pad: (6, 4),
            opacity: 0.85,
            border: Some(border),
            leader: Leader::Always,
        }
    }

    /// A line's label: a plain white box at the line's end.
    pub const LINE: Label = Label {
        pad: (4, 2),
        opacity: 0.8,
        border: None,
        leader: Leader::None,
    };

    /// The same with another leader.
    pub const fn leader(self, leader: Leader) -> Self {
        Label { leader, ..self }
    }

    /// Draw `text` near `anchor`, where `placer` finds room.
    pub fn draw<DB: DrawingBackend>(
        &self,
        root: &DrawingArea<DB, Shift>,
        placer: &mut Placer,
        anchor: (i32, i32),
        text: &str,
        style: &TextStyle<'_>,
    ) -> DrawResult<DB> {
        let (w, h) = root.estimate_text_size(text, style)?;
        let (w, h) = (w as i32 + self.pad.0, h as i32 + self.pad.1);
        let at = placer.place(anchor, w, h);
        let to = (
            anchor.0.clamp(at.0, at.0 + w),
            anchor.1.clamp(at.1, at.1 + h),
        );
        let lead = match self.leader {
            Leader::None => false,
            Leader::Always => true,
            Leader::Beyond(d) => (to.0 - anchor.0).abs() + (to.1 - anchor.1).abs() > d,
        };
        if lead {
            root.draw(&PathElement::new(vec![anchor, to], BLACK.stroke_width(1)))?;
        }
        let corners = [at, (at.0 + w, at.1 + h)];
        root.draw(&Rectangle::new(corners, WHITE.mix(self.opacity).filled()))?;
        if let Some(b) = self.border {
            root.draw(&Rectangle::new(corners, b.stroke_width(1)))?;
        }
        root.draw_text(text, style, (at.0 + self.pad.0 / 2, at.1 + self.pad.1 / 2))
    }
}

/// A location's label (see [`Label::boxed`]): a white box framed in `border`, placed by
/// `placer` where it hides nothing, and a thin line from the marker to the box.
pub fn label_box<DB: DrawingBackend>(
    root: &DrawingArea<DB, Shift>,
    placer: &mut Placer,
    anchor: (i32, i32),
    text: &str,
    style: &TextStyle<'_>,
    border: RGBColor,
) -> DrawResult<DB> {
    Label::boxed(border).draw(root, placer, anchor, text, style)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn placer_avoids_taken_boxes() {
        let mut p = Placer::new((0, 0, 1000, 1000));
        let a = p.place((500, 500), 60, 14);
        let b = p.place((500, 500), 60, 14);
        let ra = (a.0, a.1, a.0 + 60, a.1 + 14);
        let rb = (b.0, b.1, b.0 + 60, b.1 + 14);
        assert!(!overlaps(ra, rb));
    }
}
