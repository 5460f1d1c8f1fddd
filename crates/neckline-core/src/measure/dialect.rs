//! The file's dialect (field separator and decimal mark), numbers read in it, the header line
//! found past comments, and CSV errors turned into messages naming file and line.

use crate::error::{Error, Location, Result};
use std::io::{BufRead, Read};
use std::path::Path;

/// Field separator and decimal mark of a measurement file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Dialect {
    /// `,` between fields, `.` as decimal mark.
    Comma,
    /// `;` between fields, `,` (or `.`) as decimal mark.
    Semicolon,
    /// Tab between fields (pasted from a spreadsheet), `,` or `.` as decimal mark.
    Tab,
}

impl Dialect {
    /// Detect from the header line: a tab in it means the tab dialect, else a `;` the
    /// semicolon dialect, else commas.
    pub fn detect(header: &str) -> Self {
        if header.contains('\t') {
            Dialect::Tab
        } else if header.contains(';') {
            Dialect::Semicolon
        } else {
            Dialect::Comma
        }
    }
    pub(crate) fn delimiter(self) -> u8 {
        match self {
            Dialect::Comma => b',',
            Dialect::Semicolon => b';',
            Dialect::Tab => b'\t',
        }
    }
}

/// Parse one number in the file's dialect; `Err` holds what was expected.
pub fn parse_number(text: &str, dialect: Dialect) -> std::result::Result<f64, String> {
    let t = text.trim();
    let owned;
    let t = if dialect != Dialect::Comma && t.contains(',') {
        owned = t.replace(',', ".");
        owned.as_str()
    } else {
        t
    };
    match t.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ => Err(format!(
            "expected a finite number, found `{}`",
            crate::error::clip(text.trim())
        )),
    }
}

/// A CSV reader over `input` for `dialect`, without a header row.
pub fn csv_reader<R: Read>(dialect: Dialect, input: R) -> csv::Reader<R> {
    csv::ReaderBuilder::new()
        .delimiter(dialect.delimiter())
        .has_headers(false)
        .flexible(true)
        .from_reader(input)
}

/// Read up to and including the first line that is neither blank nor a `#` comment.
/// Returns what was read before the header (comment lines as empty lines, so that line
/// numbers stay right) followed by the header line, and the header line.
/// After the header `#` has no special meaning: a row is a row.
pub(crate) fn read_header_line(input: &mut impl BufRead, name: &Path) -> Result<(String, String)> {
    let mut prefix = String::new();
    let mut line = String::new();
    loop {
        line.clear();
        let n = read_line_capped(input, &mut line, name)?;
        if n == 0 {
            return Ok((prefix, String::new()));
        }
        let text = line.trim().trim_start_matches('\u{feff}').trim();
        // `sep=;` is the separator hint some spreadsheets write first: the header tells anyway.
        let hint = text.to_ascii_lowercase().starts_with("sep=");
        if !text.is_empty() && !text.starts_with('#') && !hint {
            let header = text.to_string();
            prefix.push_str(line.trim_start_matches('\u{feff}'));
            return Ok((prefix, header));
        }
        prefix.push('\n');
    }
}

/// The longest header or comment line read (1 MiB): a longer one is not a measurement file.
const MAX_HEADER_LINE: u64 = 1 << 20;

fn read_line_capped(input: &mut impl BufRead, line: &mut String, name: &Path) -> Result<usize> {
    let mut bytes = Vec::new();
    let n = input
        .take(MAX_HEADER_LINE)
        .read_until(b'\n', &mut bytes)
        .map_err(|e| Error::io(name, e))?;
    if n as u64 >= MAX_HEADER_LINE && !bytes.ends_with(b"\n") {
        return Err(Error::input(
            Location::file(name),
            "the first line is longer than 1 MiB: not a measurement CSV with a header row",
        ));
    }
    *line = String::from_utf8(bytes).map_err(|_| {
        Error::input(
            Location::file(name).at_line(1),
            "the header is not valid UTF-8 text: save the file as UTF-8 CSV (spreadsheets call it \"CSV UTF-8\")",
        )
    })?;
    Ok(n)
}

pub(crate) fn csv_error(loc: &Location, e: csv::Error) -> Error {
    let line = e.position().map(|p| p.line());
    let message = match e.kind() {
        csv::ErrorKind::Utf8 { .. } => "the file is not valid UTF-8 text: save it as UTF-8 CSV (spreadsheets call it \"CSV UTF-8\")".to_string(),
        _ => e.to_string(),
    };
    let loc = match line {
        Some(l) => loc.clone().at_line(l),
        None => loc.clone(),
    };
    Error::input(loc, message)
}
