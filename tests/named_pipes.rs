//! An input that can be read only once (a named pipe, as a shell's `<(...)` gives) is read
//! once: every row judged, the same points.csv and the same SHA-256 as from the same bytes in a
//! regular file. Opening such an input a second time (to look at its encoding, or to ask
//! whether a staged file has one stage) would take rows away from the first reader.
#![cfg(unix)]

mod common;
use common::{neckline, read_json, read_text, repo_arg, write};
use std::path::Path;

/// Make a named pipe at `path`; `false` where `mkfifo` is not at hand.
fn mkfifo(path: &Path) -> bool {
    std::process::Command::new("mkfifo")
        .arg(path)
        .status()
        .is_ok_and(|s| s.success())
}

/// Rows of axes of `stages` stages of `n` locations each, written stage after stage.
fn measurements(n: usize, stages: usize) -> String {
    let mut s = String::from(if stages > 0 {
        "id,stage,major,minor,d0,x,y\n"
    } else {
        "id,major,minor,d0,x,y\n"
    });
    for st in 0..stages.max(1) {
        for i in 0..n {
            let major = 2.5 * (1.05 + 0.3 * ((i * 7919 + st * 31) % 100) as f64 / 100.0);
            let minor = 2.5 * (0.9 + 0.15 * ((i * 104_729) % 100) as f64 / 100.0);
            let stage = if stages > 0 {
                format!("op{}0,", st + 1)
            } else {
                String::new()
            };
            s += &format!(
                "L{i},{stage}{major:.3},{minor:.3},2.5,{},{}\n",
                i % 50,
                i / 50
            );
        }
    }
    s
}

/// `check` of `text` through a named pipe and from a regular file: the same rows and digest.
fn same_through_a_pipe(text: String, rows: usize) {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let pipe = d.join("pipe.csv");
    if !mkfifo(&pipe) {
        eprintln!("no mkfifo here: skipped");
        return;
    }
    write(d, "file.csv", &text);
    let limit = repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let writer = std::thread::spawn(move || std::fs::write(&pipe, text));
    for (input, out) in [("pipe.csv", "p"), ("file.csv", "f")] {
        let args = ["check", input, "--limit", &limit, "--out", out];
        neckline(&[&args[..], &["--format", "csv,json"]].concat())
            .run_in(d)
            .expect(0);
    }
    writer.join().unwrap().unwrap();
    let (p, f) = (
        read_text(&d.join("p/points.csv")),
        read_text(&d.join("f/points.csv")),
    );
    assert_eq!(p.lines().count(), rows + 1, "every row judged");
    assert_eq!(p, f);
    let digest = |s: &serde_json::Value| s["files"][0]["sha256"].clone();
    let (sp, sf) = (
        read_json(&d.join("p/summary.json")),
        read_json(&d.join("f/summary.json")),
    );
    assert!(digest(&sp).is_string(), "{sp}");
    assert_eq!(digest(&sp), digest(&sf));
}

#[test]
fn a_file_without_stages_through_a_pipe() {
    same_through_a_pipe(measurements(3000, 0), 3000);
}

#[test]
fn a_file_of_one_stage_through_a_pipe() {
    same_through_a_pipe(measurements(3000, 1), 3000);
}

#[test]
fn a_file_of_three_stages_through_a_pipe() {
    // One row a location: its last stage, judged along its path.
    same_through_a_pipe(measurements(1000, 3), 1000);
}
