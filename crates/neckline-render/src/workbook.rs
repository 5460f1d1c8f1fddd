//! points.xlsx: the judged table as a workbook, for those who work in a spreadsheet. Sheet
//! "points" holds the columns of points.csv (numbers as numbers), its header frozen and
//! filtered, each zone cell filled in the zone's colour of the pictures; sheet "summary" holds
//! the counts per zone, the curve and its source, the settings and the caution.
//!
//! The rows are read back from points.csv after the pass, one at a time, and written in
//! rust_xlsxwriter's constant-memory mode: memory does not grow with the file.

use crate::plot::zone_colour;
use neckline_core::analysis::Analysis;
use neckline_core::assess::Zone;
use rust_xlsxwriter::{Color, Format, Workbook, Worksheet, XlsxError};
use std::path::Path;

/// Rows of a worksheet (the file format's limit, header included).
pub const MAX_ROWS: u64 = 1_048_576;

/// Rows sampled from the start of points.csv for the column widths.
const WIDTH_ROWS: usize = 1_000;

/// Columns of points.csv that hold text even where it reads as a number.
const TEXT_COLUMNS: &[&str] = &["id", "stage", "note"];

/// A cell of points.csv as written to the workbook: a number where the column holds numbers
/// and the text is one, else the text.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell<'a> {
    /// A finite number.
    Number(f64),
    /// Text (or an empty cell).
    Text(&'a str),
}

/// The cell `text` of column `name`.
pub fn cell<'a>(name: &str, text: &'a str) -> Cell<'a> {
    if TEXT_COLUMNS.contains(&name) {
        return Cell::Text(text);
    }
    match text.trim().parse::<f64>() {
        Ok(v) if v.is_finite() && !text.trim().is_empty() => Cell::Number(v),
        _ => Cell::Text(text),
    }
}

/// The fill of a zone cell: the zone's colour, with white or black text by its lightness
/// (relative luminance by the sRGB weights of ITU-R BT.709 on the 8-bit values, a common
/// approximation).
pub fn zone_format(z: Zone) -> Format {
    let c = zone_colour(z);
    let rgb = (u32::from(c.0) << 16) | (u32::from(c.1) << 8) | u32::from(c.2);
    let luma = 0.2126 * f64::from(c.0) + 0.7152 * f64::from(c.1) + 0.0722 * f64::from(c.2);
    let text = if luma < 128.0 {
        Color::White
    } else {
        Color::Black
    };
    Format::new()
        .set_background_color(Color::RGB(rgb))
        .set_font_color(text)
}

fn csv_reader(path: &Path) -> std::io::Result<csv::Reader<std::fs::File>> {
    Ok(csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .from_reader(std::fs::File::open(path)?))
}

fn io(e: XlsxError) -> std::io::Error {
    std::io::Error::other(e.to_string())
}

fn csv_io(e: csv::Error) -> std::io::Error {
    std::io::Error::new(std::io::ErrorKind::InvalidData, e.to_string())
}

/// Column widths in characters: the header's and the first rows' longest text, within 6..40.
fn widths(points_csv: &Path) -> std::io::Result<Vec<f64>> {
    let mut reader = csv_reader(points_csv)?;
    let mut widths: Vec<usize> = Vec::new();
    for record in reader.records().take(WIDTH_ROWS + 1) {
        let record = record.map_err(csv_io)?;
        for (i, f) in record.iter().enumerate() {
            if widths.len() <= i {
                widths.push(0);
            }
            widths[i] = widths[i].max(f.chars().count());
        }
    }
    Ok(widths
        .into_iter()
        .map(|w| (w + 2).clamp(6, 40) as f64)
        .collect())
}

/// Write `target` (points.xlsx) from `points_csv` (the points.csv of the same run) and the
/// analysis `a`.
pub fn write_points_xlsx(points_csv: &Path, target: &Path, a: &Analysis) -> std::io::Result<()> {
    let widths = widths(points_csv)?;
    let mut workbook = Workbook::new();
    let sheet = workbook.add_worksheet_with_constant_memory().map_err(io)?;
    sheet.set_name("points").map_err(io)?;
    points_sheet(sheet, points_csv, &widths)?;
    let sheet = workbook.add_worksheet_with_constant_memory().map_err(io)?;
    sheet.set_name("summary").map_err(io)?;
    summary_sheet(sheet, a).map_err(io)?;
    workbook.save(target).map_err(io)
}

fn points_sheet(sheet: &mut Worksheet, points_csv: &Path, widths: &[f64]) -> std::io::Result<()> {
    let header = Format::new().set_bold();
    let zones: Vec<(Zone, Format)> = Zone::ALL.iter().map(|&z| (z, zone_format(z))).collect();
    for (i, w) in widths.iter().enumerate() {
        sheet.set_column_width(i as u16, *w).map_err(io)?;
    }
    sheet.set_freeze_panes(1, 0).map_err(io)?;
    let mut reader = csv_reader(points_csv)?;
    let mut record = csv::StringRecord::new();
    let mut names: Vec<String> = Vec::new();
    let mut row: u32 = 0;
    while reader.read_record(&mut record).map_err(csv_io)? {
        if u64::from(row) >= MAX_ROWS {
            return Err(std::io::Error::other(format!(
                "more than {} locations do not fit one worksheet: use points.csv",
                MAX_ROWS - 1
            )));
        }
        if row == 0 {
            names = record.iter().map(str::to_string).collect();
            for (c, name) in names.iter().enumerate() {
                sheet
                    .write_string_with_format(0, c as u16, name, &header)
                    .map_err(io)?;
            }
        } else {
            for (c, text) in record.iter().enumerate() {
                let name = names.get(c).map_or("", String::as_str);
                let col = c as u16;
                let zone = name
                    .ends_with("zone")
                    .then(|| zones.iter().find(|(z, _)| z.name() == text).map(|(_, f)| f));
                match (cell(name, text), zone.flatten()) {
                    (Cell::Text(t), Some(f)) => sheet.write_string_with_format(row, col, t, f),
                    (Cell::Text(""), None) => continue,
                    (Cell::Text(t), None) => sheet.write_string(row, col, t),
                    (Cell::Number(v), _) => sheet.write_number(row, col, v),
                }
                .map_err(io)?;
            }
        }
        row += 1;
    }
    if row > 0 && !names.is_empty() {
        sheet
            .autofilter(0, 0, row - 1, names.len() as u16 - 1)
            .map_err(io)?;
    }
    Ok(())
}

fn summary_sheet(sheet: &mut Worksheet, a: &Analysis) -> Result<(), XlsxError> {
    let bold = Format::new().set_bold();
    sheet.set_column_width(0, 28)?;
    sheet.set_column_width(1, 60)?;
    let mut row = 0u32;
    let mut text = |sheet: &mut Worksheet, k: &str, v: &str| -> Result<(), XlsxError> {
        sheet.write_string_with_format(row, 0, k, &bold)?;
        if !v.is_empty() {
            sheet.write_string(row, 1, v)?;
        }
        row += 1;
        Ok(())
    };
    text(sheet, "input", &a.input.display().to_string())?;
    text(sheet, "verdict", a.verdict().name())?;
    let s = &a.settings;
    let l = &a.lengths;
    let opt = |v: Option<f64>| v.map_or_else(|| "not set".to_string(), |v| v.to_string());
    let lines: Vec<(&str, String)> = vec![
        ("locations judged", a.total().to_string()),
        ("rows rejected", a.rejected_total().to_string()),
        (
            "points not measured",
            a.summary.not_measured.total.to_string(),
        ),
        ("curve", a.curve.name.clone()),
        ("curve source", a.curve.source.clone()),
        ("curve strain", a.curve.measure.name().to_string()),
        ("margin (pp)", s.margin_pct.to_string()),
        ("low stretch (%)", s.low_stretch_pct.to_string()),
        ("max thinning (%)", opt(s.max_thinning_pct)),
        ("thickening (%)", s.thickening_pct.to_string()),
        ("reading error", opt(s.reading_error)),
        ("unit", l.unit.name().to_string()),
        ("d0", opt(l.d0)),
        ("t0", opt(l.t0)),
    ];
    for (k, v) in &lines {
        text(sheet, k, v)?;
    }
    row += 1;
    sheet.write_string_with_format(row, 0, "zone", &bold)?;
    sheet.write_string_with_format(row, 1, "locations", &bold)?;
    row += 1;
    for (z, n) in a.counts() {
        sheet.write_string_with_format(row, 0, z.name(), &zone_format(z))?;
        sheet.write_number(row, 1, n as f64)?;
        row += 1;
    }
    row += 1;
    sheet.write_string(row, 0, neckline_core::CAUTION)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation (numbers as numbers, ids as text) and
    //! plot.rs's palette (the zone's colour).
    use super::*;

    #[test]
    fn numbers_are_numbers_and_ids_stay_text() {
        assert_eq!(cell("margin_pct", "-3.25"), Cell::Number(-3.25));
        assert_eq!(cell("id", "007"), Cell::Text("007"));
        assert_eq!(cell("zone", "failed"), Cell::Text("failed"));
        assert_eq!(cell("x", ""), Cell::Text(""));
        assert_eq!(cell("x", "NaN"), Cell::Text("NaN"));
    }

    #[test]
    fn a_zone_cell_takes_the_palette_colour_and_a_readable_text() {
        // #EE6677 (palette RED) is light: black text; #444444 (NEUTRAL) dark: white text.
        let failed = zone_format(Zone::Failed);
        assert_eq!(
            failed,
            Format::new()
                .set_background_color(Color::RGB(0xEE6677))
                .set_font_color(Color::Black)
        );
        let low = zone_format(Zone::LowStretch);
        assert_eq!(
            low,
            Format::new()
                .set_background_color(Color::RGB(0x444444))
                .set_font_color(Color::White)
        );
    }
}
