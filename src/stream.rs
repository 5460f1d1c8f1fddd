//! The streaming pass: a measurement file read in chunks, judged on every core, written to
//! points.csv in file order and folded into one [`Summary`], in memory that does not grow with
//! the file (but for one 8-byte hash per location, to find duplicate ids).
//!
//! The main thread cuts the file into chunks at record boundaries (a small CSV state machine,
//! so a quoted field with a line break is never cut) and keeps the order; rayon parses the
//! chunks, then (after the main thread has marked duplicate ids, which needs the order) judges
//! and formats them, each chunk into its own text and partial summary; the main thread writes
//! the texts and merges the summaries in order.

use crate::analysis::{state_of, Context};
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, duplicate, Header, Measurement, RejectedRow};
use crate::output::points_csv::Layout;
use crate::summary::{Summary, View};
use rayon::prelude::*;
use std::collections::HashSet;
use std::hash::{BuildHasherDefault, Hash, Hasher};
use std::io::{self, Read, Write};

/// Target size of one chunk: large enough that a chunk's overhead is nothing, small enough
/// that a batch of them in flight stays a few MB.
pub const CHUNK_BYTES: usize = 1 << 20;

/// The longest record read (64 MiB): a longer one is an error, not a reason to hold the file.
pub const MAX_RECORD_BYTES: usize = 64 << 20;

/// A piece of the file's body that ends at a record boundary.
#[derive(Debug, Clone, PartialEq)]
pub struct Chunk {
    /// The bytes.
    pub bytes: Vec<u8>,
    /// The file's line number of the first byte.
    pub first_line: u64,
}

/// Where a CSV scanner is within a record.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Scan {
    /// At the start of a field.
    FieldStart,
    /// In an unquoted field.
    Unquoted,
    /// Inside quotes.
    Quoted,
    /// Just after a quote inside quotes: `""` is an escaped quote, anything else closes.
    QuoteInQuoted,
}

/// Cuts a reader into [`Chunk`]s at record boundaries.
pub struct Chunker<R: Read> {
    input: R,
    buf: Vec<u8>,
    line: u64,
    delimiter: u8,
    eof: bool,
    /// Bytes read from the input so far.
    pub bytes_read: u64,
}

impl<R: Read> Chunker<R> {
    /// Chunks of `input`, whose first byte is on line `first_line`.
    pub fn new(input: R, first_line: u64, delimiter: u8) -> Self {
        Chunker {
            input,
            buf: Vec::new(),
            line: first_line,
            delimiter,
            eof: false,
            bytes_read: 0,
        }
    }

    fn fill(&mut self, want: usize) -> io::Result<()> {
        while !self.eof && self.buf.len() < want {
            let old = self.buf.len();
            self.buf.resize(want.max(old + 4096), 0);
            let n = loop {
                match self.input.read(&mut self.buf[old..]) {
                    Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
                    r => break r,
                }
            };
            let n = match n {
                Ok(n) => n,
                Err(e) => {
                    self.buf.truncate(old);
                    return Err(e);
                }
            };
            self.buf.truncate(old + n);
            self.bytes_read += n as u64;
            self.eof = n == 0;
        }
        Ok(())
    }

    /// The end of the last whole record in `bytes` (just after its line break), scanning from
    /// a record start.
    fn last_record_end(&self, bytes: &[u8]) -> Option<usize> {
        let mut state = Scan::FieldStart;
        let mut end = None;
        for (i, &b) in bytes.iter().enumerate() {
            state = match (state, b) {
                (Scan::Quoted, b'"') => Scan::QuoteInQuoted,
                (Scan::Quoted, _) => Scan::Quoted,
                (Scan::QuoteInQuoted, b'"') => Scan::Quoted,
                (_, b'\n') => {
                    end = Some(i + 1);
                    Scan::FieldStart
                }
                (_, d) if d == self.delimiter => Scan::FieldStart,
                (Scan::FieldStart, b'"') => Scan::Quoted,
                (Scan::FieldStart, b' ' | b'\t') => Scan::FieldStart,
                _ => Scan::Unquoted,
            };
        }
        end
    }

    /// The next chunk of about `target` bytes, or `None` at the end.
    pub fn next_chunk(&mut self, target: usize) -> io::Result<Option<Chunk>> {
        let mut want = target;
        loop {
            self.fill(want)?;
            if self.buf.is_empty() {
                return Ok(None);
            }
            let cut = if self.eof {
                Some(self.buf.len())
            } else {
                self.last_record_end(&self.buf)
            };
            match cut {
                Some(c) => {
                    let rest = self.buf.split_off(c);
                    let bytes = std::mem::replace(&mut self.buf, rest);
                    let first_line = self.line;
                    self.line += bytes.iter().filter(|&&b| b == b'\n').count() as u64;
                    return Ok(Some(Chunk { bytes, first_line }));
                }
                None if want >= MAX_RECORD_BYTES => {
                    return Err(io::Error::new(
                        io::ErrorKind::InvalidData,
                        format!(
                            "a record at line {} is longer than {} MiB (an unclosed quote?)",
                            self.line,
                            MAX_RECORD_BYTES >> 20
                        ),
                    ))
                }
                None => want *= 2,
            }
        }
    }
}

/// One parsed row: the measurement and whether its two strain measures disagree, or why it
/// was rejected.
type Parsed = std::result::Result<(Measurement, bool), RejectedRow>;

/// Parse the records of one chunk.
fn parse_chunk(chunk: &Chunk, header: &Header) -> Result<Vec<Parsed>> {
    let mut reader = crate::measure::csv_reader(header.dialect, &chunk.bytes[..]);
    let mut record = csv::StringRecord::new();
    let mut rows = Vec::with_capacity(chunk.bytes.len() / 32);
    let at = |line: u64| chunk.first_line + line - 1;
    loop {
        match reader.read_record(&mut record) {
            Ok(false) => return Ok(rows),
            Err(e) => {
                let err = csv_error(&Location::file(&header.file), e);
                return Err(err.shift_line(chunk.first_line - 1));
            }
            // A blank spreadsheet row carries nothing to drop.
            Ok(true) if record.iter().all(|f| f.trim().is_empty()) => continue,
            Ok(true) => {
                let line = at(record.position().map_or(1, |p| p.line()));
                rows.push(header.row(&record, line));
            }
        }
    }
}

/// A hasher that passes a `u64` key through: the keys are hashes already.
#[derive(Default)]
struct Passthrough(u64);

impl Hasher for Passthrough {
    fn finish(&self) -> u64 {
        self.0
    }
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.0 = (self.0 << 8) | u64::from(b);
        }
    }
    fn write_u64(&mut self, v: u64) {
        self.0 = v;
    }
}

/// The set of (id, stage) keys seen, as 64-bit SipHash values (8 bytes a location; two
/// different keys share a hash with probability about n²/2⁶⁵: 3·10⁻⁸ at a million rows).
#[derive(Default)]
pub struct SeenIds(HashSet<u64, BuildHasherDefault<Passthrough>>);

impl SeenIds {
    /// Record the key of `m`; `false` when it was seen before.
    pub fn insert(&mut self, m: &Measurement) -> bool {
        let mut h = std::hash::DefaultHasher::new();
        (&m.id, &m.stage).hash(&mut h);
        self.0.insert(h.finish())
    }
}

/// What one chunk gives: its points.csv text and its partial summary.
struct Judged {
    text: String,
    summary: Summary,
}

fn judge_chunk(rows: Vec<Parsed>, pass: &Pass<'_>) -> Judged {
    let mut text = String::with_capacity(if pass.write { rows.len() * 160 } else { 0 });
    let mut summary = Summary::new(pass.view);
    for row in rows {
        let (m, disagree) = match row {
            Ok(r) => r,
            Err(r) => {
                summary.rejected.push(r);
                continue;
            }
        };
        if disagree {
            summary.disagree.push(m.id.clone());
        }
        match state_of(m, &pass.header.file, &pass.ctx.lengths) {
            Err(r) => summary.rejected.push(r),
            Ok(s) => {
                let p = pass.ctx.judge(s);
                if pass.write {
                    pass.layout.push_row(&mut text, &p);
                }
                summary.fold(p);
            }
        }
    }
    Judged { text, summary }
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
}

impl Pass<'_> {
    /// Read, judge and summarise every row of `body` (the input after the header), writing
    /// the points table's rows to `sink` in file order. `progress` is told the bytes read.
    pub fn run(
        &self,
        body: impl Read,
        mut sink: Option<&mut dyn Write>,
        progress: &mut dyn FnMut(u64),
    ) -> Result<Summary> {
        let h = self.header;
        let mut chunks = Chunker::new(body, h.lines + 1, h.dialect.delimiter());
        let mut seen = SeenIds::default();
        let mut summary = Summary::new(self.view);
        let batch = 2 * rayon::current_num_threads().max(1);
        loop {
            let mut todo = Vec::with_capacity(batch);
            while todo.len() < batch {
                match chunks.next_chunk(CHUNK_BYTES) {
                    Ok(Some(c)) => todo.push(c),
                    Ok(None) => break,
                    Err(e) if e.kind() == io::ErrorKind::InvalidData => {
                        return Err(Error::input(Location::file(&h.file), e.to_string()))
                    }
                    Err(e) => return Err(Error::io(&h.file, e)),
                }
            }
            if todo.is_empty() {
                return Ok(summary);
            }
            let parsed: Vec<Result<Vec<Parsed>>> =
                todo.par_iter().map(|c| parse_chunk(c, h)).collect();
            let mut parsed = parsed.into_iter().collect::<Result<Vec<_>>>()?;
            for rows in &mut parsed {
                for row in rows.iter_mut() {
                    if let Ok((m, _)) = row {
                        if !seen.insert(m) {
                            *row = Err(duplicate(h, m));
                        }
                    }
                }
            }
            let judged: Vec<Judged> = parsed
                .into_par_iter()
                .map(|rows| judge_chunk(rows, self))
                .collect();
            for j in judged {
                if let Some(w) = sink.as_mut() {
                    w.write_all(j.text.as_bytes())
                        .map_err(|e| Error::io(std::path::Path::new("points.csv"), e))?;
                }
                summary.merge(j.summary);
            }
            progress(chunks.bytes_read);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A reader that gives at most 3 bytes a call, so that chunks end anywhere.
    struct Trickle<'a>(&'a [u8]);

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
