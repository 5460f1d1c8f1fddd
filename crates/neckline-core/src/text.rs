//! Input bytes made into the text every reader takes: UTF-8 with LF line ends.
//!
//! One place for what a shop's files really are, below every CSV reader (measurements,
//! strains, nodes, elements, outlines, parts evidence, `compare`'s points tables):
//! - **workbooks** (`.xlsx`, `.xlsm`, `.xls`, `.xlsb`, `.ods`, by their name) are turned into a
//!   comma-separated text, sheet row r on line r (see [`crate::workbook`]);
//! - **encodings**: a byte-order mark says UTF-8, UTF-16 LE or UTF-16 BE; a file without one is
//!   UTF-8 when all of it is valid UTF-8 (for standard input: its first MiB), else it is read
//!   as Windows-1252 with a note on the terminal; `--encoding` forces one;
//! - **line ends**: CRLF (Windows), LF and a lone CR (classic Mac OS) each end a line; all
//!   are given to the readers as LF, so every line count is the file's own.
//!
//! Gzip, ZIP (under a text name) and binary input are passed on as they are, for
//! [`crate::error::check_text`] to refuse with its advice. The SHA-256 of an input is taken
//! of the file's own bytes, below the decoding ([`open`]).

use crate::error::{Error, Location, Result};
use sha2::{Digest, Sha256};
use std::fs::File;
use std::io::{self, BufRead, BufReader, Read};
use std::path::Path;
use std::sync::{Arc, Mutex, RwLock};

/// A text encoding that can be forced with `--encoding` (or `encoding` in the job file).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TextEncoding {
    /// UTF-8 (a byte-order mark is skipped).
    Utf8,
    /// UTF-16, little-endian (a spreadsheet's "Unicode text" on Windows).
    Utf16Le,
    /// UTF-16, big-endian.
    Utf16Be,
    /// Windows-1252, the Western-European Windows code page (a superset of printable
    /// ISO-8859-1 / Latin-1).
    Windows1252,
}

impl TextEncoding {
    /// The names accepted, for messages.
    pub const NAMES: &'static str = "utf-8, utf-16le, utf-16be, windows-1252";

    /// The encoding called `name` (case-insensitive; `latin1`, `cp1252` accepted for
    /// Windows-1252).
    pub fn parse(name: &str) -> std::result::Result<Self, String> {
        match name.trim().to_ascii_lowercase().replace('_', "-").as_str() {
            "utf-8" | "utf8" => Ok(TextEncoding::Utf8),
            "utf-16le" | "utf16le" => Ok(TextEncoding::Utf16Le),
            "utf-16be" | "utf16be" => Ok(TextEncoding::Utf16Be),
            "windows-1252" | "cp1252" | "latin1" | "latin-1" | "iso-8859-1" => {
                Ok(TextEncoding::Windows1252)
            }
            _ => Err(format!(
                "unknown encoding `{name}`: expected one of {}",
                Self::NAMES
            )),
        }
    }

    fn encoding(self) -> &'static encoding_rs::Encoding {
        match self {
            TextEncoding::Utf8 => encoding_rs::UTF_8,
            TextEncoding::Utf16Le => encoding_rs::UTF_16LE,
            TextEncoding::Utf16Be => encoding_rs::UTF_16BE,
            TextEncoding::Windows1252 => encoding_rs::WINDOWS_1252,
        }
    }
}

/// How inputs are read: set once by the command line (flags over the job file) before any
/// input is opened.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct InputOptions {
    /// The encoding of text inputs, when forced.
    pub encoding: Option<TextEncoding>,
    /// The sheet of a workbook: a name, or a 1-based number [default: the first].
    pub sheet: Option<String>,
}

static OPTIONS: RwLock<InputOptions> = RwLock::new(InputOptions {
    encoding: None,
    sheet: None,
});

/// Set how inputs are read from here on.
pub fn set_options(options: InputOptions) {
    *OPTIONS.write().unwrap_or_else(|e| e.into_inner()) = options;
}

/// How inputs are read now.
pub fn options() -> InputOptions {
    OPTIONS.read().unwrap_or_else(|e| e.into_inner()).clone()
}

/// The SHA-256 of an input's own bytes, filled as the input is read.
#[derive(Clone, Default)]
pub struct RawDigest(Arc<Mutex<Sha256>>);

impl RawDigest {
    /// The digest of the bytes read so far, lower-case hexadecimal.
    pub fn hex(&self) -> String {
        let h = self.0.lock().unwrap_or_else(|e| e.into_inner()).clone();
        crate::digest::hex(&h.finalize())
    }
}

/// Hashes what passes through it.
struct Tee<R> {
    inner: R,
    digest: RawDigest,
}

impl<R: Read> Read for Tee<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.digest
            .0
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .update(&buf[..n]);
        Ok(n)
    }
}

/// Longest start of standard input looked at to tell UTF-8 from Windows-1252: 1 MiB.
pub const SNIFF_BYTES: u64 = 1 << 20;

/// Open `path` (`-` for standard input) as UTF-8 text with LF line ends, with the digest of
/// its own bytes. A folder is refused with what to give instead.
pub fn open(path: &Path) -> Result<(Box<dyn BufRead + Send>, RawDigest)> {
    let digest = RawDigest::default();
    let opts = options();
    if path.as_os_str() == "-" {
        let raw = Tee {
            inner: io::stdin(),
            digest: digest.clone(),
        };
        return read_once(raw, path, &opts, digest);
    }
    if path.is_dir() {
        return Err(Error::input(
            Location::file(path),
            "is a folder: give a file (only `check` takes a folder, and judges each \
             measurement file in it)",
        ));
    }
    let f = File::open(path).map_err(|e| Error::io(path, e))?;
    let regular = f.metadata().is_ok_and(|m| m.is_file());
    let mut raw = Tee {
        inner: f,
        digest: digest.clone(),
    };
    if crate::workbook::is_workbook(path) {
        let mut bytes = Vec::new();
        raw.read_to_end(&mut bytes)
            .map_err(|e| Error::io(path, e))?;
        let text = crate::workbook::to_csv(path, bytes, opts.sheet.as_deref())?;
        return Ok((Box::new(io::Cursor::new(text)), digest));
    }
    if !regular {
        // A named pipe or a device is read once, as standard input is: opening it again to
        // look at its encoding would take rows away from this reader.
        return read_once(raw, path, &opts, digest);
    }
    let mut raw = BufReader::with_capacity(1 << 16, raw);
    let head = raw.fill_buf().map_err(|e| Error::io(path, e))?.to_vec();
    let valid = opts.encoding.is_some() || utf8_file(path).map_err(|e| Error::io(path, e))?;
    Ok((decoded(raw, &head, valid, path, &opts), digest))
}

/// An input that can be read only once (standard input, a named pipe): its encoding is told
/// from its first [`SNIFF_BYTES`], kept and read again ahead of the rest.
fn read_once(
    mut raw: impl Read + Send + 'static,
    path: &Path,
    opts: &InputOptions,
    digest: RawDigest,
) -> Result<(Box<dyn BufRead + Send>, RawDigest)> {
    let mut head = Vec::new();
    (&mut raw)
        .take(SNIFF_BYTES)
        .read_to_end(&mut head)
        .map_err(|e| Error::io(path, e))?;
    let whole = (head.len() as u64) < SNIFF_BYTES;
    // UTF-8 when the start looked at is (a character cut at the sniff's end aside).
    let valid = match std::str::from_utf8(&head) {
        Ok(_) => true,
        Err(e) => !whole && e.error_len().is_none(),
    };
    let raw = io::Cursor::new(head.clone()).chain(raw);
    Ok((decoded(raw, &head, valid, path, opts), digest))
}

/// A whole small text file (a job or curve file, as a text editor on Windows saves it) made
/// UTF-8: a byte-order mark says UTF-8, UTF-16 LE or UTF-16 BE; without one, valid UTF-8 is
/// taken as it is and anything else is read as Windows-1252 with a note on the terminal.
/// Gzip, ZIP and binary data are refused with [`crate::error::check_text`]'s advice, and so
/// is UTF-16 that does not decode. Line ends are left to the reader (TOML takes CRLF).
pub fn decode_whole(path: &Path, bytes: Vec<u8>) -> Result<String> {
    let encoding = match bom(&bytes) {
        Some(TextEncoding::Utf8) => {
            let rest = bytes[3..].to_vec();
            crate::error::check_text(path, &rest, true)?;
            return String::from_utf8(rest)
                .map_err(|_| Error::input(Location::file(path), "not UTF-8 text"));
        }
        Some(e) => e,
        None if std::str::from_utf8(&bytes).is_ok() => {
            crate::error::check_text(path, &bytes, true)?;
            return String::from_utf8(bytes)
                .map_err(|_| Error::input(Location::file(path), "not UTF-8 text"));
        }
        None => {
            let binary = bytes.starts_with(&[0x1F, 0x8B])
                || bytes.starts_with(b"PK\x03\x04")
                || memchr::memchr(0, &bytes).is_some();
            if binary {
                crate::error::check_text(path, &bytes, true)?;
            }
            eprintln!(
                "note: {} is not UTF-8: read as Windows-1252 (Western European Windows)",
                path.display()
            );
            TextEncoding::Windows1252
        }
    };
    let (text, had_errors) = encoding.encoding().decode_with_bom_removal(&bytes);
    if had_errors {
        return Err(Error::input(
            Location::file(path),
            "the file starts with a UTF-16 byte-order mark but is not valid UTF-16: save it \
             as UTF-8",
        ));
    }
    let text = text.into_owned();
    crate::error::check_text(path, text.as_bytes(), true)?;
    Ok(text)
}

/// Whether all of the file at `path` is valid UTF-8, read in blocks of 1 MiB.
fn utf8_file(path: &Path) -> io::Result<bool> {
    let mut f = File::open(path)?;
    let mut buf = vec![0u8; 1 << 20];
    let mut carry = 0;
    loop {
        let n = f.read(&mut buf[carry..])?;
        if n == 0 {
            return Ok(carry == 0);
        }
        let len = carry + n;
        match std::str::from_utf8(&buf[..len]) {
            Ok(_) => carry = 0,
            Err(e) if e.error_len().is_none() => {
                // A character cut at the end of the block: carried into the next.
                let start = e.valid_up_to();
                buf.copy_within(start..len, 0);
                carry = len - start;
            }
            Err(_) => return Ok(false),
        }
    }
}

/// What the first bytes say: the encoding of a byte-order mark.
fn bom(head: &[u8]) -> Option<TextEncoding> {
    if head.starts_with(&[0xEF, 0xBB, 0xBF]) {
        Some(TextEncoding::Utf8)
    } else if head.starts_with(&[0xFF, 0xFE]) {
        Some(TextEncoding::Utf16Le)
    } else if head.starts_with(&[0xFE, 0xFF]) {
        Some(TextEncoding::Utf16Be)
    } else {
        None
    }
}

/// `raw` decoded into UTF-8 with LF line ends. `head` is its start; `valid_utf8` whether
/// the input (or the part of it that was looked at) is valid UTF-8.
fn decoded(
    raw: impl Read + Send + 'static,
    head: &[u8],
    valid_utf8: bool,
    path: &Path,
    opts: &InputOptions,
) -> Box<dyn BufRead + Send> {
    let found = bom(head);
    let binary = head.starts_with(&[0x1F, 0x8B])
        || head.starts_with(b"PK\x03\x04")
        || (found.is_none() && memchr::memchr(0, head).is_some());
    let encoding = match (opts.encoding, found) {
        (Some(e), _) => e,
        (None, Some(e)) => e,
        // Gzip, ZIP and binary data go on as they are, to be refused with advice.
        (None, None) if binary => TextEncoding::Utf8,
        (None, None) if valid_utf8 => TextEncoding::Utf8,
        (None, None) => {
            // A note for the person at the terminal (the library's one such line: the
            // reading changes what the file says, and must not pass unseen).
            eprintln!(
                "note: {} is not UTF-8: read as Windows-1252 (Western European Windows); give \
                 --encoding to read it otherwise",
                path.display()
            );
            TextEncoding::Windows1252
        }
    };
    let text: Box<dyn Read + Send> = match (encoding, found) {
        // UTF-8 passes through untouched (a broken sequence is then refused at its line).
        (TextEncoding::Utf8, None) => Box::new(raw),
        (e, _) => Box::new(Decode::new(raw, e)),
    };
    Box::new(BufReader::with_capacity(1 << 16, LineEnds::new(text)))
}

/// A reader decoding `inner` from an encoding into UTF-8 (a byte-order mark of that
/// encoding removed; a sequence that cannot be decoded becomes U+FFFD).
struct Decode<R> {
    inner: R,
    decoder: encoding_rs::Decoder,
    input: Vec<u8>,
    start: usize,
    end: usize,
    eof: bool,
    done: bool,
    out: Vec<u8>,
    out_start: usize,
    out_end: usize,
}

impl<R: Read> Decode<R> {
    fn new(inner: R, e: TextEncoding) -> Self {
        Decode {
            inner,
            decoder: e.encoding().new_decoder_with_bom_removal(),
            input: vec![0; 1 << 16],
            start: 0,
            end: 0,
            eof: false,
            done: false,
            out: vec![0; 1 << 17],
            out_start: 0,
            out_end: 0,
        }
    }

    /// Decode the next piece into `out`; `false` at the end.
    fn refill(&mut self) -> io::Result<bool> {
        while !self.done {
            if self.start == self.end && !self.eof {
                self.start = 0;
                self.end = self.inner.read(&mut self.input)?;
                self.eof = self.end == 0;
            }
            let src = &self.input[self.start..self.end];
            let (result, read, written, _) =
                self.decoder.decode_to_utf8(src, &mut self.out, self.eof);
            self.start += read;
            self.done = self.eof && result == encoding_rs::CoderResult::InputEmpty;
            self.out_start = 0;
            self.out_end = written;
            if written > 0 {
                return Ok(true);
            }
        }
        Ok(false)
    }
}

impl<R: Read> Read for Decode<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        if self.out_start == self.out_end && !self.refill()? {
            return Ok(0);
        }
        let n = buf.len().min(self.out_end - self.out_start);
        buf[..n].copy_from_slice(&self.out[self.out_start..self.out_start + n]);
        self.out_start += n;
        Ok(n)
    }
}

/// A reader giving every line end as LF: CRLF becomes LF, a lone CR becomes LF.
struct LineEnds<R> {
    inner: R,
    /// The last byte given was a CR (already given as LF): an LF right after it is dropped.
    after_cr: bool,
}

impl<R> LineEnds<R> {
    fn new(inner: R) -> Self {
        LineEnds {
            inner,
            after_cr: false,
        }
    }
}

impl<R: Read> Read for LineEnds<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        loop {
            let n = self.inner.read(buf)?;
            if n == 0 {
                return Ok(0);
            }
            if !self.after_cr && memchr::memchr(b'\r', &buf[..n]).is_none() {
                return Ok(n);
            }
            let mut w = 0;
            for i in 0..n {
                let b = buf[i];
                if b == b'\n' && self.after_cr {
                    self.after_cr = false;
                    continue;
                }
                self.after_cr = b == b'\r';
                buf[w] = if self.after_cr { b'\n' } else { b };
                w += 1;
            }
            if w > 0 {
                return Ok(w);
            }
        }
    }
}

/// Read a whole text file (a job or curve file) as UTF-8, decoded as
/// [`decode_whole`] says; binary data is refused with [`crate::error::check_text`]'s
/// advice.
pub fn read_text(path: &Path) -> Result<String> {
    let bytes = std::fs::read(path).map_err(|e| Error::io(path, e))?;
    crate::text::decode_whole(path, bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn through(bytes: &[u8], e: Option<TextEncoding>) -> String {
        let opts = InputOptions {
            encoding: e,
            sheet: None,
        };
        let valid = std::str::from_utf8(bytes).is_ok();
        let mut r = decoded(
            io::Cursor::new(bytes.to_vec()),
            bytes,
            valid,
            Path::new("t.csv"),
            &opts,
        );
        let mut s = String::new();
        r.read_to_string(&mut s).unwrap();
        s
    }

    #[test]
    fn every_line_end_becomes_lf() {
        assert_eq!(through(b"a\r\nb\rc\n\r\nd\r", None), "a\nb\nc\n\nd\n");
    }

    // Windows-1252 0xE4 is U+00E4 (ä); 0x80 is U+20AC (€): the WHATWG Encoding Standard's
    // index-windows-1252.
    #[test]
    fn windows_1252_and_utf_16_are_decoded() {
        assert_eq!(
            through(b"id;note\r\nA;M\xe4rz \x80\r\n", None),
            "id;note\nA;März €\n"
        );
        let le: Vec<u8> = [0xFF, 0xFE]
            .into_iter()
            .chain("ä\r\n".encode_utf16().flat_map(u16::to_le_bytes))
            .collect();
        assert_eq!(through(&le, None), "ä\n");
        let be: Vec<u8> = [0xFE, 0xFF]
            .into_iter()
            .chain("ä\n".encode_utf16().flat_map(u16::to_be_bytes))
            .collect();
        assert_eq!(through(&be, None), "ä\n");
        assert_eq!(through(b"\xef\xbb\xbfx\n", None), "x\n");
        // Forced: UTF-8 bytes read as Windows-1252 (C3 A4 is "Ã¤").
        assert_eq!(
            through("ä".as_bytes(), Some(TextEncoding::Windows1252)),
            "Ã¤"
        );
    }

    #[test]
    fn encoding_names_are_read_and_unknown_ones_refused() {
        assert_eq!(TextEncoding::parse("UTF-16LE"), Ok(TextEncoding::Utf16Le));
        assert_eq!(TextEncoding::parse("cp1252"), Ok(TextEncoding::Windows1252));
        assert!(TextEncoding::parse("ebcdic")
            .unwrap_err()
            .contains("utf-16be"));
    }
}
