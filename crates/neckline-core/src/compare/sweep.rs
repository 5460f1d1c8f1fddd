//! Pairing by position in bounded memory: the pairs of [`super::pairing::pair`], found by a
//! sweep over the rows of grid cells instead of from every candidate at once.
//!
//! Both inputs come as streams of [`Placed`] locations sorted by cell row (then column and
//! index; [`PositionSorter`] sorts them on disk). Rows of cells are loaded one at a time; a
//! location is *complete* once the row above its own is loaded, for then every candidate pair
//! it can have (a location of the other input in one of the nine cells around it, at most
//! `within` away) is known.
//!
//! Candidates are ordered strictly: by distance, then the earlier index, then the later (as
//! [`super::pairing::pair`] sorts them). A pair is taken when it is the first live candidate
//! at both of its ends and both ends are complete; its ends and every candidate touching them
//! are then removed. This gives the greedy closest-first result exactly, whatever the sequence
//! in which such pairs are found: say the sweep takes `e`, and greedy did not. Then greedy took
//! an earlier candidate `f` sharing an end `v` with `e`; `f` is not live when `e` is taken (`e`
//! was first at `v`), so its other end `u` was taken before, by a pair `g` that greedy took too
//! (by induction), and greedy used `u` twice. Conversely a pair that greedy took and the sweep
//! did not would, at the end when no candidate is live, have an end taken by another pair of
//! the sweep, which greedy took as well: greedy used that end twice.
//!
//! What is held: the locations of the last two rows of cells and those complete locations whose
//! first candidate waits for an end that is not yet complete (a short chain in practice, the
//! whole part only if every candidate waited for the next). The pairs go to `out` as found.

use super::pairing::cell;
use std::cmp::Ordering;
use std::collections::VecDeque;
use std::fs::File;
use std::io::{self, BufWriter, Read, Seek, SeekFrom, Write};
use std::sync::Mutex;

/// A location with its cell: row `cy`, column `cx` (of cells `within` wide), its row index
/// in its input and its position.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Placed {
    /// Cell row.
    pub cy: i64,
    /// Cell column.
    pub cx: i64,
    /// Row index in its input.
    pub index: u32,
    /// Position.
    pub x: f64,
    /// Position.
    pub y: f64,
}

impl Placed {
    /// Location `index` at `(x, y)`, in cells `within` wide.
    pub fn new(index: u32, x: f64, y: f64, within: f64) -> Self {
        let (cx, cy) = cell((x, y), within);
        Placed {
            cy,
            cx,
            index,
            x,
            y,
        }
    }

    fn key(&self) -> (i64, i64, u32) {
        (self.cy, self.cx, self.index)
    }
}

/// A candidate pair as one end sees it.
#[derive(Debug, Clone, Copy)]
struct Edge {
    distance: f64,
    before: u32,
    after: u32,
    /// The other end's slot.
    other: u32,
}

impl Edge {
    fn order(&self, o: &Edge) -> Ordering {
        self.distance
            .total_cmp(&o.distance)
            .then(self.before.cmp(&o.before))
            .then(self.after.cmp(&o.after))
    }
}

struct Node {
    alive: bool,
    complete: bool,
    x: f64,
    y: f64,
    edges: Vec<Edge>,
}

/// The locations held, in slots reused as they go.
#[derive(Default)]
struct Slab {
    nodes: Vec<Node>,
    free: Vec<u32>,
}

impl Slab {
    fn add(&mut self, p: &Placed) -> u32 {
        let node = |edges| Node {
            alive: true,
            complete: false,
            x: p.x,
            y: p.y,
            edges,
        };
        match self.free.pop() {
            Some(s) => {
                let edges = std::mem::take(&mut self.nodes[s as usize].edges);
                self.nodes[s as usize] = node(edges);
                s
            }
            None => {
                self.nodes.push(node(Vec::new()));
                (self.nodes.len() - 1) as u32
            }
        }
    }

    fn remove(&mut self, s: u32) {
        let n = &mut self.nodes[s as usize];
        n.alive = false;
        n.edges.clear();
        self.free.push(s);
    }

    fn first(&self, s: u32) -> Option<Edge> {
        self.nodes[s as usize]
            .edges
            .iter()
            .copied()
            .min_by(|a, b| a.order(b))
    }
}

/// One row of cells of one input: (column, slot), by column.
type Row = Vec<(i64, u32)>;

/// A stream with the next location in view.
struct Ahead<I> {
    it: I,
    next: Option<Placed>,
}

impl<E, I: Iterator<Item = Result<Placed, E>>> Ahead<I> {
    fn new(mut it: I) -> Result<Self, E> {
        let next = it.next().transpose()?;
        Ok(Ahead { it, next })
    }

    fn row(&self) -> Option<i64> {
        self.next.map(|p| p.cy)
    }

    /// The next location, if it is in cell row `cy`.
    fn take_in(&mut self, cy: i64) -> Result<Option<Placed>, E> {
        match self.next {
            Some(p) if p.cy == cy => {
                self.next = self.it.next().transpose()?;
                Ok(Some(p))
            }
            _ => Ok(None),
        }
    }
}

/// Pair the locations of `before` with those of `after` (each sorted by cell row, then column,
/// then index, in cells `within` wide), handing each pair (before's index, after's index,
/// distance) to `out`: the pairs of [`super::pairing::pair`] on the same locations, in another
/// order.
pub fn sweep<E>(
    before: impl Iterator<Item = Result<Placed, E>>,
    after: impl Iterator<Item = Result<Placed, E>>,
    within: f64,
    mut out: impl FnMut(u32, u32, f64),
) -> Result<(), E> {
    let mut inputs = (Ahead::new(before)?, Ahead::new(after)?);
    let mut slab = Slab::default();
    // Rows of cells loaded last (`last`), and the one before it, of each input.
    let mut last: Option<i64> = None;
    let mut rows: [Row; 2] = [Vec::new(), Vec::new()];
    let mut previous: [Row; 2] = [Vec::new(), Vec::new()];
    // Locations not yet complete, in the order loaded (by row); each slot's row index.
    let mut pending: VecDeque<(i64, u32)> = VecDeque::new();
    let mut index: Vec<u32> = Vec::new();
    let mut work: Vec<u32> = Vec::new();
    loop {
        let next = match (inputs.0.row(), inputs.1.row()) {
            (Some(a), Some(b)) => Some(a.min(b)),
            (a, b) => a.or(b),
        };
        // Before row `next` is loaded, every location two rows or more below it is complete.
        let bound = next.map_or(i64::MAX, |n| n.saturating_sub(2));
        while pending.front().is_some_and(|&(cy, _)| cy <= bound) {
            if let Some((_, s)) = pending.pop_front() {
                slab.nodes[s as usize].complete = true;
                work.push(s);
            }
        }
        settle(&mut slab, &mut work, &mut out);
        let Some(n) = next else { break };
        // Load row `n` of both inputs.
        std::mem::swap(&mut rows, &mut previous);
        rows.iter_mut().for_each(Vec::clear);
        let adjacent = last.is_some_and(|l| n.checked_sub(1) == Some(l));
        let near: [&[(i64, u32)]; 2] = if adjacent {
            [&previous[0], &previous[1]]
        } else {
            [&[], &[]]
        };
        for (side, row) in rows.iter_mut().enumerate() {
            loop {
                let p = match side {
                    0 => inputs.0.take_in(n)?,
                    _ => inputs.1.take_in(n)?,
                };
                let Some(p) = p else { break };
                let s = slab.add(&p);
                if index.len() <= s as usize {
                    index.resize(s as usize + 1, 0);
                }
                index[s as usize] = p.index;
                row.push((p.cx, s));
                pending.push_back((n, s));
            }
        }
        // Candidates: before's row `n` with after's rows `n - 1` and `n`; after's row `n` with
        // before's row `n - 1`.
        for &(cx, s) in &rows[0] {
            for other in [near[1], &rows[1][..]] {
                link(&mut slab, &index, s, cx, other, true, within);
            }
        }
        for &(cx, s) in &rows[1] {
            link(&mut slab, &index, s, cx, near[0], false, within);
        }
        last = Some(n);
    }
    Ok(())
}

/// Candidates of location `s` (of before when `s_before`) in cell column `cx` with the
/// locations of `row` (of the other input) in the columns beside it.
fn link(
    slab: &mut Slab,
    index: &[u32],
    s: u32,
    cx: i64,
    row: &[(i64, u32)],
    s_before: bool,
    within: f64,
) {
    let start = row.partition_point(|&(c, _)| c < cx.saturating_sub(1));
    let end = row.partition_point(|&(c, _)| c <= cx.saturating_add(1));
    for &(_, t) in &row[start..end] {
        let (b, a) = if s_before { (s, t) } else { (t, s) };
        let (p, q) = (&slab.nodes[b as usize], &slab.nodes[a as usize]);
        let distance = (q.x - p.x).hypot(q.y - p.y);
        if distance <= within {
            let (before, after) = (index[b as usize], index[a as usize]);
            let e = |other| Edge {
                distance,
                before,
                after,
                other,
            };
            slab.nodes[b as usize].edges.push(e(a));
            slab.nodes[a as usize].edges.push(e(b));
        }
    }
}

/// Take every pair that is first at both ends, both complete, until none is left to take;
/// drop complete locations left without a candidate.
fn settle(slab: &mut Slab, work: &mut Vec<u32>, out: &mut impl FnMut(u32, u32, f64)) {
    while let Some(u) = work.pop() {
        let node = &slab.nodes[u as usize];
        if !node.alive || !node.complete {
            continue;
        }
        let Some(e) = slab.first(u) else {
            slab.remove(u);
            continue;
        };
        let v = e.other;
        if !slab.nodes[v as usize].complete {
            continue;
        }
        let mutual = slab
            .first(v)
            .is_some_and(|f| f.before == e.before && f.after == e.after);
        if !mutual {
            continue;
        }
        out(e.before, e.after, e.distance);
        for (end, partner) in [(u, v), (v, u)] {
            let edges = std::mem::take(&mut slab.nodes[end as usize].edges);
            for f in &edges {
                if f.other == partner {
                    continue;
                }
                let w = &mut slab.nodes[f.other as usize].edges;
                if let Some(k) = w.iter().position(|g| g.other == end) {
                    w.swap_remove(k);
                }
                work.push(f.other);
            }
            slab.nodes[end as usize].edges = edges;
            slab.remove(end);
        }
    }
}

/// Locations sorted on disk in chunks, to be read back merged ([`SortedPositions::iter`]).
pub struct PositionSorter {
    within: f64,
    chunk: Vec<Placed>,
    out: BufWriter<File>,
    chunks: Vec<(u64, u64)>,
    written: u64,
    /// Lowest and highest cell row met.
    rows: Option<(i64, i64)>,
}

/// Locations held in a chunk before it is sorted and written.
const CHUNK: usize = if cfg!(test) { 64 } else { 1 << 16 };
/// Bytes of one location on disk: index, x, y.
const RECORD: usize = 20;

impl PositionSorter {
    /// Locations in cells `within` wide, into the temporary file `file`.
    pub fn new(within: f64, file: File) -> Self {
        PositionSorter {
            within,
            chunk: Vec::with_capacity(CHUNK),
            out: BufWriter::with_capacity(1 << 15, file),
            chunks: Vec::new(),
            written: 0,
            rows: None,
        }
    }

    /// Add location `index` at `(x, y)`.
    pub fn push(&mut self, index: u32, x: f64, y: f64) -> io::Result<()> {
        let p = Placed::new(index, x, y, self.within);
        let (lo, hi) = self.rows.get_or_insert((p.cy, p.cy));
        (*lo, *hi) = ((*lo).min(p.cy), (*hi).max(p.cy));
        self.chunk.push(p);
        if self.chunk.len() == CHUNK {
            self.flush()?;
        }
        Ok(())
    }

    fn flush(&mut self) -> io::Result<()> {
        if self.chunk.is_empty() {
            return Ok(());
        }
        self.chunk.sort_unstable_by_key(Placed::key);
        for p in &self.chunk {
            self.out.write_all(&p.index.to_le_bytes())?;
            self.out.write_all(&p.x.to_le_bytes())?;
            self.out.write_all(&p.y.to_le_bytes())?;
        }
        let n = self.chunk.len() as u64;
        self.chunks.push((self.written, n));
        self.written += n * RECORD as u64;
        self.chunk.clear();
        Ok(())
    }

    /// The sorted chunks.
    pub fn finish(mut self) -> io::Result<SortedPositions> {
        self.flush()?;
        let file = self.out.into_inner().map_err(|e| e.into_error())?;
        Ok(SortedPositions {
            within: self.within,
            file: Mutex::new(file),
            chunks: self.chunks,
            rows: self.rows,
        })
    }
}

/// Locations in sorted chunks on disk. The file's offset is shared by every reader of it (one
/// input's positions are merged for the pairing before it and the one after it, on two
/// threads at once): a read seeks and reads under the lock.
pub struct SortedPositions {
    within: f64,
    file: Mutex<File>,
    chunks: Vec<(u64, u64)>,
    rows: Option<(i64, i64)>,
}

impl SortedPositions {
    /// Every location, by cell row, column and index (the chunks merged).
    pub fn iter(&self) -> io::Result<Merge<'_>> {
        self.rows_in(i64::MIN, i64::MAX)
    }

    /// The locations of cell rows `from` (included) to `to` (excluded; `i64::MAX`: to the
    /// end), by cell row, column and index (the chunks merged; each chunk's start found by
    /// binary search).
    pub fn rows_in(&self, from: i64, to: i64) -> io::Result<Merge<'_>> {
        let mut cursors = Vec::with_capacity(self.chunks.len());
        for c in 0..self.chunks.len() {
            let (at, n) = self.chunks[c];
            let skip = self.below(c, from)?;
            cursors.push(Cursor {
                at: at + skip * RECORD as u64,
                left: n - skip,
                buf: Vec::new(),
                used: 0,
            });
        }
        let mut m = Merge {
            file: &self.file,
            within: self.within,
            cursors,
            heads: std::collections::BinaryHeap::new(),
            to,
        };
        for c in 0..m.cursors.len() {
            m.advance(c)?;
        }
        Ok(m)
    }

    /// How many locations of chunk `c` lie in cell rows below `row`.
    fn below(&self, c: usize, row: i64) -> io::Result<u64> {
        let (at, n) = self.chunks[c];
        let (mut lo, mut hi) = (0u64, n);
        let mut f = self.file.lock().unwrap_or_else(|e| e.into_inner());
        let mut r = [0u8; RECORD];
        while lo < hi {
            let mid = lo + (hi - lo) / 2;
            f.seek(SeekFrom::Start(at + mid * RECORD as u64))?;
            f.read_exact(&mut r)?;
            if decode(&r, self.within).cy < row {
                lo = mid + 1;
            } else {
                hi = mid;
            }
        }
        Ok(lo)
    }

    /// Whether no location lies in cell row `row`.
    fn row_is_empty(&self, row: i64) -> io::Result<bool> {
        let Some(next) = row.checked_add(1) else {
            return Ok(false);
        };
        for c in 0..self.chunks.len() {
            if self.below(c, row)? != self.below(c, next)? {
                return Ok(false);
            }
        }
        Ok(true)
    }
}

/// A location as written by [`PositionSorter`].
fn decode(r: &[u8], within: f64) -> Placed {
    let word =
        |k: usize| u64::from_le_bytes(r[4 + 8 * k..12 + 8 * k].try_into().unwrap_or_default());
    let index = u32::from_le_bytes(r[..4].try_into().unwrap_or_default());
    Placed::new(
        index,
        f64::from_bits(word(0)),
        f64::from_bits(word(1)),
        within,
    )
}

/// Cell rows tried on each side of an even split of the rows when looking for a row empty in
/// both inputs.
const BAND_SEARCH: i64 = 16;

/// The bands of cell rows `[from, to)` of [`sweep_bands`]: about `bands` of them, cut at rows
/// empty in both inputs (no candidate pair crosses such a row), fewer where none is found.
fn band_rows(
    before: &SortedPositions,
    after: &SortedPositions,
    bands: usize,
) -> io::Result<Vec<(i64, i64)>> {
    let (lo, hi) = match (before.rows, after.rows) {
        (Some(a), Some(b)) => (a.0.max(b.0), a.1.min(b.1)),
        _ => return Ok(Vec::new()),
    };
    if lo > hi {
        // The inputs' rows do not overlap: one band.
        return Ok(vec![(i64::MIN, i64::MAX)]);
    }
    let mut cuts = vec![i64::MIN];
    let span = hi as i128 - lo as i128 + 1;
    for j in 1..bands {
        let target = (lo as i128 + span * j as i128 / bands as i128) as i64;
        let found = (0..=BAND_SEARCH)
            .flat_map(|d| [target.saturating_add(d), target.saturating_sub(d)])
            .filter(|&e| e > lo && e < hi && cuts.last().is_some_and(|&c| e > c))
            .find_map(|e| match (before.row_is_empty(e), after.row_is_empty(e)) {
                (Ok(true), Ok(true)) => Some(Ok(e)),
                (Err(x), _) | (_, Err(x)) => Some(Err(x)),
                _ => None,
            })
            .transpose()?;
        if let Some(e) = found {
            cuts.push(e);
        }
    }
    cuts.push(i64::MAX);
    Ok(cuts.windows(2).map(|w| (w[0], w[1])).collect())
}

/// [`sweep`] of two inputs' sorted positions, in about `bands` bands of cell rows at once
/// (on every core): each band is cut at a row of cells empty in both inputs, so that no
/// candidate pair joins two bands, and the greedy pairing of the whole is the union of the
/// bands' (it decides between candidates sharing an end only). Pairs go to `out` as found,
/// from any thread.
pub fn sweep_bands(
    before: &SortedPositions,
    after: &SortedPositions,
    within: f64,
    bands: usize,
    out: impl Fn(u32, u32, f64) + Sync,
) -> io::Result<()> {
    use rayon::prelude::*;
    band_rows(before, after, bands.max(1))?
        .into_par_iter()
        .with_max_len(1)
        .try_for_each(|(from, to)| {
            let b = before.rows_in(from, to)?;
            let a = after.rows_in(from, to)?;
            sweep(b, a, within, &out)
        })
}

struct Cursor {
    /// File offset of the next unread record, records left on disk.
    at: u64,
    left: u64,
    buf: Vec<u8>,
    used: usize,
}

/// Bytes a chunk's cursor reads at a time.
const CURSOR_BYTES: usize = RECORD * 800;

/// The chunks of [`SortedPositions`] merged, as an iterator.
pub struct Merge<'a> {
    file: &'a Mutex<File>,
    within: f64,
    cursors: Vec<Cursor>,
    heads: std::collections::BinaryHeap<std::cmp::Reverse<Head>>,
    /// The first cell row not given (`i64::MAX`: none).
    to: i64,
}

#[derive(Debug, Clone, Copy, PartialEq)]
struct Head(Placed, usize);

impl Eq for Head {}

impl PartialOrd for Head {
    fn partial_cmp(&self, o: &Self) -> Option<Ordering> {
        Some(self.cmp(o))
    }
}

impl Ord for Head {
    fn cmp(&self, o: &Self) -> Ordering {
        self.0.key().cmp(&o.0.key()).then(self.1.cmp(&o.1))
    }
}

impl Merge<'_> {
    /// Put chunk `c`'s next location among the heads.
    fn advance(&mut self, c: usize) -> io::Result<()> {
        let cur = &mut self.cursors[c];
        if cur.used == cur.buf.len() {
            if cur.left == 0 {
                return Ok(());
            }
            let n = (cur.left as usize).min(CURSOR_BYTES / RECORD);
            cur.buf.resize(n * RECORD, 0);
            let mut f = self.file.lock().unwrap_or_else(|e| e.into_inner());
            f.seek(SeekFrom::Start(cur.at))?;
            f.read_exact(&mut cur.buf)?;
            cur.at += (n * RECORD) as u64;
            cur.left -= n as u64;
            cur.used = 0;
        }
        let p = decode(&cur.buf[cur.used..cur.used + RECORD], self.within);
        cur.used += RECORD;
        if p.cy >= self.to && self.to != i64::MAX {
            // The rest of this chunk lies beyond too.
            cur.left = 0;
            cur.used = cur.buf.len();
            return Ok(());
        }
        self.heads.push(std::cmp::Reverse(Head(p, c)));
        Ok(())
    }
}

impl Iterator for Merge<'_> {
    type Item = io::Result<Placed>;

    fn next(&mut self) -> Option<io::Result<Placed>> {
        let std::cmp::Reverse(Head(p, c)) = self.heads.pop()?;
        Some(self.advance(c).map(|()| p))
    }
}

#[cfg(test)]
mod tests {
    use super::super::pairing::pair;
    use super::*;
    use proptest::prelude::*;
    use std::convert::Infallible;

    fn placed(points: &[Option<(f64, f64)>], within: f64) -> Vec<Placed> {
        let mut v: Vec<Placed> = points
            .iter()
            .enumerate()
            .filter_map(|(i, p)| p.map(|(x, y)| Placed::new(i as u32, x, y, within)))
            .collect();
        v.sort_by_key(Placed::key);
        v
    }

    fn swept(
        before: &[Option<(f64, f64)>],
        after: &[Option<(f64, f64)>],
        within: f64,
    ) -> Vec<(usize, usize, f64)> {
        let (b, a) = (placed(before, within), placed(after, within));
        let mut got = Vec::new();
        sweep(
            b.into_iter().map(Ok::<_, Infallible>),
            a.into_iter().map(Ok),
            within,
            |i, j, d| got.push((i as usize, j as usize, d)),
        )
        .unwrap_or_else(|e| match e {});
        got.sort_by(|a, b| a.2.total_cmp(&b.2).then(a.0.cmp(&b.0)).then(a.1.cmp(&b.1)));
        got
    }

    /// Independent reference: greedy over every pair of locations (no cells), in order of
    /// distance, then earlier index, then later index.
    fn brute(
        before: &[Option<(f64, f64)>],
        after: &[Option<(f64, f64)>],
        within: f64,
    ) -> Vec<(usize, usize, f64)> {
        let mut all = Vec::new();
        for (i, p) in before.iter().enumerate() {
            for (j, q) in after.iter().enumerate() {
                if let (Some(p), Some(q)) = (p, q) {
                    let d = (q.0 - p.0).hypot(q.1 - p.1);
                    if d <= within {
                        all.push((i, j, d));
                    }
                }
            }
        }
        all.sort_by(|a, b| a.2.total_cmp(&b.2).then(a.0.cmp(&b.0)).then(a.1.cmp(&b.1)));
        let (mut ub, mut ua) = (vec![false; before.len()], vec![false; after.len()]);
        all.into_iter()
            .filter(|&(i, j, _)| {
                let free = !ub[i] && !ua[j];
                if free {
                    ub[i] = true;
                    ua[j] = true;
                }
                free
            })
            .collect()
    }

    fn in_memory(
        before: &[Option<(f64, f64)>],
        after: &[Option<(f64, f64)>],
        within: f64,
    ) -> Vec<(usize, usize, f64)> {
        pair(before, after, within)
            .into_iter()
            .map(|p| (p.before, p.after, p.distance))
            .collect()
    }

    #[test]
    fn a_chain_waits_for_its_closer_end() {
        // Along y, cells 1 wide: b0 at 0, a0 at 0.9, b1 at 1.7, a1 at 2.4, b2 at 3.0: the
        // gaps shrink upwards (0.9, 0.8, 0.7, 0.6), so greedy takes (b2, a1) first, then
        // (b1, a0); b0 is left. The sweep must hold b0 until the rows above are settled.
        let before = [Some((0.0, 0.0)), Some((0.0, 1.7)), Some((0.0, 3.0))];
        let after = [Some((0.0, 0.9)), Some((0.0, 2.4))];
        let got: Vec<(usize, usize)> = swept(&before, &after, 1.0)
            .iter()
            .map(|p| (p.0, p.1))
            .collect();
        assert_eq!(got, [(2, 1), (1, 0)]);
    }

    #[test]
    fn sorted_on_disk_and_merged_back() {
        let within = 0.7;
        let pts: Vec<(f64, f64)> = (0..1000)
            .map(|i| {
                (
                    ((i * 37) % 101) as f64 * 0.31,
                    ((i * 53) % 97) as f64 * 0.29,
                )
            })
            .collect();
        let mut s = PositionSorter::new(within, tempfile::tempfile().unwrap());
        for (i, &(x, y)) in pts.iter().enumerate() {
            s.push(i as u32, x, y).unwrap();
        }
        let sorted = s.finish().unwrap();
        assert!(sorted.chunks.len() > 1);
        let got: Vec<Placed> = sorted.iter().unwrap().map(Result::unwrap).collect();
        let wrapped: Vec<Option<(f64, f64)>> = pts.iter().copied().map(Some).collect();
        assert_eq!(got, placed(&wrapped, within));
        // Read by two threads at once, as the pairings before and after an input read its
        // positions: each gets every location, in order (the file's offset is shared).
        for _ in 0..20 {
            let both: Vec<Vec<Placed>> = std::thread::scope(|t| {
                let read = || {
                    sorted
                        .iter()
                        .unwrap()
                        .map(Result::unwrap)
                        .collect::<Vec<_>>()
                };
                let (a, b) = (t.spawn(read), t.spawn(read));
                vec![a.join().unwrap(), b.join().unwrap()]
            });
            assert_eq!(both[0], got);
            assert_eq!(both[1], got);
        }
    }

    fn points(n: usize, span: f64, step: f64) -> impl Strategy<Value = Vec<Option<(f64, f64)>>> {
        // Positions on a lattice of `step` (many equal distances: ties) inside `span`, some
        // without a position.
        let cells = (span / step) as i32;
        proptest::collection::vec(
            prop_oneof![
                1 => Just(None),
                12 => (0..=cells, 0..=cells)
                    .prop_map(move |(i, j)| Some((i as f64 * step, j as f64 * step))),
            ],
            0..n,
        )
    }

    /// The positions of `pts` (their index, where given) sorted on disk as a pairing reads them.
    fn sorted_positions(pts: &[Option<(f64, f64)>], within: f64) -> SortedPositions {
        let mut s = PositionSorter::new(within, tempfile::tempfile().unwrap());
        for (i, p) in pts.iter().enumerate() {
            if let Some((x, y)) = p {
                s.push(i as u32, *x, *y).unwrap();
            }
        }
        s.finish().unwrap()
    }

    /// [`sweep_bands`] of `before` and `after` (sorted on disk in chunks) in `bands` bands,
    /// on a pool of `threads`: the pairs, in the order of [`swept`].
    fn banded(
        before: &[Option<(f64, f64)>],
        after: &[Option<(f64, f64)>],
        within: f64,
        bands: usize,
        threads: usize,
    ) -> Vec<(usize, usize, f64)> {
        let sorted = |pts: &[Option<(f64, f64)>]| sorted_positions(pts, within);
        let (b, a) = (sorted(before), sorted(after));
        let got = Mutex::new(Vec::new());
        let pool = rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap();
        pool.install(|| {
            sweep_bands(&b, &a, within, bands, |i, j, d| {
                got.lock().unwrap().push((i as usize, j as usize, d))
            })
        })
        .unwrap();
        let mut got = got.into_inner().unwrap();
        got.sort_by(|a, b| a.2.total_cmp(&b.2).then(a.0.cmp(&b.0)).then(a.1.cmp(&b.1)));
        got
    }

    /// Rows of locations far apart (many cell rows empty in both inputs): the bands are cut
    /// there, and the pairs are still those of greedy over the whole.
    #[test]
    fn bands_cut_at_empty_rows_pair_as_the_whole() {
        let within = 0.2;
        let grid = |shift: f64, skip: usize| -> Vec<Option<(f64, f64)>> {
            (0..2000)
                .map(|i: usize| {
                    (i % 101 != skip).then(|| {
                        let (c, r) = ((i % 40) as f64, (i / 40) as f64);
                        (
                            c * 0.5 + shift * (i % 3) as f64,
                            r * 0.5 + shift * (i % 5) as f64,
                        )
                    })
                })
                .collect()
        };
        let (before, after) = (grid(0.0, 3), grid(0.03, 50));
        let whole = brute(&before, &after, within);
        assert!(whole.len() > 1500);
        for threads in [1, 2] {
            for bands in [1, 2, 5, 16] {
                assert_eq!(banded(&before, &after, within, bands, threads), whole);
            }
        }
        // The bands are cut where asked (rows 0.5 apart, cells 0.2 high: empty rows abound).
        let sorted = |pts: &[Option<(f64, f64)>]| sorted_positions(pts, within);
        assert_eq!(
            band_rows(&sorted(&before), &sorted(&after), 5)
                .unwrap()
                .len(),
            5
        );
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(300))]

        /// Dense clusters: `within` spans several lattice steps, so every location has many
        /// candidates and equal distances abound.
        #[test]
        fn same_pairs_as_in_memory_greedy_dense(
            before in points(60, 3.0, 0.25),
            after in points(60, 3.0, 0.25),
            within in prop_oneof![Just(0.25), Just(0.5), Just(0.8), Just(1.3), Just(2.0)],
        ) {
            let got = swept(&before, &after, within);
            prop_assert_eq!(&got, &in_memory(&before, &after, within));
            prop_assert_eq!(&got, &brute(&before, &after, within));
        }

        /// In bands of cell rows on one thread and on two: the pairs of greedy over the whole.
        #[test]
        fn bands_pair_as_the_whole(
            before in points(150, 12.0, 0.25),
            after in points(150, 12.0, 0.25),
            within in prop_oneof![Just(0.1), Just(0.25), Just(0.6)],
            bands in 1usize..7,
            threads in 1usize..3,
        ) {
            let got = banded(&before, &after, within, bands, threads);
            prop_assert_eq!(&got, &brute(&before, &after, within));
        }

        /// Free positions (few ties), spread and negative, `within` small and large.
        #[test]
        fn same_pairs_as_in_memory_greedy_spread(
            before in proptest::collection::vec(
                proptest::option::weighted(0.9, (-20.0f64..20.0, -20.0f64..20.0)), 0..80),
            after in proptest::collection::vec(
                proptest::option::weighted(0.9, (-20.0f64..20.0, -20.0f64..20.0)), 0..80),
            within in 0.05f64..12.0,
        ) {
            let got = swept(&before, &after, within);
            prop_assert_eq!(&got, &in_memory(&before, &after, within));
            prop_assert_eq!(&got, &brute(&before, &after, within));
        }
    }
}
