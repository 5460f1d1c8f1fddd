//! What a measuring system's export puts around its rows: lines of metadata before the header
//! (a preamble: project, date, operator, units), a row of units right after it, and points it
//! did not measure (empty readings, or a validity column saying not valid).

use super::columns::{Columns, Quantity};
use super::dialect::{csv_error, csv_reader, read_header_line, read_line_capped, Dialect};
use super::rules::MAX_FIELDS;
use super::ColumnMap;
use crate::error::{Error, Location, Result};
use crate::units::LengthUnit;
use std::io::BufRead;
use std::path::Path;

/// The most lines (comments and blank lines left out) looked at for the header when its line
/// is not given: a preamble longer than this needs `--header-row`.
pub const PREAMBLE_LINES: u64 = 50;

/// The header line found, and what it gives.
pub(super) struct Found {
    /// The header's line in the file (1-based).
    pub(super) line: u64,
    /// Lines before it that were neither blank nor comments (a preamble), left aside.
    pub(super) skipped: u64,
    pub(super) dialect: Dialect,
    pub(super) columns: Columns,
    pub(super) notes: Vec<String>,
}

/// The columns of one candidate header line at `line`, or why it is not a header.
fn try_header(text: &str, line: u64, map: &ColumnMap, loc: &Location) -> Result<Found> {
    let dialect = Dialect::detect(text);
    let mut reader = csv_reader(dialect, text.as_bytes());
    let mut record = csv::StringRecord::new();
    reader
        .read_record(&mut record)
        .map_err(|e| csv_error(loc, e).shift_line(line - 1))?;
    if record.len() > MAX_FIELDS {
        return Err(Error::input(
            loc.clone().at_line(line),
            format!(
                "the header has {} fields, more than {MAX_FIELDS}: not a measurement file",
                record.len()
            ),
        ));
    }
    let (columns, notes) = Columns::from_header(&record, map, &loc.clone().at_line(line))?;
    Ok(Found {
        line,
        skipped: 0,
        dialect,
        columns,
        notes,
    })
}

/// The error for a file without a header line.
fn empty(loc: &Location) -> Error {
    Error::input(
        loc.clone(),
        "the file is empty: expected a header row naming id, major, minor (or strain columns)",
    )
}

/// Find the header in `input` and leave `input` at the line after it: line
/// `map.header_row` when given, else the first line (past comments and blank lines) that holds
/// the required columns through the column map, among the first [`PREAMBLE_LINES`]. When no
/// line does, the first line's refusal is returned.
pub(super) fn find_header(input: &mut impl BufRead, name: &Path, map: &ColumnMap) -> Result<Found> {
    let loc = Location::file(name);
    if let Some(n) = map.header_row {
        return header_at(input, name, map, n);
    }
    let mut line = 0;
    let mut first: Option<Error> = None;
    for tried in 0..PREAMBLE_LINES {
        let (prefix, text) = read_header_line(input, name)?;
        if text.is_empty() {
            return Err(first.unwrap_or_else(|| empty(&loc)));
        }
        // Comment and blank lines are one `\n` each before the header line as read.
        line += prefix.bytes().take_while(|&b| b == b'\n').count() as u64 + 1;
        match try_header(&text, line, map, &loc) {
            Ok(found) => {
                return Ok(Found {
                    skipped: tried,
                    ..found
                })
            }
            Err(e) => {
                first.get_or_insert(e);
            }
        }
    }
    Err(first.unwrap_or_else(|| empty(&loc)))
}

/// The header at line `n` (1-based), every line before it left aside.
fn header_at(input: &mut impl BufRead, name: &Path, map: &ColumnMap, n: u64) -> Result<Found> {
    let loc = Location::file(name);
    let mut text = String::new();
    for line in 1..=n {
        text.clear();
        if read_line_capped(input, &mut text, name)? == 0 {
            return Err(Error::input(
                loc,
                format!("--header-row {n}: the file has only {} lines", line - 1),
            ));
        }
    }
    let header = text.trim().trim_start_matches('\u{feff}').trim();
    if header.is_empty() {
        return Err(Error::input(
            loc.at_line(n),
            format!("--header-row {n}: line {n} is blank, expected the header"),
        ));
    }
    let found = try_header(header, n, map, &loc)?;
    Ok(Found {
        skipped: n - 1,
        ..found
    })
}

/// A unit as written in a unit row, its brackets left off.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum UnitWord {
    /// A length unit.
    Length(LengthUnit),
    /// `%`.
    Percent,
    /// `deg`, `°`.
    Degree,
    /// `-`: no unit stated.
    None,
}

impl UnitWord {
    /// Read `cell` as a unit word: `mm`, `in`, `%`, `deg`, `°`, `-`, bare or in `[ ]` or `( )`.
    pub(super) fn parse(cell: &str) -> Option<Self> {
        let t = cell.trim();
        let t = t
            .strip_prefix('[')
            .and_then(|t| t.strip_suffix(']'))
            .or_else(|| t.strip_prefix('(').and_then(|t| t.strip_suffix(')')))
            .unwrap_or(t)
            .trim()
            .to_ascii_lowercase();
        Some(match t.as_str() {
            "mm" => UnitWord::Length(LengthUnit::Mm),
            "in" | "inch" => UnitWord::Length(LengthUnit::In),
            "%" => UnitWord::Percent,
            "deg" | "°" => UnitWord::Degree,
            "-" => UnitWord::None,
            _ => return None,
        })
    }

    /// Whether this unit can be the unit of `q`.
    fn fits(self, q: Quantity) -> bool {
        matches!(
            (self, q),
            (UnitWord::None, _)
                | (UnitWord::Length(_), Quantity::Length)
                | (UnitWord::Percent, Quantity::Percent)
                | (UnitWord::Degree, Quantity::Angle)
        )
    }
}

/// What a column holds, in words.
fn holds(q: Quantity) -> &'static str {
    match q {
        Quantity::Length => "a length column",
        Quantity::Percent => "a strain column (percent)",
        Quantity::Angle => "an angle column (degrees)",
    }
}

/// The unit row read under a header.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct UnitRow {
    /// Its line in the file.
    pub line: u64,
    /// The length units it gives: field number and unit.
    pub(super) lengths: Vec<(usize, LengthUnit)>,
}

/// Whether `text` (the line after the header, at `line`) is a unit row: its cells in the
/// numeric columns are all unit words or empty, and one at least is a word. A unit that cannot
/// be its column's (`mm` under a strain, `%` under an axis) refuses the file.
pub(super) fn unit_row(
    text: &str,
    line: u64,
    dialect: Dialect,
    columns: &Columns,
    file: &Path,
) -> Result<Option<UnitRow>> {
    let mut reader = csv_reader(dialect, text.as_bytes());
    let mut record = csv::StringRecord::new();
    if !matches!(reader.read_record(&mut record), Ok(true)) {
        return Ok(None);
    }
    let mut words = Vec::new();
    for (c, q) in columns.quantities() {
        let cell = super::dialect::trim_cell(record.get(c).unwrap_or(""));
        if cell.is_empty() {
            continue;
        }
        match UnitWord::parse(cell) {
            Some(w) => words.push((c, q, w, cell)),
            None => return Ok(None),
        }
    }
    if words.is_empty() {
        return Ok(None);
    }
    let mut row = UnitRow {
        line,
        lengths: Vec::new(),
    };
    for (c, q, w, cell) in words {
        if !w.fits(q) {
            return Err(Error::input(
                Location::file(file)
                    .at_line(line)
                    .at_column(c as u64 + 1, &columns.names[c]),
                format!(
                    "the unit row gives `{cell}` under {}: the unit contradicts the column \
                     (map the column to the right name, or correct the unit row)",
                    holds(q)
                ),
            ));
        }
        if let UnitWord::Length(u) = w {
            row.lengths.push((c, u));
        }
    }
    Ok(Some(row))
}

impl UnitRow {
    /// Refuse a length unit other than `unit`, the unit the file is read in.
    pub fn check(&self, unit: LengthUnit, columns: &Columns, file: &Path) -> Result<()> {
        match self.lengths.iter().find(|(_, u)| *u != unit) {
            Some(&(c, u)) => Err(Error::input(
                Location::file(file)
                    .at_line(self.line)
                    .at_column(c as u64 + 1, &columns.names[c]),
                format!(
                    "the unit row gives `{u}` but the file is read in {} ({unit}): give \
                     --unit {u} (or `unit = \"{u}\"` in the job file)",
                    unit.plural()
                ),
            )),
            None => Ok(()),
        }
    }
}

/// Read a validity cell: `1`, `true`, `yes` valid, `0`, `false`, `no` not valid (any case);
/// an empty cell is valid (nothing said). `Err` holds what was expected.
pub fn parse_valid(cell: &str) -> std::result::Result<bool, String> {
    match cell.trim().to_ascii_lowercase().as_str() {
        "" | "1" | "true" | "yes" => Ok(true),
        "0" | "false" | "no" => Ok(false),
        _ => Err(format!(
            "expected 1/0, true/false or yes/no in the validity column, found `{}`",
            crate::error::clip(cell.trim())
        )),
    }
}

/// Whether the row `record` was not measured: its reading cells (axes or strains) all empty,
/// or its validity cell saying not valid. A validity cell that is no flag is left for the row's
/// reading to reject.
pub(super) fn not_measured(columns: &Columns, record: &csv::StringRecord) -> bool {
    // A row of the wrong length or size is the row reader's to reject.
    if record.len() != columns.names.len()
        || record.as_byte_record().as_slice().len() > super::MAX_ROW_BYTES
    {
        return false;
    }
    let empty = |c: usize| {
        record
            .get(c)
            .is_none_or(|f| super::dialect::trim_cell(f).is_empty())
    };
    if columns.reading_fields().into_iter().all(empty) {
        return true;
    }
    columns
        .valid
        .and_then(|c| parse_valid(record.get(c).unwrap_or("")).ok())
        == Some(false)
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation: a preamble before the header, a unit row
    //! after it, points not measured. Unit words as measuring systems' exports write them
    //! (common practice: `mm`, `%`, and the same in brackets).
    use super::*;

    fn find(text: &str, map: &ColumnMap) -> Result<(Found, String)> {
        let mut input = text.as_bytes();
        let found = find_header(&mut input, Path::new("m.csv"), map)?;
        Ok((found, String::from_utf8_lossy(input).into_owned()))
    }

    #[test]
    fn a_preamble_is_left_aside_and_the_header_keeps_its_line() {
        let text = "Project: rear floor pan\nDate: 2026-03-02\n# note\nUnits: mm\n\
                    id;major;minor\nA1;2,6;2,5\n";
        let (found, rest) = find(text, &ColumnMap::default()).unwrap();
        assert_eq!((found.line, found.skipped), (5, 3));
        assert_eq!(found.dialect, Dialect::Semicolon);
        assert_eq!(rest, "A1;2,6;2,5\n");
        // Given its line, the header is that line, whatever is before it.
        let map = ColumnMap {
            header_row: Some(5),
            ..ColumnMap::default()
        };
        let (found, rest) = find(text, &map).unwrap();
        assert_eq!((found.line, found.skipped), (5, 4));
        assert_eq!(rest, "A1;2,6;2,5\n");
        let map = ColumnMap {
            header_row: Some(2),
            ..ColumnMap::default()
        };
        let e = find(text, &map).err().unwrap().to_string();
        assert!(e.starts_with("m.csv:2: missing columns"), "{e}");
    }

    #[test]
    fn without_a_header_the_first_line_is_refused_at_its_own_line() {
        let e = find("# a\n# b\nid,major\nA1,2\n", &ColumnMap::default())
            .err()
            .unwrap()
            .to_string();
        assert!(e.starts_with("m.csv:3: missing column `minor`"), "{e}");
        let e = find("# only\n\n", &ColumnMap::default())
            .err()
            .unwrap()
            .to_string();
        assert!(e.starts_with("m.csv: the file is empty"), "{e}");
    }

    #[test]
    fn unit_words_are_read_bare_or_bracketed() {
        assert_eq!(UnitWord::parse("[%]"), Some(UnitWord::Percent));
        assert_eq!(
            UnitWord::parse(" (mm) "),
            Some(UnitWord::Length(LengthUnit::Mm))
        );
        assert_eq!(
            UnitWord::parse("IN"),
            Some(UnitWord::Length(LengthUnit::In))
        );
        assert_eq!(UnitWord::parse("-"), Some(UnitWord::None));
        assert_eq!(UnitWord::parse("2.5"), None);
        assert_eq!(UnitWord::parse("-2.5"), None);
    }

    #[test]
    fn validity_flags_are_read_in_any_case() {
        for v in ["1", "TRUE", "yes", " Yes ", ""] {
            assert_eq!(parse_valid(v), Ok(true), "{v}");
        }
        for v in ["0", "False", "NO"] {
            assert_eq!(parse_valid(v), Ok(false), "{v}");
        }
        assert!(parse_valid("maybe").unwrap_err().contains("found `maybe`"));
    }
}
