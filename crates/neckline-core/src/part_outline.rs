//! The part's outline on the map: read from a polyline file named by the job's `outline` key,
//! or traced from the measured locations.
//!
//! **Traced** from what the bounded summary holds: the occupied cells of its map binning (the
//! keys of square cells, doubled in size by halving the keys), so the same steps run at 100
//! locations and at a million
//! rows, on at most [`TRACE_CELLS`]² cells. The cells are first made as coarse as the spacing
//! of the locations (until nine in ten occupied cells touch another, or [`MIN_CELLS`] span the
//! part), gaps of one cell are closed (a 3×3 dilation, then erosion), the boundary of the union
//! of the cells is followed into rings (interior on the left: outer rings counter-clockwise,
//! holes clockwise), each one-cell step of a staircase is cut along the diagonal of its empty
//! cell, and runs in one direction become one edge. Every cut only adds an empty half cell;
//! last, the rings are cut to the box of the locations (the cells reach up to a cell past it).
//! So every location lies inside or on the traced outline, which is a concave hull of the
//! locations at the resolution of one cell.
//!
//! **From a file**: a CSV table (comma or semicolon, as every table, see [`crate::table`]) with
//! columns `x, y` (part coordinates, in the job's unit) and an optional `ring` column: the rows
//! of one ring follow each other, and each ring is closed (its last point joins its first; a
//! last point equal to the first is taken as that closing). Without `ring`, the rows are one
//! ring. A ring needs at least 3 points.

use crate::error::{Error, Location, Result};
use crate::table::{read_table, Table};
use rustc_hash::FxHashSet;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Most cells across the part's longer side when an outline is traced.
pub const TRACE_CELLS: i64 = 120;
/// Fewest cells across the part's longer side that the tracing coarsens to.
pub const MIN_CELLS: i64 = 8;
/// Most points an outline file may hold.
pub const MAX_POINTS: usize = 100_000;

/// Where the part's outline came from.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum OutlineSource {
    /// Traced from the measured locations.
    Traced,
    /// Read from this polyline file.
    File(PathBuf),
}

/// The part's outline: closed rings in the map's plane.
#[derive(Debug, Clone, PartialEq)]
pub struct PartOutline {
    /// Closed rings (the last point joins the first, not repeated).
    pub rings: Vec<Vec<(f64, f64)>>,
    /// Where it came from.
    pub source: OutlineSource,
    /// The cell side the outline was traced at (`None` for a file).
    pub cell: Option<f64>,
}

impl PartOutline {
    /// The legend's words for where the outline came from (a file by its name).
    pub fn describe(&self) -> String {
        match &self.source {
            OutlineSource::Traced => "outline: traced from the points".to_string(),
            OutlineSource::File(p) => {
                let name = p.file_name().map_or(p.as_os_str(), |n| n);
                format!("outline: {}", name.to_string_lossy())
            }
        }
    }

    /// The enclosed area: the sum of the rings' signed areas by the shoelace formula (outer
    /// rings counter-clockwise count positive, holes clockwise negative).
    pub fn area(&self) -> f64 {
        self.rings.iter().map(|r| signed_area(r)).sum()
    }

    /// Whether `p` lies inside the outline (even-odd rule over all rings) or within `tol` of
    /// one of its edges.
    pub fn contains(&self, p: (f64, f64), tol: f64) -> bool {
        let on_edge = self
            .rings
            .iter()
            .any(|r| edges(r).any(|(a, b)| segment_distance(p, a, b) <= tol));
        on_edge || self.rings.iter().filter(|r| crosses_odd(r, p)).count() % 2 == 1
    }
}

/// The signed area of a closed ring by the shoelace formula (Gauss's area formula:
/// A = ½ Σ (x_i·y_{i+1} − x_{i+1}·y_i); positive when counter-clockwise).
pub fn signed_area(ring: &[(f64, f64)]) -> f64 {
    0.5 * edges(ring).map(|(a, b)| a.0 * b.1 - b.0 * a.1).sum::<f64>()
}

fn edges(ring: &[(f64, f64)]) -> impl Iterator<Item = ((f64, f64), (f64, f64))> + '_ {
    (0..ring.len()).map(move |i| (ring[i], ring[(i + 1) % ring.len()]))
}

/// Whether a ray from `p` towards +x crosses the ring an odd number of times (the crossing
/// test of point-in-polygon, half-open in y so that a vertex on the ray counts once).
fn crosses_odd(ring: &[(f64, f64)], p: (f64, f64)) -> bool {
    edges(ring)
        .filter(|&(a, b)| {
            (a.1 > p.1) != (b.1 > p.1) && p.0 < a.0 + (p.1 - a.1) * (b.0 - a.0) / (b.1 - a.1)
        })
        .count()
        % 2
        == 1
}

/// The distance from `p` to the segment `a`–`b`.
fn segment_distance(p: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let len2 = dx * dx + dy * dy;
    let t = if len2 > 0.0 {
        (((p.0 - a.0) * dx + (p.1 - a.1) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let (qx, qy) = (a.0 + t * dx, a.1 + t * dy);
    ((p.0 - qx).powi(2) + (p.1 - qy).powi(2)).sqrt()
}

// ---------------------------------------------------------------------------------------------
// Reading a polyline file.

/// Read an outline file: columns `x, y` and an optional `ring`. A bad cell is an error naming
/// the file, line and column and what was expected.
pub fn read(path: &Path) -> Result<PartOutline> {
    of_table(&read_table(path, "x, y (and optionally ring)")?)
}

/// The outline of a table already read (see [`read`]).
pub fn of_table(t: &Table) -> Result<PartOutline> {
    Ok(PartOutline {
        rings: rings_of(t)?,
        source: OutlineSource::File(t.source.clone()),
        cell: None,
    })
}

fn column(t: &Table, name: &str) -> Option<usize> {
    t.header.iter().position(|h| h.eq_ignore_ascii_case(name))
}

/// One ring as read: its id, the line of its first row, its points.
type RingRows = (String, u64, Vec<(f64, f64)>);

/// The table's rows as rings, each closed.
fn rings_of(t: &Table) -> Result<Vec<Vec<(f64, f64)>>> {
    let need = |n: &str| {
        column(t, n).ok_or_else(|| {
            t.header_error(
                None,
                format!(
                    "missing column `{n}`: an outline file needs x, y (and optionally ring); \
                     found: {}",
                    t.header.join(", ")
                ),
            )
        })
    };
    let (cx, cy, cr) = (need("x")?, need("y")?, column(t, "ring"));
    if t.rows.len() > MAX_POINTS {
        return Err(Error::input(
            Location::file(&t.source),
            format!(
                "{} points, more than {MAX_POINTS}: an outline is a polyline, not a point cloud",
                t.rows.len()
            ),
        ));
    }
    let mut rings: Vec<RingRows> = Vec::new();
    let mut seen = FxHashSet::default();
    for (line, r) in &t.rows {
        let bad = |e: crate::measure::RejectedRow| Error::input(e.location, e.reason);
        t.check_len(*line, r).map_err(bad)?;
        let id = match cr {
            Some(c) => t.text(*line, r, c).map_err(bad)?,
            None => String::new(),
        };
        let p = (
            t.number(*line, r, cx).map_err(bad)?,
            t.number(*line, r, cy).map_err(bad)?,
        );
        if rings.last().is_none_or(|(last, _, _)| *last != id) {
            if !seen.insert(id.clone()) {
                let mut loc = Location::file(&t.source).at_line(*line);
                if let Some(c) = cr {
                    loc = loc.at_column(c as u64 + 1, &t.header[c]);
                }
                return Err(Error::input(
                    loc,
                    format!(
                        "ring `{id}` starts again after another ring: expected the rows of \
                         one ring to follow each other"
                    ),
                ));
            }
            rings.push((id, *line, Vec::new()));
        }
        rings.last_mut().expect("a ring was pushed").2.push(p);
    }
    rings.into_iter().map(|r| closed_ring(t, r)).collect()
}

/// A ring with its repeated closing point dropped; fewer than 3 distinct points is an error at
/// the ring's first line.
fn closed_ring(t: &Table, (id, line, mut pts): RingRows) -> Result<Vec<(f64, f64)>> {
    if pts.len() > 1 && pts.first() == pts.last() {
        pts.pop();
    }
    pts.dedup();
    if pts.len() < 3 {
        let name = if id.is_empty() {
            "the outline".to_string()
        } else {
            format!("ring `{id}`")
        };
        return Err(Error::input(
            Location::file(&t.source).at_line(line),
            format!(
                "{name} has {} distinct point(s): expected at least 3 to close a ring",
                pts.len()
            ),
        ));
    }
    Ok(pts)
}

// ---------------------------------------------------------------------------------------------
// Tracing from the binned locations.

/// Trace the outline of the occupied cells `cells` of side `size` (cell `(i, j)` spans
/// `i·size ..= (i + 1)·size` across and `j·size ..= (j + 1)·size` up, as the map binning's
/// keys; see the module's notes), cut to `extent` (`[x0, y0, x1, y1]`, the box of the
/// locations: the cells reach past it, further on one side than on the other); `None` when no
/// cell is occupied.
pub fn trace(
    cells: impl IntoIterator<Item = (i64, i64)>,
    size: f64,
    extent: Option<[f64; 4]>,
) -> Option<PartOutline> {
    let mut b = Keys {
        cells: cells.into_iter().collect(),
        size,
    };
    if b.cells.is_empty() {
        return None;
    }
    while across(&b) > TRACE_CELLS {
        b.coarsen();
    }
    while across(&b) > MIN_CELLS && !linked(&b) {
        b.coarsen();
    }
    let mut grid = Grid::of(&b);
    grid.close();
    grid.fill_saddles();
    let size = b.size;
    let rings = grid
        .rings()
        .into_iter()
        .map(|r| {
            let ring: Vec<(f64, f64)> = simplify(&cut_steps(&r))
                .into_iter()
                .map(|(i, j)| (i as f64 * size, j as f64 * size))
                .collect();
            match extent {
                // A box of no width or height (one location, or all on one line across or
                // up) would cut the ring to nothing: the cells' outline is kept whole.
                Some(e) if e[2] > e[0] && e[3] > e[1] => clip_to_box(&ring, e),
                _ => ring,
            }
        })
        .filter(|r| r.len() >= 3)
        .collect();
    Some(PartOutline {
        rings,
        source: OutlineSource::Traced,
        cell: Some(size),
    })
}

/// A ring cut to the box `[x0, y0, x1, y1]` (Sutherland-Hodgman clipping against each side
/// in turn: I. E. Sutherland, G. W. Hodgman, "Reentrant polygon clipping", Communications of
/// the ACM 17 (1), 1974): the part of the ring's inside that lies in the box.
fn clip_to_box(ring: &[(f64, f64)], e: [f64; 4]) -> Vec<(f64, f64)> {
    type Side = (fn((f64, f64), f64) -> f64, f64);
    // Each side as the signed distance inside it (>= 0 kept) and its coordinate.
    let sides: [Side; 4] = [
        (|p, v| p.0 - v, e[0]),
        (|p, v| v - p.0, e[2]),
        (|p, v| p.1 - v, e[1]),
        (|p, v| v - p.1, e[3]),
    ];
    let mut pts = ring.to_vec();
    for (inside, v) in sides {
        let n = pts.len();
        let mut out = Vec::with_capacity(n + 4);
        for i in 0..n {
            let (a, b) = (pts[i], pts[(i + 1) % n]);
            let (da, db) = (inside(a, v), inside(b, v));
            if da >= 0.0 {
                out.push(a);
            }
            if (da >= 0.0) != (db >= 0.0) {
                let t = da / (da - db);
                out.push((a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1)));
            }
        }
        pts = out;
    }
    pts.dedup_by(|a, b| (a.0 - b.0).abs() < 1e-12 && (a.1 - b.1).abs() < 1e-12);
    pts
}

/// Cells across the longer side of the occupied keys' box.
/// Occupied cells by key, and their side.
struct Keys {
    cells: FxHashSet<(i64, i64)>,
    size: f64,
}

impl Keys {
    /// Double the cells' side (the map binning's own coarsening: each key halved).
    fn coarsen(&mut self) {
        self.cells = self.cells.iter().map(|&(i, j)| (i >> 1, j >> 1)).collect();
        self.size *= 2.0;
    }
}

fn across(b: &Keys) -> i64 {
    let (lo, hi) = key_box(b);
    (hi.0 - lo.0 + 1).max(hi.1 - lo.1 + 1)
}

fn key_box(b: &Keys) -> ((i64, i64), (i64, i64)) {
    b.cells.iter().fold(
        ((i64::MAX, i64::MAX), (i64::MIN, i64::MIN)),
        |(lo, hi), &(i, j)| ((lo.0.min(i), lo.1.min(j)), (hi.0.max(i), hi.1.max(j))),
    )
}

/// Whether nine in ten occupied cells have an occupied neighbour (of the eight round them):
/// the cells are then as coarse as the spacing of the locations.
fn linked(b: &Keys) -> bool {
    let cells = &b.cells;
    let touching = cells
        .iter()
        .filter(|&&(i, j)| {
            NEIGHBOURS
                .iter()
                .any(|(di, dj)| cells.contains(&(i + di, j + dj)))
        })
        .count();
    10 * touching >= 9 * cells.len()
}

const NEIGHBOURS: [(i64, i64); 8] = [
    (-1, -1),
    (0, -1),
    (1, -1),
    (-1, 0),
    (1, 0),
    (-1, 1),
    (0, 1),
    (1, 1),
];

/// The occupied cells as a dense grid with a border of empty cells.
struct Grid {
    /// Key of the grid's cell (0, 0).
    origin: (i64, i64),
    w: i64,
    h: i64,
    on: Vec<bool>,
}

/// Empty cells round the occupied ones: room for the dilation and the boundary.
const BORDER: i64 = 2;

impl Grid {
    fn of(b: &Keys) -> Self {
        let (lo, hi) = key_box(b);
        let origin = (lo.0 - BORDER, lo.1 - BORDER);
        let (w, h) = (hi.0 - lo.0 + 1 + 2 * BORDER, hi.1 - lo.1 + 1 + 2 * BORDER);
        let mut g = Grid {
            origin,
            w,
            h,
            on: vec![false; (w * h) as usize],
        };
        for &(i, j) in &b.cells {
            g.set(i - origin.0, j - origin.1, true);
        }
        g
    }

    fn get(&self, i: i64, j: i64) -> bool {
        (0..self.w).contains(&i) && (0..self.h).contains(&j) && self.on[(j * self.w + i) as usize]
    }

    fn set(&mut self, i: i64, j: i64, v: bool) {
        self.on[(j * self.w + i) as usize] = v;
    }

    /// Each cell where `keep` holds of the cell and its eight neighbours.
    fn morph(&self, keep: fn(&[bool; 9]) -> bool) -> Vec<bool> {
        let mut out = vec![false; self.on.len()];
        for j in 0..self.h {
            for i in 0..self.w {
                let mut n = [false; 9];
                for (k, (di, dj)) in NEIGHBOURS.iter().chain([&(0, 0)]).enumerate() {
                    n[k] = self.get(i + di, j + dj);
                }
                out[(j * self.w + i) as usize] = keep(&n);
            }
        }
        out
    }

    /// Close gaps of one cell: dilate by the 3×3 square, then erode by it (the border keeps
    /// the erosion from eating the dilated edge).
    fn close(&mut self) {
        let original = self.on.clone();
        self.on = self.morph(|n| n.iter().any(|&v| v));
        self.on = self.morph(|n| n.iter().all(|&v| v));
        // Closing never removes a cell; keep the originals all the same (a grid edge).
        for (c, o) in self.on.iter_mut().zip(original) {
            *c |= o;
        }
    }

    /// Fill both empty cells of every 2×2 block whose occupied cells touch only at a corner,
    /// so that every corner of the boundary is passed once.
    fn fill_saddles(&mut self) {
        loop {
            let mut changed = false;
            for j in 0..self.h - 1 {
                for i in 0..self.w - 1 {
                    let (a, b, c, d) = (
                        self.get(i, j),
                        self.get(i + 1, j),
                        self.get(i, j + 1),
                        self.get(i + 1, j + 1),
                    );
                    if (a && d && !b && !c) || (b && c && !a && !d) {
                        for (x, y) in [(i, j), (i + 1, j), (i, j + 1), (i + 1, j + 1)] {
                            self.set(x, y, true);
                        }
                        changed = true;
                    }
                }
            }
            if !changed {
                return;
            }
        }
    }

    /// The boundary of the occupied cells as rings of lattice points (cell corners, in keys of
    /// the binning), interior on the left.
    fn rings(&self) -> Vec<Vec<(i64, i64)>> {
        let mut next: HashMap<(i64, i64), (i64, i64)> = HashMap::new();
        for j in 0..self.h {
            for i in 0..self.w {
                if !self.get(i, j) {
                    continue;
                }
                let (x, y) = (i + self.origin.0, j + self.origin.1);
                if !self.get(i, j - 1) {
                    next.insert((x, y), (x + 1, y));
                }
                if !self.get(i + 1, j) {
                    next.insert((x + 1, y), (x + 1, y + 1));
                }
                if !self.get(i, j + 1) {
                    next.insert((x + 1, y + 1), (x, y + 1));
                }
                if !self.get(i - 1, j) {
                    next.insert((x, y + 1), (x, y));
                }
            }
        }
        let mut starts: Vec<(i64, i64)> = next.keys().copied().collect();
        starts.sort_unstable();
        let mut rings = Vec::new();
        for s in starts {
            let Some(mut at) = next.remove(&s) else {
                continue;
            };
            let mut ring = vec![s];
            while at != s {
                ring.push(at);
                match next.remove(&at) {
                    Some(n) => at = n,
                    None => break,
                }
            }
            rings.push(ring);
        }
        rings
    }
}

/// The cross product of `u→v` and `v→w`: negative at a right turn.
fn turn(u: (i64, i64), v: (i64, i64), w: (i64, i64)) -> i64 {
    (v.0 - u.0) * (w.1 - v.1) - (v.1 - u.1) * (w.0 - v.0)
}

fn unit(a: (i64, i64), b: (i64, i64)) -> bool {
    (a.0 - b.0).abs() + (a.1 - b.1).abs() == 1
}

/// The ring turned to start at its smallest point (a left turn: never cut nor dropped).
fn from_smallest(ring: &[(i64, i64)]) -> Vec<(i64, i64)> {
    let k = (0..ring.len()).min_by_key(|&i| ring[i]).unwrap_or(0);
    ring[k..].iter().chain(&ring[..k]).copied().collect()
}

/// Cut each one-cell step: a right turn (a corner whose outside quarter is an empty cell)
/// between two edges of one cell is replaced by that cell's diagonal.
fn cut_steps(ring: &[(i64, i64)]) -> Vec<(i64, i64)> {
    drop_corners(ring, |u, v, w| {
        unit(u, v) && unit(v, w) && turn(u, v, w) < 0
    })
}

/// Drop the points between two edges in one direction.
fn simplify(ring: &[(i64, i64)]) -> Vec<(i64, i64)> {
    drop_corners(ring, |u, v, w| {
        let same_way = (v.0 - u.0) * (w.0 - v.0) + (v.1 - u.1) * (w.1 - v.1) > 0;
        turn(u, v, w) == 0 && same_way
    })
}

/// The ring, from its smallest point, without each point `v` for which `drop(u, v, w)` holds,
/// `u` being the last point kept and `w` the next one of the ring.
fn drop_corners(
    ring: &[(i64, i64)],
    drop: impl Fn((i64, i64), (i64, i64), (i64, i64)) -> bool,
) -> Vec<(i64, i64)> {
    let r = from_smallest(ring);
    let n = r.len();
    let mut out: Vec<(i64, i64)> = Vec::with_capacity(n);
    for i in 0..n {
        let (v, w) = (r[i], r[(i + 1) % n]);
        if out.last().is_some_and(|&u| drop(u, v, w)) {
            continue;
        }
        out.push(v);
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::summary::{Bins, ZoneCounts};
    use std::io::Write;

    fn bins_of(pts: &[(f64, f64)]) -> Bins<ZoneCounts> {
        let mut b: Bins<ZoneCounts> = Bins::new(0.01, 40_000);
        for &(x, y) in pts {
            b.add(x, y, |c| c.0[0] += 1);
        }
        b.flush();
        b
    }

    /// The outline traced as `Analysis::finish` traces it: the binned locations, cut to their box.
    fn traced(pts: &[(f64, f64)]) -> Option<PartOutline> {
        let e = pts
            .iter()
            .fold([f64::MAX, f64::MAX, f64::MIN, f64::MIN], |e, &(x, y)| {
                [e[0].min(x), e[1].min(y), e[2].max(x), e[3].max(y)]
            });
        let b = bins_of(pts);
        trace(b.cells().keys().copied(), b.size(), Some(e))
    }

    // A filled square of locations: one outer ring, counter-clockwise, holding every location;
    // its area by the shoelace formula within one cell round the edge of the square's.
    #[test]
    fn a_square_of_locations_traces_one_ring_round_it() {
        let pts: Vec<(f64, f64)> = (0..400)
            .map(|k| (f64::from(k % 20) * 5.0, f64::from(k / 20) * 5.0))
            .collect();
        let o = traced(&pts).unwrap();
        assert_eq!(o.rings.len(), 1, "{:?}", o.rings);
        assert!(signed_area(&o.rings[0]) > 0.0);
        assert!(pts.iter().all(|&p| o.contains(p, 1e-9)));
        let cell = o.cell.unwrap();
        let (side, area) = (95.0, o.area());
        assert!(
            area >= side * side && area <= (side + 2.0 * cell).powi(2),
            "{area} {cell}"
        );
    }

    // One location, or a row of them on one line: the box of the locations has no area, and
    // the outline is the cells' own, holding every location (a degenerate box once cut every
    // ring away).
    #[test]
    fn one_location_or_one_line_keeps_an_outline() {
        for pts in [
            vec![(32_111.14, -8_118.59)],
            vec![(0.0, 0.0)],
            (0..50).map(|k| (f64::from(k) * 0.5, 3.0)).collect(),
            (0..50)
                .map(|k| (-2.0, f64::from(k) * 0.5))
                .collect::<Vec<_>>(),
        ] {
            let o = traced(&pts).unwrap();
            assert!(!o.rings.is_empty(), "{pts:?}");
            assert!(o.area() > 0.0);
            assert!(pts.iter().all(|&p| o.contains(p, 1e-9)), "{:?}", o.rings);
        }
    }

    // An L of locations: the notch is left out (a concave outline, not the convex hull).
    #[test]
    fn an_l_shape_keeps_its_notch() {
        let pts: Vec<(f64, f64)> = (0..40)
            .flat_map(|i| (0..40).map(move |j| (f64::from(i) * 2.0, f64::from(j) * 2.0)))
            .filter(|&(x, y)| x < 30.0 || y < 30.0)
            .collect();
        let o = traced(&pts).unwrap();
        assert!(!o.contains((60.0, 60.0), 0.0), "notch filled");
        assert!(pts.iter().all(|&p| o.contains(p, 1e-9)));
        // The L's area: 78² − 48² (the hull would be 78²).
        let l = 78.0 * 78.0 - 48.0 * 48.0;
        assert!(o.area() < 1.2 * l, "{} against {l}", o.area());
    }

    // A ring of locations round a hole of many cells keeps the hole as a clockwise ring.
    #[test]
    fn a_large_hole_is_a_ring_of_its_own() {
        let pts: Vec<(f64, f64)> = (0..60)
            .flat_map(|i| (0..60).map(move |j| (f64::from(i), f64::from(j))))
            .filter(|&(x, y)| (x - 30.0).hypot(y - 30.0) > 12.0)
            .collect();
        let o = traced(&pts).unwrap();
        assert_eq!(o.rings.len(), 2);
        assert!(o.rings.iter().any(|r| signed_area(r) < 0.0));
        assert!(!o.contains((30.0, 30.0), 0.0));
        assert!(pts.iter().all(|&p| o.contains(p, 1e-9)));
    }

    #[test]
    fn a_file_of_two_rings_is_read() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("outline.csv");
        let mut f = std::fs::File::create(&p).unwrap();
        write!(
            f,
            "ring,x,y\nedge,0,0\nedge,10,0\nedge,10,10\nedge,0,10\nedge,0,0\nhole,4,4\nhole,6,4\nhole,5,6\n"
        )
        .unwrap();
        let o = read(&p).unwrap();
        assert_eq!(o.rings.len(), 2);
        assert_eq!(o.rings[0].len(), 4, "the closing point is not repeated");
        assert!(o.describe().ends_with("outline.csv"));
        assert!(o.contains((1.0, 1.0), 0.0) && !o.contains((5.0, 4.5), 0.0));
    }

    #[test]
    fn bad_files_name_line_and_column() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("outline.csv");
        for (text, want) in [
            ("x,y\n0,0\n1,oops\n2,2\n", "outline.csv:3:2"),
            ("x,z\n0,0\n", "missing column `y`"),
            ("x,y\n0,0\n1,1\n", "at least 3"),
            (
                "ring,x,y\na,0,0\na,1,0\na,1,1\nb,5,5\nb,6,5\nb,6,6\na,0,1\n",
                "outline.csv:8:1",
            ),
            ("x,y\n0,0\n1\n", "outline.csv:3"),
        ] {
            std::fs::write(&p, text).unwrap();
            let e = read(&p).unwrap_err().to_string();
            assert!(e.contains(want), "{text:?}: {e}");
        }
    }
}
