//! Writes the demo tryout's hand readings as a workbook, as a shop types them into a
//! spreadsheet: `cargo run --example demo_workbook` rewrites
//! `demo-parts/rear-floor-pan/tryout-1.xlsx` from `tryout-1.csv` (INVENTED demo data).
//!
//! The sheet `Readings` starts with two lines of notes (the reader finds the header below
//! them), then the header, then one row per circle with the axes and coordinates as numbers.

use std::error::Error;

const SOURCE: &str = "demo-parts/rear-floor-pan/tryout-1.csv";
const TARGET: &str = "demo-parts/rear-floor-pan/tryout-1.xlsx";

fn main() -> Result<(), Box<dyn Error>> {
    let text = std::fs::read_to_string(SOURCE)?;
    let mut reader = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .from_reader(text.as_bytes());
    let header: Vec<String> = reader.headers()?.iter().map(str::to_string).collect();
    let numeric = |name: &str| matches!(name, "major" | "minor" | "x" | "y");

    let mut book = rust_xlsxwriter::Workbook::new();
    // A fixed creation date keeps the file the same byte for byte when it is made again.
    let date = rust_xlsxwriter::ExcelDateTime::from_ymd(2026, 11, 24)?;
    book.set_properties(
        &rust_xlsxwriter::DocProperties::new()
            .set_creation_datetime(&date)
            .set_title("Rear floor pan T1 readings (INVENTED demo data)"),
    );
    let sheet = book.add_worksheet();
    sheet.set_name("Readings")?;
    sheet.write(
        0,
        0,
        "INVENTED DEMO DATA: Kestrel Ridge Stampings (invented), part RFP-2207 (invented), tryout T1",
    )?;
    sheet.write(1, 0, "Axes in mm, 2.5 mm circles; x, y in mm on the part")?;
    for (c, name) in header.iter().enumerate() {
        sheet.write(2, c as u16, name.as_str())?;
    }
    for (i, record) in reader.records().enumerate() {
        let record = record?;
        let row = i as u32 + 3;
        for (c, cell) in record.iter().enumerate() {
            if cell.is_empty() {
                continue;
            }
            if numeric(&header[c]) {
                sheet.write(row, c as u16, cell.parse::<f64>()?)?;
            } else {
                sheet.write(row, c as u16, cell)?;
            }
        }
    }
    book.save(TARGET)?;
    println!("wrote {TARGET}");
    Ok(())
}
