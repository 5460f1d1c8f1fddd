//! Errors: every input problem names its file, and where known its line and column.

use std::fmt;
use std::path::{Path, PathBuf};

/// Where in an input file a problem was found.
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Location {
    /// The file as the user named it (`-` for standard input).
    pub file: PathBuf,
    /// 1-based line number, if known.
    pub line: Option<u64>,
    /// 1-based column: a CSV field number or a TOML character column.
    pub column: Option<u64>,
    /// The column's name (CSV header or TOML key), if known.
    pub column_name: Option<String>,
}

impl Location {
    /// A location naming only the file.
    pub fn file(path: &Path) -> Self {
        Location {
            file: path.to_path_buf(),
            ..Default::default()
        }
    }
    /// This location at a line.
    pub fn at_line(mut self, line: u64) -> Self {
        self.line = Some(line);
        self
    }
    /// This location at a named column (1-based field number).
    pub fn at_column(mut self, number: u64, name: &str) -> Self {
        self.column = Some(number);
        self.column_name = Some(name.to_string());
        self
    }
}

impl fmt::Display for Location {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if let Some(cell) = crate::sheet_cells::cell_name(&self.file, self.line, self.column) {
            write!(f, "{}, {cell}", self.file.display())?;
        } else if let Some(line) = self.line {
            write!(f, "{}", self.file.display())?;
            write!(f, ":{line}")?;
            if let Some(col) = self.column {
                write!(f, ":{col}")?;
            }
        } else {
            write!(f, "{}", self.file.display())?;
        }
        if let Some(name) = &self.column_name {
            write!(f, " (column `{name}`)")?;
        }
        Ok(())
    }
}

/// Everything that can stop a command.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// A file could not be read or written.
    #[error("{}: {reason}", path.display())]
    Io {
        /// The file concerned.
        path: PathBuf,
        /// The operating system's reason (shown in the message itself, so not chained again).
        reason: std::io::Error,
    },
    /// An input file is wrong as a whole, or at a given place.
    #[error("{location}: {message}")]
    Input {
        /// Where the problem is.
        location: Location,
        /// What was found and what was expected.
        message: String,
    },
    /// Settings that contradict each other or are out of range.
    #[error("{0}")]
    Usage(String),
}

impl Error {
    /// An input error at `location`.
    pub fn input(location: Location, message: impl Into<String>) -> Self {
        Error::Input {
            location,
            message: message.into(),
        }
    }
    /// The same error with its line moved down by `lines` (for a reader that started after
    /// the header).
    pub fn shift_line(self, lines: u64) -> Self {
        match self {
            Error::Input {
                mut location,
                message,
            } => {
                location.line = location.line.map(|l| l + lines);
                Error::Input { location, message }
            }
            e => e,
        }
    }
    /// An I/O error on `path`.
    pub fn io(path: &Path, source: std::io::Error) -> Self {
        Error::Io {
            path: path.to_path_buf(),
            reason: source,
        }
    }
}

/// 1-based line and column of byte `offset` in `text`.
pub fn line_col(text: &str, offset: usize) -> (u64, u64) {
    let before = text.get(..offset.min(text.len())).unwrap_or(text);
    let line = before.matches('\n').count() as u64 + 1;
    let col = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) as u64 + 1;
    (line, col)
}

/// A TOML parse error of `text` (read from `path`) as an input error at its line and column,
/// in words for people rather than for programmers.
pub fn toml_error(path: &Path, text: &str, e: &toml::de::Error) -> Error {
    let mut loc = Location::file(path);
    if let Some(span) = e.span() {
        let (l, c) = line_col(text, span.start);
        loc = loc.at_line(l);
        loc.column = Some(c);
    }
    let mut m = e
        .message()
        .trim()
        .replace("expected f64", "expected a number")
        .replace("invalid type: string", "found text")
        .replace("invalid type: integer", "found a whole number")
        .replace("invalid type: floating point", "found a number");
    if m.contains("invalid type: map, expected a string") {
        m = "expected text in quotes (a date too: date = \"2026-11-24\")".into();
    }
    Error::input(loc, m)
}

/// Refuse bytes that are not UTF-8 text, saying what they look like and what to do: a UTF-16
/// "Unicode text" export, a gzip or ZIP file, binary data (a NUL byte), or text in another code
/// page (the line and column of the first byte that is not UTF-8). `head` is the start of the
/// file (or all of it when `whole`; otherwise a character cut at its end is not an error).
pub fn check_text(name: &Path, head: &[u8], whole: bool) -> Result<()> {
    let at = |offset: usize| {
        let text = String::from_utf8_lossy(&head[..offset]);
        let (l, c) = line_col(&text, text.len());
        let mut loc = Location::file(name).at_line(l);
        loc.column = Some(c);
        loc
    };
    let whole_file = |m: &str| Err(Error::input(Location::file(name), m));
    if head.starts_with(&[0xFF, 0xFE]) || head.starts_with(&[0xFE, 0xFF]) {
        return whole_file(
            "the file is UTF-16 text (a spreadsheet's \"Unicode text\" export): save it as \
             \"CSV UTF-8\" or plain comma-separated text and try again",
        );
    }
    if head.starts_with(&[0x1F, 0x8B]) {
        return whole_file("the file is gzip-compressed: unpack it first (gunzip)");
    }
    if head.starts_with(b"PK\x03\x04") {
        return whole_file(
            "the file is a ZIP archive (a spreadsheet workbook?): export the sheet as CSV",
        );
    }
    if let Some(i) = head.iter().position(|&b| b == 0) {
        return Err(Error::input(
            at(i),
            "a NUL byte: binary data, not a text file",
        ));
    }
    if let Err(e) = std::str::from_utf8(head) {
        if whole || e.error_len().is_some() {
            let i = e.valid_up_to();
            return Err(Error::input(
                at(i),
                format!(
                    "byte 0x{:02X} is not UTF-8 (Latin-1 or another code page?): save the file \
                     as UTF-8",
                    head[i]
                ),
            ));
        }
    }
    Ok(())
}

/// A value quoted in a message, cut to 40 characters with its full length noted when longer.
pub fn clip(raw: &str) -> String {
    if raw.chars().count() <= 40 {
        return raw.to_string();
    }
    let head: String = raw.chars().take(40).collect();
    format!("{head}... ({} bytes)", raw.len())
}

/// Result with this crate's [`Error`].
pub type Result<T, E = Error> = std::result::Result<T, E>;
