//! A file with a `stage` column judged in memory that does not grow with the file: the same
//! judgement as [`crate::point::staged::judge_staged`], row for row.
//!
//! Three passes, through anonymous temporary run files (gone when the run ends however it
//! ends):
//!
//! 1. The file is read in chunks (parsed and checked on every core, then taken in file order
//!    on one thread): rows rejected by themselves are kept aside, the stages are found in
//!    order (a stage not in the job file's is refused at its row), and every other row (its
//!    line, stage, id and fields) is appended to one of `P` partitions chosen by a hash of its
//!    id, `P` from the input's length ([`PARTITION_BYTES`] of run a partition).
//! 2. The partitions are grouped on every core, one at a time a thread: a partition's rows
//!    sorted by id (exactly, not by a hash), each location's rows taken in file order, a
//!    second row of one stage rejected as a duplicate, a row whose strains cannot be found
//!    rejected; each location with a row left is written to a second run file with its place
//!    in the file, the line of its first accepted row, in that order.
//! 3. The partitions' second runs are merged by that place (a k-way merge), [`BLOCK`]
//!    locations at a time a thread judged on every core (at the last stage by the strain curve, along
//!    the path when the file has several stages), formatted and folded into partial summaries
//!    that merge in order; the rejected rows of passes 1 and 2 merge by line. So points.csv and
//!    the summary come out as the in-memory judgement gives them, in the order the locations
//!    first appear.
//!
//! What stays in memory: a partition being grouped (one a thread), a batch being judged, one
//! buffer a partition, the capped lists; nothing a row or a location.
//!
//! A file whose rows are all of one stage ([`one_stage`]) needs none of this: `check` judges
//! it as a file without stages, in one streamed pass, with the same outputs.

use crate::capped::{Capped, LIST_CAP};
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, duplicate_key, Header, RejectedRow};
use crate::output::points_csv::Layout;
use crate::point::{state_of, Context, StateInput};
use crate::stream::{read_batch, Chunk, Chunker};
use crate::summary::{Summary, Template, View};
use rayon::prelude::*;
use std::cmp::Reverse;
use std::collections::BinaryHeap;
use std::fs::File;
use std::hash::BuildHasher;
use std::io::{self, BufRead, BufReader, BufWriter, Read, Seek, Write};

/// Bytes of run file a partition holds (what one thread reads into memory to group it).
pub const PARTITION_BYTES: u64 = if cfg!(test) { 1 << 10 } else { 4 << 20 };
/// Most partitions (each an open file and a buffer while the runs are written and merged).
const MAX_PARTITIONS: u64 = 256;
/// Partitions when the input's length is not known.
const UNKNOWN_PARTITIONS: usize = if cfg!(test) { 5 } else { 64 };
/// Run bytes per input byte, about: a row's fields with their lengths, its line, stage and id.
const RUN_PER_INPUT: u64 = 3;
/// Locations judged at a time by one thread in the last pass, into one partial summary. The
/// summary's map lists its cells in an order that follows how the locations were cut into
/// parts: the same cut gives the same bytes.
pub const BLOCK: usize = if cfg!(test) { 4 } else { 32_768 };
/// Bytes of buffer for each run file.
const RUN_BUFFER: usize = 32 << 10;

/// How many partitions for an input of `size` bytes (`None`: not known).
fn partitions(size: Option<u64>) -> usize {
    match size {
        None => UNKNOWN_PARTITIONS,
        Some(s) => {
            (s.saturating_mul(RUN_PER_INPUT) / PARTITION_BYTES + 1).min(MAX_PARTITIONS) as usize
        }
    }
}

/// What the first pass learns of one row, on a worker, before the rows are taken in order.
enum Pre {
    /// A row not measured (its line).
    NotMeasured(u64),
    /// A row rejected by itself (its line).
    Rejected(u64, RejectedRow),
    /// A row read.
    Row(Box<PreRow>),
}

/// A row read in the first pass.
struct PreRow {
    line: u64,
    /// Its partition.
    part: usize,
    id: String,
    stage: Option<String>,
    /// Whether its strains cannot be found (the reason is found again, if it is not a
    /// duplicate).
    unjudged: bool,
    /// The row's fields, each as a 4-byte length and the bytes.
    fields: Vec<u8>,
}

/// Flags of a row in a first run: no `stage` field; its strains cannot be found.
const NO_STAGE: u8 = 1;
const UNJUDGED: u8 = 2;

/// A hash that is the same on every run (FxHash, of the `rustc-hash` crate).
fn hash_of(v: &str) -> u64 {
    rustc_hash::FxBuildHasher.hash_one(v)
}

fn partition(key: u64, n: usize) -> usize {
    // The high bits mix best.
    ((u128::from(key) * n as u128) >> 64) as usize
}

fn encode(record: &csv::StringRecord, out: &mut Vec<u8>) {
    out.extend_from_slice(&(record.len() as u32).to_le_bytes());
    for f in record {
        out.extend_from_slice(&(f.len() as u32).to_le_bytes());
        out.extend_from_slice(f.as_bytes());
    }
}

/// The record encoded at the start of `bytes`, and the bytes after it.
fn decode<'a>(bytes: &'a [u8], record: &mut csv::StringRecord) -> &'a [u8] {
    record.clear();
    let n = word(bytes) as usize;
    let mut rest = &bytes[4..];
    for _ in 0..n {
        let len = word(rest) as usize;
        // The bytes were a field of a record read as UTF-8.
        record.push_field(std::str::from_utf8(&rest[4..4 + len]).unwrap_or_default());
        rest = &rest[4 + len..];
    }
    rest
}

fn word(b: &[u8]) -> u32 {
    u32::from_le_bytes([b[0], b[1], b[2], b[3]])
}

fn long(b: &[u8]) -> u64 {
    u64::from_le_bytes([b[0], b[1], b[2], b[3], b[4], b[5], b[6], b[7]])
}

/// First pass over one chunk: every row parsed and checked alone; a file-level error ends the
/// chunk (the rows before it are still taken).
fn scan_chunk(
    chunk: &Chunk,
    header: &Header,
    ctx: &Context,
    parts: usize,
) -> (Vec<Pre>, Option<Error>) {
    let mut reader = crate::measure::csv_reader(header.dialect, &chunk.bytes[..]);
    let mut record = csv::StringRecord::new();
    let mut out = Vec::with_capacity(chunk.bytes.len() / 40);
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => return (out, None),
            Err(e) => {
                let err = csv_error(&Location::file(&header.file), e);
                return (out, Some(err.shift_line(chunk.first_line - 1)));
            }
            Ok(true) if record.iter().all(|f| f.trim().is_empty()) => continue,
            Ok(true) => {}
        }
        let line = chunk.first_line + record.position().map_or(1, |p| p.line()) - 1;
        if header.not_measured(&record) {
            out.push(Pre::NotMeasured(line));
            continue;
        }
        let m = match header.row(&record, line) {
            Ok((m, _)) => m,
            Err(r) => {
                out.push(Pre::Rejected(line, r));
                continue;
            }
        };
        let part = partition(hash_of(&m.id), parts);
        let (id, stage) = (m.id.clone(), m.stage.clone());
        let unjudged = state_of(m, &header.file, &ctx.lengths).is_err();
        let mut fields = Vec::new();
        encode(&record, &mut fields);
        out.push(Pre::Row(Box::new(PreRow {
            line,
            part,
            id,
            stage,
            unjudged,
            fields,
        })));
    }
}

/// The first pass's state, taken in file order.
struct FirstPass<'a> {
    header: &'a Header,
    order: Option<&'a [String]>,
    stages: Vec<String>,
    /// The rows rejected by themselves, with their lines.
    rejected: Capped<(u64, RejectedRow)>,
    not_measured: Capped<u64>,
    runs: Vec<BufWriter<File>>,
}

impl FirstPass<'_> {
    fn take(&mut self, pre: Pre) -> Result<()> {
        let r = match pre {
            Pre::NotMeasured(line) => {
                self.not_measured.push(line);
                return Ok(());
            }
            Pre::Rejected(line, r) => {
                self.rejected.push((line, r));
                return Ok(());
            }
            Pre::Row(r) => r,
        };
        // A repeated (id, stage) has the stage of its first row, already found (or refused).
        let name = r.stage.as_deref().unwrap_or_default();
        let k = match self.stages.iter().position(|s| s == name) {
            Some(k) => k,
            None if self.order.is_some() => {
                let mut loc = Location::file(&self.header.file).at_line(r.line);
                if let Some(c) = self.header.columns.index("stage") {
                    loc = loc.at_column(c as u64 + 1, "stage");
                }
                return Err(Error::input(
                    loc,
                    format!(
                        "stage `{name}` is not in the job file's stages ({})",
                        self.stages.join(", ")
                    ),
                ));
            }
            None => {
                self.stages.push(name.to_string());
                self.stages.len() - 1
            }
        };
        let flags =
            if r.stage.is_none() { NO_STAGE } else { 0 } | if r.unjudged { UNJUDGED } else { 0 };
        let mut head = [0u8; 21];
        head[..8].copy_from_slice(&r.line.to_le_bytes());
        head[8..12].copy_from_slice(&(k as u32).to_le_bytes());
        head[12] = flags;
        head[13..17].copy_from_slice(&(r.id.len() as u32).to_le_bytes());
        head[17..].copy_from_slice(&(r.fields.len() as u32).to_le_bytes());
        let w = &mut self.runs[r.part];
        w.write_all(&head)
            .and_then(|_| w.write_all(r.id.as_bytes()))
            .and_then(|_| w.write_all(&r.fields))
            .map_err(run_error)
    }
}

fn run_error(e: io::Error) -> Error {
    Error::io(&std::env::temp_dir(), e)
}

/// An anonymous temporary file (removed by the system when closed).
fn temp() -> Result<File> {
    tempfile::tempfile().map_err(run_error)
}

/// Whether the measurement file at `path` (its header read as `header`) has at most one stage:
/// every non-blank row's `stage` field, trimmed, the same. Such a file gives each location at
/// most one row (a repeated id at one stage is a duplicate), so the judgement of
/// [`judge_staged_runs`] is that of the streamed `check` row by row, in file order: no path,
/// no grouping. Decided by reading the file again ([`one_stage_body`]); `false` for standard
/// input, a named pipe or a device (read once: `check` keeps its body in a temporary file and
/// asks [`one_stage_body`]) and a file that cannot be read again.
pub fn one_stage(path: &std::path::Path, header: &Header) -> bool {
    let regular = std::fs::metadata(path).is_ok_and(|m| m.is_file());
    if path.as_os_str() == "-" || !regular || !header.columns.has("stage") {
        return false;
    }
    let Ok((mut input, _)) = crate::text::open(path) else {
        return false;
    };
    let mut line = Vec::new();
    for _ in 0..header.lines {
        line.clear();
        if input.read_until(b'\n', &mut line).is_err() {
            return false;
        }
    }
    one_stage_body(input, header)
}

/// Keep `body` (the rows of `file`, read once, as standard input is) in an anonymous
/// temporary file, so that it can be read again ([`one_stage_body`], then the judgement);
/// the file, rewound, and its length. A read error is reported as reading the rows in chunks
/// reports it.
pub fn spool(mut body: impl Read, file: &std::path::Path) -> Result<(File, u64)> {
    let mut out = temp()?;
    let mut buf = vec![0u8; 1 << 16];
    let mut len = 0u64;
    loop {
        let n = match body.read(&mut buf) {
            Ok(0) => break,
            Ok(n) => n,
            Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
            Err(e) if e.kind() == io::ErrorKind::InvalidData => {
                return Err(Error::input(Location::file(file), e.to_string()))
            }
            Err(e) => return Err(Error::io(file, e)),
        };
        out.write_all(&buf[..n]).map_err(run_error)?;
        len += n as u64;
    }
    out.rewind().map_err(run_error)?;
    Ok((out, len))
}

/// Whether `body` (the rows after `header`, decoded as [`crate::text`] gives them) has at
/// most one stage (see [`one_stage`]): read in parallel chunks, only the `stage` field of each
/// row, stopping at the second stage found; `false` when its rows do not parse (the staged
/// path then says why).
pub fn one_stage_body(input: impl Read, header: &Header) -> bool {
    let Some(col) = header.columns.index("stage") else {
        return false;
    };
    let mut chunks = Chunker::new(input, header.lines + 1, header.dialect.delimiter());
    let batch = 2 * rayon::current_num_threads().max(1);
    let mut stage: Option<Option<Vec<u8>>> = None;
    loop {
        let Ok(todo) = read_batch(&mut chunks, batch, &header.file) else {
            return false;
        };
        if todo.is_empty() {
            return true;
        }
        let found: Vec<Option<Vec<Option<Vec<u8>>>>> =
            todo.par_iter().map(|c| stages_of(c, header, col)).collect();
        for values in found {
            let Some(values) = values else {
                return false;
            };
            for v in values {
                match &stage {
                    None => stage = Some(v),
                    Some(s) if *s == v => {}
                    Some(_) => return false,
                }
            }
        }
    }
}

/// The different `stage` fields (trimmed; `None` for a row without one) of a chunk's non-blank
/// rows, in order, at most two; `None` when a record does not parse.
fn stages_of(chunk: &Chunk, header: &Header, col: usize) -> Option<Vec<Option<Vec<u8>>>> {
    let mut reader = crate::measure::csv_reader(header.dialect, &chunk.bytes[..]);
    let mut record = csv::ByteRecord::new();
    let mut out: Vec<Option<Vec<u8>>> = Vec::new();
    while reader.read_byte_record(&mut record).ok()? {
        if record.iter().all(|f| f.trim_ascii().is_empty()) {
            continue;
        }
        let v = record.get(col).map(<[u8]>::trim_ascii);
        if out.last().map(|o| o.as_deref()) != Some(v) && !out.iter().any(|o| o.as_deref() == v) {
            out.push(v.map(<[u8]>::to_vec));
            if out.len() > 1 {
                break;
            }
        }
    }
    Some(out)
}

/// The outcome of a staged file judged through run files.
pub struct StagedRun {
    /// The summary (rejected rows and rows not measured included).
    pub summary: Summary,
    /// The stages, in order.
    pub stages: Vec<String>,
}

/// Judge the rows of `body` (a file with a `stage` column, after its header; about `size`
/// bytes, when known) as [`crate::point::staged::judge_staged`] does, in bounded memory, writing
/// points.csv (its header line first, in `layout`, whose `path` is set when the file has
/// several stages) to `sink`.
#[allow(clippy::too_many_arguments)]
pub fn judge_staged_runs(
    body: impl Read + Send,
    size: Option<u64>,
    header: &Header,
    ctx: &Context,
    order: Option<&[String]>,
    layout: &mut Layout,
    view: View,
    sink: Option<&mut (dyn Write + Send)>,
) -> Result<StagedRun> {
    let parts = partitions(size);
    let mut first = FirstPass {
        header,
        order,
        stages: order.map(<[String]>::to_vec).unwrap_or_default(),
        rejected: Capped::default(),
        not_measured: Capped::default(),
        runs: Vec::with_capacity(parts),
    };
    for _ in 0..parts {
        first
            .runs
            .push(BufWriter::with_capacity(RUN_BUFFER, temp()?));
    }
    let mut chunks = Chunker::new(body, header.lines + 1, header.dialect.delimiter());
    let batch = 2 * rayon::current_num_threads().max(1);
    let mut todo = read_batch(&mut chunks, batch, &header.file)?;
    while !todo.is_empty() {
        let (next, scanned) = rayon::join(
            || read_batch(&mut chunks, batch, &header.file),
            || {
                todo.par_iter()
                    .map(|c| scan_chunk(c, header, ctx, parts))
                    .collect::<Vec<_>>()
            },
        );
        for (pres, err) in scanned {
            for p in pres {
                first.take(p)?;
            }
            if let Some(e) = err {
                return Err(e);
            }
        }
        todo = next?;
    }
    drop(chunks);
    let staged = first.stages.len() >= 2;
    layout.path = staged;
    let stages = std::mem::take(&mut first.stages);

    // Second pass: each partition grouped into its locations, on every core.
    let threads = rayon::current_num_threads().max(1);
    let mut sorted = Vec::with_capacity(parts);
    let mut rejected = first.rejected;
    let mut runs = first.runs.into_iter().peekable();
    while runs.peek().is_some() {
        let group: Vec<BufWriter<File>> = runs.by_ref().take(threads).collect();
        let grouped: Vec<Result<Grouped>> = group
            .into_par_iter()
            .map(|w| {
                let mut f = w.into_inner().map_err(|e| run_error(e.into_error()))?;
                f.rewind().map_err(run_error)?;
                group_partition(f, header, ctx, &stages)
            })
            .collect();
        for g in grouped {
            let g = g?;
            sorted.push(g.run);
            rejected = merge_rejected(rejected, g.rejected);
        }
    }

    // Third pass: the locations merged into file order, judged a batch at a time.
    let mut summary = Summary::new(view);
    summary.supported = ctx.curve.supported_true();
    let mut sink = sink;
    let out_err = |e| Error::io(std::path::Path::new("points.csv"), e);
    if let Some(w) = sink.as_mut() {
        w.write_all(layout.header_line().as_bytes())
            .map_err(out_err)?;
    }
    let write = sink.is_some();
    let layout = &*layout;
    let mut merge = Merge::new(sorted)?;
    loop {
        // Read while nothing is judged: one batch in memory at a time.
        let todo = merge.batch(BLOCK * threads)?;
        if todo.is_empty() {
            break;
        }
        let template = summary.template();
        let judged: Vec<(Vec<u8>, Summary)> = todo
            .spans
            .par_chunks(BLOCK)
            .map(|spans| {
                judge_batch(
                    &todo.bytes,
                    spans,
                    header,
                    ctx,
                    staged,
                    layout,
                    write,
                    &template,
                )
            })
            .collect();
        for (text, part) in judged {
            if let Some(w) = sink.as_mut() {
                w.write_all(&text).map_err(out_err)?;
            }
            summary.merge(part);
        }
    }
    summary.rejected = Capped {
        items: rejected.items.into_iter().map(|(_, r)| r).collect(),
        total: rejected.total,
    };
    summary.not_measured = first.not_measured;
    Ok(StagedRun { summary, stages })
}

/// The first [`LIST_CAP`] rejected rows of `a` and `b` (each in file order) by line, and
/// how many in all.
fn merge_rejected(
    a: Capped<(u64, RejectedRow)>,
    b: Capped<(u64, RejectedRow)>,
) -> Capped<(u64, RejectedRow)> {
    let mut items = Vec::with_capacity(LIST_CAP.min(a.items.len() + b.items.len()));
    let (mut a_items, mut b_items) = (
        a.items.into_iter().peekable(),
        b.items.into_iter().peekable(),
    );
    while items.len() < LIST_CAP {
        let next = match (a_items.peek(), b_items.peek()) {
            (Some(x), Some(y)) if y.0 < x.0 => b_items.next(),
            (Some(_), _) => a_items.next(),
            (None, _) => b_items.next(),
        };
        match next {
            Some(r) => items.push(r),
            None => break,
        }
    }
    Capped {
        items,
        total: a.total + b.total,
    }
}

/// What grouping one partition gives: its locations in order of place (the line of each
/// one's first accepted row), and its rejected rows, the first [`LIST_CAP`] by line.
struct Grouped {
    run: File,
    rejected: Capped<(u64, RejectedRow)>,
}

/// One row of a first run, read back.
struct RunRow {
    line: u64,
    k: u32,
    flags: u8,
    id: (usize, usize),
    fields: (usize, usize),
}

/// Second pass over one partition: its rows grouped by id (in file order within each), each
/// location's duplicates and rows without strains rejected, and the rest written to a new
/// run file by place: for each location its place, byte length and rows (stage, line and
/// fields, in stage order).
fn group_partition(
    mut file: File,
    header: &Header,
    ctx: &Context,
    stages: &[String],
) -> Result<Grouped> {
    let mut bytes = Vec::new();
    file.read_to_end(&mut bytes).map_err(run_error)?;
    drop(file);
    let mut rows: Vec<RunRow> = Vec::new();
    let mut at = 0;
    while at + 21 <= bytes.len() {
        let b = &bytes[at..at + 21];
        let (id_len, len) = (word(&b[13..]) as usize, word(&b[17..]) as usize);
        let id = at + 21;
        rows.push(RunRow {
            line: long(b),
            k: word(&b[8..]),
            flags: b[12],
            id: (id, id + id_len),
            fields: (id + id_len, id + id_len + len),
        });
        at = id + id_len + len;
    }
    let id_of = |r: &RunRow| &bytes[r.id.0..r.id.1];
    // Stable: each id's rows stay in file order.
    rows.sort_by(|a, b| id_of(a).cmp(id_of(b)));
    let mut rejected: Vec<(u64, RejectedRow)> = Vec::new();
    let mut total = 0;
    let mut reject = |list: &mut Vec<(u64, RejectedRow)>, line: u64, r: RejectedRow| {
        total += 1;
        list.push((line, r));
        if list.len() >= 2 * LIST_CAP {
            list.sort_by_key(|(l, _)| *l);
            list.truncate(LIST_CAP);
        }
    };
    // (place, first and end of its rows in `accepted`).
    let mut places: Vec<(u64, usize, usize)> = Vec::new();
    let mut accepted: Vec<usize> = Vec::new();
    let mut seen: Vec<(u32, u8)> = Vec::new();
    let mut record = csv::StringRecord::new();
    let mut i = 0;
    while i < rows.len() {
        let start = accepted.len();
        seen.clear();
        let mut j = i;
        while j < rows.len() && id_of(&rows[j]) == id_of(&rows[i]) {
            let r = &rows[j];
            let key = (r.k, r.flags & NO_STAGE);
            if seen.contains(&key) {
                let id = std::str::from_utf8(id_of(r)).unwrap_or_default();
                let stage = (r.flags & NO_STAGE == 0).then(|| stages[r.k as usize].as_str());
                reject(
                    &mut rejected,
                    r.line,
                    duplicate_key(header, id, stage, r.line),
                );
            } else if r.flags & UNJUDGED != 0 {
                seen.push(key);
                // Read again for the reason its strains cannot be found.
                decode(&bytes[r.fields.0..], &mut record);
                let why = header
                    .row(&record, r.line)
                    .ok()
                    .and_then(|(m, _)| state_of(m, &header.file, &ctx.lengths).err());
                if let Some(why) = why {
                    reject(&mut rejected, r.line, why);
                }
            } else {
                seen.push(key);
                accepted.push(j);
            }
            j += 1;
        }
        if accepted.len() > start {
            places.push((rows[accepted[start]].line, start, accepted.len()));
        }
        i = j;
    }
    places.sort_unstable_by_key(|p| p.0);
    let mut w = BufWriter::with_capacity(RUN_BUFFER, temp()?);
    let mut loc = Vec::new();
    for &(place, a, b) in &places {
        let list = &mut accepted[a..b];
        list.sort_by_key(|&j| rows[j].k);
        loc.clear();
        loc.extend_from_slice(&place.to_le_bytes());
        loc.extend_from_slice(&[0; 4]);
        for &j in list.iter() {
            let r = &rows[j];
            loc.extend_from_slice(&r.k.to_le_bytes());
            loc.extend_from_slice(&r.line.to_le_bytes());
            loc.extend_from_slice(&bytes[r.fields.0..r.fields.1]);
        }
        let len = (loc.len() - 12) as u32;
        loc[8..12].copy_from_slice(&len.to_le_bytes());
        w.write_all(&loc).map_err(run_error)?;
    }
    let mut run = w.into_inner().map_err(|e| run_error(e.into_error()))?;
    run.rewind().map_err(run_error)?;
    rejected.sort_by_key(|(l, _)| *l);
    rejected.truncate(LIST_CAP);
    Ok(Grouped {
        run,
        rejected: Capped {
            items: rejected,
            total,
        },
    })
}
/// The partitions' second runs merged by place: a k-way merge, one location of each run held.
struct Merge {
    runs: Vec<BufReader<File>>,
    /// (place, run) of each run's next location, the least first.
    heads: BinaryHeap<Reverse<(u64, usize)>>,
    /// Each run's next location: its rows.
    next: Vec<Vec<u8>>,
}

/// A batch of locations in file order: their rows one after another, and each one's span.
#[derive(Default)]
struct Batch {
    bytes: Vec<u8>,
    spans: Vec<(usize, usize)>,
}

impl Batch {
    fn is_empty(&self) -> bool {
        self.spans.is_empty()
    }
}

impl Merge {
    fn new(files: Vec<File>) -> Result<Merge> {
        let mut m = Merge {
            runs: files
                .into_iter()
                .map(|f| BufReader::with_capacity(RUN_BUFFER, f))
                .collect(),
            heads: BinaryHeap::new(),
            next: Vec::new(),
        };
        m.next = vec![Vec::new(); m.runs.len()];
        for r in 0..m.runs.len() {
            m.advance(r)?;
        }
        Ok(m)
    }

    /// Read run `r`'s next location (if it has one) into `next[r]` and `heads`.
    fn advance(&mut self, r: usize) -> Result<()> {
        let mut head = [0u8; 12];
        let input = &mut self.runs[r];
        if input.fill_buf().map_err(run_error)?.is_empty() {
            return Ok(());
        }
        input.read_exact(&mut head).map_err(run_error)?;
        let next = &mut self.next[r];
        next.clear();
        next.resize(word(&head[8..]) as usize, 0);
        input.read_exact(next).map_err(run_error)?;
        self.heads.push(Reverse((long(&head), r)));
        Ok(())
    }

    /// The next `n` locations in file order (fewer at the end).
    fn batch(&mut self, n: usize) -> Result<Batch> {
        let mut b = Batch::default();
        while b.spans.len() < n {
            let Some(Reverse((_, r))) = self.heads.pop() else {
                break;
            };
            let start = b.bytes.len();
            b.bytes.extend_from_slice(&self.next[r]);
            b.spans.push((start, b.bytes.len()));
            self.advance(r)?;
        }
        Ok(b)
    }
}

/// Third pass over consecutive locations (`spans` of `bytes`): each judged, formatted and
/// folded into a partial summary, in order.
#[allow(clippy::too_many_arguments)]
fn judge_batch(
    bytes: &[u8],
    spans: &[(usize, usize)],
    header: &Header,
    ctx: &Context,
    staged: bool,
    layout: &Layout,
    write: bool,
    like: &Template,
) -> (Vec<u8>, Summary) {
    let mut text = Vec::with_capacity(if write { spans.len() * 200 } else { 0 });
    let mut part = like.part();
    let mut record = csv::StringRecord::new();
    let mut list: Vec<(usize, StateInput)> = Vec::new();
    for &(a, b) in spans {
        list.clear();
        let mut rest = &bytes[a..b];
        while rest.len() >= 12 {
            let (k, line) = (word(rest), long(&rest[4..]));
            rest = decode(&rest[12..], &mut record);
            // The row was accepted in the second pass: it reads the same again.
            if let Ok((m, _)) = header.row(&record, line) {
                if let Ok(s) = state_of(m, &header.file, &ctx.lengths) {
                    list.push((k as usize, s));
                }
            }
        }
        if let Some(p) =
            crate::point::staged::judge_location(std::mem::take(&mut list), ctx, staged)
        {
            if write {
                layout.push_row(&mut text, &p);
            }
            part.fold_ref(&p);
        }
    }
    (text, part)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::measure::{ColumnMap, MeasurementReader};
    use crate::units::Lengths;
    use std::path::Path;

    fn ctx() -> Context {
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let curve = crate::limit::LimitCurve::load(
            &root.join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml"),
        )
        .unwrap();
        Context {
            curve,
            settings: crate::assess::Settings::default(),
            lengths: Lengths {
                unit: Default::default(),
                d0: Some(2.5),
                t0: Some(0.8),
            },
            strain_input: false,
            true_input: false,
        }
    }

    /// A staged file with every kind of row: stages out of order, duplicates, rejected and not
    /// measured rows, a location seen only at one stage, ids whose first rows are rejected.
    fn staged_text(stages: usize) -> String {
        let mut s = String::from("id,stage,major,minor,x,y\n");
        for k in (0..stages).rev() {
            for i in 0..23 {
                if (i + k) % 7 == 3 && k > 0 {
                    continue;
                }
                let major = 2.6 + 0.05 * (k as f64) * (1.0 + (i % 5) as f64);
                let minor = 2.5 - 0.01 * (i % 4) as f64 + 0.02 * k as f64;
                s.push_str(&format!("L{i},op{k},{major:.3},{minor:.3},{i},{k}\n"));
                if i % 9 == 2 {
                    s.push_str(&format!("L{i},op{k},2.7,2.5,0,0\n")); // a repeat
                }
                if i % 11 == 4 {
                    s.push_str(&format!("L{i},op{k},x,2.5,0,0\n")); // rejected
                    s.push_str(&format!("L{i}b,op{k},9.9,2.5,0,0\n")); // implausible
                }
            }
        }
        s
    }

    /// The run files give what the in-memory judgement gives: the same rows of points.csv in
    /// the same order, the same counts, worst list, rejected rows and stages, whatever the
    /// number of partitions (five, the length not known; one; six).
    #[test]
    fn runs_agree_with_judging_in_memory() {
        let ctx = ctx();
        for (stages, size) in [(1, None), (3, None), (3, Some(0)), (3, Some(2_000))] {
            let text = staged_text(stages);
            let path = Path::new("staged.csv");
            let mut input = text.as_bytes();
            let header = Header::read(&mut input, path, &ColumnMap::default()).unwrap();
            let rows = MeasurementReader::after(input, header.clone());
            let mem = crate::point::staged::judge_staged(rows, &ctx, None).unwrap();
            let mut layout = Layout {
                path: mem.stages.len() >= 2,
                ..Layout::default()
            };
            let mut want = layout.header_line().into_bytes();
            let mut s = Summary::new(View::default());
            for p in &mem.points {
                layout.push_row(&mut want, p);
                s.fold_ref(p);
            }
            layout.path = false;
            let mut got = Vec::new();
            let run = judge_staged_runs(
                input,
                size,
                &header,
                &ctx,
                None,
                &mut layout,
                View::default(),
                Some(&mut got),
            )
            .unwrap();
            assert_eq!(layout.path, stages >= 2);
            assert_eq!(
                String::from_utf8(got).unwrap(),
                String::from_utf8(want).unwrap()
            );
            assert_eq!(run.stages, mem.stages);
            assert_eq!(run.summary.counts, s.counts);
            let ids = |v: &[crate::point::PointResult]| {
                v.iter().map(|p| p.input.id.clone()).collect::<Vec<_>>()
            };
            assert_eq!(ids(&run.summary.worst), ids(&s.worst));
            assert_eq!(ids(&run.summary.kept), ids(&s.kept));
            let rej = |v: &[RejectedRow]| v.iter().map(|r| r.to_string()).collect::<Vec<_>>();
            assert_eq!(rej(&run.summary.rejected.items), rej(&mem.rejected));
            assert_eq!(run.summary.rejected.total, mem.rejected.len());
            assert!(!mem.rejected.is_empty());
        }
    }

    #[test]
    fn a_stage_not_in_the_job_is_refused_at_its_row() {
        let ctx = ctx();
        let text = staged_text(3);
        let mut input = text.as_bytes();
        let header = Header::read(&mut input, Path::new("s.csv"), &ColumnMap::default()).unwrap();
        let order = ["op0".to_string(), "op1".to_string()];
        let rows = MeasurementReader::after(input, header.clone());
        let want = crate::point::staged::judge_staged(rows, &ctx, Some(&order))
            .err()
            .unwrap()
            .to_string();
        let got = judge_staged_runs(
            input,
            None,
            &header,
            &ctx,
            Some(&order),
            &mut Layout::default(),
            View::default(),
            None,
        )
        .err()
        .unwrap()
        .to_string();
        assert_eq!(got, want);
        assert!(got.contains("op2"), "{got}");
    }

    /// Rows kept from a reader read once are those read: one stage found in them as in the
    /// text itself, two stages (or a row with none beside one with a stage) not.
    #[test]
    fn kept_rows_tell_one_stage_from_several() {
        fn header_of(text: &str) -> (Header, &[u8]) {
            let mut input = text.as_bytes();
            let h = Header::read(&mut input, Path::new("-"), &ColumnMap::default()).unwrap();
            (h, input)
        }
        for (text, one) in [
            (
                "id,stage,major,minor\nA,op10,2.6,2.5\n\nB, op10 ,2.7,2.5\n",
                true,
            ),
            (
                "id,stage,major,minor\nA,op10,2.6,2.5\nB,op20,2.7,2.5\n",
                false,
            ),
            ("id,stage,major,minor\nA,op10,2.6,2.5\nB,,2.7,2.5\n", false),
        ] {
            let (header, body) = header_of(text);
            let (mut kept, len) = spool(body, Path::new("-")).unwrap();
            assert_eq!(len, body.len() as u64);
            let mut again = Vec::new();
            kept.read_to_end(&mut again).unwrap();
            assert_eq!(again, body, "the rows kept as they were read");
            kept.rewind().unwrap();
            assert_eq!(one_stage_body(&kept, &header), one, "{text}");
        }
    }
}
