//! A sample of the at-risk locations spread over the diagram: per cell of a coarse grid over
//! (minor, major) strain, the few worst. Bounded memory (the cells double in size past a cap),
//! and the same sample whatever the order locations are folded or parts merged in: each cell
//! keeps the smallest of a total order, and the smallest of a union are the smallest of the
//! parts' smallest.

use super::bins::{Bins, Cell};
use crate::point::PointResult;
use rustc_hash::FxHashMap;
use std::cmp::Ordering;
use std::sync::Arc;

/// Side of a cell at first, percent strain.
pub const SPREAD_CELL_PCT: f64 = 2.0;
/// Cells at most (past it, cells double in size).
pub const SPREAD_CELLS: usize = 240;
/// Locations kept per cell, worst first.
pub const SPREAD_PER_CELL: usize = 8;

/// A location's rank in the sample: the worst-list rank, then file line and id (a total order).
#[derive(Debug, Clone, PartialEq)]
pub struct Rank(pub u8, pub f64, pub u64, pub String);

/// A rank by reference: (worst-list rank and key, file line, id).
pub type RankRef<'a> = (u8, f64, u64, &'a str);

impl Rank {
    fn cmp(&self, o: &Rank) -> Ordering {
        self.cmp_ref((o.0, o.1, o.2, &o.3))
    }

    fn cmp_ref(&self, o: RankRef<'_>) -> Ordering {
        self.0
            .cmp(&o.0)
            .then(self.1.total_cmp(&o.1))
            .then(self.2.cmp(&o.2))
            .then(self.3.as_str().cmp(o.3))
    }
}

/// The worst few locations of a cell, worst first (boxed: a location kept before others moves
/// a pointer, not the whole result).
#[derive(Debug, Clone, Default)]
pub struct Worst(pub Vec<(Rank, Box<PointResult>)>);

impl Worst {
    /// Offer a location; kept (copied) only when among the [`SPREAD_PER_CELL`] worst.
    pub fn offer(&mut self, r: RankRef<'_>, p: &PointResult) {
        if let Some(at) = self.place(r) {
            let rank = Rank(r.0, r.1, r.2, r.3.to_string());
            self.put(at, rank, Box::new(p.clone()));
        }
    }

    /// Where a location of rank `r` goes, `None` when it is not among the worst.
    fn place(&self, r: RankRef<'_>) -> Option<usize> {
        if self.0.len() == SPREAD_PER_CELL && self.0.last().is_some_and(|l| l.0.cmp_ref(r).is_le())
        {
            return None;
        }
        Some(self.0.partition_point(|(q, _)| q.cmp_ref(r).is_lt()))
    }

    fn put(&mut self, at: usize, rank: Rank, p: Box<PointResult>) {
        self.0.insert(at, (rank, p));
        self.0.truncate(SPREAD_PER_CELL);
    }
}

impl Cell for Worst {
    fn absorb(&mut self, other: Self) {
        if self.0.is_empty() {
            *self = other;
            return;
        }
        for (r, p) in other.0 {
            match self.place((r.0, r.1, r.2, &r.3)) {
                Some(at) => self.put(at, r, p),
                // The other's rest ranks after this one: none of it is among the worst.
                None => break,
            }
        }
    }
}

/// The last key of every full cell of a summary's sample, at the sample's cell size. A later
/// location whose key ranks after its cell's bar can not enter the merged sample: the cell
/// (or the larger one it is merged into when the cells double) already holds
/// [`SPREAD_PER_CELL`] locations that rank before it. Parts of a file skip such locations
/// without copying them; the merged sample is the same.
#[derive(Debug, Clone, PartialEq)]
pub struct Bars {
    level: u32,
    keys: FxHashMap<(i64, i64), (u8, f64)>,
}

impl Bars {
    /// The bars of `b`'s full cells; `None` when no cell is full.
    pub fn of(b: &Bins<Worst>) -> Option<Arc<Bars>> {
        let keys: FxHashMap<_, _> = b
            .cells
            .iter()
            .filter(|(_, w)| w.0.len() == SPREAD_PER_CELL)
            .filter_map(|(k, w)| w.0.last().map(|(r, _)| (*k, (r.0, r.1))))
            .collect();
        (!keys.is_empty()).then(|| {
            Arc::new(Bars {
                level: b.level,
                keys,
            })
        })
    }

    /// Whether a location at `(x, y)` of worst-list key `k` can not enter `b` merged with the
    /// summary these bars are of. Strictly after the bar only: on a tie of keys the file line
    /// decides, and a part's lines need not follow the summary's.
    pub fn shut_out(&self, b: &Bins<Worst>, x: f64, y: f64, k: (u8, f64)) -> bool {
        if b.level != self.level || !(x.is_finite() && y.is_finite()) {
            return false;
        }
        self.keys
            .get(&b.key(x, y))
            .is_some_and(|bar| k.0.cmp(&bar.0).then(k.1.total_cmp(&bar.1)).is_gt())
    }
}

/// The sample's binning.
pub fn new_spread() -> Bins<Worst> {
    Bins::new(SPREAD_CELL_PCT, SPREAD_CELLS)
}

/// Every location of the sample, worst first.
pub fn sample(b: &Bins<Worst>) -> Vec<&(Rank, Box<PointResult>)> {
    let mut all: Vec<&(Rank, Box<PointResult>)> = b.cells().values().flat_map(|w| &w.0).collect();
    all.sort_by(|a, b| a.0.cmp(&b.0));
    all
}
