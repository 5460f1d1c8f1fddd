//! Binned densities for the pictures: a sparse square binning of the plane ([`Bins`]) whose
//! cells count locations per zone on the diagram ([`ZoneCounts`]) and keep the worst values on
//! the map ([`MapCell`]).

use crate::assess::Zone;
use crate::point::PointResult;
use rustc_hash::FxHashMap;

/// A value of a cell that absorbs another cell's.
pub trait Cell: Default + Clone {
    /// Take `other` into `self` (by value: a cell moves its contents, copying nothing).
    fn absorb(&mut self, other: Self);
}

/// A sparse square binning of the plane whose cells double in size when there are too many:
/// bounded memory whatever the spread, and two binnings always merge (the finer is coarsened).
#[derive(Debug, Clone, PartialEq)]
pub struct Bins<C> {
    base: f64,
    pub(crate) level: u32,
    cap: usize,
    pub(crate) cells: FxHashMap<(i64, i64), C>,
    /// The cell added to last, not yet in `cells`: neighbouring locations usually share a
    /// cell, so most additions touch no hash table.
    pending: Option<((i64, i64), C)>,
}

impl<C: Cell> Bins<C> {
    /// Cells of side `base` at first, at most `cap` of them.
    pub fn new(base: f64, cap: usize) -> Self {
        Bins {
            base,
            level: 0,
            cap,
            cells: FxHashMap::default(),
            pending: None,
        }
    }

    /// The cells by integer key at the current size (call [`Bins::flush`] first after adding).
    pub fn cells(&self) -> &FxHashMap<(i64, i64), C> {
        debug_assert!(self.pending.is_none(), "cells read before a flush");
        &self.cells
    }

    /// Put the pending cell into the table.
    pub fn flush(&mut self) {
        if let Some((k, c)) = self.pending.take() {
            self.cells.entry(k).or_default().absorb(c);
            if self.cells.len() > self.cap {
                self.coarsen();
            }
        }
    }

    /// The side of a cell now.
    pub fn size(&self) -> f64 {
        self.base * f64::from(1u32 << self.level.min(30))
    }

    /// The key of the cell holding `(x, y)`.
    pub fn key(&self, x: f64, y: f64) -> (i64, i64) {
        let k = |v: f64| ((v / self.base).floor() as i64) >> self.level;
        (k(x), k(y))
    }

    /// The lower-left corner of the cell `key`.
    pub fn corner(&self, key: (i64, i64)) -> (f64, f64) {
        (key.0 as f64 * self.size(), key.1 as f64 * self.size())
    }

    /// Add to the cell at `(x, y)` (ignored when not finite).
    pub fn add(&mut self, x: f64, y: f64, f: impl FnOnce(&mut C)) {
        if !(x.is_finite() && y.is_finite()) {
            return;
        }
        let key = self.key(x, y);
        match &mut self.pending {
            Some((k, c)) if *k == key => f(c),
            _ => {
                self.flush();
                // The flush may have coarsened the table: the key at the size now.
                let key = self.key(x, y);
                let mut c = C::default();
                f(&mut c);
                self.pending = Some((key, c));
            }
        }
    }

    /// Add to the cell at `(x, y)` in the table itself, not through the pending cell: for cells
    /// whose value is costly to make and absorb, when neighbours seldom share a cell.
    pub fn add_in_table(&mut self, x: f64, y: f64, f: impl FnOnce(&mut C)) {
        if !(x.is_finite() && y.is_finite()) {
            return;
        }
        self.flush();
        let key = self.key(x, y);
        f(self.cells.entry(key).or_default());
        if self.cells.len() > self.cap {
            self.coarsen();
        }
    }

    /// Double the cell size, merging each 2×2 block of cells.
    pub fn coarsen(&mut self) {
        self.coarsen_by(1);
    }

    /// Double the cell size `steps` times in one pass over the cells (each block of
    /// 2^steps × 2^steps cells merged; the same cells as that many [`Bins::coarsen`] calls).
    fn coarsen_by(&mut self, steps: u32) {
        if let Some((k, c)) = self.pending.take() {
            self.cells.entry(k).or_default().absorb(c);
        }
        if steps == 0 {
            return;
        }
        self.level += steps;
        let shift = steps.min(63);
        let old = std::mem::take(&mut self.cells);
        for ((i, j), c) in old {
            self.cells
                .entry((i >> shift, j >> shift))
                .or_default()
                .absorb(c);
        }
    }

    /// Coarsen until no more than `n` cells span `extent` along its longer side.
    pub fn coarsen_to(&mut self, extent: f64, n: usize) {
        while extent / self.size() > n as f64 && self.level < 30 {
            self.coarsen();
        }
    }

    /// Take `other`'s cells in.
    pub fn merge(&mut self, mut other: Bins<C>) {
        self.flush();
        other.flush();
        if self.level < other.level {
            self.coarsen_by(other.level - self.level);
        }
        // The other's cells are taken in at this size directly, not coarsened first.
        let shift = (self.level - other.level).min(63);
        for ((i, j), c) in other.cells {
            self.cells
                .entry((i >> shift, j >> shift))
                .or_default()
                .absorb(c);
        }
        while self.cells.len() > self.cap {
            self.coarsen();
        }
    }
}

/// Locations per zone in one cell of the diagram.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct ZoneCounts(pub [u32; 6]);

impl Cell for ZoneCounts {
    fn absorb(&mut self, o: Self) {
        for (a, b) in self.0.iter_mut().zip(o.0) {
            *a += b;
        }
    }
}

/// The worst values of the locations in one cell of the part map.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MapCell {
    /// Locations in the cell.
    pub n: u32,
    /// Smallest margin, pp (a location failed by thinning counts as below the curve).
    pub margin: Option<f32>,
    /// Largest thinning, percent.
    pub thinning: f32,
    /// Largest engineering major strain, percent.
    pub major: f32,
    /// Worst zone.
    pub zone: Zone,
}

impl Default for MapCell {
    fn default() -> Self {
        MapCell {
            n: 0,
            margin: None,
            thinning: f32::NEG_INFINITY,
            major: f32::NEG_INFINITY,
            zone: Zone::Safe,
        }
    }
}

impl Cell for MapCell {
    fn absorb(&mut self, o: Self) {
        self.n += o.n;
        self.margin = match (self.margin, o.margin) {
            (Some(a), Some(b)) => Some(a.min(b)),
            (a, b) => a.or(b),
        };
        self.thinning = self.thinning.max(o.thinning);
        self.major = self.major.max(o.major);
        self.zone = self.zone.min(o.zone);
    }
}

impl MapCell {
    /// The cell value of one location.
    pub fn of(p: &PointResult) -> Self {
        MapCell {
            n: 1,
            margin: map_margin(p).map(|m| m as f32),
            thinning: (p.strain.thinning * 100.0) as f32,
            major: p.strain.eng.major.percent() as f32,
            zone: p.zone(),
        }
    }
}

/// The margin a location is coloured by on the map: a location failed by thinning keeps a
/// positive margin, so it is shown just below the curve, never as safe.
pub fn map_margin(p: &PointResult) -> Option<f64> {
    let m = p.judgement.margin_pct;
    if p.zone() == Zone::Failed {
        // Failed by thinning can have no margin at all (minor strain outside the curve).
        return Some(m.unwrap_or(0.0).min(-0.01));
    }
    m
}

#[cfg(test)]
mod tests {
    use super::*;

    // Every location lands in the cell that holds it, even when adding it flushed the table
    // past its cap and so doubled the cell size: the cell's square must contain the location.
    #[test]
    fn a_location_lands_in_its_own_cell_across_a_coarsening() {
        let mut b: Bins<ZoneCounts> = Bins::new(1.0, 8);
        let pts: Vec<(f64, f64)> = (0..200)
            .map(|i| (f64::from(i % 20) * 3.0 + 0.5, f64::from(i / 20) * 3.0 + 0.5))
            .collect();
        for &(x, y) in &pts {
            b.add(x, y, |c| c.0[0] += 1);
        }
        b.flush();
        let size = b.size();
        assert!(b.level > 0, "the table never coarsened");
        let inside = |(x, y): (f64, f64)| {
            b.cells().keys().any(|&k| {
                let (x0, y0) = b.corner(k);
                (x0..x0 + size).contains(&x) && (y0..y0 + size).contains(&y)
            })
        };
        assert!(pts.iter().all(|&p| inside(p)));
        // Every cell holds a location: none was put at a key of an older, smaller size.
        for &k in b.cells().keys() {
            let (x0, y0) = b.corner(k);
            assert!(
                pts.iter()
                    .any(|&(x, y)| (x0..x0 + size).contains(&x) && (y0..y0 + size).contains(&y)),
                "cell {k:?} holds no location"
            );
        }
    }
}
