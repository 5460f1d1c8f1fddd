//! A measurement file with a `stage` column whose rows are all of one stage is judged as the
//! same rows without `stage`, in one streamed pass; its outputs are those the staged path
//! gives for it. Standard input (read once, its rows kept in a temporary file) is judged as
//! the same file read from disk, byte for byte.

mod common;
use common::{neckline, read_json, read_rows, read_text, write};

/// `n` invented locations of one stage `op10`, on a 0.5 mm grid, with a repeated id, a row
/// that is not a number and a blank line among them (so that rows are rejected and lines
/// differ from records).
fn staged_rows(n: usize) -> String {
    let mut s = String::from("id,stage,major,minor,d0,x,y\n");
    for i in 0..n {
        // A fixed, varied reading: major 2.5-3.4 mm, minor 2.3-2.7 mm (d0 2.5 mm).
        let major = 2.5 + 0.9 * ((i * 37) % 101) as f64 / 100.0;
        let minor = (2.3 + 0.4 * ((i * 53) % 97) as f64 / 96.0).min(major);
        let (x, y) = ((i % 200) as f64 * 0.5, (i / 200) as f64 * 0.5);
        s += &format!("P{i},op10,{major:.3},{minor:.3},2.5,{x},{y}\n");
        match i {
            500 => s += "P17,op10,2.9,2.6,2.5,0,0\n",
            900 => s += "P900b,op10,abc,2.6,2.5,0,0\n",
            1200 => s.push('\n'),
            _ => {}
        }
    }
    s
}

/// The same text without its `stage` column.
fn without_stage(text: &str) -> String {
    text.lines()
        .map(|l| {
            let mut f: Vec<&str> = l.split(',').collect();
            if f.len() > 1 {
                f.remove(1);
            }
            f.join(",") + "\n"
        })
        .collect()
}

fn check(d: &std::path::Path, input: &str, out: &str) -> common::Run {
    let limit = common::repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    neckline(&[
        "check", input, "--limit", &limit, "--out", out, "--format", "csv,json",
    ])
    .run_in(d)
    .expect(0)
}

#[test]
fn one_stage_rows_judge_as_the_same_rows_without_stage() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let text = staged_rows(20_000);
    write(d, "staged.csv", &text);
    write(d, "plain.csv", without_stage(&text));
    check(d, "staged.csv", "s");
    check(d, "plain.csv", "p");
    let (s, p) = (
        read_rows(&d.join("s/points.csv")),
        read_rows(&d.join("p/points.csv")),
    );
    assert_eq!(s.len(), 20_000);
    assert_eq!(s.len(), p.len());
    for (a, b) in s.iter().zip(&p) {
        assert_eq!(a["stage"], "op10");
        assert_eq!(b["stage"], "");
        let mut a = a.clone();
        a.insert("stage".into(), String::new());
        assert_eq!(&a, b, "every other column the same");
    }
    let (js, jp) = (
        read_json(&d.join("s/summary.json")),
        read_json(&d.join("p/summary.json")),
    );
    assert_eq!(js["rejected_rows"], 2, "the repeated id and the bad number");
    assert_eq!(js["rejected_rows"], jp["rejected_rows"]);
    assert_eq!(js["verdict"], jp["verdict"]);
}

/// Judge `text` from the file `name` and from standard input with `--format csv,json,svg`,
/// and check that every output is the same, byte for byte, but for what names the input
/// (`name` or `-`) and the run time.
fn stdin_gives_what_the_file_gives(text: &str, name: &str) {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, name, text);
    let limit = common::repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let run = |input: &str, out: &str| {
        let args = [
            "check",
            input,
            "--limit",
            &limit,
            "--out",
            out,
            "--format",
            "csv,json,svg",
        ];
        let r = neckline(&args);
        let r = if input == "-" { r.stdin(text) } else { r };
        r.run_in(d).expect(0)
    };
    run(name, "file");
    run("-", "stdin");
    assert_eq!(
        read_text(&d.join("file/points.csv")),
        read_text(&d.join("stdin/points.csv")),
        "the same points.csv, byte for byte"
    );
    let strip = |p: &str| {
        let mut j = read_json(&d.join(p));
        // What names the input (`name` or `-`) or the time apart, all else the same.
        for k in ["run_time_utc", "input", "points_file"] {
            j.as_object_mut().unwrap().remove(k);
        }
        for f in j["files"].as_array_mut().unwrap() {
            f.as_object_mut().unwrap().remove("path");
        }
        for r in j["rejected"].as_array_mut().unwrap() {
            r.as_object_mut().unwrap().remove("file");
        }
        j
    };
    let (file, stdin) = (strip("file/summary.json"), strip("stdin/summary.json"));
    assert_eq!(file, stdin);
    assert_eq!(
        file["files"][0]["role"], "measurements",
        "the digest of what was read, the same from standard input: {file}"
    );
    for picture in ["fld.svg", "map.svg"] {
        // The footer names the input.
        let named =
            read_text(&d.join("stdin").join(picture)).replace("input -", &format!("input {name}"));
        assert_eq!(read_text(&d.join("file").join(picture)), named, "{picture}");
    }
}

#[test]
fn a_file_of_one_stage_from_standard_input_gives_what_the_file_gives() {
    // Streamed in one pass whether read from disk or from standard input, with Windows line
    // ends (made LF as the file is read, before its rows are kept).
    let text = staged_rows(1_500).replace('\n', "\r\n");
    stdin_gives_what_the_file_gives(&text, "staged.csv");
}

#[test]
fn a_file_of_three_stages_from_standard_input_gives_what_the_file_gives() {
    let one = staged_rows(1_500);
    let mut text = one.clone();
    for stage in ["op20", "op30"] {
        text += &one
            .lines()
            .skip(1)
            .map(|l| l.replace("op10", stage) + "\n")
            .collect::<String>();
    }
    stdin_gives_what_the_file_gives(&text, "three.csv");
}

#[test]
fn two_stages_of_different_locations_still_take_the_path() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    // Each location has one row, but the file has two stages: the staged judgement (with
    // its path columns), not the file without stages.
    let text = "id,stage,major,minor,d0\nA,op10,2.9,2.6,2.5\nB,op20,2.8,2.6,2.5\n";
    write(d, "two.csv", text);
    check(d, "two.csv", "o");
    let header = read_text(&d.join("o/points.csv"));
    let plain = {
        write(d, "plain.csv", without_stage(text));
        check(d, "plain.csv", "p");
        read_text(&d.join("p/points.csv"))
    };
    let first = |t: &str| t.lines().next().unwrap().to_string();
    assert_ne!(
        first(&header),
        first(&plain),
        "path columns added: {header}"
    );
}
