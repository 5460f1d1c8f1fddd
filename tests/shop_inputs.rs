//! The files a shop really has, through the real binary: Windows line ends, Windows-1252 and
//! UTF-16 text, workbooks, folders of files.

mod common;
use common::{neckline, read_rows, repo_arg, run_in, write, Run};
use std::path::Path;

const LIMIT: &str = "limits/steel-0.80mm-n0.20-keeler-brazier.toml";

/// A strain export without an id column: each location is named by its line.
const STRAINS: &str = "x,y,major_true_pct,minor_true_pct\n\
                       0,0,12.0,-3.0\n\
                       10,0,18.5,2.0\n\
                       20,0,25.0,5.0\n\
                       30,0,31.0,-8.0\n";

fn crlf(text: &str) -> String {
    text.replace('\n', "\r\n")
}

fn check(dir: &Path, file: &str, out: &str, extra: &[&str]) -> Run {
    let limit = repo_arg(LIMIT);
    let mut args = vec![
        "check", file, "--limit", &limit, "--out", out, "--format", "csv,json",
    ];
    args.extend_from_slice(extra);
    run_in(dir, &args)
}

/// (id, zone, margin) of each row of a points.csv.
fn judged(dir: &Path, out: &str) -> Vec<(String, String, String)> {
    read_rows(&dir.join(out).join("points.csv"))
        .iter()
        .map(|r| {
            (
                r["id"].clone(),
                r["zone"].clone(),
                r.get("margin_pct").cloned().unwrap_or_default(),
            )
        })
        .collect()
}

#[test]
fn crlf_and_mixed_line_ends_give_the_lf_points_and_names() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "lf.csv", STRAINS);
    write(d, "crlf.csv", crlf(STRAINS));
    // Mixed: CRLF on odd lines, LF on even ones.
    let mixed: String = STRAINS
        .lines()
        .enumerate()
        .map(|(i, l)| format!("{l}{}", if i % 2 == 0 { "\r\n" } else { "\n" }))
        .collect();
    write(d, "mixed.csv", mixed);
    // A lone CR (classic Mac OS) ends a line too.
    write(d, "cr.csv", STRAINS.replace('\n', "\r"));
    check(d, "lf.csv", "lf", &[]).ok();
    let lf = judged(d, "lf");
    let ids: Vec<&str> = lf.iter().map(|(id, _, _)| id.as_str()).collect();
    // Named by their lines 2..5, as the module documentation of `measure` says.
    assert_eq!(ids, ["2", "3", "4", "5"]);
    for other in ["crlf", "mixed", "cr"] {
        let r = check(d, &format!("{other}.csv"), other, &[]).ok();
        assert!(!r.stderr.contains("rejected"), "{r}");
        assert_eq!(judged(d, other), lf, "{other}");
    }
    // compare of the LF run and the CRLF run: the same locations, nothing changed.
    let r = run_in(
        d,
        &[
            "compare",
            "lf/points.csv",
            "crlf/points.csv",
            "--fail-on",
            "new-failed",
        ],
    )
    .ok();
    assert!(r.stdout.contains("--fail-on new-failed: passed"), "{r}");
    assert!(
        r.stdout.contains("0 locations newly failed or marginal"),
        "{r}"
    );
}

#[test]
fn a_duplicate_id_in_a_crlf_file_rejects_only_the_second_row_at_its_line() {
    let text = crlf("id,major_true_pct,minor_true_pct\nA,12,-3\nA,13,-3\nB,14,-2\n");
    let r = neckline(&[
        "check",
        "m.csv",
        "--limit",
        &repo_arg(LIMIT),
        "--out",
        "o",
        "--format",
        "csv",
    ])
    .file("m.csv", text)
    .run()
    .ok();
    assert!(
        r.stdout
            .contains("m.csv:3:1 (column `id`): duplicate id `A`"),
        "{r}"
    );
    assert!(!r.stdout.contains("m.csv:2:"), "{r}");
    let rows = read_rows(&r.path("o/points.csv"));
    assert_eq!(rows.len(), 2, "{r}");
}

/// Windows-1252 bytes of `text` (Latin-1 letters only).
fn cp1252(text: &str) -> Vec<u8> {
    text.chars()
        .map(|c| u8::try_from(u32::from(c)).expect("a Latin-1 letter"))
        .collect()
}

fn utf16(text: &str, le: bool) -> Vec<u8> {
    let bom: [u8; 2] = if le { [0xFF, 0xFE] } else { [0xFE, 0xFF] };
    bom.into_iter()
        .chain(text.encode_utf16().flat_map(
            move |u| {
                if le {
                    u.to_le_bytes()
                } else {
                    u.to_be_bytes()
                }
            },
        ))
        .collect()
}

#[test]
fn windows_1252_and_utf_16_files_are_read_with_their_notes_in_utf_8() {
    let text = "id;major_true_pct;minor_true_pct;note\r\nA;12,0;-3,0;Kante gedrückt\r\nB;18,5;2,0;Größe ok\r\n";
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "utf8.csv", text);
    write(d, "cp1252.csv", cp1252(text));
    write(d, "le.txt", utf16(&text.replace(';', "\t"), true));
    write(d, "be.txt", utf16(&text.replace(';', "\t"), false));
    check(d, "utf8.csv", "utf8", &[]).ok();
    let want = read_rows(&d.join("utf8/points.csv"));
    // The note comes out in UTF-8, as written (ü is U+00FC).
    assert_eq!(want[0]["note"], "Kante gedrückt");
    let r = check(d, "cp1252.csv", "cp", &[]).ok();
    assert!(
        r.stderr
            .contains("cp1252.csv is not UTF-8: read as Windows-1252"),
        "{r}"
    );
    for out in ["cp", "le", "be"] {
        if out != "cp" {
            let file = format!("{out}.txt");
            let r = check(d, &file, out, &[]).ok();
            assert!(!r.stderr.contains("not UTF-8"), "{r}");
        }
        let got = read_rows(&d.join(out).join("points.csv"));
        for (g, w) in got.iter().zip(&want) {
            assert_eq!(
                (&g["id"], &g["zone"], &g["note"]),
                (&w["id"], &w["zone"], &w["note"]),
                "{out}"
            );
        }
        assert_eq!(got.len(), want.len(), "{out}");
    }
    // Forced: the UTF-8 file read as Windows-1252 shows its two bytes of ü as two letters.
    check(d, "utf8.csv", "forced", &["--encoding", "windows-1252"]).ok();
    let forced = read_rows(&d.join("forced/points.csv"));
    assert_eq!(forced[0]["note"], "Kante gedrÃ¼ckt");
    let r = check(d, "utf8.csv", "bad", &["--encoding", "ebcdic"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("unknown encoding `ebcdic`"), "{r}");
}

/// A workbook with the strain rows on `Readings` (second sheet) and a cover sheet first.
fn workbook(path: &Path, date_at: Option<(u32, u16)>) {
    use rust_xlsxwriter::{ExcelDateTime, Format, Workbook};
    let mut book = Workbook::new();
    let cover = book.add_worksheet();
    cover.set_name("Cover").unwrap();
    cover.write(0, 0, "Tryout readings (invented)").unwrap();
    let sheet = book.add_worksheet();
    sheet.set_name("Readings").unwrap();
    for (c, h) in ["id", "major_true_pct", "minor_true_pct", "note"]
        .iter()
        .enumerate()
    {
        sheet.write(0, c as u16, *h).unwrap();
    }
    let rows = [
        ("A", 12.0, -3.0, "edge"),
        ("B", 18.5, 2.0, "a, b"),
        ("C", 1.0 / 3.0, 0.1, ""),
    ];
    for (i, (id, maj, min, note)) in rows.iter().enumerate() {
        let r = i as u32 + 1;
        sheet.write(r, 0, *id).unwrap();
        sheet.write(r, 1, *maj).unwrap();
        sheet.write(r, 2, *min).unwrap();
        if !note.is_empty() {
            sheet.write(r, 3, *note).unwrap();
        }
    }
    if let Some((r, c)) = date_at {
        let date = ExcelDateTime::from_ymd(2026, 11, 24).unwrap();
        let f = Format::new().set_num_format("yyyy-mm-dd");
        sheet.write_datetime_with_format(r, c, &date, &f).unwrap();
    }
    book.save(path).unwrap();
}

#[test]
fn a_workbook_gives_the_points_of_the_same_rows_as_csv() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    workbook(&d.join("t.xlsx"), None);
    write(
        d,
        "t.csv",
        format!(
            "id,major_true_pct,minor_true_pct,note\nA,12,-3,edge\nB,18.5,2,\"a, b\"\nC,{},0.1,\n",
            1.0_f64 / 3.0
        ),
    );
    check(d, "t.csv", "csv", &[]).ok();
    check(d, "t.xlsx", "by-name", &["--sheet", "Readings"]).ok();
    check(d, "t.xlsx", "by-number", &["--sheet", "2"]).ok();
    let want = std::fs::read_to_string(d.join("csv/points.csv")).unwrap();
    for out in ["by-name", "by-number"] {
        let got = std::fs::read_to_string(d.join(out).join("points.csv")).unwrap();
        assert_eq!(got, want, "{out}");
    }
    // The first sheet (the default) is the cover: no strain columns there.
    let r = check(d, "t.xlsx", "first", &[]);
    assert_eq!(r.code, 2, "{r}");
    let r = check(d, "t.xlsx", "none", &["--sheet", "7"]);
    assert!(
        r.stderr.contains("no sheet `7`") && r.stderr.contains("`Readings`"),
        "{r}"
    );
}

#[test]
fn a_date_in_a_number_column_is_refused_naming_the_sheet_and_cell() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // Row 3 (0-based 2), column C (0-based 2): minor_true_pct of B.
    workbook(&d.join("tryout.xlsx"), Some((2, 2)));
    let r = check(d, "tryout.xlsx", "o", &["--sheet", "Readings"]).ok();
    assert!(
        r.stdout.contains(
            "tryout.xlsx, Readings!C3 (column `minor_true_pct`): expected a number, found the \
             date 2026-11-24"
        ),
        "{r}"
    );
}

#[test]
fn a_folder_is_judged_file_by_file_and_other_commands_refuse_it() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "in/a.csv", STRAINS);
    write(d, "in/b.txt", crlf(STRAINS));
    write(d, "in/points.csv", STRAINS);
    write(d, "in/readme.md", "not a measurement file");
    workbook(&d.join("in/c.xlsx"), None);
    let r = check(d, "in", "out", &["--sheet", "Readings"]).ok();
    let index = std::fs::read_to_string(d.join("out/index.csv")).unwrap();
    assert_eq!(index.lines().count(), 4, "{index}\n{r}");
    for name in ["a", "b", "c"] {
        assert!(d.join("out").join(name).join("points.csv").is_file(), "{r}");
    }
    assert!(!d.join("out/points").exists(), "{r}");
    let r = run_in(d, &["strains", "in"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("is a folder: give a file"), "{r}");
}

/// A file of the hostile corpus that is read now (tests/hostile/recovered/).
fn recovered(name: &str) -> Vec<u8> {
    std::fs::read(common::repo("tests/hostile/recovered").join(name)).unwrap()
}

#[test]
fn the_corpus_files_in_other_encodings_are_read_now() {
    let limit = repo_arg(LIMIT);
    // UTF-16 LE with BOM, tab-separated with decimal commas: A1 at 3,0 / 2,6 on d0 2.5 is an
    // engineering major strain of (3.0 - 2.5) / 2.5 = 20 %.
    for name in ["measure-utf16.csv", "measure-latin1.csv"] {
        let r = neckline(&[
            "check", name, "--d0", "2.5", "--limit", &limit, "--out", "o", "--format", "csv",
        ])
        .file(name, recovered(name))
        .run()
        .ok();
        let rows = read_rows(&r.path("o/points.csv"));
        assert_eq!(rows.len(), 1, "{r}");
        assert_eq!(
            (rows[0]["id"].as_str(), rows[0]["major_eng_pct"].as_str()),
            ("A1", "20.000")
        );
        if name.contains("latin1") {
            // 0xE9 in Latin-1 / Windows-1252 is é (U+00E9).
            assert_eq!(rows[0]["note"], "réparation", "{r}");
            assert!(r.stderr.contains("read as Windows-1252"), "{r}");
        }
    }
    // UTF-16 nodes: the one quad of the grid is judged.
    let r = neckline(&["grid", "nodes-utf16.csv", "--limit", &limit, "--out", "o"])
        .file("nodes-utf16.csv", recovered("nodes-utf16.csv"))
        .run()
        .ok();
    assert!(
        r.stdout.contains("1 location judged, 0 rows rejected"),
        "{r}"
    );
    // UTF-16 elements on nodes A..D: the triangle A, B, C is judged.
    let r = neckline(&[
        "grid",
        "nodes-id.csv",
        "--elements",
        "elements-utf16.csv",
        "--limit",
        &limit,
        "--out",
        "o",
    ])
    .file(
        "nodes-id.csv",
        "id,X,Y,x,y\nA,0,0,0,0\nB,2.5,0,3,0\nC,2.5,2.5,3,2.5\nD,0,2.5,0,2.5\n",
    )
    .file("elements-utf16.csv", recovered("elements-utf16.csv"))
    .run()
    .ok();
    assert!(
        r.stdout.contains("1 location judged, 0 rows rejected"),
        "{r}"
    );
    // A Windows-1252 points table: its id `été` comes out in UTF-8.
    let r = neckline(&["compare", "a.csv", "points-latin1.csv", "--out", "o"])
        .file(
            "a.csv",
            "id,major_eng_pct,minor_eng_pct,margin_pct,zone,x,y\nA1,18,3,7,marginal,1,2\n",
        )
        .file("points-latin1.csv", recovered("points-latin1.csv"))
        .run()
        .ok();
    assert!(r.stdout.contains("été (safe)"), "{r}");
    // A UTF-16 points table is compared like any other.
    neckline(&["compare", "a.csv", "points-utf16.csv", "--out", "o"])
        .file(
            "a.csv",
            "id,major_eng_pct,minor_eng_pct,margin_pct,zone,x,y\nA1,18,3,7,marginal,1,2\n",
        )
        .file("points-utf16.csv", recovered("points-utf16.csv"))
        .run()
        .ok();
}

#[test]
fn a_column_map_naming_one_header_twice_is_the_maps_error() {
    let r = neckline(&[
        "check",
        "m.csv",
        "--limit",
        &repo_arg(LIMIT),
        "--column",
        "major_true_pct=Major",
        "--column",
        "minor_true_pct=major",
    ])
    .file("m.csv", "id,Major,Minor\nA,12,-3\n")
    .run();
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains(
            "--column: `major_true_pct` and `minor_true_pct` both name the header `Major`"
        ),
        "{r}"
    );
    assert!(!r.stderr.contains("appears twice"), "{r}");
}
