//! A comparison of files of any length in bounded memory, through partitioned run files.
//!
//! 1. Each input is read as a stream (the inputs on every core at once): each row is folded
//!    into its tryout's [`TryoutStats`](super::read::TryoutStats) and appended to one of `P` anonymous temporary run
//!    files, chosen by a hash of its id (by id) or of its track (by position).
//! 2. The partitions are joined on every core, each thread folding those it takes into one
//!    partial [`Tally`] of its own: a partition's rows of all inputs are read back, joined into
//!    tracks (an id met twice in one input is refused there), and each track is folded into
//!    the tally and written as its compare.csv row, with its place in the first file's order,
//!    to another run file, in that order.
//! 3. The threads' tallies merge into one; the partitions' rows are merged by their place into
//!    compare.csv, block by block of places on every core, written in order by the caller's
//!    thread.
//!
//! Each input's SHA-256 is taken as it is read ([`compare_files_digested`]).
//!
//! By position, each input is still read once (on every core at once), and then its tracks are
//! found: each row goes to one run file in row order (input 0's straight to the partition of
//! its track, which it starts), its position to a file sorted by grid cell in chunks, the hash
//! of its id to a partition of hashes (each sorted afterwards: two equal hashes, and only then,
//! send the file to be read again for its ids themselves, so a duplicate is refused at its
//! line). Each input is paired with the one before it by a sweep over the merged chunks
//! ([`super::sweep`]: greedy closest-first, the pairs of [`super::pairing::pair`]), which gives
//! each row of the later input its partner (4 bytes a row), in bands of cell rows on every
//! core ([`sweep::sweep_bands`]); the later inputs' rows are then routed from their runs to
//! the partitions of their tracks, their segments shared out among the cores, and joined as by
//! id.
//!
//! What stays in memory: a partition being joined (two on two cores), the capped lists and the
//! densities of each thread, and a few blocks of compare.csv rows being merged; by position
//! also a chunk of positions being sorted, each band's last two rows of cells with the
//! locations still waiting on them, and the partner of every row of each later input. The run files are anonymous temporary files: the system removes them however the
//! run ends.

use super::read::{duplicate, for_each_row, tryout_of, unique_labels, ReadRow};
use super::tally::{order_of, Order, Tally};
use super::{csv_out, density_for, finish, sweep, Comparison, Matching, ResultRow, Track};
use crate::assess::Zone;
use crate::error::{Error, Location, Result};
use crate::measure::open_input;
use rayon::prelude::*;
use std::collections::{BinaryHeap, HashMap, HashSet};
use std::fs::File;
use std::hash::{BuildHasher, Hash};
use std::io::{self, BufReader, BufWriter, Read, Seek, Write};
use std::path::{Path, PathBuf};

/// Bytes of input per partition (of all inputs together).
const PARTITION_BYTES: u64 = if cfg!(test) { 1 << 10 } else { 8 << 20 };
/// Most partitions.
const MAX_PARTITIONS: u64 = 256;

/// An anonymous temporary file (removed by the system however the run ends).
pub fn temp() -> Result<File> {
    tempfile::tempfile().map_err(|e| Error::io(&std::env::temp_dir(), e))
}

fn run_error(e: io::Error) -> Error {
    Error::io(&std::env::temp_dir(), e)
}

/// A hash that is the same on every run (FxHash, of the `rustc-hash` crate).
fn hash_of(v: impl Hash) -> u64 {
    rustc_hash::FxBuildHasher.hash_one(v)
}

fn partition(key: u64, n: usize) -> usize {
    // The high bits mix best.
    ((key as u128 * n as u128) >> 64) as usize
}

/// One row of a run file.
struct RunRow {
    index: u64,
    line: u64,
    track: u64,
    id_column: u64,
    row: ResultRow,
}

fn put_opt(w: &mut Vec<u8>, v: Option<f64>) {
    w.extend_from_slice(&v.unwrap_or(f64::NAN).to_le_bytes());
}

fn encode(buf: &mut Vec<u8>, index: u64, line: u64, track: u64, r: &ReadRow) {
    buf.clear();
    for v in [index, line, track, r.id_column] {
        buf.extend_from_slice(&v.to_le_bytes());
    }
    buf.extend_from_slice(&(r.id.len() as u32).to_le_bytes());
    buf.extend_from_slice(r.id.as_bytes());
    for v in [r.major_pct, r.minor_pct] {
        buf.extend_from_slice(&v.to_le_bytes());
    }
    for v in [r.margin_pct, r.limit_pct, r.x, r.y] {
        put_opt(buf, v);
    }
    buf.push(super::tally::zone_index(r.zone) as u8);
}

fn decode(r: &mut impl Read) -> io::Result<Option<RunRow>> {
    let mut head = [0u8; 36];
    match r.read_exact(&mut head[..8]) {
        Ok(()) => {}
        Err(e) if e.kind() == io::ErrorKind::UnexpectedEof => return Ok(None),
        Err(e) => return Err(e),
    }
    r.read_exact(&mut head[8..])?;
    let u = |k: usize| u64::from_le_bytes(head[k * 8..k * 8 + 8].try_into().unwrap_or_default());
    let len = u32::from_le_bytes(head[32..36].try_into().unwrap_or_default()) as usize;
    let mut id = vec![0u8; len];
    r.read_exact(&mut id)?;
    let mut nums = [0u8; 49];
    r.read_exact(&mut nums)?;
    let f = |k: usize| f64::from_le_bytes(nums[k * 8..k * 8 + 8].try_into().unwrap_or_default());
    let opt = |k: usize| Some(f(k)).filter(|v| !v.is_nan());
    let id = String::from_utf8(id).map_err(|e| io::Error::new(io::ErrorKind::InvalidData, e))?;
    Ok(Some(RunRow {
        index: u(0),
        line: u(1),
        track: u(2),
        id_column: u(3),
        row: ResultRow {
            id,
            major_pct: f(0),
            minor_pct: f(1),
            margin_pct: opt(2),
            limit_pct: opt(3),
            x: opt(4),
            y: opt(5),
            zone: Zone::ALL[(nums[48] as usize).min(5)],
        },
    }))
}

/// Read `path` into `parts` run files by a hash of each row's id; its stats and the SHA-256 of
/// its bytes.
fn split(path: &Path, parts: usize) -> Result<(super::TryoutStats, Vec<File>, String)> {
    let mut files: Vec<BufWriter<File>> = (0..parts)
        .map(|_| temp().map(|f| BufWriter::with_capacity(1 << 15, f)))
        .collect::<Result<_>>()?;
    let mut stats = super::TryoutStats::default();
    let mut buf = Vec::with_capacity(256);
    let mut index = 0u64;
    let (input, digest) = crate::text::open(path)?;
    for_each_row(input, path, |line, r| {
        stats.fold(&r);
        encode(&mut buf, index, line, 0, &r);
        files[partition(hash_of(r.id.as_bytes()), parts)]
            .write_all(&buf)
            .map_err(run_error)?;
        index += 1;
        Ok(())
    })?;
    stats.finish();
    let files = files.into_iter().map(rewound).collect::<Result<_>>()?;
    Ok((stats, files, digest.hex()))
}

/// A partition's compare.csv rows, in order, in a run file: each row its place in order
/// (8 bytes), its length (4 bytes) and its text. `blocks` gives the offset in the file of the
/// first row of each block of places met ([`block_of`]), in order; `len` the file's length.
struct RowRun {
    part: usize,
    file: std::sync::Mutex<File>,
    blocks: Vec<(u64, u64)>,
    len: u64,
}

/// Writes a [`RowRun`].
struct RowWriter {
    out: BufWriter<File>,
    blocks: Vec<(u64, u64)>,
    len: u64,
}

impl RowWriter {
    fn new() -> Result<Self> {
        Ok(RowWriter {
            out: BufWriter::with_capacity(1 << 16, temp()?),
            blocks: Vec::new(),
            len: 0,
        })
    }

    /// Add the row `text` at place `order` (each later than the one before).
    fn push(&mut self, order: Order, text: &[u8]) -> Result<()> {
        if self
            .blocks
            .last()
            .is_none_or(|&(k, _)| k != block_of(order))
        {
            self.blocks.push((block_of(order), self.len));
        }
        let head = [&order.to_le_bytes()[..], &(text.len() as u32).to_le_bytes()];
        for part in head.into_iter().chain([text]) {
            self.out.write_all(part).map_err(run_error)?;
        }
        self.len += 12 + text.len() as u64;
        Ok(())
    }

    /// The run of partition `part`.
    fn finish(self, part: usize) -> Result<RowRun> {
        let f = self
            .out
            .into_inner()
            .map_err(|e| run_error(e.into_error()))?;
        Ok(RowRun {
            part,
            file: std::sync::Mutex::new(f),
            blocks: self.blocks,
            len: self.len,
        })
    }
}

/// Places in order per block of compare.csv rows merged at a time, as a power of two.
const BLOCK_SHIFT: u32 = if cfg!(test) { 6 } else { 13 };

/// The block of a place in order: places of one block are consecutive in order, and a later
/// block holds only later places.
fn block_of(order: Order) -> u64 {
    order >> BLOCK_SHIFT
}

/// What one partition gives: its tally, its compare.csv rows in order, and the first id met
/// twice in one input (tryout, line, error).
struct Joined {
    tally: Tally,
    rows: Vec<RowRun>,
    duplicate: Option<(usize, u64, Error)>,
}

struct Shape<'a> {
    paths: &'a [PathBuf],
    matching: Matching,
    tolerance: f64,
    density: &'a super::tally::Density,
    csv: bool,
    /// An input has more than [`crate::summary::KEEP_ALL`] locations: the tally keeps only
    /// its capped lists.
    beyond_keep_all: bool,
}

impl Joined {
    /// Nothing joined yet.
    fn empty(shape: &Shape) -> Joined {
        let n = shape.paths.len();
        let density = Some(shape.density.clone());
        let tally = if shape.beyond_keep_all {
            Tally::beyond_keep_all(n, shape.tolerance, density)
        } else {
            Tally::new(n, shape.tolerance, density)
        };
        Joined {
            tally,
            rows: Vec::new(),
            duplicate: None,
        }
    }
}

/// Join partition `p` (its run files of every input) into `acc`: its tracks folded into the
/// tally, their compare.csv rows in order into a run file of their own.
fn join(p: usize, inputs: Vec<(usize, File)>, shape: &Shape, acc: &mut Joined) -> Result<()> {
    let n = shape.paths.len();
    // Tracks by a hash of their key; two keys of one hash (rare) go to `clashes`.
    let mut index: HashMap<u64, usize, rustc_hash::FxBuildHasher> = HashMap::default();
    let mut clashes: HashMap<Vec<u8>, usize> = HashMap::new();
    let mut tracks: Vec<(Order, Track)> = Vec::new();
    let mut dup: Option<(usize, u64, Error)> = None;
    // The files of one input are together, the inputs in order (an id's track takes its place
    // from the first input that has it).
    for (k, f) in inputs {
        let mut r = BufReader::with_capacity(1 << 16, f);
        while let Some(row) = decode(&mut r).map_err(run_error)? {
            let order = match shape.matching {
                Matching::Id => order_of(k, row.index),
                Matching::Xy { .. } => row.track,
            };
            // By position the hash is the track itself: no two tracks share one.
            let same = |t: &Track, key: &[u8]| match shape.matching {
                Matching::Id => super::csv_out::latest(t).id.as_bytes() == key,
                Matching::Xy { .. } => true,
            };
            let (h, key) = match shape.matching {
                Matching::Id => (hash_of(row.row.id.as_bytes()), row.row.id.as_bytes()),
                Matching::Xy { .. } => (row.track, &[][..]),
            };
            let found = match index.get(&h) {
                Some(&i) if same(&tracks[i].1, key) => Some(i),
                Some(_) => clashes.get(key).copied(),
                None => None,
            };
            let at = match found {
                Some(i) => i,
                None => {
                    tracks.push((
                        order,
                        Track {
                            at: vec![None; n],
                            step: vec![None; n],
                        },
                    ));
                    let i = tracks.len() - 1;
                    match index.entry(h) {
                        std::collections::hash_map::Entry::Occupied(_) => {
                            clashes.insert(key.to_vec(), i);
                        }
                        std::collections::hash_map::Entry::Vacant(v) => {
                            v.insert(i);
                        }
                    }
                    i
                }
            };
            let t = &mut tracks[at].1;
            if t.at[k].is_some() {
                if dup.as_ref().is_none_or(|d| (k, row.line) < (d.0, d.1)) {
                    let loc = Location::file(&shape.paths[k]);
                    let e = duplicate(&loc, row.line, row.id_column, &row.row.id);
                    dup = Some((k, row.line, e));
                }
                continue;
            }
            t.at[k] = Some(row.row);
        }
    }
    drop((index, clashes));
    if let Matching::Xy { .. } = shape.matching {
        for (_, t) in &mut tracks {
            steps(t);
        }
    }
    tracks.sort_by_key(|(o, _)| *o);
    let tally = &mut acc.tally;
    let mut out = RowWriter::new()?;
    let mut b = Vec::with_capacity(256);
    for (order, t) in &tracks {
        tally.fold(t, *order);
        if shape.csv {
            b.clear();
            csv_out::push_record(shape.matching, shape.tolerance, t, &mut b);
            out.push(*order, &b)?;
        }
    }
    acc.rows.push(out.finish(p)?);
    acc.duplicate = earlier(acc.duplicate.take(), dup);
    Ok(())
}

/// Of two first repeats (tryout, line, error), the earlier.
fn earlier(
    a: Option<(usize, u64, Error)>,
    b: Option<(usize, u64, Error)>,
) -> Option<(usize, u64, Error)> {
    match (a, b) {
        (Some(x), Some(y)) => Some(if (y.0, y.1) < (x.0, x.1) { y } else { x }),
        (x, y) => x.or(y),
    }
}

/// The distance of each step of a track paired by position.
fn steps(t: &mut Track) {
    for k in 1..t.at.len() {
        if let (Some(a), Some(b)) = (&t.at[k - 1], &t.at[k]) {
            if let (Some(p), Some(q)) = (a.xy(), b.xy()) {
                t.step[k] = Some((q.0 - p.0).hypot(q.1 - p.1));
            }
        }
    }
}

fn merge_joined(mut a: Joined, b: Joined) -> Joined {
    a.tally.merge(b.tally);
    a.rows.extend(b.rows);
    a.duplicate = earlier(a.duplicate, b.duplicate);
    a
}

/// Merge the partitions' compare.csv rows by their place into `out`, after the header. The
/// blocks of places ([`block_of`]) are merged on every core, a few at a time ahead of the one
/// written; this thread writes them in order.
fn merge_rows(mut rows: Vec<RowRun>, header: &[String], out: &mut dyn Write) -> Result<()> {
    rows.sort_by_key(|r| r.part);
    let mut w = csv::Writer::from_writer(&mut *out);
    w.write_record(header)
        .map_err(|e| run_error(io::Error::other(e)))?;
    w.flush().map_err(run_error)?;
    drop(w);
    let mut blocks: Vec<u64> = rows
        .iter()
        .flat_map(|r| r.blocks.iter().map(|b| b.0))
        .collect();
    blocks.sort_unstable();
    blocks.dedup();
    let ahead = 2 * rayon::current_num_threads().max(1);
    let written = merge_blocks(&rows, &blocks, ahead, out);
    // The run files are closed (their pages freed) on the pool, off this thread.
    rayon::spawn(move || drop(rows));
    written
}

/// Merge `blocks` of `rows`, `ahead` at a time on the pool, and write them in order to `out`.
fn merge_blocks(rows: &[RowRun], blocks: &[u64], ahead: usize, out: &mut dyn Write) -> Result<()> {
    let (tx, rx) = std::sync::mpsc::channel::<(usize, io::Result<Vec<u8>>)>();
    rayon::in_place_scope(|s| {
        let spawn = |i: usize| {
            let tx = tx.clone();
            let block = blocks[i];
            s.spawn(move |_| {
                // The receiver is gone only when writing failed: nothing is left to do.
                let _ = tx.send((i, merge_block(rows, block)));
            });
        };
        let mut spawned = blocks.len().min(ahead);
        (0..spawned).for_each(spawn);
        let mut ready: HashMap<usize, Vec<u8>> = HashMap::new();
        for i in 0..blocks.len() {
            let bytes = loop {
                if let Some(b) = ready.remove(&i) {
                    break b;
                }
                let (k, r) = crate::pool::wait(&rx, "its merged block");
                ready.insert(k, r.map_err(run_error)?);
            };
            out.write_all(&bytes).map_err(run_error)?;
            if spawned < blocks.len() {
                spawn(spawned);
                spawned += 1;
            }
        }
        Ok(())
    })
}

/// The rows of block `block` of every partition, merged by their place, without their heads.
fn merge_block(rows: &[RowRun], block: u64) -> io::Result<Vec<u8>> {
    let mut runs: Vec<Vec<u8>> = Vec::new();
    for r in rows {
        let Ok(k) = r.blocks.binary_search_by_key(&block, |b| b.0) else {
            continue;
        };
        let (at, end) = (r.blocks[k].1, r.blocks.get(k + 1).map_or(r.len, |b| b.1));
        let mut buf = vec![0u8; (end - at) as usize];
        let mut f = r.file.lock().unwrap_or_else(|e| e.into_inner());
        f.seek(io::SeekFrom::Start(at))?;
        f.read_exact(&mut buf)?;
        runs.push(buf);
    }
    let head = |run: &[u8], at: usize| -> io::Result<(Order, usize)> {
        let h = run
            .get(at..at + 12)
            .ok_or_else(|| io::Error::from(io::ErrorKind::UnexpectedEof))?;
        let order = u64::from_le_bytes(h[..8].try_into().unwrap_or_default());
        let len = u32::from_le_bytes(h[8..].try_into().unwrap_or_default()) as usize;
        Ok((order, len))
    };
    let mut out = Vec::with_capacity(runs.iter().map(Vec::len).sum());
    let mut at = vec![0usize; runs.len()];
    let mut heap = BinaryHeap::new();
    for (i, run) in runs.iter().enumerate() {
        if !run.is_empty() {
            heap.push(std::cmp::Reverse((head(run, 0)?.0, i)));
        }
    }
    while let Some(std::cmp::Reverse((_, i))) = heap.pop() {
        let (run, a) = (&runs[i], at[i]);
        let len = head(run, a)?.1;
        let text = run
            .get(a + 12..a + 12 + len)
            .ok_or_else(|| io::Error::from(io::ErrorKind::UnexpectedEof))?;
        out.extend_from_slice(text);
        at[i] = a + 12 + len;
        if at[i] < run.len() {
            heap.push(std::cmp::Reverse((head(run, at[i])?.0, i)));
        }
    }
    Ok(out)
}

/// What the one read of an input gives when pairing by position: its stats, its rows (input 0:
/// already in the partitions of their tracks; a later input: one run in row order, to be
/// routed once its pairs are known), its positions sorted by cell, its number of rows.
struct ReadOnce {
    stats: super::TryoutStats,
    rows: Vec<File>,
    /// A later input's run: the offset of every [`SEGMENT`]th row, and its length.
    segments: Vec<u64>,
    written: u64,
    positions: sweep::SortedPositions,
    count: usize,
    /// The SHA-256 of its bytes.
    digest: String,
}

/// A hash of an id for the check that none is met twice (SipHash with fixed keys; two ids of
/// one hash are told apart by reading the file again).
fn id_hash(id: &str) -> u64 {
    use std::hash::Hasher;
    let mut h = std::hash::DefaultHasher::new();
    h.write(id.as_bytes());
    h.finish()
}

/// Read input `k` once, by position: its rows into run files, its positions sorted on disk,
/// the hashes of its ids into `parts` files; then the check that no id is met twice. The
/// first error in the file's order is given (a duplicate id before a bad row is the error).
fn read_placed(path: &Path, k: usize, parts: usize, within: f64) -> Result<ReadOnce> {
    let writers = |n: usize, cap: usize| -> Result<Vec<BufWriter<File>>> {
        (0..n)
            .map(|_| temp().map(|f| BufWriter::with_capacity(cap, f)))
            .collect()
    };
    let mut files = writers(if k == 0 { parts } else { 1 }, 1 << 15)?;
    let mut ids = writers(parts, 1 << 12)?;
    let mut sorter = sweep::PositionSorter::new(within, temp()?);
    let mut stats = super::TryoutStats::default();
    let mut buf = Vec::with_capacity(256);
    let mut index = 0u64;
    let (mut segments, mut written) = (Vec::new(), 0u64);
    let loc = Location::file(path);
    let (input, digest) = crate::text::open(path)?;
    let read = for_each_row(input, path, |line, r| {
        let Ok(i) = u32::try_from(index) else {
            return Err(Error::input(
                loc.clone().at_line(line),
                "more than 4 294 967 295 locations: too many to pair by position",
            ));
        };
        stats.fold(&r);
        let h = id_hash(&r.id);
        ids[partition(h, parts)]
            .write_all(&h.to_le_bytes())
            .map_err(run_error)?;
        if let Some((x, y)) = r.xy() {
            sorter.push(i, x, y).map_err(run_error)?;
        }
        // A row's own place: its track's when it starts one (always in input 0).
        let track = order_of(k, index);
        encode(&mut buf, index, line, track, &r);
        let f = if k == 0 {
            partition(hash_of(track), parts)
        } else {
            if index.is_multiple_of(SEGMENT) {
                segments.push(written);
            }
            written += buf.len() as u64;
            0
        };
        files[f].write_all(&buf).map_err(run_error)?;
        index += 1;
        Ok(())
    });
    check_ids(path, ids)?;
    read?;
    stats.finish();
    Ok(ReadOnce {
        stats,
        rows: files.into_iter().map(rewound).collect::<Result<_>>()?,
        segments,
        written,
        positions: sorter.finish().map_err(run_error)?,
        count: index as usize,
        digest: digest.hex(),
    })
}

fn rewound(w: BufWriter<File>) -> Result<File> {
    let mut f = w.into_inner().map_err(|e| run_error(e.into_error()))?;
    f.rewind().map_err(run_error)?;
    Ok(f)
}

/// The check that no id of `path` is met twice, from the hashes of its ids in `files`
/// (partitioned by hash): each partition sorted, equal neighbours noted; only when two agree is
/// the file read again, its ids of those hashes compared themselves. The error is the first in
/// the file's order: the id met twice, or a bad row before it.
fn check_ids(path: &Path, files: Vec<BufWriter<File>>) -> Result<()> {
    let mut shared: HashSet<u64> = HashSet::new();
    let (mut bytes, mut hashes) = (Vec::new(), Vec::new());
    for w in files {
        bytes.clear();
        rewound(w)?.read_to_end(&mut bytes).map_err(run_error)?;
        hashes.clear();
        hashes.extend(
            bytes
                .chunks_exact(8)
                .map(|c| u64::from_le_bytes(c.try_into().unwrap_or_default())),
        );
        hashes.sort_unstable();
        shared.extend(hashes.windows(2).filter(|w| w[0] == w[1]).map(|w| w[0]));
    }
    if shared.is_empty() {
        return Ok(());
    }
    let loc = Location::file(path);
    let mut seen: HashSet<String> = HashSet::new();
    for_each_row(open_input(path)?, path, |line, r| {
        if shared.contains(&id_hash(&r.id)) && !seen.insert(r.id.clone()) {
            return Err(duplicate(&loc, line, r.id_column, &r.id));
        }
        Ok(())
    })?;
    Ok(())
}

/// No partner.
const NONE: u32 = u32::MAX;

/// The place of the track of row `i` of input `k`, given each later input's partners (the row
/// of the input before that each row was paired with).
fn track_of(partners: &[Vec<u32>], mut k: usize, mut i: u64) -> Order {
    while k > 0 {
        match partners[k][i as usize] {
            NONE => break,
            p => {
                k -= 1;
                i = p as u64;
            }
        }
    }
    order_of(k, i)
}

/// Rows of a later input's run per segment, routed on one core: its segments are shared out
/// among the cores.
const SEGMENT: u64 = if cfg!(test) { 16 } else { 1 << 16 };

/// Bytes `at..end` of a file shared by several readers (each read seeks under the lock).
struct Slice<'a> {
    file: &'a std::sync::Mutex<File>,
    at: u64,
    end: u64,
}

impl Read for Slice<'_> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let want = (self.end - self.at).min(buf.len() as u64) as usize;
        if want == 0 {
            return Ok(0);
        }
        let mut f = self.file.lock().unwrap_or_else(|e| e.into_inner());
        f.seek(io::SeekFrom::Start(self.at))?;
        let n = f.read(&mut buf[..want])?;
        self.at += n as u64;
        Ok(n)
    }
}

/// Route the rows of input `k` (one run in row order, `segments` the offsets of its segments,
/// `len` its length) into `parts` partitions by their track, the segments shared out in
/// contiguous groups among the cores: the partitions of each group.
fn route(
    run: File,
    segments: &[u64],
    len: u64,
    k: usize,
    partners: &[Vec<u32>],
    parts: usize,
) -> Result<Vec<Vec<File>>> {
    let groups = rayon::current_num_threads().clamp(1, segments.len().max(1));
    let run = std::sync::Mutex::new(run);
    let bound = |g: usize| -> u64 {
        segments
            .get(g * segments.len() / groups)
            .copied()
            .unwrap_or(len)
    };
    (0..groups)
        .into_par_iter()
        .with_max_len(1)
        .map(|g| {
            let slice = Slice {
                file: &run,
                at: bound(g),
                end: if g + 1 == groups { len } else { bound(g + 1) },
            };
            route_slice(slice, k, partners, parts)
        })
        .collect()
}

/// Route the rows of `slice` (of input `k`'s run) into `parts` partitions by their track.
fn route_slice(
    slice: Slice<'_>,
    k: usize,
    partners: &[Vec<u32>],
    parts: usize,
) -> Result<Vec<File>> {
    let mut files: Vec<BufWriter<File>> = (0..parts)
        .map(|_| temp().map(|f| BufWriter::with_capacity(1 << 15, f)))
        .collect::<Result<_>>()?;
    let mut r = BufReader::with_capacity(1 << 16, slice);
    let mut rec = Vec::with_capacity(256);
    loop {
        rec.resize(36, 0);
        match r.read_exact(&mut rec[..8]) {
            Ok(()) => {}
            Err(e) if e.kind() == io::ErrorKind::UnexpectedEof => break,
            Err(e) => return Err(run_error(e)),
        }
        r.read_exact(&mut rec[8..]).map_err(run_error)?;
        let len = u32::from_le_bytes(rec[32..36].try_into().unwrap_or_default()) as usize;
        rec.resize(36 + len + 49, 0);
        r.read_exact(&mut rec[36..]).map_err(run_error)?;
        let index = u64::from_le_bytes(rec[..8].try_into().unwrap_or_default());
        let track = track_of(partners, k, index);
        rec[16..24].copy_from_slice(&track.to_le_bytes());
        files[partition(hash_of(track), parts)]
            .write_all(&rec)
            .map_err(run_error)?;
    }
    files.into_iter().map(rewound).collect()
}

/// Each input's stats, the sources of rows (an input, and rows of it in partitions; the
/// inputs in order), and each input's SHA-256.
type Split = (
    Vec<super::TryoutStats>,
    Vec<(usize, Vec<File>)>,
    Vec<String>,
);

/// By position: read every input once (on every core), pair each with the one before it on
/// its positions sorted by cell ([`sweep`]), route the later inputs' rows to their tracks'
/// partitions. Each input's stats, partitions and SHA-256.
fn split_by_position(paths: &[PathBuf], parts: usize, within: f64) -> Result<Split> {
    let read: Vec<Result<ReadOnce>> = paths
        .par_iter()
        .enumerate()
        .map(|(k, p)| read_placed(p, k, parts, within))
        .collect();
    let read: Vec<ReadOnce> = read.into_iter().collect::<Result<_>>()?;
    // Each later input's partners: for each row, the row of the input before it paired with it.
    let paired: Vec<Result<Vec<u32>>> = (1..read.len())
        .into_par_iter()
        .map(|k| {
            use std::sync::atomic::{AtomicU32, Ordering::Relaxed};
            let partners: Vec<AtomicU32> =
                (0..read[k].count).map(|_| AtomicU32::new(NONE)).collect();
            // Bands of cell rows on every core: each row of the later input is paired in one
            // band at most, and read once all bands are done.
            let bands = 4 * rayon::current_num_threads().max(1);
            let (before, after) = (&read[k - 1].positions, &read[k].positions);
            sweep::sweep_bands(before, after, within, bands, |b, a, _| {
                partners[a as usize].store(b, Relaxed)
            })
            .map_err(run_error)?;
            Ok(partners.into_iter().map(AtomicU32::into_inner).collect())
        })
        .collect();
    let mut partners = vec![Vec::new()];
    for p in paired {
        partners.push(p?);
    }
    let mut stats = Vec::with_capacity(read.len());
    let mut runs = Vec::with_capacity(read.len());
    let mut digests = Vec::with_capacity(read.len());
    for r in read {
        stats.push(r.stats);
        runs.push((r.rows, r.segments, r.written));
        digests.push(r.digest);
    }
    let routed: Vec<Result<Vec<Vec<File>>>> = runs
        .into_par_iter()
        .enumerate()
        .map(|(k, (rows, segments, len))| match k {
            0 => Ok(vec![rows]),
            _ => route(
                rows.into_iter()
                    .next()
                    .ok_or_else(|| run_error(io::ErrorKind::NotFound.into()))?,
                &segments,
                len,
                k,
                &partners,
                parts,
            ),
        })
        .collect();
    let mut files = Vec::new();
    for (k, r) in routed.into_iter().enumerate() {
        files.extend(r?.into_iter().map(|f| (k, f)));
    }
    Ok((stats, files, digests))
}

/// The first fault in file order, given `fault`, the first of input `k` (the first input
/// with one): an id met twice before it, in input `k` or in one before (which the join would
/// report had the inputs read to their end), or `fault` itself. By id only: by position the
/// ids are checked as the positions are read, row by row. The ids before the fault are read
/// again through `parts` run files, each searched alone: no set of every id is held.
fn earliest_fault(
    paths: &[PathBuf],
    k: usize,
    fault: Error,
    matching: Matching,
    parts: usize,
) -> Error {
    let at = match &fault {
        Error::Input { location, .. } => location.line,
        _ => None,
    };
    let (Matching::Id, Some(at)) = (matching, at) else {
        return fault;
    };
    match first_duplicate(&paths[..=k], at, parts) {
        Ok(Some(e)) => e,
        _ => fault,
    }
}

/// The first id met twice in one of `paths` (by input, then line), the last read only before
/// line `until`.
fn first_duplicate(paths: &[PathBuf], until: u64, parts: usize) -> Result<Option<Error>> {
    let mut files: Vec<BufWriter<File>> = (0..parts)
        .map(|_| temp().map(|f| BufWriter::with_capacity(1 << 15, f)))
        .collect::<Result<_>>()?;
    let last = paths.len() - 1;
    for (k, path) in paths.iter().enumerate() {
        let read = for_each_row(open_input(path)?, path, |line, r| {
            if k == last && line >= until {
                return Ok(());
            }
            let w = &mut files[partition(hash_of(r.id.as_bytes()), parts)];
            let head = [k as u64, line, r.id_column, r.id.len() as u64];
            head.iter()
                .try_for_each(|v| w.write_all(&v.to_le_bytes()))
                .and_then(|_| w.write_all(r.id.as_bytes()))
                .map_err(run_error)
        });
        // The last input's fault is known; the inputs before it read to their end.
        if k != last {
            read?;
        }
    }
    let mut first: Option<(u64, u64, Error)> = None;
    for w in files {
        let mut f = w.into_inner().map_err(|e| run_error(e.into_error()))?;
        f.rewind().map_err(run_error)?;
        let mut r = BufReader::with_capacity(1 << 16, f);
        let mut seen: HashSet<(u64, Vec<u8>)> = HashSet::new();
        let mut head = [0u8; 32];
        loop {
            match r.read_exact(&mut head) {
                Err(e) if e.kind() == io::ErrorKind::UnexpectedEof => break,
                other => other.map_err(run_error)?,
            }
            let v = |i: usize| {
                u64::from_le_bytes(head[i * 8..i * 8 + 8].try_into().unwrap_or_default())
            };
            let (k, line, column) = (v(0), v(1), v(2));
            let mut id = vec![0u8; v(3) as usize];
            r.read_exact(&mut id).map_err(run_error)?;
            // Rows are in file order within each partition: the first repeat is its earliest.
            if !seen.insert((k, id.clone())) {
                if first.as_ref().is_none_or(|f| (k, line) < (f.0, f.1)) {
                    let loc = Location::file(&paths[k as usize]);
                    let id = String::from_utf8_lossy(&id);
                    first = Some((k, line, duplicate(&loc, line, column, &id)));
                }
                break;
            }
        }
    }
    Ok(first.map(|(_, _, e)| e))
}

/// Compare the `points.csv` files at `paths` (at least two), writing compare.csv to `csv`
/// when given, in bounded memory (see the module's text). The comparison holds the counts of
/// every location and, beyond [`crate::summary::KEEP_ALL`] locations, the tracks of the capped
/// lists and the densities.
pub fn compare_files(
    paths: &[PathBuf],
    matching: Matching,
    tolerance: f64,
    csv: Option<&mut dyn Write>,
) -> Result<Comparison> {
    compare_files_digested(paths, matching, tolerance, csv).map(|(c, _)| c)
}

/// As [`compare_files`], with the SHA-256 of each input's bytes as read (lower-case
/// hexadecimal, in input order): each input is read once, for both.
pub fn compare_files_digested(
    paths: &[PathBuf],
    matching: Matching,
    tolerance: f64,
    csv: Option<&mut dyn Write>,
) -> Result<(Comparison, Vec<String>)> {
    if paths.len() < 2 {
        return Err(Error::Usage("compare needs at least two results".into()));
    }
    let mut tryouts: Vec<_> = paths
        .iter()
        .enumerate()
        .map(|(k, p)| tryout_of(p, k + 1))
        .collect();
    unique_labels(&mut tryouts);
    let bytes: u64 = paths
        .iter()
        .map(|p| std::fs::metadata(p).map_or(0, |m| m.len()))
        .sum();
    let parts = (bytes / PARTITION_BYTES).clamp(1, MAX_PARTITIONS) as usize;
    // Each source of rows: its input, and its rows in `parts` partitions.
    let mut files: Vec<(usize, Vec<File>)> = Vec::new();
    let mut digests = Vec::with_capacity(paths.len());
    match matching {
        Matching::Xy { within } => {
            let (stats, f, d) = split_by_position(paths, parts, within)?;
            for (t, s) in tryouts.iter_mut().zip(stats) {
                t.stats = s;
            }
            files = f;
            digests = d;
        }
        Matching::Id => {
            let split: Vec<Result<_>> = paths.par_iter().map(|p| split(p, parts)).collect();
            for (k, (t, r)) in tryouts.iter_mut().zip(split).enumerate() {
                let (stats, f, d) = match r {
                    Ok(r) => r,
                    Err(e) => return Err(earliest_fault(paths, k, e, matching, parts)),
                };
                t.stats = stats;
                files.push((k, f));
                digests.push(d);
            }
        }
    }
    let density = density_for(&tryouts);
    let shape = Shape {
        paths,
        matching,
        tolerance,
        density: &density,
        csv: csv.is_some(),
        beyond_keep_all: tryouts
            .iter()
            .any(|t| t.stats.locations > crate::summary::KEEP_ALL),
    };
    let mut by_part: Vec<Vec<(usize, File)>> = (0..parts).map(|_| Vec::new()).collect();
    for (k, input) in files {
        for (p, f) in input.into_iter().enumerate() {
            by_part[p].push((k, f));
        }
    }
    // Each thread takes the next partition left and folds it into one running result of its
    // own (the partial tallies alive do not grow with the number of partitions); the threads'
    // results merge at the end.
    let threads = rayon::current_num_threads().max(1);
    let queue = std::sync::Mutex::new(by_part.into_iter().enumerate());
    let done: Vec<Result<Joined>> = (0..threads)
        .into_par_iter()
        .with_max_len(1)
        .map(|_| {
            let mut acc = Joined::empty(&shape);
            loop {
                let next = queue.lock().unwrap_or_else(|e| e.into_inner()).next();
                let Some((p, inputs)) = next else {
                    return Ok(acc);
                };
                join(p, inputs, &shape, &mut acc)?;
            }
        })
        .collect();
    let mut joined: Option<Joined> = None;
    for j in done {
        let j = j?;
        joined = Some(match joined {
            Some(a) => merge_joined(a, j),
            None => j,
        });
    }
    let joined = joined.ok_or_else(|| Error::Usage("nothing to compare".into()))?;
    if let Some((_, _, e)) = joined.duplicate {
        return Err(e);
    }
    if let Some(out) = csv {
        merge_rows(joined.rows, &csv_out::header_of(paths.len(), matching), out)?;
    }
    Ok((finish(tryouts, joined.tally, matching, tolerance)?, digests))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::compare::{compare, read_tryout};

    fn points(dir: &Path, name: &str, rows: &[(String, f64, &str, f64)]) -> PathBuf {
        let p = dir.join(name);
        let mut s = String::from(
            "id,major_eng_pct,minor_eng_pct,margin_pct,limit_major_eng_pct,zone,x,y\n",
        );
        for (i, (id, margin, zone, x)) in rows.iter().enumerate() {
            s.push_str(&format!(
                "{id},{:.3},{:.3},{margin:.3},40.000,{zone},{x:.3},{:.3}\n",
                40.0 - margin,
                (i % 7) as f64 - 3.0,
                (i / 50) as f64
            ));
        }
        std::fs::write(&p, s).unwrap();
        p
    }

    /// The earlier tryout of the tests below: `n` locations `L{i}` with margins from -5 to 44
    /// pp, each zoned by `zone`, at `x` 0 to 49.
    fn earlier(
        n: usize,
        zone: impl Fn(f64) -> &'static str,
    ) -> Vec<(String, f64, &'static str, f64)> {
        (0..n)
            .map(|i| {
                let m = (i * 37 % 50) as f64 - 5.0;
                (format!("L{i}"), m, zone(m), (i % 50) as f64)
            })
            .collect()
    }

    /// The comparison through run files equals the one held whole (an independent in-memory
    /// join), rows of compare.csv in the same order.
    #[test]
    fn runs_give_what_the_whole_comparison_gives() {
        let dir = tempfile::tempdir().unwrap();
        let zone = |m: f64| {
            if m <= 0.0 {
                "failed"
            } else if m < 10.0 {
                "marginal"
            } else {
                "safe"
            }
        };
        let a = earlier(400, zone);
        // The later file: in another order, one missing, one new, some moved.
        let mut b: Vec<_> = a
            .iter()
            .filter(|r| r.0 != "L7")
            .map(|r| {
                let m = r.1 - if r.0.ends_with('3') { 4.0 } else { 0.0 };
                (r.0.clone(), m, zone(m), r.3 + 0.1)
            })
            .collect();
        b.reverse();
        b.push(("NEW".into(), -1.0, "failed", 70.0));
        let pa = points(dir.path(), "a.csv", &a);
        let pb = points(dir.path(), "b.csv", &b);
        assert!(PARTITION_BYTES < std::fs::metadata(&pa).unwrap().len());
        for matching in [Matching::Id, Matching::Xy { within: 0.5 }] {
            same_as_whole(&[pa.clone(), pb.clone()], matching);
        }
    }

    /// `compare_files` of `paths` against the in-memory comparison of the same files (an
    /// independent join): the same tracks, counts and compare.csv. The streamed one back.
    fn same_as_whole(paths: &[PathBuf], matching: Matching) -> Comparison {
        let tryouts: Vec<_> = paths
            .iter()
            .enumerate()
            .map(|(k, p)| read_tryout(p, k + 1).unwrap())
            .collect();
        // Every track in order, held whole (the comparison keeps only the capped lists'
        // beyond KEEP_ALL locations), for compare.csv.
        let every = match matching {
            Matching::Id => crate::compare::tracks_by_id(&tryouts),
            Matching::Xy { within } => crate::compare::tracks_by_position(&tryouts, within),
        };
        let whole = compare(tryouts, matching, 1.0).unwrap();
        let mut text = Vec::new();
        let runs = compare_files(paths, matching, 1.0, Some(&mut text)).unwrap();
        assert_eq!(runs.tracks, whole.tracks);
        assert_eq!(runs.counts, whole.counts);
        let mut expected = Vec::new();
        {
            let mut w = csv::Writer::from_writer(&mut expected);
            w.write_record(csv_out::header_of(paths.len(), matching))
                .unwrap();
            for t in &every {
                w.write_record(csv_out::record_of(matching, 1.0, t))
                    .unwrap();
            }
        }
        assert_eq!(
            String::from_utf8(text).unwrap(),
            String::from_utf8(expected).unwrap()
        );
        runs
    }

    /// Beyond [`crate::summary::KEEP_ALL`] locations (where only the capped lists are kept),
    /// on one thread and on several: the tracks, counts and compare.csv of the whole
    /// comparison (an independent in-memory join).
    #[test]
    fn beyond_keep_all_as_the_whole_comparison_on_any_threads() {
        let dir = tempfile::tempdir().unwrap();
        let n = crate::summary::KEEP_ALL + 700;
        let zone = |m: f64| if m <= 0.0 { "failed" } else { "safe" };
        let a = earlier(n, zone);
        let mut b: Vec<_> = a
            .iter()
            .filter(|r| !r.0.ends_with("17"))
            .map(|r| {
                let m = r.1 - if r.0.ends_with('3') { 4.0 } else { 0.0 };
                (r.0.clone(), m, zone(m), r.3 + 0.1)
            })
            .collect();
        b.rotate_left(n / 3);
        let paths = [
            points(dir.path(), "a.csv", &a),
            points(dir.path(), "b.csv", &b),
        ];
        let pool = |threads| {
            rayon::ThreadPoolBuilder::new()
                .num_threads(threads)
                .build()
                .unwrap()
        };
        let (one, two) = (pool(1), pool(2));
        for matching in [Matching::Id, Matching::Xy { within: 0.5 }] {
            // On one thread against the whole; on two, the same again.
            let runs = one.install(|| same_as_whole(&paths, matching));
            assert!(runs.counts.tracks > crate::summary::KEEP_ALL);
            let mut text = (Vec::new(), Vec::new());
            let a = one.install(|| compare_files(&paths, matching, 1.0, Some(&mut text.0)));
            let b = two.install(|| compare_files(&paths, matching, 1.0, Some(&mut text.1)));
            let (a, b) = (a.unwrap(), b.unwrap());
            assert_eq!((&a.tracks, &a.counts), (&b.tracks, &b.counts));
            assert_eq!(text.0, text.1);
        }
    }

    /// The rows of partitions merged by place, blocks on every core and written in order:
    /// every row once, in order of place (checked against the rows sorted whole), on a pool
    /// of one thread and of two; places sparse and dense, blocks shared or not.
    #[test]
    fn rows_merged_by_place_as_sorted_whole() {
        let mut r = 0x2545f4914f6cdd1du64;
        let mut next = |m: u64| {
            r ^= r << 13;
            r ^= r >> 7;
            r ^= r << 17;
            r % m
        };
        for (parts, rows, spread) in [(1, 50, 1), (3, 400, 1), (7, 900, 5), (5, 300, 1 << 12)] {
            // Distinct places, each given to a partition at random.
            let mut places: Vec<Order> = (0..rows).map(|i| i * spread + next(spread)).collect();
            places.extend((0..rows / 10).map(|i| order_of(1, i * 3)));
            let mut by_part: Vec<Vec<Order>> = vec![Vec::new(); parts];
            for &o in &places {
                by_part[next(parts as u64) as usize].push(o);
            }
            let text = |o: Order| format!("row {o},{}\n", "x".repeat((o % 17) as usize));
            let mut expected = String::from("h1,h2\n");
            for &o in &places {
                expected.push_str(&text(o));
            }
            for threads in [1, 2] {
                let pool = rayon::ThreadPoolBuilder::new()
                    .num_threads(threads)
                    .build()
                    .unwrap();
                let runs: Vec<RowRun> = by_part
                    .iter()
                    .enumerate()
                    .rev()
                    .map(|(p, os)| {
                        let mut w = RowWriter::new().unwrap();
                        for &o in os {
                            w.push(o, text(o).as_bytes()).unwrap();
                        }
                        w.finish(p).unwrap()
                    })
                    .collect();
                let mut out = Vec::new();
                let header = ["h1".to_string(), "h2".to_string()];
                pool.install(|| merge_rows(runs, &header, &mut out))
                    .unwrap();
                assert_eq!(String::from_utf8(out).unwrap(), expected);
            }
        }
    }

    /// By position through three inputs, rows shuffled and moved: the tracks and compare.csv
    /// of the whole comparison (an independent in-memory join), each input read once.
    #[test]
    fn three_inputs_by_position_give_the_whole_comparison() {
        let dir = tempfile::tempdir().unwrap();
        let rows = |shift: f64, skip: usize, seed: usize| -> Vec<(String, f64, &str, f64)> {
            let mut v: Vec<_> = (0..300)
                .filter(|i| i % 97 != skip)
                .map(|i| {
                    let m = ((i * 31 + seed) % 45) as f64 - 3.0;
                    let z = if m <= 0.0 { "failed" } else { "safe" };
                    // Ids differ between inputs: only positions can pair them.
                    let x = (i % 50) as f64 + shift * ((i * seed) % 3) as f64;
                    (format!("S{seed}-{i}"), m, z, x)
                })
                .collect();
            v.rotate_left(seed * 7);
            v
        };
        let paths = [
            points(dir.path(), "a.csv", &rows(0.0, 5, 1)),
            points(dir.path(), "b.csv", &rows(0.2, 11, 2)),
            points(dir.path(), "c.csv", &rows(0.3, 40, 3)),
        ];
        let runs = same_as_whole(&paths, Matching::Xy { within: 0.45 });
        // Some locations are followed through all three, some only through part.
        let through = |t: &Track| t.at.iter().filter(|r| r.is_some()).count();
        assert!(runs.tracks.iter().filter(|t| through(t) == 3).count() > 100);
        assert!(runs.tracks.iter().any(|t| through(t) == 1));
    }

    /// By position the ids are checked too: the first id met twice, at its line; a bad row
    /// after it does not hide it, a bad row before it is the error.
    #[test]
    fn by_position_an_id_twice_is_refused_at_its_line() {
        let dir = tempfile::tempdir().unwrap();
        let rows: Vec<_> = (0..60)
            .map(|i| {
                (
                    format!("L{}", if i == 45 { 3 } else { i }),
                    20.0,
                    "safe",
                    0.0,
                )
            })
            .collect();
        let pa = points(dir.path(), "a.csv", &rows);
        let xy = Matching::Xy { within: 0.5 };
        let e = compare_files(&[pa.clone(), pa.clone()], xy, 1.0, None)
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("a.csv:47:1 (column `id`)") && e.contains("duplicate id `L3`"),
            "{e}"
        );
        // Bad numbers in the major column (column 2) after and before line 47.
        let text = std::fs::read_to_string(&pa).unwrap();
        let bad = |line: usize| -> PathBuf {
            let t: Vec<String> = text
                .lines()
                .enumerate()
                .map(|(k, l)| {
                    let mut f: Vec<&str> = l.split(',').collect();
                    if k + 1 == line {
                        f[1] = "x1";
                    }
                    f.join(",")
                })
                .collect();
            let p = dir.path().join(format!("bad{line}.csv"));
            std::fs::write(&p, t.join("\n") + "\n").unwrap();
            p
        };
        let (late, early) = (bad(55), bad(30));
        let good = points(dir.path(), "g.csv", &rows[..40]);
        let e = compare_files(&[good.clone(), late], xy, 1.0, None)
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("bad55.csv:47:1") && e.contains("duplicate id"),
            "{e}"
        );
        let e = compare_files(&[good, early], xy, 1.0, None)
            .unwrap_err()
            .to_string();
        assert!(e.contains("bad30.csv:30:2"), "{e}");
    }

    #[test]
    fn an_id_twice_is_refused_at_its_line() {
        let dir = tempfile::tempdir().unwrap();
        let rows: Vec<_> = (0..60)
            .map(|i| {
                (
                    format!("L{}", if i == 45 { 3 } else { i }),
                    20.0,
                    "safe",
                    0.0,
                )
            })
            .collect();
        let pa = points(dir.path(), "a.csv", &rows);
        let e = compare_files(&[pa.clone(), pa], Matching::Id, 1.0, None)
            .unwrap_err()
            .to_string();
        // Line 47: the header is line 1 and L3's second row the 46th.
        assert!(
            e.contains("a.csv:47:1 (column `id`)") && e.contains("duplicate id `L3`"),
            "{e}"
        );
    }

    /// A file with a repeated id (line 5) and a value that is not a number (line 9): the
    /// repeat is reported, the earlier fault; with the two the other way round, the number.
    /// Across files the first file's fault comes first, whatever its line.
    #[test]
    fn the_earliest_fault_is_reported() {
        let dir = tempfile::tempdir().unwrap();
        let rows: Vec<_> = (0..12)
            .map(|i| (format!("L{i}"), 20.0, "safe", 0.0))
            .collect();
        let good = points(dir.path(), "good.csv", &rows);
        let text = std::fs::read_to_string(&good).unwrap();
        // Line n of the file is row n - 2 (the header is line 1).
        let with = |name: &str, dup_line: usize, bad_line: usize| {
            let mut lines: Vec<String> = text.lines().map(String::from).collect();
            lines[dup_line - 1] =
                lines[dup_line - 1].replacen(&format!("L{}", dup_line - 2), "L1", 1);
            lines[bad_line - 1] = lines[bad_line - 1].replacen(",20.000,", ",2o.000,", 1);
            let p = dir.path().join(name);
            std::fs::write(&p, lines.join("\n") + "\n").unwrap();
            p
        };
        let err = |paths: &[PathBuf]| {
            compare_files(paths, Matching::Id, 1.0, None)
                .unwrap_err()
                .to_string()
        };
        let dup_first = with("dup-first.csv", 5, 9);
        let e = err(&[dup_first.clone(), good.clone()]);
        assert!(
            e.contains("dup-first.csv:5:1 (column `id`)") && e.contains("duplicate id `L1`"),
            "{e}"
        );
        let e = err(&[good.clone(), dup_first.clone()]);
        assert!(
            e.contains("dup-first.csv:5:1"),
            "in the second file too: {e}"
        );
        let bad_first = with("bad-first.csv", 9, 5);
        let e = err(&[bad_first.clone(), good.clone()]);
        assert!(
            e.contains("bad-first.csv:5:") && e.contains("2o.000"),
            "{e}"
        );
        // The first file's repeat (line 9) before the second file's bad number (line 5).
        let e = err(&[with("dup-late.csv", 9, 11), bad_first]);
        assert!(
            e.contains("dup-late.csv:9:1") && e.contains("duplicate id"),
            "{e}"
        );
    }
}
