//! The parsed header of a measurement file.

use super::dialect::{csv_error, csv_reader, read_header_line};
use super::row::RowReader;
use super::rules::{RowRules, SwapLog, MAX_FIELDS, SWAP_TOLERANCE_PP};
use super::{ColumnMap, Columns, Dialect, Measurement, RejectedRow};
use crate::error::{Error, Location, Result};
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
    /// Lines taken by comments and the header: the first data line is `lines + 1`.
    pub lines: u64,
    /// The d0, reading error and unit the rows are read with (see [`Header::with_rules`]).
    pub rules: RowRules,
    /// The rows whose near-equal axes were swapped.
    pub swaps: std::sync::Arc<SwapLog>,
}

impl Header {
    /// Read comment lines and the header line from `input`, which is left at the first data
    /// line.
    pub fn read(input: &mut impl BufRead, name: &Path, map: &ColumnMap) -> Result<Self> {
        let loc = Location::file(name);
        let head = input.fill_buf().map_err(|e| Error::io(name, e))?;
        crate::error::check_text(name, head, false)?;
        let (prefix, header) = read_header_line(input, name)?;
        if header.is_empty() {
            return Err(Error::input(
                loc,
                "the file is empty: expected a header row naming id, major, minor (or strain columns)",
            ));
        }
        let dialect = Dialect::detect(&header);
        let lines = prefix.bytes().filter(|&b| b == b'\n').count().max(1) as u64;
        let mut reader = csv_reader(dialect, header.as_bytes());
        let mut record = csv::StringRecord::new();
        reader
            .read_record(&mut record)
            .map_err(|e| csv_error(&loc, e))?;
        if record.len() > MAX_FIELDS {
            return Err(Error::input(
                loc.at_line(lines),
                format!(
                    "the header has {} fields, more than {MAX_FIELDS}: not a measurement file",
                    record.len()
                ),
            ));
        }
        let (columns, notes) = Columns::from_header(&record, map, &loc)?;
        Ok(Header {
            file: name.to_path_buf(),
            dialect,
            columns,
            notes,
            lines,
            rules: RowRules::default(),
            swaps: Default::default(),
        })
    }

    /// The same header, its rows read with `rules` (the run's d0, reading error and unit).
    pub fn with_rules(mut self, rules: RowRules) -> Self {
        self.rules = rules;
        self
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
        let wide = format!("id,major,minor{}\n", ",extra".repeat(MAX_FIELDS - 2));
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
