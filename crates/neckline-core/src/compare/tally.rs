//! What the outputs of a comparison need of every location, in bounded memory: the counts, the
//! lists (each keeps its first [`LIST_CAP`] in its own order and counts the rest), and binned
//! densities for the pictures. Tracks are folded in one at a time, in any order (each carries
//! its place in the first file's order), and two tallies merge, so that partitions of the
//! locations can be tallied on every core. While there are at most [`KEEP_ALL`] locations every
//! track is kept, and the comparison is the same as one held whole.

use super::{at_risk, Change, Status, Track};
use crate::assess::Zone;
use crate::capped::LIST_CAP;
use crate::summary::KEEP_ALL;
use std::cmp::Ordering;
use std::collections::BinaryHeap;

/// A track's place in the order of compare.csv: the tryout where it first appears (high 24
/// bits) and its row there (low 40 bits).
pub type Order = u64;

/// The order of row `index` of tryout `k`.
pub fn order_of(k: usize, index: u64) -> Order {
    ((k as u64) << 40) | index
}

/// Numbers of locations, whatever the lists keep.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Counts {
    /// Every location of any input.
    pub tracks: usize,
    /// By [`Status`] (in the order of its variants).
    pub status: [usize; 4],
    /// By [`Change`]: improved, worsened, unchanged.
    pub change: [usize; 3],
    /// Zone before (row) to zone after (column), in [`Zone::ALL`] order.
    pub transitions: [[usize; 6]; 6],
    /// Failed now and not before.
    pub newly_failed: usize,
    /// Failed or marginal now and in a better zone before.
    pub newly_at_risk: usize,
    /// Failed or marginal before, neither now.
    pub fixed: usize,
    /// Measured only in the last tryout and failed or marginal there.
    pub at_risk_only_after: usize,
    /// Measured only in the last tryout and failed there.
    pub failed_only_after: usize,
    /// Margin fell by more than the tolerance.
    pub losses: usize,
    /// Margin grew by more than the tolerance.
    pub gains: usize,
    /// Failed or marginal in the last tryout.
    pub still_at_risk: usize,
    /// Failed before, not failed now.
    pub left_failed: usize,
    /// Locations in both tryout k − 1 and tryout k (index k; index 0 unused).
    pub shared: Vec<usize>,
    /// Largest |margin change| of a location in both of the last two tryouts (at least 0).
    pub most_change: f64,
}

impl Counts {
    fn merge(&mut self, o: &Counts) {
        self.tracks += o.tracks;
        for i in 0..4 {
            self.status[i] += o.status[i];
        }
        for i in 0..3 {
            self.change[i] += o.change[i];
        }
        for (a, b) in self.transitions.iter_mut().zip(&o.transitions) {
            for (x, y) in a.iter_mut().zip(b) {
                *x += y;
            }
        }
        self.newly_failed += o.newly_failed;
        self.newly_at_risk += o.newly_at_risk;
        self.fixed += o.fixed;
        self.at_risk_only_after += o.at_risk_only_after;
        self.failed_only_after += o.failed_only_after;
        self.losses += o.losses;
        self.gains += o.gains;
        self.still_at_risk += o.still_at_risk;
        self.left_failed += o.left_failed;
        if self.shared.len() < o.shared.len() {
            self.shared.resize(o.shared.len(), 0);
        }
        for (a, b) in self.shared.iter_mut().zip(&o.shared) {
            *a += b;
        }
        self.most_change = self.most_change.max(o.most_change);
    }
}

/// Index of a status in [`Counts::status`].
pub fn status_index(s: Status) -> usize {
    match s {
        Status::Both => 0,
        Status::OnlyBefore => 1,
        Status::OnlyAfter => 2,
        Status::OnlyEarlier => 3,
    }
}

/// Index of a change in [`Counts::change`].
pub fn change_index(c: Change) -> usize {
    match c {
        Change::Improved => 0,
        Change::Worsened => 1,
        Change::Unchanged => 2,
    }
}

/// Index of a zone in [`Zone::ALL`].
pub fn zone_index(z: Zone) -> usize {
    Zone::ALL.iter().position(|&a| a == z).unwrap_or(0)
}

/// A sort key: numbers compared by `total_cmp`, then the order.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Key(f64, f64, Order);

impl Eq for Key {}
impl PartialOrd for Key {
    fn partial_cmp(&self, o: &Self) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Key {
    fn cmp(&self, o: &Self) -> Ordering {
        self.0
            .total_cmp(&o.0)
            .then(self.1.total_cmp(&o.1))
            .then(self.2.cmp(&o.2))
    }
}

struct Entry(Key, Track);

impl PartialEq for Entry {
    fn eq(&self, o: &Self) -> bool {
        self.0 == o.0
    }
}
impl Eq for Entry {}
impl PartialOrd for Entry {
    fn partial_cmp(&self, o: &Self) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}
impl Ord for Entry {
    fn cmp(&self, o: &Self) -> Ordering {
        self.0.cmp(&o.0)
    }
}

/// The `cap` smallest tracks by key (a max-heap that drops its largest).
#[derive(Default)]
struct Smallest {
    cap: usize,
    heap: BinaryHeap<Entry>,
}

impl Smallest {
    fn new(cap: usize) -> Self {
        Smallest {
            cap,
            heap: BinaryHeap::new(),
        }
    }
    fn push(&mut self, key: Key, t: &Track) {
        if self.heap.len() >= self.cap {
            match self.heap.peek() {
                Some(top) if key < top.0 => {
                    self.heap.pop();
                }
                _ => return,
            }
        }
        self.heap.push(Entry(key, t.clone()));
    }
    /// As [`Smallest::push`], the track moved in rather than copied.
    fn push_owned(&mut self, e: Entry) {
        if self.heap.len() >= self.cap {
            match self.heap.peek() {
                Some(top) if e.0 < top.0 => {
                    self.heap.pop();
                }
                _ => return,
            }
        }
        self.heap.push(e);
    }
    fn merge(&mut self, o: Smallest) {
        for e in o.heap {
            self.push_owned(e);
        }
    }
}

/// The lists a comparison keeps, each the first [`LIST_CAP`] by its own order.
const LISTS: usize = 12;

/// A grid of cells over a rectangle, counting what falls in each.
#[derive(Debug, Clone, PartialEq)]
pub struct Grid<T> {
    /// Left and right edges.
    pub x: (f64, f64),
    /// Bottom and top edges.
    pub y: (f64, f64),
    /// Cells across and up.
    pub n: usize,
    /// Row-major from the bottom left.
    pub cells: Vec<T>,
}

impl<T: Clone + Default> Grid<T> {
    /// An empty grid of `n × n` cells over `x × y`.
    pub fn new(x: (f64, f64), y: (f64, f64), n: usize) -> Self {
        Grid {
            x,
            y,
            n,
            cells: vec![T::default(); n * n],
        }
    }

    /// The cell of a point (clamped to the edges).
    pub fn cell(&mut self, p: (f64, f64)) -> &mut T {
        let f = |v: f64, (lo, hi): (f64, f64)| {
            let t = ((v - lo) / (hi - lo).max(1e-12) * self.n as f64).floor();
            (t.max(0.0) as usize).min(self.n - 1)
        };
        let (i, j) = (f(p.0, self.x), f(p.1, self.y));
        &mut self.cells[j * self.n + i]
    }

    /// The rectangle of cell `k`: (x0, y0), (x1, y1).
    pub fn rect(&self, k: usize) -> ((f64, f64), (f64, f64)) {
        let (i, j) = (k % self.n, k / self.n);
        let w = (self.x.1 - self.x.0) / self.n as f64;
        let h = (self.y.1 - self.y.0) / self.n as f64;
        let x0 = self.x.0 + i as f64 * w;
        let y0 = self.y.0 + j as f64 * h;
        ((x0, y0), (x0 + w, y0 + h))
    }
}

/// A cell of the map: how many locations, and the extreme margin changes among those measured
/// in both of the last two tryouts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MapCell {
    /// Locations placed here.
    pub count: u32,
    /// Of those, measured in both of the last two tryouts.
    pub both: u32,
    /// Smallest margin change (largest loss), pp.
    pub lowest: f64,
    /// Largest margin change, pp.
    pub highest: f64,
}

impl Default for MapCell {
    fn default() -> Self {
        MapCell {
            count: 0,
            both: 0,
            lowest: f64::INFINITY,
            highest: f64::NEG_INFINITY,
        }
    }
}

/// Cells across each density grid.
pub const DENSITY_CELLS: usize = 80;

/// Densities for the pictures beyond [`KEEP_ALL`] locations.
#[derive(Debug, Clone, PartialEq)]
pub struct Density {
    /// Latest (minor, major) of each location, by change: none, unchanged, improved, worsened.
    pub fld: Grid<[u32; 4]>,
    /// Latest (x, y) of each location that has one.
    pub map: Option<Grid<MapCell>>,
}

impl Density {
    /// Empty grids over the given extents (of every input's locations).
    pub fn new(
        strains: ((f64, f64), (f64, f64)),
        places: Option<((f64, f64), (f64, f64))>,
    ) -> Self {
        Density {
            fld: Grid::new(strains.0, strains.1, DENSITY_CELLS),
            map: places.map(|(x, y)| Grid::new(x, y, DENSITY_CELLS)),
        }
    }

    fn merge(&mut self, o: &Density) {
        for (a, b) in self.fld.cells.iter_mut().zip(&o.fld.cells) {
            for i in 0..4 {
                a[i] += b[i];
            }
        }
        if let (Some(m), Some(n)) = (&mut self.map, &o.map) {
            for (a, b) in m.cells.iter_mut().zip(&n.cells) {
                a.count += b.count;
                a.both += b.both;
                a.lowest = a.lowest.min(b.lowest);
                a.highest = a.highest.max(b.highest);
            }
        }
    }
}

/// The index in [`Density::fld`]'s cells of a change.
pub fn density_index(c: Option<Change>) -> usize {
    match c {
        None => 0,
        Some(Change::Unchanged) => 1,
        Some(Change::Improved) => 2,
        Some(Change::Worsened) => 3,
    }
}

/// Counts, capped lists and densities of the tracks folded in.
pub struct Tally {
    tolerance: f64,
    tryouts: usize,
    /// The counts.
    pub counts: Counts,
    lists: Vec<Smallest>,
    /// The first [`KEEP_ALL`] + 1 tracks in order (all of them while there are few).
    all: Smallest,
    /// Densities (when asked for).
    pub density: Option<Density>,
}

const INF: f64 = f64::INFINITY;

impl Tally {
    /// An empty tally of `tryouts` inputs.
    pub fn new(tryouts: usize, tolerance: f64, density: Option<Density>) -> Self {
        Tally {
            tolerance,
            tryouts,
            counts: Counts {
                shared: vec![0; tryouts],
                ..Counts::default()
            },
            lists: (0..LISTS).map(|_| Smallest::new(LIST_CAP)).collect(),
            all: Smallest::new(KEEP_ALL + 1),
            density,
        }
    }

    /// An empty tally that will hold more than [`KEEP_ALL`] tracks (the caller knows: an input
    /// has more locations than that): it keeps only the capped lists, for
    /// [`Tally::finish`] would not use the first [`KEEP_ALL`] + 1 tracks.
    pub fn beyond_keep_all(tryouts: usize, tolerance: f64, density: Option<Density>) -> Self {
        Tally {
            all: Smallest::new(0),
            ..Tally::new(tryouts, tolerance, density)
        }
    }

    /// Fold in one track, whose place in order is `order`.
    pub fn fold(&mut self, t: &Track, order: Order) {
        let c = &mut self.counts;
        c.tracks += 1;
        for k in 1..self.tryouts {
            if t.at[k - 1].is_some() && t.at[k].is_some() {
                c.shared[k] += 1;
            }
        }
        let status = t.status();
        c.status[status_index(status)] += 1;
        let change = t.change(self.tolerance);
        if let Some(ch) = change {
            c.change[change_index(ch)] += 1;
        }
        let keep = |list: usize, a: f64, b: f64, lists: &mut Vec<Smallest>| {
            lists[list].push(Key(a, b, order), t);
        };
        let lists = &mut self.lists;
        if let Some((b, a)) = t.zones() {
            c.transitions[zone_index(b)][zone_index(a)] += 1;
            if a == Zone::Failed && b != Zone::Failed {
                c.newly_failed += 1;
                keep(0, 0.0, 0.0, lists);
            }
            if at_risk(a) && a < b {
                c.newly_at_risk += 1;
                keep(1, zone_index(a) as f64, 0.0, lists);
            }
            if at_risk(b) && !at_risk(a) {
                c.fixed += 1;
                keep(2, 0.0, 0.0, lists);
            }
            if b == Zone::Failed && a != Zone::Failed {
                c.left_failed += 1;
                keep(3, 0.0, 0.0, lists);
            }
        }
        if let Some(d) = t.margin_change() {
            if status == Status::Both {
                c.most_change = c.most_change.max(d.abs());
            }
            if change != Some(Change::Unchanged) && change.is_some() {
                if d < 0.0 {
                    c.losses += 1;
                    keep(4, d, 0.0, lists);
                } else if d > 0.0 {
                    c.gains += 1;
                    keep(5, -d, 0.0, lists);
                }
            }
        }
        if let Some(r) = t.after() {
            if at_risk(r.zone) {
                c.still_at_risk += 1;
                let m = r.margin_pct.unwrap_or(INF);
                keep(6, zone_index(r.zone) as f64, m, lists);
                if status == Status::OnlyAfter {
                    c.at_risk_only_after += 1;
                    keep(7, 0.0, 0.0, lists);
                    if r.zone == Zone::Failed {
                        c.failed_only_after += 1;
                        keep(8, 0.0, 0.0, lists);
                    }
                }
            }
        }
        match status {
            Status::OnlyBefore => keep(9, 0.0, 0.0, lists),
            Status::OnlyAfter => keep(10, 0.0, 0.0, lists),
            Status::OnlyEarlier => keep(11, 0.0, 0.0, lists),
            Status::Both => {}
        }
        self.all.push(Key(0.0, 0.0, order), t);
        if let Some(d) = &mut self.density {
            let last = super::csv_out::latest(t);
            d.fld.cell((last.minor_pct, last.major_pct))[density_index(change)] += 1;
            if let (Some(m), Some(xy)) = (&mut d.map, last.xy()) {
                let cell = m.cell(xy);
                cell.count += 1;
                if let (Status::Both, Some(d)) = (status, t.margin_change()) {
                    cell.both += 1;
                    cell.lowest = cell.lowest.min(d);
                    cell.highest = cell.highest.max(d);
                }
            }
        }
    }

    /// Add `other` (tracks of other locations).
    pub fn merge(&mut self, other: Tally) {
        self.counts.merge(&other.counts);
        for (a, b) in self.lists.iter_mut().zip(other.lists) {
            a.merge(b);
        }
        self.all.merge(other.all);
        if let (Some(a), Some(b)) = (&mut self.density, &other.density) {
            a.merge(b);
        }
    }

    /// Whether every track is kept.
    pub fn complete(&self) -> bool {
        self.counts.tracks <= KEEP_ALL
    }

    /// The tracks kept, in order: every one while there are at most [`KEEP_ALL`], else those of
    /// the capped lists (each once). The densities go only with a tally that is not complete.
    pub fn finish(self) -> (Counts, Vec<Track>, Option<Density>) {
        let complete = self.complete();
        let mut kept: Vec<(Order, Track)> = if complete {
            self.all.heap.into_iter().map(|e| (e.0 .2, e.1)).collect()
        } else {
            self.lists
                .into_iter()
                .flat_map(|l| l.heap.into_iter().map(|e| (e.0 .2, e.1)))
                .collect()
        };
        kept.sort_by_key(|(o, _)| *o);
        kept.dedup_by_key(|(o, _)| *o);
        let density = if complete { None } else { self.density };
        (
            self.counts,
            kept.into_iter().map(|(_, t)| t).collect(),
            density,
        )
    }
}
