//! Interrupted runs: `check` killed (SIGKILL) while it writes a large points.csv leaves the
//! output folder with the previous complete outputs, or none, never a torn file. Outputs are
//! written into a staging folder `.neckline-stage.PID.N` beside their targets and renamed in
//! when every one is complete (a rename within one file system is atomic: POSIX rename(2)).
//!
//! A killed run leaves its staging folder and its lock file behind (nothing runs after
//! SIGKILL; the kernel releases the lock itself). The next run into the folder takes the lock,
//! sees that the process named in the staging folder's name is gone and removes it.

mod common;
use common::run_in;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

const CURVE: &str =
    "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\npoints = [[-40, 60], [0, 30], [20, 42]]\n";
const ROWS: usize = 400_000;

/// A measurement file of `ROWS` rows; `shift` changes every major axis so two runs differ.
fn measurements(shift: f64) -> String {
    let mut s = String::with_capacity(ROWS * 40);
    s.push_str("id,major,minor,x,y\n");
    for i in 0..ROWS {
        let major = 2.6 + shift + (i % 500) as f64 * 0.001;
        s.push_str(&format!("P{i},{major:.4},2.5,{},{}\n", i % 1000, i / 1000));
    }
    s
}

/// The command line of every run here: `input` judged into out/points.csv.
fn check_args(input: &str) -> [&str; 10] {
    [
        "check", input, "--d0", "2.5", "--limit", "c.toml", "--out", "out", "--format", "csv",
    ]
}

/// Start `neckline` on `input` in `dir` without waiting, to be killed while it writes (a run
/// to its end goes through `common::run_in`).
fn start(dir: &Path, input: &str) -> Child {
    Command::new(env!("CARGO_BIN_EXE_neckline"))
        .current_dir(dir)
        .args(check_args(input))
        .env("NO_COLOR", "1")
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap()
}

/// Every file in `dir` with its bytes, temporaries apart.
fn outputs(dir: &Path) -> (Vec<(PathBuf, Vec<u8>)>, Vec<PathBuf>) {
    let mut files = Vec::new();
    let mut temps = Vec::new();
    let Ok(rd) = std::fs::read_dir(dir) else {
        return (files, temps);
    };
    for e in rd {
        let p = e.unwrap().path();
        let name = p.file_name().unwrap().to_string_lossy().into_owned();
        if name.starts_with('.') {
            temps.push(p);
        } else {
            let bytes = std::fs::read(&p).unwrap();
            files.push((p, bytes));
        }
    }
    files.sort();
    temps.sort();
    (files, temps)
}

/// Wait until the run writes a points.csv temporary of at least 1 MB, then kill it (SIGKILL).
/// Returns false when the run ended before that.
fn kill_while_writing(child: &mut Child, out: &Path) -> bool {
    let deadline = Instant::now() + Duration::from_secs(60);
    while Instant::now() < deadline {
        if child.try_wait().unwrap().is_some() {
            return false;
        }
        let writing = std::fs::read_dir(out).into_iter().flatten().any(|e| {
            let e = e.unwrap();
            let name = e.file_name().to_string_lossy().into_owned();
            name.starts_with(".neckline-stage.")
                && std::fs::metadata(e.path().join("points.csv")).map_or(0, |m| m.len()) > 1 << 20
        });
        if writing {
            child.kill().unwrap(); // SIGKILL on Unix
            child.wait().unwrap();
            return true;
        }
        std::thread::sleep(Duration::from_millis(5));
    }
    let _ = child.kill();
    panic!("no staged points.csv within 60 s");
}

/// points.csv is whole: a header and one line per row, each with the header's field count.
fn assert_whole(points: &[u8]) {
    let text = std::str::from_utf8(points).unwrap();
    assert!(text.ends_with('\n'));
    let mut lines = text.lines();
    let fields = lines.next().unwrap().split(',').count();
    let mut n = 0;
    for l in lines {
        assert_eq!(l.split(',').count(), fields, "{l}");
        n += 1;
    }
    assert_eq!(n, ROWS);
}

#[test]
fn a_killed_first_run_leaves_no_output() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), CURVE).unwrap();
    std::fs::write(dir.path().join("m.csv"), measurements(0.0)).unwrap();
    let out = dir.path().join("out");
    let mut child = start(dir.path(), "m.csv");
    assert!(kill_while_writing(&mut child, &out), "the run ended first");
    let (files, temps) = outputs(&out);
    assert!(
        files.is_empty(),
        "{:?}",
        files.iter().map(|f| &f.0).collect::<Vec<_>>()
    );
    assert_eq!(
        temps.len(),
        2,
        "the staging folder and the lock file: {temps:?}"
    );
}

#[test]
fn a_killed_run_keeps_the_previous_outputs_and_the_next_run_completes() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), CURVE).unwrap();
    std::fs::write(dir.path().join("a.csv"), measurements(0.0)).unwrap();
    std::fs::write(dir.path().join("b.csv"), measurements(0.05)).unwrap();
    let out = dir.path().join("out");
    // A complete first run.
    let first = run_in(dir.path(), &check_args("a.csv"));
    assert_eq!(first.code, 0, "{first}");
    let (before, temps) = outputs(&out);
    assert!(temps.is_empty(), "{temps:?}");
    let points = &before
        .iter()
        .find(|f| f.0.ends_with("points.csv"))
        .unwrap()
        .1;
    assert_whole(points);

    // A second run over it, killed while it writes points.csv: the first run's files remain,
    // byte for byte; the killed run's staging folder and lock file are left.
    let mut child = start(dir.path(), "b.csv");
    assert!(kill_while_writing(&mut child, &out), "the run ended first");
    let (after, temps) = outputs(&out);
    assert_eq!(after, before, "the previous outputs, unchanged");
    assert_eq!(temps.len(), 2, "{temps:?}");

    // The next run removes the dead run's staging folder and completes.
    let third = run_in(dir.path(), &check_args("b.csv"));
    assert_eq!(third.code, 0, "{third}");
    let (last, temps) = outputs(&out);
    assert!(temps.is_empty(), "{temps:?}");
    let points = &last.iter().find(|f| f.0.ends_with("points.csv")).unwrap().1;
    assert_whole(points);
    assert_ne!(last, before, "the new outputs replaced the old");
}
