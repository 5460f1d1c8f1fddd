//! A CSV table, read whole or streamed in chunks ([`TableStream`]): the reader of node, element, outline and parts files (the
//! same two dialects as measurement files, a header row, then data rows with their lines).
//! Values are taken out of it cell by cell with the file, line and column of each in the error.
//! Fields and rows are bounded ([`MAX_FIELDS`], [`MAX_FIELD_BYTES`]) so a mangled file is cheap
//! to refuse.

use crate::chunk::{read_batch, Chunk, Chunker};
use crate::error::{Error, Location, Result};
use crate::measure::{csv_error, open_input, parse_number, read_header_line, Dialect, RejectedRow};
use rayon::prelude::*;
use std::io::{BufRead, Read};
use std::path::{Path, PathBuf};

/// A CSV file read whole: its header and its non-blank rows with their line numbers.
#[derive(Debug, Clone)]
pub struct Table {
    /// The file as named by the user.
    pub source: PathBuf,
    /// The detected dialect.
    pub dialect: Dialect,
    /// Header names, trimmed (case kept).
    pub header: Vec<String>,
    /// 1-based line of the header (after any leading comment lines).
    pub header_line: u64,
    /// Data rows with their 1-based line numbers.
    pub rows: Vec<(u64, csv::StringRecord)>,
}

/// Read a CSV table from `path` (`-` for standard input); `what` names the expected header in
/// the message for an empty file.
pub fn read_table(path: &Path, what: &str) -> Result<Table> {
    read_table_from(open_input(path)?, path, what)
}

/// Read a CSV table from any reader; `name` is used in messages.
pub fn read_table_from(input: impl BufRead + Send, name: &Path, what: &str) -> Result<Table> {
    let mut rows = Vec::new();
    let mut t = stream_table_from(input, name, what)?.for_each_batch(
        |_, line, r| (line, r.clone()),
        |_, batch| {
            rows.extend(batch);
            Ok(())
        },
    )?;
    t.rows = rows;
    Ok(t)
}

/// A CSV table read as a stream: its head (header, dialect; no rows) and its body, cut into
/// chunks at record boundaries with the file's own line numbers.
pub struct TableStream<R: Read> {
    /// The head of the table (its `rows` empty).
    pub table: Table,
    chunks: Chunker<R>,
}

/// Open `path` (`-` for standard input) as a [`TableStream`]; `what` names the expected
/// header in the message for an empty file.
pub fn stream_table(path: &Path, what: &str) -> Result<TableStream<impl BufRead + Send>> {
    stream_table_from(open_input(path)?, path, what)
}

/// A [`TableStream`] of any reader; `name` is used in messages.
pub fn stream_table_from<R: BufRead + Send>(
    mut input: R,
    name: &Path,
    what: &str,
) -> Result<TableStream<R>> {
    let loc = Location::file(name);
    let head = input.fill_buf().map_err(|e| Error::io(name, e))?;
    crate::error::check_text(name, head, false)?;
    let (prefix, header_line) = read_header_line(&mut input, name)?;
    if header_line.is_empty() {
        return Err(Error::input(
            loc,
            format!("the file is empty: expected a header row naming {what}"),
        ));
    }
    let dialect = Dialect::detect(&header_line);
    let header_line_no = prefix.trim_end_matches(['\n', '\r']).matches('\n').count() as u64 + 1;
    let mut reader = csv_builder(dialect).from_reader(prefix.as_bytes());
    let header_record = reader.headers().map_err(|e| csv_error(&loc, e))?;
    check_record_size(header_record, &loc, 0)?;
    let header = header_record
        .iter()
        .map(|h| h.trim().trim_start_matches('\u{feff}').to_string())
        .collect();
    let body_line = prefix.matches('\n').count() as u64 + 1;
    Ok(TableStream {
        table: Table {
            source: name.to_path_buf(),
            dialect,
            header,
            header_line: header_line_no,
            rows: Vec::new(),
        },
        chunks: Chunker::new(input, body_line, dialect.delimiter()),
    })
}

fn csv_builder(dialect: Dialect) -> csv::ReaderBuilder {
    let mut b = csv::ReaderBuilder::new();
    b.delimiter(dialect.delimiter())
        .flexible(true)
        .trim(csv::Trim::All);
    b
}

impl<R: Read + Send> TableStream<R> {
    /// Every non-blank row, a batch of chunks at a time: `parse` turns each row (with its
    /// line) into an item on every core, `take` is given each batch's items in file order.
    /// A table with no data row is refused after its last chunk. Gives back the table's head.
    pub fn for_each_batch<T: Send>(
        mut self,
        parse: impl Fn(&Table, u64, &csv::StringRecord) -> T + Sync,
        mut take: impl FnMut(&Table, Vec<T>) -> Result<()>,
    ) -> Result<Table> {
        let batch = 2 * rayon::current_num_threads().max(1);
        let mut any = false;
        loop {
            let chunks = read_batch(&mut self.chunks, batch, &self.table.source)?;
            if chunks.is_empty() {
                break;
            }
            let t = &self.table;
            let parsed: Vec<Result<Vec<T>>> = chunks
                .par_iter()
                .map(|c| {
                    let rows = t.chunk_rows(c)?;
                    Ok(rows.iter().map(|(line, r)| parse(t, *line, r)).collect())
                })
                .collect();
            let mut items = Vec::new();
            for p in parsed {
                items.extend(p?);
            }
            any |= !items.is_empty();
            take(t, items)?;
        }
        if !any {
            return Err(Error::input(
                Location::file(&self.table.source),
                "the file has a header but no data rows",
            ));
        }
        Ok(self.table)
    }
}

impl<R: Read + Send> TableStream<R> {
    /// One field of every row, a batch of chunks at a time on every core: `field` turns the
    /// text of column `col` (0-based, as read; `None` when the row has no such field) into an
    /// item, `take` is given each batch's items in file order. A light pass for a question
    /// about one column: rows are not checked, lines not counted. A chunk that is not valid
    /// CSV ends the read with an error.
    pub fn for_each_field<T: Send>(
        mut self,
        col: usize,
        field: impl Fn(Option<&str>) -> T + Sync,
        mut take: impl FnMut(Vec<T>) -> Result<()>,
    ) -> Result<()> {
        let batch = 2 * rayon::current_num_threads().max(1);
        let loc = Location::file(&self.table.source);
        loop {
            let chunks = read_batch(&mut self.chunks, batch, &self.table.source)?;
            if chunks.is_empty() {
                return Ok(());
            }
            let dialect = self.table.dialect;
            let found: Vec<Result<Vec<T>>> = chunks
                .par_iter()
                .map(|c| {
                    let mut reader = csv_builder(dialect)
                        .has_headers(false)
                        .trim(csv::Trim::None)
                        .from_reader(&c.bytes[..]);
                    let mut record = csv::ByteRecord::new();
                    let mut out = Vec::new();
                    while reader
                        .read_byte_record(&mut record)
                        .map_err(|e| csv_error(&loc, e))?
                    {
                        out.push(field(
                            record.get(col).and_then(|b| std::str::from_utf8(b).ok()),
                        ));
                    }
                    Ok(out)
                })
                .collect();
            let mut items = Vec::new();
            for f in found {
                items.extend(f?);
            }
            take(items)?;
        }
    }
}

/// Where each line ends, so that a record's 1-based line comes from its byte offset: the csv
/// crate's own line count misses blank lines between records, and its offset of a record that
/// follows blank lines is that of the first blank line.
struct LineIndex(Vec<u64>);

impl LineIndex {
    fn new(bytes: &[u8]) -> Self {
        LineIndex(
            memchr::memchr_iter(b'\n', bytes)
                .map(|i| i as u64)
                .collect(),
        )
    }

    /// The 1-based line of the record starting at byte `offset` of `bytes`: line ends before
    /// its first byte that is not a line end, plus one.
    fn line_at(&self, bytes: &[u8], offset: u64) -> u64 {
        let skipped = bytes.get(offset as usize..).map_or(0, |rest| {
            rest.iter()
                .take_while(|b| matches!(b, b'\n' | b'\r'))
                .count()
        });
        let first = offset + skipped as u64;
        self.0.partition_point(|&nl| nl < first) as u64 + 1
    }
}

/// Most fields a row may have: node, element and outline rows have up to 7, so a thousand is
/// not one of them but a mangled file.
pub const MAX_FIELDS: usize = 1000;
/// Longest field, bytes: a number or an id is far shorter; longer is not a value but a mangled
/// file (an unclosed quote, a pasted document).
pub const MAX_FIELD_BYTES: usize = 4096;

/// Refuse the file at a row with more than [`MAX_FIELDS`] fields or a field longer than
/// [`MAX_FIELD_BYTES`].
fn check_record_size(r: &csv::StringRecord, loc: &Location, shift: u64) -> Result<()> {
    let line = r.position().map_or(0, |p| p.line() + shift);
    if r.len() > MAX_FIELDS {
        return Err(Error::input(
            loc.clone().at_line(line),
            format!(
                "{} fields on one row, more than {MAX_FIELDS}: not a table of this kind",
                r.len()
            ),
        ));
    }
    if let Some((i, f)) = r
        .iter()
        .enumerate()
        .find(|(_, f)| f.len() > MAX_FIELD_BYTES)
    {
        let mut at = loc.clone().at_line(line);
        at.column = Some(i as u64 + 1);
        return Err(Error::input(
            at,
            format!(
                "a field of {} bytes, more than {MAX_FIELD_BYTES}: an unclosed quote or pasted \
                 text?",
                f.len()
            ),
        ));
    }
    Ok(())
}

impl Table {
    /// The non-blank rows of one chunk of this table's body, with their lines in the file.
    pub fn chunk_rows(&self, chunk: &Chunk) -> Result<Vec<(u64, csv::StringRecord)>> {
        let loc = Location::file(&self.source);
        let shift = chunk.first_line - 1;
        let lines = LineIndex::new(&chunk.bytes);
        let mut reader = csv_builder(self.dialect)
            .has_headers(false)
            .from_reader(&chunk.bytes[..]);
        let mut rows = Vec::new();
        for record in reader.records() {
            let record = record.map_err(|e| csv_error(&loc, e).shift_line(shift))?;
            check_record_size(&record, &loc, shift)?;
            if record.iter().all(|f| f.trim().is_empty()) {
                continue;
            }
            let line = record
                .position()
                .map_or(0, |p| lines.line_at(&chunk.bytes, p.byte()) + shift);
            rows.push((line, record));
        }
        Ok(rows)
    }

    /// A rejected row at `line`, column `col` (0-based) of this table.
    pub fn reject(
        &self,
        line: u64,
        col: Option<usize>,
        id: Option<String>,
        reason: String,
    ) -> RejectedRow {
        let mut location = Location::file(&self.source).at_line(line);
        if let Some(c) = col {
            location = location.at_column(c as u64 + 1, &self.header[c]);
        }
        RejectedRow {
            location,
            id,
            reason,
        }
    }

    /// Check the field count of a row against the header.
    pub fn check_len(
        &self,
        line: u64,
        r: &csv::StringRecord,
    ) -> std::result::Result<(), RejectedRow> {
        if r.len() == self.header.len() {
            return Ok(());
        }
        Err(self.reject(
            line,
            None,
            None,
            format!(
                "expected {} fields as in the header, found {}",
                self.header.len(),
                r.len()
            ),
        ))
    }

    /// A required finite number in column `col`.
    pub fn number(
        &self,
        line: u64,
        r: &csv::StringRecord,
        col: usize,
    ) -> std::result::Result<f64, RejectedRow> {
        let raw = r.get(col).unwrap_or("").trim();
        if raw.is_empty() {
            return Err(self.reject(
                line,
                Some(col),
                None,
                "expected a number, found an empty field".into(),
            ));
        }
        parse_number(raw, self.dialect).map_err(|e| self.reject(line, Some(col), None, e))
    }

    /// A required non-empty text in column `col`.
    pub fn text(
        &self,
        line: u64,
        r: &csv::StringRecord,
        col: usize,
    ) -> std::result::Result<String, RejectedRow> {
        match r.get(col).map(str::trim) {
            Some(t) if !t.is_empty() => Ok(t.to_string()),
            _ => Err(self.reject(
                line,
                Some(col),
                None,
                "expected a value, found an empty field".into(),
            )),
        }
    }

    /// A header error at column `col` (0-based), or at the header line when `None`.
    pub fn header_error(&self, col: Option<usize>, message: String) -> Error {
        let mut loc = Location::file(&self.source).at_line(self.header_line);
        if let Some(c) = col {
            loc = loc.at_column(c as u64 + 1, &self.header[c]);
        }
        Error::input(loc, message)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<Table> {
        read_table_from(text.as_bytes(), Path::new("t.csv"), "id, x, y")
    }

    #[test]
    fn rows_keep_their_file_lines_after_comments_and_blank_rows() {
        let t = read("# note\nid,x,y\na,1,2\n\nb,3,4\n").unwrap();
        assert_eq!(t.header, ["id", "x", "y"]);
        assert_eq!(t.header_line, 2);
        let lines: Vec<u64> = t.rows.iter().map(|(l, _)| *l).collect();
        assert_eq!(lines, [3, 5]);
    }

    #[test]
    fn windows_line_ends_give_the_same_lines() {
        let t = read("# note\r\nid,x,y\r\na,1,2\r\n\r\nb,3,4\r\nc,5,6\r\n").unwrap();
        let lines: Vec<u64> = t.rows.iter().map(|(l, _)| *l).collect();
        assert_eq!(lines, [3, 5, 6]);
    }

    #[test]
    fn semicolon_files_are_read_like_comma_files() {
        let t = read("id;x;y\na;1;2\n").unwrap();
        assert_eq!(t.rows[0].1.get(2), Some("2"));
    }

    #[test]
    fn empty_and_header_only_files_are_refused_with_what_was_expected() {
        let e = read("").unwrap_err().to_string();
        assert!(e.contains("t.csv") && e.contains("id, x, y"), "{e}");
        let e = read("id,x,y\n").unwrap_err().to_string();
        assert!(e.contains("no data rows"), "{e}");
    }

    #[test]
    fn an_overlong_field_is_refused_at_its_line_and_column() {
        let long = "9".repeat(MAX_FIELD_BYTES + 1);
        let e = read(&format!("id,x,y\na,1,2\nb,{long},2\n"))
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("t.csv") && e.contains('3') && e.contains("more than 4096"),
            "{e}"
        );
    }

    #[test]
    fn a_cell_that_is_not_a_number_names_line_and_column() {
        let t = read("id,x,y\na,1,oops\n").unwrap();
        let (line, r) = &t.rows[0];
        let e = t.number(*line, r, 2).unwrap_err().to_string();
        assert!(e.contains("t.csv") && e.contains("oops"), "{e}");
    }
}
