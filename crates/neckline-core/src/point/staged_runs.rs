//! A file with a `stage` column judged in memory that does not grow with the file but for a
//! few bytes a row: the same judgement as [`super::staged::judge_staged`], row for row.
//!
//! Two passes. The first reads the file in chunks (parsed and checked on every core, then taken
//! in file order on one thread): it rejects rows as the in-memory reader does, finds the stages
//! in order, numbers each location by its first accepted row, and appends every accepted row
//! (its fields, line, stage and location number) to a temporary run file holding
//! [`BLOCK`] locations (`number / BLOCK`). Memory: a hash of each (id, stage) key to find
//! duplicates (about 9 bytes a row) and a hash of each id with its number (about 14 bytes a
//! location). Two different keys share a 64-bit hash with probability about n²/2⁶⁵
//! (3·10⁻⁸ at a million), as in [`crate::stream`].
//!
//! The second pass takes the run files in order, a batch at a time on every core: each
//! file's rows are grouped by location, read again, judged (at the last stage by the strain
//! curve, along the path when the file has several stages), formatted and folded into a
//! partial summary; the texts are written and the summaries merged in order, so points.csv
//! and the summary come out as the in-memory judgement gives them, in the order the locations
//! first appear. The run files are anonymous temporary files, gone when the run ends however
//! it ends.
//!
//! A file whose rows are all of one stage ([`one_stage`]) needs none of this: `check` judges
//! it as a file without stages, in one streamed pass, with the same outputs.

use super::{state_of, Context, StateInput};
use crate::capped::Capped;
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, duplicate_key, Header, RejectedRow};
use crate::output::points_csv::Layout;
use crate::stream::{read_batch, Chunk, Chunker, SeenIds};
use crate::summary::{Summary, Template, View};
use rayon::prelude::*;
use std::hash::{Hash, Hasher};
use std::io::{self, BufRead, BufWriter, Read, Seek, Write};

/// Locations per run file: a file holds about `BLOCK × stages` rows (about 60 bytes each).
pub const BLOCK: u32 = if cfg!(test) { 4 } else { 32_768 };

/// What the first pass learns of one row, on a worker, before the rows are taken in order.
enum Pre {
    /// A row not measured (its line).
    NotMeasured(u64),
    /// A row rejected by itself.
    Rejected(RejectedRow),
    /// A row read.
    Row(Box<PreRow>),
}

/// A row read in the first pass.
struct PreRow {
    line: u64,
    /// Hash of (id, stage).
    key: u64,
    /// Hash of the id.
    id_hash: u64,
    id: String,
    stage: Option<String>,
    /// Why its strains cannot be found, if they cannot.
    state: Option<RejectedRow>,
    /// The row's fields, each as a 4-byte length and the bytes.
    fields: Vec<u8>,
}

fn hash_of(v: impl Hash) -> u64 {
    let mut h = std::hash::DefaultHasher::new();
    v.hash(&mut h);
    h.finish()
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
    let word = |b: &[u8]| u32::from_le_bytes([b[0], b[1], b[2], b[3]]) as usize;
    record.clear();
    let n = word(bytes);
    let mut rest = &bytes[4..];
    for _ in 0..n {
        let len = word(rest);
        // The bytes were a field of a record read as UTF-8.
        record.push_field(std::str::from_utf8(&rest[4..4 + len]).unwrap_or_default());
        rest = &rest[4 + len..];
    }
    rest
}

/// First pass over one chunk: every row parsed and checked alone; a file-level error ends the
/// chunk (the rows before it are still taken).
fn scan_chunk(chunk: &Chunk, header: &Header, ctx: &Context) -> (Vec<Pre>, Option<Error>) {
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
                out.push(Pre::Rejected(r));
                continue;
            }
        };
        let key = hash_of((&m.id, &m.stage));
        let id_hash = hash_of(&m.id);
        let (id, stage) = (m.id.clone(), m.stage.clone());
        let state = state_of(m, &header.file, &ctx.lengths).err();
        let mut fields = Vec::new();
        if state.is_none() {
            encode(&record, &mut fields);
        }
        out.push(Pre::Row(Box::new(PreRow {
            line,
            key,
            id_hash,
            id,
            stage,
            state,
            fields,
        })));
    }
}

/// Each id's location number, by the id's 64-bit hash: open addressing filled to at most 7/8
/// (about 14 bytes a location).
#[derive(Default)]
struct Numbers {
    keys: Vec<u64>,
    values: Vec<u32>,
    len: usize,
}

impl Numbers {
    /// The number of `hash`, given `next` when it is new (and whether it was).
    fn get_or_insert(&mut self, hash: u64, next: u32) -> (u32, bool) {
        let h = hash.max(1);
        if (self.len + 1) * 8 > self.keys.len() * 7 {
            self.grow();
        }
        let n = self.keys.len();
        let mut i = ((u128::from(h) * n as u128) >> 64) as usize;
        loop {
            match self.keys[i] {
                0 => {
                    self.keys[i] = h;
                    self.values[i] = next;
                    self.len += 1;
                    return (next, true);
                }
                k if k == h => return (self.values[i], false),
                _ => i = if i + 1 == n { 0 } else { i + 1 },
            }
        }
    }

    fn grow(&mut self) {
        let size = (self.keys.len() * 2).max(1024);
        let keys = std::mem::replace(&mut self.keys, vec![0; size]);
        let values = std::mem::replace(&mut self.values, vec![0; size]);
        self.len = 0;
        for (k, v) in keys.into_iter().zip(values).filter(|(k, _)| *k != 0) {
            self.get_or_insert(k, v);
        }
    }
}

/// The first pass's state, taken in file order.
struct FirstPass<'a> {
    header: &'a Header,
    order: Option<&'a [String]>,
    seen: SeenIds,
    numbers: Numbers,
    next: u32,
    stages: Vec<String>,
    rejected: Capped<RejectedRow>,
    not_measured: Capped<u64>,
    runs: Vec<BufWriter<std::fs::File>>,
}

impl FirstPass<'_> {
    fn take(&mut self, pre: Pre) -> Result<()> {
        let r = match pre {
            Pre::NotMeasured(line) => {
                self.not_measured.push(line);
                return Ok(());
            }
            Pre::Rejected(r) => {
                self.rejected.push(r);
                return Ok(());
            }
            Pre::Row(r) => r,
        };
        if !self.seen.insert(r.key) {
            let header = self.header;
            self.rejected
                .push_with(|| duplicate_key(header, &r.id, r.stage.as_deref(), r.line));
            return Ok(());
        }
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
        if let Some(rej) = r.state {
            self.rejected.push(rej);
            return Ok(());
        }
        let (number, new) = self.numbers.get_or_insert(r.id_hash, self.next);
        if new {
            self.next += 1;
        }
        let block = (number / BLOCK) as usize;
        while self.runs.len() <= block {
            let f = tempfile().map_err(|e| Error::io(&std::env::temp_dir(), e))?;
            self.runs.push(BufWriter::with_capacity(1 << 16, f));
        }
        let w = &mut self.runs[block];
        let mut head = [0u8; 20];
        head[..4].copy_from_slice(&number.to_le_bytes());
        head[4..8].copy_from_slice(&(k as u32).to_le_bytes());
        head[8..16].copy_from_slice(&r.line.to_le_bytes());
        head[16..].copy_from_slice(&(r.fields.len() as u32).to_le_bytes());
        w.write_all(&head)
            .and_then(|_| w.write_all(&r.fields))
            .map_err(|e| Error::io(&std::env::temp_dir(), e))
    }
}

/// An anonymous temporary file (removed by the system when closed).
fn tempfile() -> io::Result<std::fs::File> {
    tempfile::tempfile()
}

/// Whether the measurement file at `path` (its header read as `header`) has at most one stage:
/// every non-blank row's `stage` field, trimmed, the same. Such a file gives each location at
/// most one row (a repeated id at one stage is a duplicate), so the judgement of
/// [`judge_staged_runs`] is that of the streamed `check` row by row, in file order: no path,
/// no grouping. Decided by reading the file again in parallel chunks, only the `stage`
/// field of each row, stopping at the second stage found; `false` for standard input, a file
/// that cannot be read again or whose rows do not parse (the staged path then says why).
pub fn one_stage(path: &std::path::Path, header: &Header) -> bool {
    let Some(col) = header.columns.index("stage") else {
        return false;
    };
    if path.as_os_str() == "-" {
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

/// Judge the rows of `body` (a file with a `stage` column, after its header) as
/// [`super::staged::judge_staged`] does, in bounded memory, writing points.csv (its header line
/// first, in `layout`, whose `path` is set when the file has several stages) to `sink`.
pub fn judge_staged_runs(
    body: impl Read + Send,
    header: &Header,
    ctx: &Context,
    order: Option<&[String]>,
    layout: &mut Layout,
    view: View,
    sink: Option<&mut (dyn Write + Send)>,
) -> Result<StagedRun> {
    let mut first = FirstPass {
        header,
        order,
        seen: SeenIds::default(),
        numbers: Numbers::default(),
        next: 0,
        stages: order.map(<[String]>::to_vec).unwrap_or_default(),
        rejected: Capped::default(),
        not_measured: Capped::default(),
        runs: Vec::new(),
    };
    let mut chunks = Chunker::new(body, header.lines + 1, header.dialect.delimiter());
    let batch = 2 * rayon::current_num_threads().max(1);
    let mut todo = read_batch(&mut chunks, batch, &header.file)?;
    while !todo.is_empty() {
        let (next, scanned) = rayon::join(
            || read_batch(&mut chunks, batch, &header.file),
            || {
                todo.par_iter()
                    .map(|c| scan_chunk(c, header, ctx))
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
    let staged = first.stages.len() >= 2;
    layout.path = staged;
    let tmp_err = |e| Error::io(&std::env::temp_dir(), e);
    let mut runs = Vec::with_capacity(first.runs.len());
    for w in first.runs.drain(..) {
        let mut f = w.into_inner().map_err(|e| tmp_err(e.into_error()))?;
        f.rewind().map_err(tmp_err)?;
        runs.push(f);
    }
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
    let threads = rayon::current_num_threads().max(1);
    let mut runs = runs.into_iter().enumerate().peekable();
    while runs.peek().is_some() {
        let group: Vec<(usize, std::fs::File)> = runs.by_ref().take(threads).collect();
        let template = summary.template();
        let judged: Vec<Result<(Vec<u8>, Summary)>> = group
            .into_par_iter()
            .map(|(b, f)| judge_run(f, b as u32, header, ctx, staged, layout, write, &template))
            .collect();
        for j in judged {
            let (text, part) = j?;
            if let Some(w) = sink.as_mut() {
                w.write_all(&text).map_err(out_err)?;
            }
            summary.merge(part);
        }
    }
    summary.rejected = first.rejected;
    summary.not_measured = first.not_measured;
    Ok(StagedRun {
        summary,
        stages: first.stages,
    })
}

/// Second pass over one run file (block `block`): its locations judged in number order.
#[allow(clippy::too_many_arguments)]
fn judge_run(
    mut file: std::fs::File,
    block: u32,
    header: &Header,
    ctx: &Context,
    staged: bool,
    layout: &Layout,
    write: bool,
    like: &Template,
) -> Result<(Vec<u8>, Summary)> {
    let mut bytes = Vec::new();
    file.read_to_end(&mut bytes)
        .map_err(|e| Error::io(&std::env::temp_dir(), e))?;
    drop(file);
    // (location number, stage, line, start of the fields).
    let mut rows: Vec<(u32, u32, u64, usize)> = Vec::new();
    let mut at = 0;
    while at + 20 <= bytes.len() {
        let b = &bytes[at..at + 20];
        let number = u32::from_le_bytes([b[0], b[1], b[2], b[3]]);
        let k = u32::from_le_bytes([b[4], b[5], b[6], b[7]]);
        let line = u64::from_le_bytes([b[8], b[9], b[10], b[11], b[12], b[13], b[14], b[15]]);
        let len = u32::from_le_bytes([b[16], b[17], b[18], b[19]]) as usize;
        rows.push((number, k, line, at + 20));
        at += 20 + len;
    }
    rows.sort_unstable_by_key(|&(n, k, line, _)| (n, k, line));
    let mut text = Vec::with_capacity(if write { rows.len() * 200 } else { 0 });
    let mut part = like.part();
    let mut record = csv::StringRecord::new();
    let mut list: Vec<(usize, StateInput)> = Vec::new();
    let mut i = 0;
    debug_assert!(rows.first().is_none_or(|r| r.0 / BLOCK == block));
    while i < rows.len() {
        let number = rows[i].0;
        list.clear();
        while i < rows.len() && rows[i].0 == number {
            let (_, k, line, start) = rows[i];
            decode(&bytes[start..], &mut record);
            // The row was accepted in the first pass: it reads the same again.
            if let Ok((m, _)) = header.row(&record, line) {
                if let Ok(s) = state_of(m, &header.file, &ctx.lengths) {
                    list.push((k as usize, s));
                }
            }
            i += 1;
        }
        if let Some(p) = super::staged::judge_location(std::mem::take(&mut list), ctx, staged) {
            if write {
                layout.push_row(&mut text, &p);
            }
            part.fold_ref(&p);
        }
    }
    Ok((text, part))
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
    /// the same order, the same counts, worst list, rejected rows and stages.
    #[test]
    fn runs_agree_with_judging_in_memory() {
        let ctx = ctx();
        for stages in [1, 3] {
            let text = staged_text(stages);
            let path = Path::new("staged.csv");
            let mut input = text.as_bytes();
            let header = Header::read(&mut input, path, &ColumnMap::default()).unwrap();
            let rows = MeasurementReader::after(input, header.clone());
            let mem = super::super::staged::judge_staged(rows, &ctx, None).unwrap();
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
            let ids = |v: &[super::super::PointResult]| {
                v.iter().map(|p| p.input.id.clone()).collect::<Vec<_>>()
            };
            assert_eq!(ids(&run.summary.worst), ids(&s.worst));
            assert_eq!(ids(&run.summary.kept), ids(&s.kept));
            let rej = |v: &[RejectedRow]| v.iter().map(|r| r.to_string()).collect::<Vec<_>>();
            assert_eq!(rej(&run.summary.rejected.items), rej(&mem.rejected));
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
        let want = super::super::staged::judge_staged(rows, &ctx, Some(&order))
            .err()
            .unwrap()
            .to_string();
        let got = judge_staged_runs(
            input,
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

    #[test]
    fn numbers_are_kept_by_hash() {
        let mut n = Numbers::default();
        for k in 0..5000u64 {
            assert_eq!(n.get_or_insert(k * 0x9E37_79B9, k as u32), (k as u32, true));
        }
        for k in 0..5000u64 {
            assert_eq!(n.get_or_insert(k * 0x9E37_79B9, 0), (k as u32, false));
        }
    }
}
