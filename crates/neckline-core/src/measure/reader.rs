//! Opening a measurement file and reading its rows: all at once into a [`MeasurementSet`], or
//! one at a time with a [`MeasurementReader`].

use super::dialect::{csv_error, csv_reader};
use super::{ColumnMap, Header, Measurement, MeasurementSet, RejectedRow};
use crate::error::{Error, Location, Result};
use std::collections::HashSet;
use std::io::BufRead;
use std::path::Path;

/// Open `path` for reading as UTF-8 text with LF line ends (`-` is standard input): a
/// workbook's sheet, or text in any encoding [`crate::text`] reads.
pub fn open_input(path: &Path) -> Result<Box<dyn BufRead + Send>> {
    crate::text::open(path).map(|(input, _)| input)
}

/// Read a measurement file from `path` (`-` for standard input) into memory: for small files
/// (outlines, parts evidence); `check` streams through [`crate::stream`].
pub fn read_measurements(path: &Path) -> Result<MeasurementSet> {
    let input = open_input(path)?;
    read_measurements_from(input, path, &ColumnMap::default())
}

/// Read measurements from any reader; `name` is used in messages.
pub fn read_measurements_from(
    input: impl BufRead,
    name: &Path,
    map: &ColumnMap,
) -> Result<MeasurementSet> {
    let mut rows = MeasurementReader::new(input, name, map)?;
    let mut points = Vec::new();
    let mut rejected = Vec::new();
    for row in &mut rows {
        match row? {
            Ok(m) => points.push(m),
            Err(r) => rejected.push(r),
        }
    }
    if points.is_empty() && rejected.is_empty() {
        return Err(no_rows(name));
    }
    Ok(MeasurementSet {
        source: name.to_path_buf(),
        dialect: rows.header.dialect,
        points,
        rejected,
        notes: rows.header.notes.clone(),
        not_measured: rows.header.unmeasured_lines(),
    })
}

/// The error for a file with a header and no data row.
pub fn no_rows(name: &Path) -> Error {
    Error::input(
        Location::file(name),
        "the file has a header but no measurement rows",
    )
}

/// The rows of a measurement file, one at a time, each accepted or rejected. Memory stays
/// bounded by one row plus the set of ids seen (needed to find duplicates). A file-level
/// problem met part way (a broken UTF-8 sequence, an I/O error) ends the iteration with
/// `Some(Err(..))`.
pub struct MeasurementReader<B: BufRead> {
    reader: csv::Reader<B>,
    /// The header.
    pub header: Header,
    ids: HashSet<(String, Option<String>)>,
    record: csv::StringRecord,
    failed: bool,
}

/// One data row: the measurement, or why it was rejected.
pub type Row = std::result::Result<Measurement, RejectedRow>;

impl<B: BufRead> MeasurementReader<B> {
    /// Read and check the header; `name` is used in messages.
    pub fn new(mut input: B, name: &Path, map: &ColumnMap) -> Result<Self> {
        let header = Header::read(&mut input, name, map)?;
        Ok(Self::after(input, header))
    }

    /// The rows of `input`, whose header was read already.
    pub fn after(input: B, header: Header) -> Self {
        MeasurementReader {
            reader: csv_reader(header.dialect, input),
            header,
            ids: HashSet::new(),
            record: csv::StringRecord::new(),
            failed: false,
        }
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
                    return Some(Err(csv_error(&Location::file(&self.header.file), e)
                        .shift_line(self.header.lines)));
                }
                Ok(true) if self.record.iter().all(|f| f.trim().is_empty()) => continue,
                Ok(true) => {
                    let line = self.header.lines + self.record.position().map_or(0, |p| p.line());
                    if self.header.not_measured(&self.record) {
                        self.header.log_unmeasured(line);
                        continue;
                    }
                    let row = self.header.row(&self.record, line).map(|(m, _)| m);
                    return Some(Ok(row.and_then(|m| {
                        if self.ids.insert((m.id.clone(), m.stage.clone())) {
                            Ok(m)
                        } else {
                            Err(duplicate(&self.header, &m))
                        }
                    })));
                }
            }
        }
    }
}

/// The rejection of a row whose id (and stage) came before.
pub fn duplicate(header: &Header, m: &Measurement) -> RejectedRow {
    duplicate_key(header, &m.id, m.stage.as_deref(), m.line)
}

/// [`duplicate`] from the row's key (id, stage) and line.
pub fn duplicate_key(header: &Header, id: &str, stage: Option<&str>, line: u64) -> RejectedRow {
    let mut location = Location::file(&header.file).at_line(line);
    if let Some(c) = header.columns.id {
        location = location.at_column(c as u64 + 1, &header.columns.names[c]);
    }
    let reason = match stage {
        Some(s) => {
            format!("duplicate id `{id}` in stage `{s}`: each location is measured once per stage")
        }
        None => format!("duplicate id `{id}`: ids must be unique within a file"),
    };
    RejectedRow {
        location,
        id: Some(id.to_string()),
        reason,
    }
}

#[cfg(test)]
mod tests {
    //! Expectations from the doc comments of [`read_measurements_from`] and
    //! [`MeasurementReader`] and the module documentation of `measure` (an empty or duplicate
    //! id rejects the row; a file without data rows is refused).
    use super::super::Dialect;
    use super::*;

    fn read(text: &[u8]) -> Result<MeasurementSet> {
        read_measurements_from(text, Path::new("m.csv"), &ColumnMap::default())
    }

    #[test]
    fn rows_are_kept_in_order_with_duplicates_rejected_per_stage() {
        let text =
            b"id;major;minor;stage\nA1;2,6;2,5;op10\n\n ; \nA1;2,9;2,6;op20\nA1;3,0;2,6;op20\n";
        let set = read(text).unwrap();
        assert_eq!(set.dialect, Dialect::Semicolon);
        assert_eq!(set.source, Path::new("m.csv"));
        let lines: Vec<u64> = set.points.iter().map(|m| m.line).collect();
        assert_eq!(lines, [2, 5]);
        assert_eq!(set.rejected.len(), 1);
        assert_eq!(
            set.rejected[0].to_string(),
            "m.csv:6:1 (column `id`): duplicate id `A1` in stage `op20`: each location is \
             measured once per stage"
        );
        assert_eq!(set.rejected[0].id.as_deref(), Some("A1"));
    }

    #[test]
    fn a_file_without_rows_or_with_broken_text_is_refused() {
        let e = read(b"# note\nid,major,minor\n\n").unwrap_err().to_string();
        assert_eq!(e, "m.csv: the file has a header but no measurement rows");
        // A byte that is not UTF-8 is refused at its line: by the text check of the start of
        // the file, or, further on, by the reader, which then ends the rows.
        let e = read(b"id,major,minor\nA1,2.6,2.5\nA2,2.\xff,2.5\nA3,2.6,2.5\n")
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("m.csv:3:") && e.contains("not UTF-8"), "{e}");
        let header = Header::read(
            &mut &b"id,major,minor\n"[..],
            Path::new("m.csv"),
            &ColumnMap::default(),
        )
        .unwrap();
        let mut rows =
            MeasurementReader::after(&b"A1,2.6,2.5\nA2,\xff,2\nA3,2.6,2.5\n"[..], header);
        assert!(matches!(rows.next(), Some(Ok(Ok(_)))));
        let e = rows.next().unwrap().unwrap_err().to_string();
        assert!(e.starts_with("m.csv:3: the file is not valid UTF-8"), "{e}");
        assert!(rows.next().is_none());
    }

    #[test]
    fn a_missing_file_is_an_error_naming_it() {
        let path = Path::new("no-such-dir-for-neckline/m.csv");
        let e = open_input(path).err().unwrap().to_string();
        assert!(e.starts_with("no-such-dir-for-neckline/m.csv: "), "{e}");
        assert!(read_measurements(path).is_err());
    }
}
