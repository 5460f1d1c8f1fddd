//! A sample of the at-risk locations spread over the diagram: per cell of a coarse grid over
//! (minor, major) strain, the few worst. Bounded memory (the cells double in size past a cap),
//! and the same sample whatever the order locations are folded or parts merged in: each cell
//! keeps the smallest of a total order, and the smallest of a union are the smallest of the
//! parts' smallest.

use super::bins::{Bins, Cell};
use crate::point::PointResult;
use std::cmp::Ordering;

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

/// The worst few locations of a cell, worst first.
#[derive(Debug, Clone, Default)]
pub struct Worst(pub Vec<(Rank, PointResult)>);

impl Worst {
    /// Offer a location; kept (copied) only when among the [`SPREAD_PER_CELL`] worst.
    pub fn offer(&mut self, r: RankRef<'_>, p: &PointResult) {
        if self.0.len() == SPREAD_PER_CELL && self.0.last().is_some_and(|l| l.0.cmp_ref(r).is_le())
        {
            return;
        }
        let at = self.0.partition_point(|(q, _)| q.cmp_ref(r).is_lt());
        self.0
            .insert(at, (Rank(r.0, r.1, r.2, r.3.to_string()), p.clone()));
        self.0.truncate(SPREAD_PER_CELL);
    }
}

impl Cell for Worst {
    fn absorb(&mut self, other: &Self) {
        for (r, p) in &other.0 {
            self.offer((r.0, r.1, r.2, &r.3), p);
        }
    }
}

/// The sample's binning.
pub fn new_spread() -> Bins<Worst> {
    Bins::new(SPREAD_CELL_PCT, SPREAD_CELLS)
}

/// Every location of the sample, worst first.
pub fn sample(b: &Bins<Worst>) -> Vec<&(Rank, PointResult)> {
    let mut all: Vec<&(Rank, PointResult)> = b.cells().values().flat_map(|w| &w.0).collect();
    all.sort_by(|a, b| a.0.cmp(&b.0));
    all
}
