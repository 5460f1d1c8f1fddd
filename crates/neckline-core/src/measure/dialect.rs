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

/// `cell.trim()`, answered at once for the usual cell that begins and ends with a visible
/// ASCII character (such a character is never white space, so there is nothing to trim).
#[inline]
pub fn trim_cell(cell: &str) -> &str {
    match (cell.as_bytes().first(), cell.as_bytes().last()) {
        (Some(f), Some(l)) if f.is_ascii_graphic() && l.is_ascii_graphic() => cell,
        _ => cell.trim(),
    }
}

/// Parse one number in the file's dialect; `Err` holds what was expected.
pub fn parse_number(text: &str, dialect: Dialect) -> std::result::Result<f64, String> {
    let t = trim_cell(text);
    let owned;
    let t = if dialect != Dialect::Comma && t.contains(',') {
        owned = t.replace(',', ".");
        owned.as_str()
    } else {
        t
    };
    match t.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        _ if is_date(t) => Err(format!("expected a number, found the date {t}")),
        _ => Err(format!(
            "expected a finite number, found `{}`",
            crate::error::clip(text.trim())
        )),
    }
}

/// Whether `t` starts as an ISO date `YYYY-MM-DD` (as a workbook's date cell is given).
fn is_date(t: &str) -> bool {
    let b = t.as_bytes();
    b.len() >= 10
        && b[..10].iter().enumerate().all(|(i, c)| {
            if i == 4 || i == 7 {
                *c == b'-'
            } else {
                c.is_ascii_digit()
            }
        })
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

pub(super) fn read_line_capped(
    input: &mut impl BufRead,
    line: &mut String,
    name: &Path,
) -> Result<usize> {
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

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation ("Three dialects are recognised from the
    //! header line") and README.md, "What input is refused, and why".
    use super::*;

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() < 1e-12
    }

    #[test]
    fn the_separator_is_sniffed_from_the_header_line() {
        assert_eq!(Dialect::detect("id,major,minor"), Dialect::Comma);
        assert_eq!(Dialect::detect("id;major;minor"), Dialect::Semicolon);
        assert_eq!(Dialect::detect("id\tmajor\tminor"), Dialect::Tab);
        // A tab wins over a semicolon, a semicolon over a comma (Dialect::detect's doc).
        assert_eq!(Dialect::detect("id;note, free\tmajor"), Dialect::Tab);
        assert_eq!(Dialect::detect("id;major,1;minor"), Dialect::Semicolon);
        assert_eq!(
            [Dialect::Comma, Dialect::Semicolon, Dialect::Tab].map(Dialect::delimiter),
            [b',', b';', b'\t']
        );
    }

    #[test]
    fn a_decimal_comma_is_read_where_the_comma_is_not_the_separator() {
        assert!(parse_number("2,75", Dialect::Semicolon).is_ok_and(|v| close(v, 2.75)));
        assert!(parse_number(" 2,75 ", Dialect::Tab).is_ok_and(|v| close(v, 2.75)));
        // The decimal point is read in every dialect.
        for d in [Dialect::Comma, Dialect::Semicolon, Dialect::Tab] {
            assert!(parse_number("-1.5e-1", d).is_ok_and(|v| close(v, -0.15)));
        }
        // In the comma dialect a comma cannot be a decimal mark.
        assert!(parse_number("2,75", Dialect::Comma).is_err());
    }

    #[test]
    fn only_finite_numbers_are_numbers() {
        // Rust's f64 parser accepts inf, infinity and NaN in any case (std docs, `f64::from_str`);
        // a reading is never one of them, nor a value overflowing to infinity.
        for text in [
            "inf", "-inf", "Infinity", "NaN", "nan", "1e999", "", "abc", "2.5 mm", "1..2",
        ] {
            let e = parse_number(text, Dialect::Semicolon).unwrap_err();
            assert!(e.starts_with("expected a finite number, found `"), "{e}");
            assert!(e.contains(text.trim()), "{e}");
        }
    }

    #[test]
    fn the_header_line_comes_after_comments_blank_lines_and_a_separator_hint() {
        let text = "\u{feff}# measured 2026\n\nsep=;\nid;major;minor\n# not a comment now\n";
        let mut input = text.as_bytes();
        let (prefix, header) = read_header_line(&mut input, Path::new("m.csv")).unwrap();
        assert_eq!(header, "id;major;minor");
        // One line break per line before the header, then the header line as read.
        assert_eq!(prefix, "\n\n\nid;major;minor\n");
        // The input is left at the first line after the header.
        assert_eq!(input, b"# not a comment now\n");
        let mut empty = "# only a comment\n\n".as_bytes();
        let (_, header) = read_header_line(&mut empty, Path::new("m.csv")).unwrap();
        assert!(header.is_empty());
    }

    #[test]
    fn a_header_line_that_is_not_utf8_or_too_long_refuses_the_file() {
        let mut latin1: &[u8] = b"id;d\xe9formation\n";
        let e = read_header_line(&mut latin1, Path::new("m.csv")).unwrap_err();
        assert!(
            e.to_string()
                .starts_with("m.csv:1: the header is not valid UTF-8"),
            "{e}"
        );
        let long = vec![b'a'; (1 << 20) + 10];
        let e = read_header_line(&mut long.as_slice(), Path::new("m.csv")).unwrap_err();
        assert!(e.to_string().contains("longer than 1 MiB"), "{e}");
    }

    #[test]
    fn a_csv_error_names_the_file_and_the_line() {
        let mut reader = csv_reader(Dialect::Comma, &b"A1,2.6,2.5\nA2,\xff,2.5\n"[..]);
        let mut record = csv::StringRecord::new();
        assert!(reader.read_record(&mut record).unwrap());
        let e = reader.read_record(&mut record).unwrap_err();
        let e = csv_error(&Location::file(Path::new("m.csv")), e);
        let text = e.to_string();
        assert!(
            text.starts_with("m.csv:2: the file is not valid UTF-8 text"),
            "{text}"
        );
        assert!(text.contains("CSV UTF-8"), "{text}");
    }
}
