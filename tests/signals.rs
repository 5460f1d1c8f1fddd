//! Ctrl-C (SIGINT) and SIGTERM stop `check` cleanly at any moment of a larger run: exit status
//! 128 + the signal's number (130, 143: the shells' convention, POSIX.1-2017 Shell Command
//! Language 2.8.2), one line on standard error, the staging folder and the lock file removed,
//! and the previous outputs byte for byte as they were.

#![cfg(unix)]

mod common;
use common::run_in;
use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

const CURVE: &str = "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\n\
                     points = [[-40, 60], [0, 30], [20, 42]]\n";
/// About 3.6 MB of points.csv: large enough to stop the run while it writes, small enough for
/// a debug build to judge in a second or two.
const ROWS: usize = 25_000;

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

fn check_args(input: &str) -> Vec<&str> {
    vec![
        "check",
        input,
        "--d0",
        "2.5",
        "--limit",
        "c.toml",
        "--out",
        "out",
        "--format",
        "csv,json,svg",
    ]
}

/// A folder with the curve, two inputs and a complete first run's outputs in `out`.
fn with_first_run() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), CURVE).unwrap();
    std::fs::write(dir.path().join("a.csv"), measurements(0.0)).unwrap();
    std::fs::write(dir.path().join("b.csv"), measurements(0.05)).unwrap();
    run_in(dir.path(), &check_args("a.csv")).ok();
    dir
}

/// Every entry of `dir` with its bytes (folders as empty).
fn contents(dir: &Path) -> Vec<(PathBuf, Vec<u8>)> {
    let mut v: Vec<(PathBuf, Vec<u8>)> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| {
            let p = e.unwrap().path();
            let b = std::fs::read(&p).unwrap_or_default();
            (p, b)
        })
        .collect();
    v.sort();
    v
}

fn start(dir: &Path) -> Child {
    Command::new(env!("CARGO_BIN_EXE_neckline"))
        .current_dir(dir)
        .args(check_args("b.csv"))
        .env("NO_COLOR", "1")
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap()
}

/// The moment to send the signal at.
#[derive(Debug, Clone, Copy)]
enum Moment {
    /// As soon as the staging folder exists (the pass just starting).
    Staged,
    /// When the staged points.csv holds at least this many bytes.
    Written(u64),
}

/// Wait for `moment`; false when the run ended first.
fn wait_for(child: &mut Child, out: &Path, moment: Moment) -> bool {
    let deadline = Instant::now() + Duration::from_secs(60);
    while Instant::now() < deadline {
        if child.try_wait().unwrap().is_some() {
            return false;
        }
        let reached = std::fs::read_dir(out).into_iter().flatten().any(|e| {
            let e = e.unwrap();
            let name = e.file_name().to_string_lossy().into_owned();
            let staged = e.path().join("points.csv");
            name.starts_with(".neckline-stage.")
                && match moment {
                    Moment::Staged => true,
                    Moment::Written(n) => std::fs::metadata(staged).is_ok_and(|m| m.len() >= n),
                }
        });
        if reached {
            return true;
        }
        std::thread::sleep(Duration::from_millis(2));
    }
    panic!("{moment:?} not reached within 60 s");
}

/// Signal the second run at `moment` and check the clean stop.
fn stop_at(sig: i32, moment: Moment) {
    let dir = with_first_run();
    let out = dir.path().join("out");
    let before = contents(&out);
    assert_eq!(before.len(), 4, "{before:?}");
    let mut child = start(dir.path());
    assert!(wait_for(&mut child, &out, moment), "the run ended first");
    // SAFETY: kill(2) to our own child.
    assert_eq!(unsafe { libc::kill(child.id() as libc::pid_t, sig) }, 0);
    let o = child.wait_with_output().unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(128 + sig), "{moment:?}: {err}");
    let name = if sig == libc::SIGINT {
        "SIGINT"
    } else {
        "SIGTERM"
    };
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains(&format!("stopped by {name}")), "{err}");
    assert_eq!(
        contents(&out),
        before,
        "{moment:?}: the previous outputs, no temporaries"
    );
}

#[test]
fn sigint_as_the_pass_starts() {
    stop_at(libc::SIGINT, Moment::Staged);
}

#[test]
fn sigint_while_points_are_written() {
    stop_at(libc::SIGINT, Moment::Written(256 << 10));
}

#[test]
fn sigterm_while_points_are_written() {
    stop_at(libc::SIGTERM, Moment::Written(1 << 20));
}

#[test]
fn a_killed_run_is_cleared_by_the_next() {
    let dir = with_first_run();
    let out = dir.path().join("out");
    let before = contents(&out);
    let mut child = start(dir.path());
    assert!(
        wait_for(&mut child, &out, Moment::Written(512 << 10)),
        "the run ended first"
    );
    child.kill().unwrap(); // SIGKILL
    child.wait().unwrap();
    let left: Vec<_> = contents(&out)
        .into_iter()
        .filter(|(p, _)| p.file_name().unwrap().to_string_lossy().starts_with('.'))
        .collect();
    assert_eq!(left.len(), 2, "staging folder and lock file: {left:?}");
    let outputs: Vec<_> = contents(&out)
        .into_iter()
        .filter(|(p, _)| !p.file_name().unwrap().to_string_lossy().starts_with('.'))
        .collect();
    assert_eq!(outputs, before, "the previous outputs, unchanged");
    let r = run_in(dir.path(), &check_args("b.csv")).ok();
    let names: Vec<String> = contents(&out)
        .iter()
        .map(|(p, _)| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(
        names,
        ["fld.svg", "map.svg", "points.csv", "summary.json"],
        "{r}"
    );
}
