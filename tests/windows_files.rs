//! Windows files beyond the measurements: job and curve files saved by a Windows text editor
//! (UTF-16 "Unicode", or the Western-European code page), Windows-1252 text on standard input,
//! and the demo tryout kept as a workbook.

mod common;
use common::{neckline, read_json, read_rows, repo, repo_arg, run_in, write};

const LIMIT: &str = "limits/steel-0.80mm-n0.20-keeler-brazier.toml";

/// UTF-16 little-endian with its byte-order mark, as Windows Notepad's "Unicode" writes it.
fn utf16le(text: &str) -> Vec<u8> {
    [0xFF, 0xFE]
        .into_iter()
        .chain(text.encode_utf16().flat_map(u16::to_le_bytes))
        .collect()
}

/// UTF-16 big-endian with its byte-order mark.
fn utf16be(text: &str) -> Vec<u8> {
    [0xFE, 0xFF]
        .into_iter()
        .chain(text.encode_utf16().flat_map(u16::to_be_bytes))
        .collect()
}

/// Windows-1252 for text whose letters are all Latin-1 (one byte each: U+00E4 is 0xE4).
fn cp1252(text: &str) -> Vec<u8> {
    text.chars()
        .map(|c| u8::try_from(u32::from(c)).expect("a Latin-1 letter"))
        .collect()
}

/// The demo job for tryout 1 with the curve's path made absolute, so the copy can live in
/// a test folder, and CRLF line ends as a Windows editor saves it.
fn demo_job() -> String {
    let text = std::fs::read_to_string(repo("demo-parts/rear-floor-pan/job-t1.toml")).unwrap();
    text.lines()
        .map(|l| {
            if l.starts_with("limit = ") {
                format!("limit = {:?}", repo_arg(LIMIT))
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\r\n")
        + "\r\n"
}

#[test]
fn a_job_file_in_utf16_or_windows_1252_is_read_as_the_utf8_one() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let tryout = repo_arg("demo-parts/rear-floor-pan/tryout-1.csv");
    // A note with a non-ASCII letter: it must come out in UTF-8 whatever the file's encoding.
    let job = demo_job().replace("tryout = \"T1\"", "tryout = \"T1 (Prüfung)\"");
    write(d, "utf8.toml", &job);
    write(d, "le.toml", utf16le(&job));
    write(d, "be.toml", utf16be(&job));
    write(d, "ansi.toml", cp1252(&job));
    let mut summaries = Vec::new();
    for name in ["utf8", "le", "be", "ansi"] {
        let r = run_in(
            d,
            &[
                "check",
                &tryout,
                "--job",
                &format!("{name}.toml"),
                "--out",
                name,
                "--format",
                "csv,json",
            ],
        )
        .ok();
        assert!(
            r.stdout.contains("Tryout: T1 (Prüfung)"),
            "{name}: {}",
            r.stdout
        );
        if name == "ansi" {
            assert!(
                r.stderr.contains("not UTF-8: read as Windows-1252"),
                "{}",
                r.stderr
            );
        }
        let mut s = read_json(&d.join(name).join("summary.json"));
        // What differs by design: the job file's own name and checksum, and the run's time.
        for key in ["files", "run_time_utc"] {
            s.as_object_mut().unwrap().remove(key);
        }
        summaries.push((name, s));
        assert_eq!(
            std::fs::read(d.join(name).join("points.csv")).unwrap(),
            std::fs::read(d.join("utf8").join("points.csv")).unwrap(),
            "{name}"
        );
    }
    for (name, s) in &summaries[1..] {
        assert_eq!(s, &summaries[0].1, "{name}");
    }
}

#[test]
fn a_curve_file_in_utf16_is_read_and_a_broken_one_refused() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let curve = std::fs::read_to_string(repo(LIMIT)).unwrap();
    write(d, "curve-le.toml", utf16le(&curve.replace('\n', "\r\n")));
    let tryout = repo_arg("demo-parts/rear-floor-pan/tryout-1.csv");
    let args = |limit: &'static str, out: &'static str| {
        vec![
            "check".to_string(),
            tryout.clone(),
            "--d0".into(),
            "2.5".into(),
            "--limit".into(),
            limit.into(),
            "--out".into(),
            out.into(),
            "--format".into(),
            "csv".into(),
        ]
    };
    let utf8_curve = repo_arg(LIMIT);
    let mut reference = args("x", "ref");
    reference[5] = utf8_curve;
    neckline(&reference).run_in(d).ok();
    neckline(&args("curve-le.toml", "le")).run_in(d).ok();
    assert_eq!(
        read_rows(&d.join("le/points.csv")),
        read_rows(&d.join("ref/points.csv"))
    );
    // A byte-order mark followed by a lone half of a UTF-16 surrogate pair: not text.
    write(d, "broken.toml", [0xFF, 0xFE, 0x00, 0xD8, b'a', 0x00]);
    let r = neckline(&args("broken.toml", "broken")).run_in(d).expect(2);
    assert!(r.stderr.contains("broken.toml"), "{}", r.stderr);
    assert!(r.stderr.contains("not valid UTF-16"), "{}", r.stderr);
}

#[test]
fn windows_1252_on_standard_input_is_read_with_a_note() {
    let text = "id,major_true_pct,minor_true_pct,note\n\
                P1,12.0,-3.0,Kante gedrückt\n\
                P2,31.0,-8.0,Riß\n";
    let limit = repo_arg(LIMIT);
    let args = [
        "check", "-", "--limit", &limit, "--out", "o", "--format", "csv",
    ];
    let utf8 = neckline(&args).stdin(text.as_bytes().to_vec()).run().ok();
    let ansi = neckline(&args)
        .stdin(cp1252(&text.replace('\n', "\r\n")))
        .run()
        .ok();
    assert!(
        ansi.stderr.contains("not UTF-8: read as Windows-1252"),
        "{}",
        ansi.stderr
    );
    let a = read_rows(&utf8.path("o/points.csv"));
    let b = read_rows(&ansi.path("o/points.csv"));
    assert_eq!(a, b);
    assert_eq!(a.len(), 2);
}

#[test]
fn the_demo_workbook_is_judged_as_the_demo_csv() {
    // demo-parts/rear-floor-pan/tryout-1.xlsx holds the readings of tryout-1.csv as numbers,
    // under two lines of notes (made by `cargo run --example demo_workbook`).
    let [_, job] = common::demo_tryout(1);
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    for (file, out) in [("tryout-1.csv", "csv"), ("tryout-1.xlsx", "xlsx")] {
        let input = repo_arg(&format!("demo-parts/rear-floor-pan/{file}"));
        run_in(
            d,
            &[
                "check", &input, "--job", &job, "--out", out, "--format", "csv",
            ],
        )
        .ok();
    }
    let csv = std::fs::read(d.join("csv/points.csv")).unwrap();
    assert_eq!(std::fs::read(d.join("xlsx/points.csv")).unwrap(), csv);
    assert_eq!(read_rows(&d.join("xlsx/points.csv")).len(), 120);
}
