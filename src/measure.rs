//! Reading circle-grid measurements from CSV.
//!
//! Columns (header row, names case-insensitive, any order): `id`, `major`, `minor` (the measured
//! ellipse axes; `d1`, `d2` are accepted as aliases), and optionally `d0`, `x`, `y`, `stage`,
//! `thickness`, `note`. Two dialects are recognised from the header line: comma-separated with a
//! decimal point, and semicolon-separated with a decimal comma (common in European shops).
//!
//! What rejects the **whole file**: it cannot be read, it is empty or has no data row, the header
//! lacks a required column or names one twice. What rejects **one row** (listed, never dropped in
//! silence): a wrong number of fields, an empty or duplicate id, a value that is not a finite
//! number, an axis or d0 that is zero or negative, `major < minor`, no d0 at all for that row.

use crate::error::{Error, Location, Result};
use crate::observed::Condition;
use std::collections::HashSet;
use std::fs::File;
use std::io::{self, BufRead, BufReader, Cursor, Read};
use std::path::{Path, PathBuf};

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

/// One measured location, as read (lengths in the file's unit).
#[derive(Debug, Clone, PartialEq)]
pub struct Measurement {
    /// Location label, unique in the file.
    pub id: String,
    /// 1-based line in the file, for messages.
    pub line: u64,
    /// Measured major axis d1.
    pub major: f64,
    /// Measured minor axis d2.
    pub minor: f64,
    /// Initial circle diameter of this row (overrides the job's and the flag's).
    pub d0: Option<f64>,
    /// Position on the part.
    pub x: Option<f64>,
    /// Position on the part.
    pub y: Option<f64>,
    /// Forming stage or operation label.
    pub stage: Option<String>,
    /// Measured sheet thickness, for a cross-check with the computed one.
    pub thickness: Option<f64>,
    /// Free text.
    pub note: Option<String>,
    /// Condition observed on the part at this circle (`safe`, `necked`, `split`), if marked.
    pub condition: Option<Condition>,
}

/// A data row that was not accepted, with the reason.
#[derive(Debug, Clone, PartialEq)]
pub struct RejectedRow {
    /// Where: file, line and column.
    pub location: Location,
    /// The row's id, if it could be read.
    pub id: Option<String>,
    /// What was found and what was expected.
    pub reason: String,
}

impl std::fmt::Display for RejectedRow {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.location, self.reason)
    }
}

/// The accepted and rejected rows of one measurement file.
#[derive(Debug, Clone)]
pub struct MeasurementSet {
    /// The file as named by the user (`-` for standard input).
    pub source: PathBuf,
    /// The detected dialect.
    pub dialect: Dialect,
    /// Accepted rows, in file order.
    pub points: Vec<Measurement>,
    /// Rejected rows, in file order.
    pub rejected: Vec<RejectedRow>,
    /// Header columns that were not recognised (ignored).
    pub ignored_columns: Vec<String>,
}

/// Indices of the recognised columns in the header.
#[derive(Debug, Default)]
struct Columns {
    names: Vec<String>,
    id: usize,
    major: usize,
    minor: usize,
    d0: Option<usize>,
    x: Option<usize>,
    y: Option<usize>,
    stage: Option<usize>,
    thickness: Option<usize>,
    note: Option<usize>,
    condition: Option<usize>,
}

const REQUIRED: [&str; 3] = ["id", "major", "minor"];
const KNOWN: [&str; 11] = [
    "id",
    "major",
    "minor",
    "d0",
    "x",
    "y",
    "stage",
    "thickness",
    "note",
    "condition",
    "",
];

fn canonical(name: &str) -> String {
    let n = name
        .trim()
        .trim_start_matches('\u{feff}')
        .to_ascii_lowercase();
    match n.as_str() {
        "d1" => "major".into(),
        "d2" => "minor".into(),
        _ => n,
    }
}

impl Columns {
    fn from_header(header: &csv::StringRecord, loc: &Location) -> Result<(Self, Vec<String>)> {
        let names: Vec<String> = header.iter().map(canonical).collect();
        let mut seen = HashSet::new();
        for (i, n) in names.iter().enumerate() {
            if !n.is_empty() && !seen.insert(n.clone()) {
                return Err(Error::input(
                    loc.clone().at_line(1).at_column(i as u64 + 1, n),
                    format!("column `{n}` appears twice in the header"),
                ));
            }
        }
        let find = |n: &str| names.iter().position(|c| c == n);
        for req in REQUIRED {
            if find(req).is_none() {
                return Err(Error::input(
                    loc.clone().at_line(1),
                    format!(
                        "missing column `{req}`: the header must name id, major and minor \
                         (found: {})",
                        header.iter().collect::<Vec<_>>().join(", ")
                    ),
                ));
            }
        }
        let ignored = names
            .iter()
            .filter(|n| !KNOWN.contains(&n.as_str()))
            .cloned()
            .collect();
        let cols = Columns {
            id: find("id").unwrap_or_default(),
            major: find("major").unwrap_or_default(),
            minor: find("minor").unwrap_or_default(),
            d0: find("d0"),
            x: find("x"),
            y: find("y"),
            stage: find("stage"),
            thickness: find("thickness"),
            note: find("note"),
            condition: find("condition"),
            names,
        };
        Ok((cols, ignored))
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
        _ => Err(format!("expected a finite number, found `{}`", text.trim())),
    }
}

/// Reads one row into a [`Measurement`], or says why it is rejected.
struct RowReader<'a> {
    cols: &'a Columns,
    dialect: Dialect,
    loc: Location,
    record: &'a csv::StringRecord,
}

impl RowReader<'_> {
    fn reject(&self, col: usize, reason: String) -> RejectedRow {
        RejectedRow {
            location: self
                .loc
                .clone()
                .at_column(col as u64 + 1, &self.cols.names[col]),
            id: self.text(self.cols.id),
            reason,
        }
    }

    fn text(&self, col: usize) -> Option<String> {
        let v = self.record.get(col)?.trim();
        (!v.is_empty()).then(|| v.to_string())
    }

    fn number(&self, col: usize) -> std::result::Result<f64, RejectedRow> {
        let raw = self.record.get(col).unwrap_or("");
        if raw.trim().is_empty() {
            return Err(self.reject(col, "expected a number, found an empty field".into()));
        }
        parse_number(raw, self.dialect).map_err(|e| self.reject(col, e))
    }

    fn optional(&self, col: Option<usize>) -> std::result::Result<Option<f64>, RejectedRow> {
        match col {
            Some(c) if self.text(c).is_some() => self.number(c).map(Some),
            _ => Ok(None),
        }
    }

    fn positive(&self, col: usize, what: &str) -> std::result::Result<f64, RejectedRow> {
        let v = self.number(col)?;
        if v <= 0.0 {
            return Err(self.reject(col, format!("{what} must be greater than zero, found {v}")));
        }
        Ok(v)
    }

    fn read(&self) -> std::result::Result<Measurement, RejectedRow> {
        let c = self.cols;
        if self.record.len() != c.names.len() {
            return Err(RejectedRow {
                location: self.loc.clone(),
                id: None,
                reason: format!(
                    "expected {} fields as in the header, found {}",
                    c.names.len(),
                    self.record.len()
                ),
            });
        }
        let id = self
            .text(c.id)
            .ok_or_else(|| self.reject(c.id, "empty id".into()))?;
        let major = self.positive(c.major, "the major axis")?;
        let minor = self.positive(c.minor, "the minor axis")?;
        if major < minor {
            return Err(self.reject(
                c.minor,
                format!("major axis {major} is smaller than minor axis {minor}: columns swapped?"),
            ));
        }
        let d0 = match c.d0 {
            Some(col) if self.text(col).is_some() => Some(self.positive(col, "d0")?),
            _ => None,
        };
        let thickness = match c.thickness {
            Some(col) if self.text(col).is_some() => Some(self.positive(col, "thickness")?),
            _ => None,
        };
        Ok(Measurement {
            id,
            line: self.loc.line.unwrap_or(0),
            major,
            minor,
            d0,
            x: self.optional(c.x)?,
            y: self.optional(c.y)?,
            stage: c.stage.and_then(|s| self.text(s)),
            thickness,
            note: c.note.and_then(|s| self.text(s)),
            condition: c.condition.map_or(Ok(None), |col| {
                Condition::parse_optional(self.record.get(col).unwrap_or(""))
                    .map_err(|e| self.reject(col, e))
            })?,
        })
    }
}

/// Open `path` for reading; `-` is standard input.
pub fn open_input(path: &Path) -> Result<Box<dyn BufRead>> {
    if path.as_os_str() == "-" {
        return Ok(Box::new(BufReader::new(io::stdin())));
    }
    let f = File::open(path).map_err(|e| Error::io(path, e))?;
    Ok(Box::new(BufReader::new(f)))
}

/// Read a measurement file from `path` (`-` for standard input).
pub fn read_measurements(path: &Path) -> Result<MeasurementSet> {
    let input = open_input(path)?;
    read_measurements_from(input, path)
}

/// Read measurements from any reader; `name` is used in messages.
pub fn read_measurements_from(input: impl BufRead, name: &Path) -> Result<MeasurementSet> {
    let mut rows = MeasurementReader::new(input, name)?;
    let mut points = Vec::new();
    let mut rejected = Vec::new();
    for row in &mut rows {
        match row? {
            Ok(m) => points.push(m),
            Err(r) => rejected.push(r),
        }
    }
    if points.is_empty() && rejected.is_empty() {
        return Err(Error::input(
            Location::file(name),
            "the file has a header but no measurement rows",
        ));
    }
    Ok(MeasurementSet {
        source: name.to_path_buf(),
        dialect: rows.dialect,
        points,
        rejected,
        ignored_columns: rows.ignored_columns,
    })
}

/// The rows of a measurement file, one at a time, each accepted or rejected: the streaming
/// form of [`read_measurements_from`] for files too large to hold. Memory stays bounded by one
/// row plus the set of ids seen (needed to find duplicates). A file-level problem met part way
/// (a broken UTF-8 sequence, an I/O error) ends the iteration with `Some(Err(..))`.
pub struct MeasurementReader<B: BufRead> {
    reader: csv::Reader<std::io::Chain<Cursor<Vec<u8>>, B>>,
    cols: Columns,
    loc: Location,
    ids: HashSet<String>,
    record: csv::StringRecord,
    failed: bool,
    /// The detected dialect.
    pub dialect: Dialect,
    /// Header columns that were not recognised (ignored).
    pub ignored_columns: Vec<String>,
}

/// One data row: the measurement, or why it was rejected.
pub type Row = std::result::Result<Measurement, RejectedRow>;

impl<B: BufRead> MeasurementReader<B> {
    /// Read and check the header; `name` is used in messages.
    pub fn new(mut input: B, name: &Path) -> Result<Self> {
        let loc = Location::file(name);
        let (prefix, header) = read_header_line(&mut input, name)?;
        if header.is_empty() {
            return Err(Error::input(
                loc,
                "the file is empty: expected a header row naming id, major, minor",
            ));
        }
        let dialect = Dialect::detect(&header);
        let mut reader = csv::ReaderBuilder::new()
            .delimiter(dialect.delimiter())
            .flexible(true)
            .trim(csv::Trim::All)
            .from_reader(Cursor::new(prefix.into_bytes()).chain(input));
        let header = reader.headers().map_err(|e| csv_error(&loc, e))?.clone();
        let (cols, ignored_columns) = Columns::from_header(&header, &loc)?;
        Ok(MeasurementReader {
            reader,
            cols,
            loc,
            ids: HashSet::new(),
            record: csv::StringRecord::new(),
            failed: false,
            dialect,
            ignored_columns,
        })
    }

    fn judge_row(&mut self) -> Row {
        let line = self.record.position().map_or(0, |p| p.line());
        let row = RowReader {
            cols: &self.cols,
            dialect: self.dialect,
            loc: self.loc.clone().at_line(line),
            record: &self.record,
        };
        let m = row.read()?;
        if !self.ids.insert(m.id.clone()) {
            return Err(row.reject(
                self.cols.id,
                format!("duplicate id `{}`: ids must be unique within a file", m.id),
            ));
        }
        Ok(m)
    }
}

impl<B: BufRead> Iterator for MeasurementReader<B> {
    type Item = Result<Row>;

    fn next(&mut self) -> Option<Result<Row>> {
        if self.failed {
            return None;
        }
        loop {
            match self.reader.read_record(&mut self.record) {
                Ok(false) => return None,
                Err(e) => {
                    self.failed = true;
                    return Some(Err(csv_error(&self.loc, e)));
                }
                // A blank spreadsheet row carries nothing to drop.
                Ok(true) if self.record.iter().all(|f| f.trim().is_empty()) => continue,
                Ok(true) => return Some(Ok(self.judge_row())),
            }
        }
    }
}

/// Read up to and including the first line that is neither blank nor a `#` comment.
/// Returns what the CSV reader is to be fed in place of what was read (comment lines become
/// empty lines, which it skips, so that line numbers stay right) and the header line.
/// After the header `#` has no special meaning: a row is a row.
pub(crate) fn read_header_line(input: &mut impl BufRead, name: &Path) -> Result<(String, String)> {
    let mut prefix = String::new();
    let mut line = String::new();
    loop {
        line.clear();
        let n = input.read_line(&mut line).map_err(|e| Error::io(name, e))?;
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
    use super::*;

    fn read(text: &str) -> Result<MeasurementSet> {
        read_measurements_from(text.as_bytes(), Path::new("t.csv"))
    }

    #[test]
    fn reads_comma_file() {
        let s = read("id,major,minor,x,y\nA1,3.25,2.40,10,20\nA2,2.6,2.5,,\n").unwrap();
        assert_eq!(s.dialect, Dialect::Comma);
        assert_eq!(s.points.len(), 2);
        assert_eq!(s.points[0].x, Some(10.0));
        assert_eq!(s.points[1].x, None);
        assert_eq!(s.points[1].line, 3);
    }

    #[test]
    fn reads_semicolon_decimal_comma() {
        let s = read("ID;Major;Minor;d0\nA1;3,25;2,40;2,5\n").unwrap();
        assert_eq!(s.dialect, Dialect::Semicolon);
        assert!((s.points[0].major - 3.25).abs() < 1e-12);
        assert_eq!(s.points[0].d0, Some(2.5));
    }

    #[test]
    fn missing_column_rejects_file() {
        let e = read("id,major\nA,1\n").unwrap_err().to_string();
        assert!(
            e.contains("t.csv:1") && e.contains("missing column `minor`"),
            "{e}"
        );
    }

    #[test]
    fn bad_rows_are_listed_with_line_and_column() {
        let s = read("id,major,minor\nA,abc,2\nB,2,3\nC,0,0\nD,3,2\nD,3,2\nE,3\n").unwrap();
        assert_eq!(s.points.len(), 1);
        let r: Vec<String> = s.rejected.iter().map(|r| r.to_string()).collect();
        assert!(
            r[0].starts_with("t.csv:2:2 (column `major`)") && r[0].contains("`abc`"),
            "{r:?}"
        );
        assert!(
            r[1].contains(":3:3") && r[1].contains("smaller than minor"),
            "{r:?}"
        );
        assert!(
            r[2].contains(":4:2") && r[2].contains("greater than zero"),
            "{r:?}"
        );
        assert!(
            r[3].contains(":6:1") && r[3].contains("duplicate id `D`"),
            "{r:?}"
        );
        assert!(
            r[4].contains(":7") && r[4].contains("expected 3 fields"),
            "{r:?}"
        );
    }

    #[test]
    fn leading_comments_do_not_decide_the_dialect() {
        let s = read("# made by a, b, c\n\nid;major;minor\nA;3,1;2,6\n").unwrap();
        assert_eq!(s.dialect, Dialect::Semicolon);
        assert_eq!(s.points[0].line, 4);
    }

    #[test]
    fn hash_after_the_header_is_a_row_not_a_comment() {
        let s = read("# note\nid,major,minor\n#1,3,2\nA,3,2\n").unwrap();
        assert_eq!(s.points.len(), 2);
        assert_eq!(s.points[0].id, "#1");
        assert_eq!(s.points[0].line, 3);
    }

    // The streaming reader gives the same rows, one at a time, as the whole-file reader.
    #[test]
    fn streaming_reader_yields_rows_in_order() {
        let text = "id,major,minor\nA,3,2\nB,x,2\nA,3,2\n";
        let rows: Vec<Row> = MeasurementReader::new(text.as_bytes(), Path::new("t.csv"))
            .unwrap()
            .map(|r| r.unwrap())
            .collect();
        assert_eq!(rows.len(), 3);
        assert!(rows[0].is_ok() && rows[1].is_err() && rows[2].is_err());
        let set = read("id,major,minor\nA,3,2\nB,x,2\nA,3,2\n").unwrap();
        assert_eq!(set.points.len(), 1);
        assert_eq!(set.rejected.len(), 2);
    }

    #[test]
    fn invalid_utf8_part_way_is_a_file_error_with_its_line() {
        let mut bytes = b"id,major,minor\nA,3,2\nB,3,2\n".to_vec();
        bytes.extend_from_slice(b"C\xff,3,2\n");
        let e = read_measurements_from(&bytes[..], Path::new("t.csv"))
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("t.csv:4") && e.contains("UTF-8"), "{e}");
    }

    #[test]
    fn tab_separated_and_separator_hint_are_read() {
        let s = read("id\tmajor\tminor\nA\t3,25\t2.40\n").unwrap();
        assert_eq!(s.dialect, Dialect::Tab);
        assert!((s.points[0].major - 3.25).abs() < 1e-12);
        let s = read("sep=;\nid;major;minor\nA;3,25;2,40\n").unwrap();
        assert_eq!(s.dialect, Dialect::Semicolon);
        assert_eq!(s.points[0].line, 3);
    }

    #[test]
    fn nan_and_infinity_are_not_numbers() {
        let s = read("id,major,minor\nA,NaN,2\nB,inf,2\n").unwrap();
        assert_eq!(s.rejected.len(), 2);
    }

    #[test]
    fn empty_file_and_header_only_are_errors() {
        assert!(read("").unwrap_err().to_string().contains("empty"));
        assert!(read("id,major,minor\n")
            .unwrap_err()
            .to_string()
            .contains("no measurement rows"));
    }

    #[test]
    fn duplicate_header_is_an_error() {
        let e = read("id,major,minor,major\nA,3,2,3\n")
            .unwrap_err()
            .to_string();
        assert!(e.contains("appears twice"), "{e}");
    }
}
