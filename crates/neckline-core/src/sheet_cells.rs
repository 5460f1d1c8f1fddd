//! The cell names of the workbooks read, for messages: the sheet read from each workbook and the
//! sheet column its text's first field is in, so that a [`crate::error::Location`] in a
//! workbook reads `tryout.xlsx, Sheet1!C14` (kept apart from the workbook reader, so that the
//! errors at the bottom of the crate need nothing above them).

use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// A workbook read: its sheet, and the 0-based sheet column of the text's first field.
struct Sheet {
    file: PathBuf,
    name: String,
    first_column: u32,
}

static SHEETS: Mutex<Vec<Sheet>> = Mutex::new(Vec::new());

/// The sheet read from `file` and the cell name of its `line` and field `column` (1-based):
/// `Sheet1!C14`, or `Sheet1!14:14` (the whole row) without a column; `None` for a file that is
/// not a workbook read here.
pub fn cell_name(file: &Path, line: Option<u64>, column: Option<u64>) -> Option<String> {
    let sheets = SHEETS.lock().unwrap_or_else(|e| e.into_inner());
    let s = sheets.iter().rev().find(|s| s.file == file)?;
    Some(match (line, column) {
        (Some(l), Some(c)) => format!(
            "{}!{}{l}",
            s.name,
            column_letters(u64::from(s.first_column) + c)
        ),
        (Some(l), None) => format!("{}!{l}:{l}", s.name),
        _ => s.name.clone(),
    })
}

/// The letters of 1-based sheet column `n`: 1 is A, 26 is Z, 27 is AA (bijective base 26, as
/// spreadsheets name columns: common practice).
pub fn column_letters(mut n: u64) -> String {
    let mut letters = Vec::new();
    while n > 0 {
        let d = (n - 1) % 26;
        letters.push(b'A' + d as u8);
        n = (n - 1) / 26;
    }
    letters.reverse();
    String::from_utf8(letters).unwrap_or_default()
}

/// Remember that `file` was read from its sheet `name`, whose first field is in the 0-based
/// sheet column `first_column` (the last read of a file stands).
pub fn remember(file: &Path, name: &str, first_column: u32) {
    let mut sheets = SHEETS.lock().unwrap_or_else(|e| e.into_inner());
    sheets.retain(|s| s.file != file);
    sheets.push(Sheet {
        file: file.to_path_buf(),
        name: name.to_string(),
        first_column,
    });
}

#[cfg(test)]
mod tests {
    use super::*;

    // Spreadsheet column names: A..Z, then AA (27), AZ (52), BA (53), ZZ (702), AAA (703):
    // common practice (bijective base 26).
    #[test]
    fn column_letters_follow_the_spreadsheet() {
        let got: Vec<String> = [1, 3, 26, 27, 52, 53, 702, 703]
            .into_iter()
            .map(column_letters)
            .collect();
        assert_eq!(got, ["A", "C", "Z", "AA", "AZ", "BA", "ZZ", "AAA"]);
    }

    #[test]
    fn a_cell_is_named_by_sheet_column_and_row() {
        let file = Path::new("named-cells-test.xlsx");
        assert_eq!(cell_name(file, Some(3), Some(2)), None);
        remember(file, "Readings", 1);
        assert_eq!(
            cell_name(file, Some(14), Some(2)).as_deref(),
            Some("Readings!C14")
        );
        assert_eq!(
            cell_name(file, Some(14), None).as_deref(),
            Some("Readings!14:14")
        );
    }
}
