//! The streaming pass: a measurement file read in chunks, judged on every core, written to
//! points.csv in file order and folded into one [`Summary`], in memory that does not grow with
//! the file (but for one 8-byte hash per location, to find duplicate ids).
//!
//! The calling thread cuts the file into chunks at record boundaries (a small CSV state
//! machine, so a quoted field with a line break is never cut) and hands each to rayon as soon
//! as it is cut, a few per core in flight; each chunk is parsed, judged and formatted into its
//! own text and partial summary. The calling thread takes them back in file order, checks
//! their keys for repeats (which needs the order; a chunk with a repeat is judged again with
//! those rows rejected), merges the summaries and hands the texts to a writer thread.

pub mod elements;
pub mod staged_runs;

pub(crate) use crate::chunk::read_batch;
pub use crate::chunk::{Chunk, Chunker, CHUNK_BYTES, MAX_RECORD_BYTES};
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, duplicate, Header, Measurement};
use crate::output::points_csv::Layout;
use crate::point::{strain_of, Context};
use crate::summary::{Summary, Template, View};
use std::hash::{Hash, Hasher};
use std::io::{self, Read, Write};
use std::panic::AssertUnwindSafe;
use std::sync::Arc;

/// The hash of a location's (id, stage) key.
fn key_hash(m: &Measurement) -> u64 {
    let mut h = std::hash::DefaultHasher::new();
    (&m.id, &m.stage).hash(&mut h);
    h.finish()
}

/// The set of (id, stage) keys seen, as 64-bit SipHash values in an open-addressing table
/// filled to at most 7/8, sized from the file's length: about 9 bytes a location (two
/// different keys share a hash with probability about n²/2⁶⁵: 3·10⁻⁸ at a million rows). The
/// only memory of the pass that grows with the file.
#[derive(Default)]
pub struct SeenIds {
    slots: Vec<u64>,
    len: usize,
}

impl SeenIds {
    /// Record a key's hash; `false` when it was seen before.
    pub fn insert(&mut self, hash: u64) -> bool {
        // 0 marks an empty slot: the one hash that is 0 is stored as 1.
        let h = hash.max(1);
        if (self.len + 1) * 8 > self.slots.len() * 7 {
            self.grow((self.len + 1) * 2);
        }
        let n = self.slots.len();
        // Multiply-shift maps the hash onto 0..n without a power-of-two size (Lemire 2019).
        let mut i = ((u128::from(h) * n as u128) >> 64) as usize;
        loop {
            match self.slots[i] {
                0 => {
                    self.slots[i] = h;
                    self.len += 1;
                    return true;
                }
                s if s == h => return false,
                _ => i = if i + 1 == n { 0 } else { i + 1 },
            }
        }
    }

    /// Make room for `n` more keys.
    pub fn reserve(&mut self, n: usize) {
        let want = self.len + n;
        if want * 8 > self.slots.len() * 7 {
            self.grow(want);
        }
    }

    fn grow(&mut self, keys: usize) {
        let size = (keys * 8 / 7 + 16).max(self.slots.len());
        let old = std::mem::replace(&mut self.slots, vec![0; size]);
        self.len = 0;
        for h in old.into_iter().filter(|&h| h != 0) {
            self.insert(h);
        }
    }
}

/// What one chunk gives: its points.csv text, its partial summary, and the key hash and line
/// of each row it judged (for the check of duplicates, which needs the file's order).
struct Judged {
    text: Vec<u8>,
    summary: Summary,
    keys: Vec<(u64, u64)>,
}

/// Parse, judge and format the rows of one chunk into `text` (emptied first: a buffer the writer
/// is done with, so that its pages are not faulted in again), the rows at `duplicates` (lines)
/// rejected as repeats of an earlier key.
fn judge_chunk(
    chunk: &Chunk,
    pass: &Pass<'_>,
    like: &Template,
    duplicates: &[u64],
    mut text: Vec<u8>,
) -> Result<Judged> {
    let header = pass.header;
    let mut reader = crate::measure::csv_reader(header.dialect, &chunk.bytes[..]);
    let mut record = csv::StringRecord::new();
    // Rows of points.csv are about 190 bytes, input rows 30 or more: room enough not to copy.
    let room = if pass.write { chunk.bytes.len() * 8 } else { 0 };
    text.clear();
    text.reserve(room);
    let mut out = Judged {
        text,
        summary: like.part(),
        keys: Vec::with_capacity(chunk.bytes.len() / 24),
    };
    let summary = &mut out.summary;
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => return Ok(out),
            Err(e) => {
                let err = csv_error(&Location::file(&header.file), e);
                return Err(err.shift_line(chunk.first_line - 1));
            }
            // A blank spreadsheet row carries nothing to drop.
            Ok(true)
                if record
                    .iter()
                    .all(|f| crate::measure::trim_cell(f).is_empty()) =>
            {
                continue
            }
            Ok(true) => {}
        }
        let line = chunk.first_line + record.position().map_or(1, |p| p.line()) - 1;
        if header.not_measured(&record) {
            summary.not_measured.push(line);
            continue;
        }
        let (m, disagree) = match header.row(&record, line) {
            Ok(r) => r,
            Err(r) => {
                summary.rejected.push(r);
                continue;
            }
        };
        if duplicates.contains(&line) {
            summary.rejected.push(duplicate(header, &m));
            continue;
        }
        out.keys.push((key_hash(&m), line));
        if disagree {
            summary.disagree.push(m.id.clone());
        }
        match strain_of(&m, &header.file, &pass.ctx.lengths) {
            Err(r) => summary.rejected.push(r),
            Ok((d0, strain)) => {
                let p = pass.ctx.judge_parts(m, d0, strain);
                if pass.write {
                    pass.layout.push_row(&mut out.text, &p);
                }
                summary.fold_ref(&p);
            }
        }
    }
}

/// One streaming pass over a measurement file's body.
pub struct Pass<'a> {
    /// The file's header.
    pub header: &'a Header,
    /// What every location is judged with.
    pub ctx: &'a Context,
    /// The points.csv columns.
    pub layout: &'a Layout,
    /// How the pictures bin the locations.
    pub view: View,
    /// Whether rows are formatted for a points table.
    pub write: bool,
    /// The file's size, when known (to size the set of ids once).
    pub size_hint: Option<u64>,
}

/// What comes back from a chunk judged on the pool: its place in the file, the chunk (judged
/// again should it hold a repeated key) and the outcome, or the panic of the job.
type Done = (u64, Chunk, std::thread::Result<Result<Judged>>);

impl Pass<'_> {
    /// Read, judge and summarise every row of `body` (the input after the header), writing
    /// the points table's rows to `sink` in file order. `progress` is told the bytes read.
    ///
    /// A pipeline without a barrier: this thread reads chunks and hands each to the pool as
    /// soon as it is cut (up to four chunks a core in flight), takes the judged chunks back in
    /// file order (checking their keys for repeats, which needs the order), merges their
    /// summaries and passes their text to a writer thread of its own. Each chunk is judged
    /// against the summary's template as it was when the chunk was handed out: any earlier
    /// template gives the same merged summary (see [`Template`]).
    pub fn run(
        &self,
        body: impl Read + Send,
        sink: Option<&mut (dyn Write + Send)>,
        progress: &mut dyn FnMut(u64),
    ) -> Result<Summary> {
        let h = self.header;
        let mut chunks = Chunker::new(body, h.lines + 1, h.dialect.delimiter());
        let mut summary = Summary::new(self.view);
        summary.supported = self.ctx.curve.supported_true();
        let window = 4 * rayon::current_num_threads().max(1) as u64;
        let out_err = |e| Error::io(std::path::Path::new("points.csv"), e);
        std::thread::scope(|scope| {
            let (tx, rx) = std::sync::mpsc::sync_channel::<Vec<u8>>(2);
            // Written texts come back to be filled again.
            let (spent_tx, spent) = std::sync::mpsc::channel::<Vec<u8>>();
            let writer = sink.map(|w| {
                scope.spawn(move || -> io::Result<()> {
                    for text in rx {
                        w.write_all(&text)?;
                        let _ = spent_tx.send(text);
                    }
                    Ok(())
                })
            });
            let mut order = InOrder {
                pass: self,
                seen: SeenIds::default(),
                tx: writer.is_some().then_some(&tx),
                merged: 0,
            };
            let (done_tx, done_rx) = std::sync::mpsc::channel::<Done>();
            let piped = rayon::in_place_scope_fifo(|s| -> Result<()> {
                let mut like = Arc::new(summary.template());
                let (mut sent, mut read_error, mut at_end) = (0u64, None, false);
                let mut ready = std::collections::BTreeMap::new();
                loop {
                    // Once the end is met the input is not read again (a terminal would wait).
                    while !at_end && read_error.is_none() && sent - order.merged < window {
                        match read_batch(&mut chunks, 1, &h.file).map(|mut v| v.pop()) {
                            Ok(Some(chunk)) => {
                                let (done, like) = (done_tx.clone(), Arc::clone(&like));
                                let text = spent.try_recv().unwrap_or_default();
                                s.spawn_fifo(move |_| {
                                    let judged = std::panic::catch_unwind(AssertUnwindSafe(|| {
                                        judge_chunk(&chunk, self, &like, &[], text)
                                    }));
                                    // The receiver outlives the scope: a send can not fail.
                                    let _ = done.send((sent, chunk, judged));
                                });
                                sent += 1;
                            }
                            Ok(None) => at_end = true,
                            // Reported once the chunks before it are taken in, as their
                            // faults come first in the file.
                            Err(e) => read_error = Some(e),
                        }
                    }
                    if order.merged == sent {
                        return read_error.map_or(Ok(()), Err);
                    }
                    let (i, chunk, judged) = crate::pool::wait(&done_rx, "its judged chunk");
                    let judged = judged.unwrap_or_else(|panic| std::panic::resume_unwind(panic));
                    ready.insert(i, (chunk, judged));
                    while let Some((chunk, judged)) = ready.remove(&order.merged) {
                        order.take(&chunk, judged?, &mut summary, &like)?;
                        like = Arc::new(summary.template());
                        progress(chunks.bytes_read);
                    }
                }
            });
            drop(tx);
            let written = writer.map(|w| {
                w.join()
                    .unwrap_or_else(|_| Err(io::Error::other("the writer thread failed")))
            });
            piped?;
            if let Some(w) = written {
                w.map_err(out_err)?;
            }
            Ok(summary)
        })
    }
}

/// The judged chunks taken in file order.
struct InOrder<'p, 'a> {
    pass: &'p Pass<'a>,
    seen: SeenIds,
    tx: Option<&'p std::sync::mpsc::SyncSender<Vec<u8>>>,
    merged: u64,
}

impl InOrder<'_, '_> {
    /// Check a chunk's keys against those before it (a chunk with a repeat, which is rare, is
    /// judged again with those rows rejected), pass its text on and merge its summary.
    fn take(
        &mut self,
        chunk: &Chunk,
        mut judged: Judged,
        summary: &mut Summary,
        like: &Template,
    ) -> Result<()> {
        if self.merged == 0 {
            // Room for the whole file at the first chunk's bytes per row, so the set of ids is
            // not rehashed again and again.
            let rows = judged.keys.len() as f64;
            let size = self.pass.size_hint.unwrap_or(0) as f64;
            let scale = (size / chunk.bytes.len().max(1) as f64).max(1.0);
            self.seen.reserve((rows * scale) as usize);
        }
        let repeats: Vec<u64> = judged
            .keys
            .iter()
            .filter(|(hash, _)| !self.seen.insert(*hash))
            .map(|(_, line)| *line)
            .collect();
        if !repeats.is_empty() {
            judged = judge_chunk(chunk, self.pass, like, &repeats, judged.text)?;
        }
        // A failed writer ends the channel; its error is reported when it is joined.
        if let Some(tx) = self.tx {
            if tx.send(judged.text).is_err() {
                self.tx = None;
            }
        }
        summary.merge(judged.summary);
        self.merged += 1;
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A reader that gives at most 3 bytes a call, so that chunks end anywhere.
    pub(super) struct Trickle<'a>(pub(super) &'a [u8]);

    impl Read for Trickle<'_> {
        fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
            let n = buf.len().min(3).min(self.0.len());
            buf[..n].copy_from_slice(&self.0[..n]);
            self.0 = &self.0[n..];
            Ok(n)
        }
    }

    fn chunks(text: &str, target: usize) -> Vec<Chunk> {
        let mut c = Chunker::new(Trickle(text.as_bytes()), 2, b',');
        let mut v = Vec::new();
        while let Some(ch) = c.next_chunk(target).unwrap() {
            v.push(ch);
        }
        v
    }

    #[test]
    fn chunks_end_at_records_and_keep_every_byte() {
        let text = "A,1,2\nB,\"two\nlines\",3\nC,4,5\nD,6,7\n";
        for target in 1..text.len() + 2 {
            let c = chunks(text, target);
            let joined: Vec<u8> = c.iter().flat_map(|c| c.bytes.clone()).collect();
            assert_eq!(joined, text.as_bytes());
            assert!(c.len() > 1 || target > text.len() / 2, "{target}");
            for ch in &c {
                // No chunk starts inside the quoted line break.
                assert!(!ch.bytes.starts_with(b"lines"), "{target}");
            }
            // Line numbers follow the line breaks before each chunk.
            let mut line = 2;
            for ch in &c {
                assert_eq!(ch.first_line, line);
                line += ch.bytes.iter().filter(|&&b| b == b'\n').count() as u64;
            }
        }
    }

    /// The demo tryouts streamed in small chunks and judged in memory give the same zones,
    /// margins, worst list and rows.
    #[test]
    fn streaming_agrees_with_judging_in_memory() {
        use crate::analysis::Analysis;
        use crate::measure::{read_measurements_from, ColumnMap};
        use crate::point::{state_of, Context};
        use crate::units::Lengths;
        use std::path::Path;
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        let curve = crate::limit::LimitCurve::load(
            &root.join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml"),
        )
        .unwrap();
        let lengths = Lengths {
            unit: Default::default(),
            d0: Some(2.5),
            t0: Some(0.8),
        };
        let ctx = Context {
            curve,
            settings: crate::assess::Settings::default(),
            lengths,
            strain_input: false,
            true_input: false,
        };
        for t in ["tryout-1.csv", "tryout-2.csv"] {
            let path = root.join("../../demo-parts/rear-floor-pan").join(t);
            let text = std::fs::read_to_string(&path).unwrap();
            let set =
                read_measurements_from(text.as_bytes(), &path, &ColumnMap::default()).unwrap();
            let states = set
                .points
                .into_iter()
                .map(|m| state_of(m, &path, &lengths).unwrap());
            let (a, all) = Analysis::of_states(
                path.clone(),
                Default::default(),
                ctx.clone(),
                View::default(),
                states,
                set.rejected,
                &[],
            );
            let layout = Layout::default();
            let table = crate::output::points_csv::table(&layout, &all);

            let mut input = text.as_bytes();
            let header = Header::read(&mut input, &path, &ColumnMap::default()).unwrap();
            let pass = Pass {
                header: &header,
                ctx: &ctx,
                layout: &layout,
                view: View::default(),
                write: true,
                size_hint: None,
            };
            let mut out = layout.header_line().into_bytes();
            // Trickled input: many small chunks, so that merging is exercised.
            let streamed = pass
                .run(Trickle(input), Some(&mut out), &mut |_| {})
                .unwrap();
            assert_eq!(String::from_utf8(out).unwrap(), table, "{t}");
            assert_eq!(streamed.counts, a.summary.counts, "{t}");
            let ids = |s: &Summary| {
                s.worst
                    .iter()
                    .map(|p| p.input.id.clone())
                    .collect::<Vec<_>>()
            };
            assert_eq!(ids(&streamed), ids(&a.summary), "{t}");
            assert_eq!(streamed.margins, a.summary.margins);
            assert_eq!(streamed.kept, a.summary.kept);
        }
    }

    #[test]
    fn seen_ids_find_every_repeat_and_nothing_else() {
        let mut s = SeenIds::default();
        let keys: Vec<u64> = (0..10_000u64)
            .map(|k| k.wrapping_mul(0x9E37_79B9_7F4A_7C15))
            .collect();
        for k in &keys {
            assert!(s.insert(*k));
        }
        for k in &keys {
            assert!(!s.insert(*k));
        }
        let mut z = SeenIds::default();
        assert!(
            z.insert(0) && !z.insert(0) && !z.insert(1),
            "0 is kept as 1"
        );
        let mut r = SeenIds::default();
        r.reserve(100);
        let size = r.slots.len();
        for k in 0..100u64 {
            r.insert(k * 7919 + 3);
        }
        assert_eq!(r.slots.len(), size, "sized once from the reserve");
    }

    #[test]
    fn escaped_quotes_do_not_confuse_the_cut() {
        let c = Chunker::new(&b""[..], 1, b',');
        let text = b"A,\"say \"\"hi\"\"\nthere\",1\nB,2";
        assert_eq!(c.last_record_end(text), Some(23));
        assert_eq!(&text[..23], b"A,\"say \"\"hi\"\"\nthere\",1\n");
        // A quote inside an unquoted field is a character, not the start of quotes.
        assert_eq!(c.last_record_end(b"A,5\" tape,1\nB"), Some(12));
    }
}
