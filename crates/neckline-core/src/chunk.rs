//! A file's body cut into chunks at record boundaries, with the file's own line number of
//! each chunk's first byte: what the streaming readers (measurements in [`crate::stream`],
//! node and element tables in [`crate::table`]) parse on every core.

use crate::error::{Error, Location, Result};
use crate::measure::MAX_ROW_BYTES;
use std::io::{self, Read};

/// Target size of one chunk: large enough that a chunk's overhead is nothing, small enough
/// that a batch of them in flight stays a few MB (1 KiB in the unit tests, so that a small
/// file is cut into many chunks and their merging is tested).
pub const CHUNK_BYTES: usize = if cfg!(test) { 1 << 10 } else { 1 << 18 };

/// The longest record the chunker holds while it looks for the record's end: 64 MiB, 1024 times
/// [`MAX_ROW_BYTES`]. A record that has not ended by then ends the pass with an error for the
/// whole file (holding more would let memory grow with the file). It is not a rule for rows:
/// any record over [`MAX_ROW_BYTES`] (64 KiB) is rejected as a row anyway, alone and with its
/// line. This cap is far larger so that a row that is too long but does end (a pasted document,
/// a quote closed some lines later) is still cut out whole and rejected alone while the rows
/// after it are judged; only a record too long to hold refuses the file.
pub const MAX_RECORD_BYTES: usize = 1024 * MAX_ROW_BYTES;

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
            let need = (want - self.buf.len()) as u64;
            let n = (&mut self.input).take(need).read_to_end(&mut self.buf)?;
            self.bytes_read += n as u64;
            self.eof = n == 0;
        }
        Ok(())
    }

    /// The end of the last whole record in `bytes` (just after its line break), scanning from
    /// a record start. Without a quote in `bytes` that is simply after the last line break.
    pub(crate) fn last_record_end(&self, bytes: &[u8]) -> Option<usize> {
        if memchr::memchr(b'"', bytes).is_none() {
            return memchr::memrchr(b'\n', bytes).map(|i| i + 1);
        }
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
                    // The next buffer is made as large as a chunk at once, so that filling it
                    // does not copy it again and again as it grows.
                    let mut rest = Vec::with_capacity(want.max(self.buf.len() - c) + (1 << 16));
                    rest.extend_from_slice(&self.buf[c..]);
                    self.buf.truncate(c);
                    let bytes = std::mem::replace(&mut self.buf, rest);
                    let first_line = self.line;
                    self.line += memchr::memchr_iter(b'\n', &bytes).count() as u64;
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

/// A batch of chunks read, or the error that stopped reading.
pub fn read_batch<R: Read>(
    chunks: &mut Chunker<R>,
    n: usize,
    file: &std::path::Path,
) -> Result<Vec<Chunk>> {
    let mut todo = Vec::with_capacity(n);
    while todo.len() < n {
        match chunks.next_chunk(CHUNK_BYTES) {
            Ok(Some(c)) => todo.push(c),
            Ok(None) => break,
            Err(e) if e.kind() == io::ErrorKind::InvalidData => {
                return Err(Error::input(Location::file(file), e.to_string()))
            }
            Err(e) => return Err(Error::io(file, e)),
        }
    }
    Ok(todo)
}
