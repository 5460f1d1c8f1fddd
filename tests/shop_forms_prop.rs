//! Property: the same rows as LF UTF-8 CSV, CRLF, Windows-1252, UTF-16 LE and a workbook give
//! the same judged points (ids, zones, margins) and the same rejections at the same lines.

mod common;
use common::{neckline, read_json, read_rows, repo_arg};
use proptest::prelude::*;

/// One data row: an id, a major and a minor true strain (percent), a cell that may be text
/// where a number belongs, and a note with a Latin-1 letter.
#[derive(Debug, Clone)]
struct Row {
    id: u8,
    major: f64,
    minor: f64,
    bad: bool,
}

fn rows() -> impl Strategy<Value = Vec<Row>> {
    prop::collection::vec(
        (
            0u8..6,
            0.0f64..40.0,
            -15.0f64..15.0,
            prop::bool::weighted(0.15),
        )
            .prop_map(|(id, major, minor, bad)| Row {
                id,
                major,
                minor,
                bad,
            }),
        1..12,
    )
}

fn csv_text(rows: &[Row]) -> String {
    let mut s = String::from("id,major_true_pct,minor_true_pct,note\n");
    for r in rows {
        let major = if r.bad {
            "x".to_string()
        } else {
            r.major.to_string()
        };
        s += &format!("P{},{major},{},déjà vu\n", r.id, r.minor);
    }
    s
}

fn workbook(rows: &[Row]) -> Vec<u8> {
    let mut book = rust_xlsxwriter::Workbook::new();
    let sheet = book.add_worksheet();
    for (c, h) in ["id", "major_true_pct", "minor_true_pct", "note"]
        .iter()
        .enumerate()
    {
        sheet.write(0, c as u16, *h).unwrap();
    }
    for (i, r) in rows.iter().enumerate() {
        let n = i as u32 + 1;
        sheet.write(n, 0, format!("P{}", r.id)).unwrap();
        if r.bad {
            sheet.write(n, 1, "x").unwrap();
        } else {
            sheet.write(n, 1, r.major).unwrap();
        }
        sheet.write(n, 2, r.minor).unwrap();
        sheet.write(n, 3, "déjà vu").unwrap();
    }
    book.save_to_buffer().unwrap()
}

/// A workbook error names its cell (`FILE, Sheet1!B2`); a text file names line and column
/// (`FILE:2:2`). Row 2 column B is line 2 column 2: write the cell the text-file way so the
/// messages compare.
fn same_location(message: &str) -> String {
    let Some(at) = message.find("FILE, Sheet1!") else {
        return message.to_string();
    };
    let cell_start = at + "FILE, Sheet1!".len();
    let rest = &message[cell_start..];
    let letters: String = rest.chars().take_while(char::is_ascii_uppercase).collect();
    let digits: String = rest[letters.len()..]
        .chars()
        .take_while(char::is_ascii_digit)
        .collect();
    let column = letters
        .bytes()
        .fold(0u32, |n, b| n * 26 + u32::from(b - b'A' + 1));
    format!(
        "{}FILE:{digits}:{column}{}",
        &message[..at],
        &rest[letters.len() + digits.len()..]
    )
}

type Judged = (Vec<(String, String, String)>, Vec<serde_json::Value>);

fn judge(name: &str, bytes: Vec<u8>) -> Judged {
    let limit = repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let r = neckline(&[
        "check", name, "--limit", &limit, "--out", "o", "--format", "csv,json",
    ])
    .file(name, bytes)
    .run();
    if r.code == 2 {
        // Every row rejected: the run refuses the file; the same for every form.
        return (
            Vec::new(),
            vec![serde_json::Value::String(same_location(
                &r.stderr.lines().last().unwrap_or("").replace(name, "FILE"),
            ))],
        );
    }
    let points = read_rows(&r.path("o/points.csv"))
        .iter()
        .map(|p| (p["id"].clone(), p["zone"].clone(), p["margin_pct"].clone()))
        .collect();
    let mut rejected = read_json(&r.path("o/summary.json"))["rejected"]
        .as_array()
        .cloned()
        .unwrap_or_default();
    for j in &mut rejected {
        j.as_object_mut().unwrap().remove("file");
    }
    (points, rejected)
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 4, ..ProptestConfig::default() })]
    #[test]
    fn every_form_of_the_same_rows_is_judged_the_same(rows in rows()) {
        let text = csv_text(&rows);
        let want = judge("lf.csv", text.clone().into_bytes());
        let crlf = text.replace('\n', "\r\n");
        // Windows-1252: every letter here is Latin-1, one byte each (é U+00E9, à U+00E0).
        let cp1252: Vec<u8> = crlf.chars().map(|c| u8::try_from(u32::from(c)).unwrap()).collect();
        let utf16: Vec<u8> = [0xFF, 0xFE]
            .into_iter()
            .chain(crlf.encode_utf16().flat_map(u16::to_le_bytes))
            .collect();
        for (name, bytes) in [
            ("crlf.csv", crlf.clone().into_bytes()),
            ("cp1252.csv", cp1252),
            ("utf16.txt", utf16),
            ("book.xlsx", workbook(&rows)),
        ] {
            prop_assert_eq!(&judge(name, bytes), &want, "{}", name);
        }
    }
}

/// The case a random draw found: every row rejected, so the run refuses the file and the
/// message, not summary.json, carries the location; a workbook's cell must name the same place.
#[test]
fn a_file_of_only_bad_rows_is_refused_at_the_same_place_in_every_form() {
    let rows = [Row {
        id: 0,
        major: 0.0,
        minor: 0.0,
        bad: true,
    }];
    let want = judge("lf.csv", csv_text(&rows).into_bytes());
    assert!(want.1[0].as_str().unwrap().contains("FILE:2:2"), "{want:?}");
    assert_eq!(judge("book.xlsx", workbook(&rows)), want);
}
