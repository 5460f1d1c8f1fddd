//! The parsed header of a measurement file.

use super::preamble::{find_header, not_measured, unit_row, UnitRow};
use super::row::RowReader;
use super::rules::{RowRules, SwapLog, SWAP_TOLERANCE_PP};
use super::{ColumnMap, Columns, Dialect, Measurement, RejectedRow};
use crate::error::{Error, Result};
use std::io::BufRead;
use std::path::{Path, PathBuf};

/// The parsed header of a measurement file: everything needed to read its rows, in any order
/// and on any thread.
#[derive(Debug, Clone)]
pub struct Header {
    /// The file as named by the user.
    pub file: PathBuf,
    /// The detected dialect.
    pub dialect: Dialect,
    /// The recognised columns.
    pub columns: Columns,
    /// Notes for the user about the header.
    pub notes: Vec<String>,
    /// Lines taken by comments, a preamble, the header and a unit row: the first data line is
    /// `lines + 1`.
    pub lines: u64,
    /// The unit row under the header, if the file has one.
    pub units: Option<UnitRow>,
    /// The lines of the rows not measured, as read one at a time by a
    /// [`super::MeasurementReader`] (the streaming pass counts them in its summary).
    pub unmeasured: std::sync::Arc<std::sync::Mutex<crate::capped::Capped<u64>>>,
    /// The d0, reading error and unit the rows are read with (see [`Header::with_rules`]).
    pub rules: RowRules,
    /// The rows whose near-equal axes were swapped.
    pub swaps: std::sync::Arc<SwapLog>,
}

impl Header {
    /// Read comment lines, a preamble, the header line and a unit row from `input`, which is
    /// left at the first data line. The header is line `map.header_row` when given, else the
    /// first line that holds the required columns (see [`super::PREAMBLE_LINES`]).
    pub fn read(input: &mut impl BufRead, name: &Path, map: &ColumnMap) -> Result<Self> {
        let head = input.fill_buf().map_err(|e| Error::io(name, e))?;
        crate::error::check_text(name, head, false)?;
        let found = find_header(input, name, map)?;
        let mut notes = found.notes;
        if found.skipped > 0 {
            notes.insert(
                0,
                format!(
                    "the header is line {}: the {} line{} before it (a preamble) left aside",
                    found.line,
                    found.skipped,
                    if found.skipped == 1 { "" } else { "s" }
                ),
            );
        }
        let mut lines = found.line;
        // A row of units right after the header, when it is whole in the buffer.
        let buf = input.fill_buf().map_err(|e| Error::io(name, e))?;
        let mut units = None;
        if let Some(end) = buf.iter().position(|&b| b == b'\n') {
            if let Ok(text) = std::str::from_utf8(&buf[..end]) {
                units = unit_row(text, lines + 1, found.dialect, &found.columns, name)?;
            }
            if units.is_some() {
                input.consume(end + 1);
                lines += 1;
            }
        }
        Ok(Header {
            file: name.to_path_buf(),
            dialect: found.dialect,
            columns: found.columns,
            notes,
            lines,
            units,
            rules: RowRules::default(),
            swaps: Default::default(),
            unmeasured: Default::default(),
        })
    }

    /// Refuse a unit row whose length unit is not the one the rows are read in (see
    /// [`Header::with_rules`]).
    pub fn check_units(&self) -> Result<()> {
        match &self.units {
            Some(u) => u.check(self.rules.unit, &self.columns, &self.file),
            None => Ok(()),
        }
    }

    /// Whether `record` (at `line`) was not measured: its axes or strains all empty, or the
    /// validity column saying not valid. Such a row is neither judged nor rejected.
    pub fn not_measured(&self, record: &csv::StringRecord) -> bool {
        not_measured(&self.columns, record)
    }

    /// The same header, its rows read with `rules` (the run's d0, reading error and unit).
    pub fn with_rules(mut self, rules: RowRules) -> Self {
        self.rules = rules;
        self
    }

    /// Count the row at `line` as not measured.
    pub fn log_unmeasured(&self, line: u64) {
        if let Ok(mut log) = self.unmeasured.lock() {
            log.push(line);
        }
    }

    /// The lines of the rows not measured so far (by a [`super::MeasurementReader`]).
    pub fn unmeasured_lines(&self) -> crate::capped::Capped<u64> {
        self.unmeasured
            .lock()
            .map(|l| l.clone())
            .unwrap_or_default()
    }

    /// A note for the user when near-equal axes or strains were swapped.
    pub fn swap_note(&self) -> Option<String> {
        let (n, first) = self.swaps.get();
        let tol = match (self.rules.reading_error, self.columns.gives_strains()) {
            (Some(r), true) => format!("the reading error {r} pp"),
            (Some(r), false) => format!("the reading error {r}"),
            (None, true) => format!("{SWAP_TOLERANCE_PP} pp"),
            (None, false) => "1 % of d0".into(),
        };
        (n > 0).then(|| {
            format!(
                "{n} row{} read minor a hair above major (within {tol}): taken as \
                 near-equal and swapped, first at line {first}; each is noted in points.csv",
                if n == 1 { "" } else { "s" }
            )
        })
    }

    /// Read one record at `line` into a measurement or a rejection, and whether its
    /// engineering and true strains disagree.
    pub fn row(
        &self,
        record: &csv::StringRecord,
        line: u64,
    ) -> std::result::Result<(Measurement, bool), RejectedRow> {
        RowReader {
            cols: &self.columns,
            dialect: self.dialect,
            file: &self.file,
            line,
            record,
            rules: &self.rules,
            swaps: &self.swaps,
        }
        .read()
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of [`Header`] and README.md, "What input is refused,
    //! and why" (a header of more than 1000 fields rejects the file).
    use super::super::Reading;
    use super::*;

    fn read(text: &str) -> (Result<Header>, String) {
        let mut input = text.as_bytes();
        let header = Header::read(&mut input, Path::new("m.csv"), &ColumnMap::default());
        (header, String::from_utf8_lossy(input).into_owned())
    }

    #[test]
    fn comments_are_counted_and_the_input_is_left_at_the_first_row() {
        let (header, rest) = read("# part 4711\n\n# d0 2.5\nid;major;minor\nA1;2,6;2,5\n");
        let header = header.unwrap();
        assert_eq!(header.dialect, Dialect::Semicolon);
        assert_eq!(header.lines, 4);
        assert_eq!(rest, "A1;2,6;2,5\n");
        assert!(!header.columns.gives_strains());
        let (header, _) = read("id\tmajor\tminor");
        let header = header.unwrap();
        assert_eq!((header.dialect, header.lines), (Dialect::Tab, 1));
    }

    #[test]
    fn a_file_without_a_usable_header_is_refused() {
        let e = read("# only a comment\n\n").0.unwrap_err().to_string();
        assert!(e.starts_with("m.csv: the file is empty"), "{e}");
        let wide = format!(
            "id,major,minor{}\n",
            ",extra".repeat(super::super::MAX_FIELDS - 2)
        );
        let e = read(&wide).0.unwrap_err().to_string();
        assert!(
            e.starts_with("m.csv:1: the header has 1001 fields, more than 1000"),
            "{e}"
        );
        let e = read("id,major\n").0.unwrap_err().to_string();
        assert!(e.starts_with("m.csv:1: missing column `minor`"), "{e}");
    }

    #[test]
    fn a_row_is_read_at_its_line_with_the_rules_in_force() {
        let (header, _) = read("id,major,minor\n");
        let header = header.unwrap().with_rules(RowRules {
            d0: Some(2.5),
            ..RowRules::default()
        });
        let record = csv::StringRecord::from(vec!["A7", "2.50", "2.51"]);
        let (m, disagree) = header.row(&record, 9).unwrap();
        assert_eq!((m.id.as_str(), m.line, disagree), ("A7", 9, false));
        assert!(matches!(m.reading, Reading::Axes { major, .. } if (major - 2.51).abs() < 1e-12));
        let note = header.swap_note().unwrap();
        assert!(note.starts_with("1 row read minor a hair above major (within 1 % of d0)"));
        assert!(note.contains("first at line 9"), "{note}");
        let bad = csv::StringRecord::from(vec!["A8", "x", "2.5"]);
        let e = header.row(&bad, 10).unwrap_err();
        assert_eq!(
            e.to_string(),
            "m.csv:10:2 (column `major`): expected a finite number, found `x`"
        );
    }
}
