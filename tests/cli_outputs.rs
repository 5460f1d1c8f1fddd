//! Integration tests of the output choices of `check`: --format, --points, --plot-strain, the
//! part map's skip note, early output-path checks, and the terminal summary off a terminal.

use assert_cmd::Command;
use std::path::{Path, PathBuf};

fn repo(p: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(p)
}

struct Run {
    dir: tempfile::TempDir,
    code: i32,
    stdout: String,
    stderr: String,
}

impl std::fmt::Display for Run {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "dir: {}\nexit: {}\n--- stdout\n{}\n--- stderr\n{}",
            self.dir.path().display(),
            self.code,
            self.stdout,
            self.stderr
        )
    }
}

impl Run {
    fn files(&self, sub: &str) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(self.dir.path().join(sub))
            .map(|d| {
                d.map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
                    .collect()
            })
            .unwrap_or_default();
        v.sort();
        v
    }
}

/// Run `neckline check` on the demo tryout with `args` in a fresh folder; NO_COLOR unset.
fn check_demo(args: &[&str]) -> Run {
    let dir = tempfile::tempdir().unwrap();
    let out = Command::cargo_bin("neckline")
        .unwrap()
        .current_dir(dir.path())
        .env_remove("NO_COLOR")
        .arg("check")
        .arg(repo("demo-parts/rear-floor-pan/tryout-1.csv"))
        .arg("--job")
        .arg(repo("demo-parts/rear-floor-pan/job-t1.toml"))
        .args(args)
        .output()
        .unwrap();
    Run {
        dir,
        code: out.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    }
}

#[test]
fn default_writes_every_output_and_plain_text_off_a_terminal() {
    let r = check_demo(&["--out", "o"]);
    assert_eq!(r.code, 0, "{r}");
    assert_eq!(
        r.files("o"),
        [
            "fld.png",
            "fld.svg",
            "map.png",
            "map.svg",
            "points.csv",
            "report.html",
            "summary.json"
        ],
        "{r}"
    );
    // stdout is a pipe here, so no colour even though NO_COLOR is unset.
    assert!(!r.stdout.contains('\x1b'), "{r}");
    for line in r.stdout.lines() {
        assert!(
            line.chars().count() <= 80,
            "{} columns: {line}",
            line.chars().count()
        );
    }
}

#[test]
fn format_chooses_the_files() {
    let r = check_demo(&["--out", "o", "--format", "csv"]);
    assert_eq!(r.code, 0, "{r}");
    assert_eq!(r.files("o"), ["points.csv"], "{r}");
    let r = check_demo(&["--out", "o", "--format", "svg,html"]);
    assert_eq!(r.code, 0, "{r}");
    assert_eq!(r.files("o"), ["fld.svg", "map.svg", "report.html"], "{r}");
}

#[test]
fn unknown_format_is_a_usage_error() {
    let r = check_demo(&["--out", "o", "--format", "csv,pdf"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("pdf") && r.stderr.contains("html"), "{r}");
    assert!(r.files("o").is_empty(), "{r}");
}

#[test]
fn points_to_stdout_moves_the_summary_to_stderr() {
    let r = check_demo(&["--out", "o", "--format", "csv", "--points", "-"]);
    assert_eq!(r.code, 0, "{r}");
    let mut rows = csv::Reader::from_reader(r.stdout.as_bytes());
    assert_eq!(&rows.headers().unwrap()[0], "id");
    assert_eq!(rows.records().count(), 120, "the demo has 120 locations");
    assert!(r.stderr.contains("Verdict: FAIL"), "{r}");
    assert!(r.files("o").is_empty(), "{r}");
}

#[test]
fn points_to_a_chosen_file() {
    let r = check_demo(&[
        "--out",
        "o",
        "--format",
        "json",
        "--points",
        "elsewhere/p.csv",
    ]);
    assert_eq!(r.code, 0, "{r}");
    assert!(r.dir.path().join("elsewhere/p.csv").is_file(), "{r}");
    assert_eq!(r.files("o"), ["summary.json"], "{r}");
}

#[test]
fn true_strain_axes_on_request() {
    let r = check_demo(&["--out", "o", "--format", "svg", "--plot-strain", "true"]);
    assert_eq!(r.code, 0, "{r}");
    let svg = std::fs::read_to_string(r.dir.path().join("o/fld.svg")).unwrap();
    assert!(svg.contains("major strain ε1, true %"), "{r}");
}

#[test]
fn bad_output_path_fails_before_the_work() {
    // The out folder is a file, and the measurement file does not exist: the output path is
    // checked first, so the error names it.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("taken"), "x").unwrap();
    let out = Command::cargo_bin("neckline")
        .unwrap()
        .current_dir(dir.path())
        .args(["check", "nowhere.csv", "--d0", "2.5", "--out", "taken"])
        .arg("--limit")
        .arg(repo("tests/data/flat-30.toml"))
        .output()
        .unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{stderr}");
    assert!(
        stderr.contains("taken") && !stderr.contains("nowhere.csv"),
        "{stderr}"
    );
}

#[test]
fn no_positions_no_map_with_a_note() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("m.csv"),
        "id,major,minor\nP1,3.25,2.40\nP2,2.9,2.55\n",
    )
    .unwrap();
    let out = Command::cargo_bin("neckline")
        .unwrap()
        .current_dir(dir.path())
        .args([
            "check",
            "m.csv",
            "--d0",
            "2.5",
            "--out",
            "o",
            "--format",
            "svg,png,html",
        ])
        .arg("--limit")
        .arg(repo("tests/data/flat-30.toml"))
        .output()
        .unwrap();
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}");
    assert!(
        stdout.contains("no location has x, y: the part map was not drawn"),
        "{stdout}"
    );
    assert!(dir.path().join("o/fld.svg").is_file() && dir.path().join("o/fld.png").is_file());
    assert!(!dir.path().join("o/map.svg").exists() && !dir.path().join("o/map.png").exists());
    let html = std::fs::read_to_string(dir.path().join("o/report.html")).unwrap();
    assert!(html.contains("No map: no location carries x, y coordinates."));
}
