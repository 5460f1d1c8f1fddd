//! Integration tests of what a measuring system's export puts around its rows (a preamble
//! before the header, a unit row after it, points not measured) and of the tables written back
//! for a spreadsheet (points.xlsx, `--decimal-comma`).

mod common;
use common::{demo_tryout, neckline, read_json, repo, rows};

/// A strain export with a preamble, a unit row, a validity column and empty strains: rows on
/// lines 7.. (the header on line 5, the unit row on 6).
const EXPORT: &str = "Project: rear floor pan (invented)\n\
Date: 2026-11-24\n\
Operator: night shift (invented)\n\
Units: mm\n\
Point;X;Y;Major strain;Minor strain;Valid\n\
;mm;mm;%;%;-\n\
P1;0;0;30,5;-10,2;1\n\
P2;0;10;;;1\n\
P3;0;20;25,0;-8,0;no\n\
P4;0;30;;-8,0;1\n\
P5;0;40;20,0;5,0;TRUE\n\
P6;0;50;;;\n";

const MAP: [&str; 12] = [
    "--column",
    "id=Point",
    "--column",
    "x=X",
    "--column",
    "y=Y",
    "--column",
    "major_true_pct=Major strain",
    "--column",
    "minor_true_pct=Minor strain",
    "--column",
    "valid=Valid",
];

fn limit() -> String {
    common::repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml")
}

fn check_export(text: &str, extra: &[&str]) -> common::Run {
    let limit = limit();
    let mut args = vec!["check", "e.csv", "--limit", &limit, "--out", "o"];
    args.extend(MAP);
    args.extend(extra);
    neckline(&args).file("e.csv", text).run()
}

#[test]
fn a_preamble_is_skipped_the_unit_row_too_and_unmeasured_points_are_counted_once() {
    let r = check_export(EXPORT, &[]);
    // P4 (one of its pair empty) is rejected: the verdict is incomplete at best, exit 0.
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("the header is line 5"), "{r}");
    // P2 (both empty), P3 (flagged no) and P6 (both empty, no flag) are not measured, once.
    assert!(
        r.stdout
            .contains("3 points not measured (lines 8, 9, 12): empty readings or flagged"),
        "{r}"
    );
    assert!(
        r.stdout.contains("2 locations judged, 1 row rejected"),
        "{r}"
    );
    assert!(
        r.stdout.contains("e.csv:10:4 (column `major_true_pct`)"),
        "{r}"
    );
    let points = rows(&r.read("o/points.csv"));
    let ids: Vec<&str> = points.iter().map(|p| p["id"].as_str()).collect();
    assert_eq!(ids, ["P1", "P5"]);
    let json = read_json(&r.path("o/summary.json"));
    assert_eq!(json["not_measured"]["count"], 3);
    assert_eq!(
        json["not_measured"]["first_lines"],
        serde_json::json!([8, 9, 12])
    );
    assert_eq!(json["rejected_rows"], 1);
    assert_eq!(json["rejected"][0]["line"], 10);
    let html = r.read("o/report.html");
    assert!(html.contains("3 points not measured"), "report");
}

#[test]
fn without_unmeasured_rows_the_verdict_is_not_incomplete() {
    // The same file without its half-empty row P4: every measured row is judged.
    let text = EXPORT.replace("P4;0;30;;-8,0;1\n", "");
    let r = check_export(&text, &["--format", "json"]);
    let json = read_json(&r.path("o/summary.json"));
    assert_eq!(json["rejected_rows"], 0, "{r}");
    assert_ne!(json["verdict"], "incomplete", "{r}");
    assert_eq!(json["not_measured"]["count"], 3);
}

#[test]
fn header_row_names_the_header_and_errors_keep_the_files_lines() {
    let r = check_export(EXPORT, &["--header-row", "5", "--format", "json"]);
    assert_eq!(r.code, 0, "{r}");
    // Line 4 is not the header: the refusal names line 4.
    let r = check_export(EXPORT, &["--header-row", "4"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("e.csv:4: "), "{r}");
    // Two comment lines before a header that lacks a column: the header's own line, 3.
    let r = neckline(&["check", "m.csv", "--limit", &limit()])
        .file("m.csv", "# a\n# b\nid,major\nA1,2.6\n")
        .run();
    assert!(r.stderr.contains("m.csv:3: missing column `minor`"), "{r}");
}

#[test]
fn a_unit_that_contradicts_its_column_is_refused_naming_line_and_column() {
    let text = EXPORT.replace(";mm;mm;%;%;-", ";mm;mm;mm;%;-");
    let r = check_export(&text, &[]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains(
            "e.csv:6:4 (column `major_true_pct`): the unit row gives `mm` under a strain column"
        ),
        "{r}"
    );
    let text = EXPORT.replace(";mm;mm;%;%;-", ";(in);[in];%;%;-");
    let r = check_export(&text, &[]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("e.csv:6:2 (column `x`): the unit row gives `in`"),
        "{r}"
    );
    assert!(r.stderr.contains("--unit in"), "{r}");
    let r = check_export(&text, &["--unit", "in", "--format", "json"]);
    assert_eq!(r.code, 0, "{r}");
}

/// A validity cell that is no flag rejects its row, naming the column.
#[test]
fn a_validity_cell_that_is_no_flag_rejects_the_row() {
    let text = EXPORT.replace("P5;0;40;20,0;5,0;TRUE", "P5;0;40;20,0;5,0;maybe");
    let r = check_export(&text, &["--format", "json"]);
    let json = read_json(&r.path("o/summary.json"));
    assert_eq!(json["rejected_rows"], 2, "{r}");
    let reasons = json["rejected"].to_string();
    assert!(reasons.contains("found `maybe`"), "{reasons}");
}

#[test]
fn points_xlsx_holds_the_rows_of_points_csv_with_numbers_and_zone_colours() {
    use calamine::{open_workbook, Data, Reader, Xlsx};
    let [csv, job] = demo_tryout(1);
    let r = neckline(&[
        "check", &csv, "--job", &job, "--out", "o", "--format", "csv,xlsx",
    ])
    .run()
    .ok();
    let points = rows(&r.read("o/points.csv"));
    let mut book: Xlsx<_> = open_workbook(r.path("o/points.xlsx")).unwrap();
    assert_eq!(book.sheet_names(), ["points", "summary"]);
    let sheet = book.worksheet_range("points").unwrap();
    // The header and one row per row of points.csv.
    assert_eq!(sheet.height(), points.len() + 1);
    let header: Vec<String> = sheet
        .rows()
        .next()
        .unwrap()
        .iter()
        .map(|c| c.to_string())
        .collect();
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    for (i, p) in points.iter().enumerate() {
        let row = &sheet.rows().nth(i + 1).unwrap();
        assert_eq!(row[col("id")], Data::String(p["id"].clone()));
        assert_eq!(row[col("zone")], Data::String(p["zone"].clone()));
        // A number is a number cell with the value points.csv writes.
        match &row[col("margin_pct")] {
            Data::Float(v) => {
                let want: f64 = p["margin_pct"].parse().unwrap();
                assert!((v - want).abs() < 1e-9, "{v} {want}");
            }
            other => panic!("margin_pct of {} is {other:?}", p["id"]),
        }
    }
    // The zone cell's fill: the zone's colour of the pictures (plot.rs palette: failed #EE6677).
    let failed = points.iter().position(|p| p["zone"] == "failed").unwrap();
    let xml = sheet_xml(&r.path("o/points.xlsx"));
    let fill = style_of_cell(&xml.0, failed + 2, col("zone"));
    assert!(xml.1[fill].contains("EE6677"), "{}", xml.1[fill]);
    let summary = book.worksheet_range("summary").unwrap();
    let text: Vec<String> = summary
        .rows()
        .flat_map(|r| r.iter().map(|c| c.to_string()))
        .collect();
    assert!(text.iter().any(|t| t.starts_with("Caution")), "{text:?}");
    assert!(text.iter().any(|t| t == "curve source"), "{text:?}");
}

/// The sheet's XML and the fill colours of the workbook's cell formats, in `cellXfs` order.
fn sheet_xml(path: &std::path::Path) -> (String, Vec<String>) {
    let file = std::fs::File::open(path).unwrap();
    let mut zip = zip::ZipArchive::new(file).unwrap();
    let mut read = |name: &str| {
        let mut s = String::new();
        std::io::Read::read_to_string(&mut zip.by_name(name).unwrap(), &mut s).unwrap();
        s
    };
    let sheet = read("xl/worksheets/sheet1.xml");
    let styles = read("xl/styles.xml");
    // Each `<xf` of cellXfs names a fillId; each `<fill>` of fills has its colour.
    let fills: Vec<&str> = styles.split("<fill>").skip(1).collect();
    let xfs = styles.split("<cellXfs").nth(1).unwrap();
    let per_xf = xfs
        .split("<xf ")
        .skip(1)
        .map(|xf| {
            let id: usize = xf
                .split("fillId=\"")
                .nth(1)
                .and_then(|s| s.split('"').next())
                .and_then(|s| s.parse().ok())
                .unwrap_or(0);
            fills.get(id).copied().unwrap_or("").to_string()
        })
        .collect();
    (sheet, per_xf)
}

/// The style index of the cell at 1-based `row`, 0-based `col`.
fn style_of_cell(sheet: &str, row: usize, col: usize) -> usize {
    let mut letters = String::new();
    let mut c = col + 1;
    while c > 0 {
        letters.insert(0, (b'A' + ((c - 1) % 26) as u8) as char);
        c = (c - 1) / 26;
    }
    let cell = format!("r=\"{letters}{row}\"");
    let at = sheet.find(&cell).unwrap_or_else(|| panic!("{cell}"));
    sheet[at..]
        .split("s=\"")
        .nth(1)
        .and_then(|s| s.split('"').next())
        .and_then(|s| s.parse().ok())
        .unwrap()
}

#[test]
fn decimal_comma_writes_semicolons_and_commas_with_the_same_values() {
    let [csv, job] = demo_tryout(1);
    let plain = neckline(&[
        "check", &csv, "--job", &job, "--out", "o", "--format", "csv",
    ])
    .run()
    .ok();
    let comma = neckline(&[
        "check",
        &csv,
        "--job",
        &job,
        "--out",
        "o",
        "--format",
        "csv",
        "--decimal-comma",
    ])
    .run()
    .ok();
    let a = plain.read("o/points.csv");
    let b = comma.read("o/points.csv");
    assert!(
        b.starts_with(&a.lines().next().unwrap().replace(',', ";")),
        "{b}"
    );
    // Read back as `;` with decimal commas, every value is the same.
    let mut r = csv::ReaderBuilder::new()
        .delimiter(b';')
        .from_reader(b.as_bytes());
    let back: Vec<Vec<String>> = r
        .records()
        .map(|rec| rec.unwrap().iter().map(|f| f.replace(',', ".")).collect())
        .collect();
    let mut r = csv::Reader::from_reader(a.as_bytes());
    let orig: Vec<Vec<String>> = r
        .records()
        .map(|rec| rec.unwrap().iter().map(|f| f.replace(',', ".")).collect())
        .collect();
    assert_eq!(back, orig);
    assert!(b.lines().nth(1).unwrap().contains(';'));
    // compare.csv too.
    let [csv2, _] = demo_tryout(2);
    let p1 = plain.path("o/points.csv");
    let r = neckline(&[
        "check", &csv2, "--job", &job, "--out", "o2", "--format", "csv",
    ])
    .run_in(&plain.dir);
    assert_eq!(r.code, 0, "{r}");
    let p1 = p1.display().to_string();
    let c = neckline(&[
        "compare",
        &p1,
        "o2/points.csv",
        "--out",
        "c",
        "--decimal-comma",
    ])
    .run_in(&plain.dir);
    assert!(c.code == 0 || c.code == 1, "{c}");
    let text = c.read("c/compare.csv");
    let second = text.lines().nth(1).unwrap();
    assert!(second.contains(';') && second.contains(','), "{second}");
}

/// The demo export: preamble, unit row, validity column and empty strains, read as the
/// export's text in UTF-8 with LF line ends (the file itself is Windows-1252 with CRLF).
#[test]
fn the_demo_export_reads_with_its_preamble_unit_row_and_unmeasured_points() {
    let dir = repo("demo-parts/rear-floor-pan-export");
    let bytes = std::fs::read(dir.join("tryout-1-export.csv")).unwrap();
    // Windows-1252 is ISO 8859-1 outside 0x80..=0x9F (WHATWG Encoding Standard, index
    // windows-1252): the file has no byte there, so each byte is its own code point.
    assert!(!bytes.iter().any(|b| (0x80..=0x9f).contains(b)));
    assert!(bytes.windows(2).any(|w| w == b"\r\n"));
    let text: String = bytes
        .iter()
        .map(|&b| b as char)
        .collect::<String>()
        .replace("\r\n", "\n");
    assert!(text.contains('Ö'));
    let job = dir.join("job.toml").display().to_string();
    let r = neckline(&[
        "check", "e.csv", "--job", &job, "--out", "o", "--format", "json",
    ])
    .file("e.csv", text)
    .run();
    assert!(r.code == 0 || r.code == 1, "{r}");
    assert!(r.stdout.contains("the header is line 7"), "{r}");
    assert!(r.stdout.contains("5 points not measured"), "{r}");
    let json = read_json(&r.path("o/summary.json"));
    assert_eq!(json["rejected_rows"], 0, "{r}");
    assert_eq!(json["points"], 120 - 5);
}
