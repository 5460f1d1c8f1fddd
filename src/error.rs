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
        write!(f, "{}", self.file.display())?;
        if let Some(line) = self.line {
            write!(f, ":{line}")?;
            if let Some(col) = self.column {
                write!(f, ":{col}")?;
            }
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

/// `text` cut to at most `max` characters, with `...` when cut: for quoting input in messages.
pub fn clip(text: &str, max: usize) -> String {
    match text.char_indices().nth(max) {
        Some((i, _)) => format!("{}...", &text[..i]),
        None => text.to_string(),
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

/// Result with this crate's [`Error`].
pub type Result<T, E = Error> = std::result::Result<T, E>;
