//! Workbooks (`.xlsx`, `.xlsm`, `.xls`, `.xlsb`, `.ods`) read through calamine and given to the
//! CSV readers as comma-separated text: sheet row r is line r (empty rows as empty lines), so
//! that every line number in a message is the sheet's row; a number cell is written in Rust's
//! shortest round-trip form (it parses back to the identical f64); a date cell is written as
//! its ISO date, which a number column refuses as "the date ..."; text as it is.
//!
//! Messages about a workbook name the workbook, the sheet and the cell (`tryout.xlsx,
//! Sheet1!C14`): the sheet read from each workbook, and the column the text's first field is in,
//! are kept in [`crate::sheet_cells`] for [`crate::error::Location`]'s display.

use crate::error::{Error, Location, Result};
use calamine::{Data, Reader};
use std::path::Path;

/// The file name endings read as workbooks (case-insensitive).
pub const EXTENSIONS: [&str; 5] = ["xlsx", "xlsm", "xls", "xlsb", "ods"];

/// Whether `path` is named as a workbook.
pub fn is_workbook(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| EXTENSIONS.iter().any(|w| e.eq_ignore_ascii_case(w)))
}

/// The sheet of `bytes` (the workbook `path`) picked by `sheet` (a name, or a 1-based number;
/// the first when `None`), as comma-separated text, sheet row r on line r.
pub fn to_csv(path: &Path, bytes: Vec<u8>, sheet: Option<&str>) -> Result<Vec<u8>> {
    let loc = Location::file(path);
    let mut book = calamine::open_workbook_auto_from_rs(std::io::Cursor::new(bytes))
        .map_err(|e| Error::input(loc.clone(), format!("not a workbook that can be read: {e}")))?;
    let names = book.sheet_names();
    let name = pick(&names, sheet).ok_or_else(|| {
        Error::input(
            loc.clone(),
            format!(
                "no sheet `{}`: the workbook has {} (give --sheet NAME or a number from 1)",
                sheet.unwrap_or("1"),
                names
                    .iter()
                    .map(|n| format!("`{n}`"))
                    .collect::<Vec<_>>()
                    .join(", ")
            ),
        )
    })?;
    let range = book
        .worksheet_range(&name)
        .map_err(|e| Error::input(loc.clone(), format!("sheet `{name}` cannot be read: {e}")))?;
    let (first_row, first_column) = range.start().unwrap_or((0, 0));
    crate::sheet_cells::remember(path, &name, first_column);
    let mut out = vec![b'\n'; first_row as usize];
    for row in range.rows() {
        let cells: Vec<String> = row.iter().map(cell_text).collect();
        // Every row as wide as the sheet's used range; an empty row an empty line.
        let end = if cells.iter().all(String::is_empty) {
            0
        } else {
            cells.len()
        };
        for (i, c) in cells[..end].iter().enumerate() {
            if i > 0 {
                out.push(b',');
            }
            if c.contains([',', ';', '\t', '"', '\n', '\r']) {
                out.push(b'"');
                out.extend_from_slice(c.replace('"', "\"\"").as_bytes());
                out.push(b'"');
            } else {
                out.extend_from_slice(c.as_bytes());
            }
        }
        out.push(b'\n');
    }
    Ok(out)
}

/// The sheet named `want`, or numbered so from 1, or the first.
fn pick(names: &[String], want: Option<&str>) -> Option<String> {
    let Some(want) = want.map(str::trim) else {
        return names.first().cloned();
    };
    if let Some(n) = names.iter().find(|n| n.as_str() == want) {
        return Some(n.clone());
    }
    if let Some(n) = names.iter().find(|n| n.eq_ignore_ascii_case(want)) {
        return Some(n.clone());
    }
    let i: usize = want.parse().ok()?;
    names.get(i.checked_sub(1)?).cloned()
}

/// A cell as text: numbers in the shortest form that reads back as the same f64, dates as ISO
/// dates, the rest as shown.
fn cell_text(c: &Data) -> String {
    match c {
        Data::Empty => String::new(),
        Data::Int(i) => i.to_string(),
        // Rust's `Display` for f64 is the shortest decimal that parses back to the same value.
        Data::Float(f) => f.to_string(),
        Data::String(s) => s.clone(),
        Data::Bool(b) => if *b { "TRUE" } else { "FALSE" }.to_string(),
        Data::DateTime(d) if d.is_duration() => format!("the duration {}", d.as_f64()),
        Data::DateTime(d) => {
            let (y, mo, day, h, mi, s, _) = d.to_ymd_hms_milli();
            if (h, mi, s) == (0, 0, 0) {
                format!("{y:04}-{mo:02}-{day:02}")
            } else {
                format!("{y:04}-{mo:02}-{day:02} {h:02}:{mi:02}:{s:02}")
            }
        }
        Data::DateTimeIso(s) | Data::DurationIso(s) => s.clone(),
        Data::Error(e) => e.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_sheet_is_picked_by_name_or_number() {
        let names = vec!["Sheet1".to_string(), "Tryout 2".to_string()];
        assert_eq!(pick(&names, None).as_deref(), Some("Sheet1"));
        assert_eq!(pick(&names, Some("2")).as_deref(), Some("Tryout 2"));
        assert_eq!(pick(&names, Some("tryout 2")).as_deref(), Some("Tryout 2"));
        assert_eq!(pick(&names, Some("3")), None);
        assert_eq!(pick(&names, Some("0")), None);
    }

    #[test]
    fn numbers_are_written_to_read_back_the_same() {
        for v in [0.1, 1.0 / 3.0, 2.345_678_901_234_567e-7, 12.5, 1e21] {
            let t = cell_text(&Data::Float(v));
            assert_eq!(t.parse::<f64>().unwrap().to_bits(), v.to_bits(), "{t}");
        }
        assert_eq!(cell_text(&Data::Int(-4)), "-4");
    }
}
