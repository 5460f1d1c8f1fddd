//! Integration tests of the output choices of `check`: --format, --points, --plot-strain, the
//! part map's skip note, early output-path checks, and the terminal summary off a terminal.

mod common;
use common::{demo_tryout, neckline, repo_arg, run_in, Run};

/// The files in the folder `sub` of a run's folder, sorted (none when it does not exist).
fn files(r: &Run, sub: &str) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(r.path(sub))
        .map(|d| {
            d.map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// Run `neckline check` on the demo tryout with `args` in a fresh folder; NO_COLOR unset.
fn check_demo(args: &[&str]) -> Run {
    let [csv, job] = demo_tryout(1);
    let mut all = vec!["check", &csv, "--job", &job];
    all.extend_from_slice(args);
    neckline(&all).env_remove("NO_COLOR").run()
}

#[test]
fn default_writes_every_output_and_plain_text_off_a_terminal() {
    let r = check_demo(&["--out", "o"]);
    assert_eq!(r.code, 0, "{r}");
    assert_eq!(
        files(&r, "o"),
        [
            "fld.png",
            "fld.svg",
            "map.png",
            "map.svg",
            "points.csv",
            "report.html",
            "review.html",
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
    assert_eq!(files(&r, "o"), ["points.csv"], "{r}");
    let r = check_demo(&["--out", "o", "--format", "svg,html"]);
    assert_eq!(r.code, 0, "{r}");
    assert_eq!(files(&r, "o"), ["fld.svg", "map.svg", "report.html"], "{r}");
}

#[test]
fn unknown_format_is_a_usage_error() {
    let r = check_demo(&["--out", "o", "--format", "csv,pdf"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("pdf") && r.stderr.contains("html"), "{r}");
    assert!(files(&r, "o").is_empty(), "{r}");
}

#[test]
fn points_to_stdout_moves_the_summary_to_stderr() {
    let r = check_demo(&["--out", "o", "--format", "csv", "--points", "-"]);
    assert_eq!(r.code, 0, "{r}");
    let mut rows = csv::Reader::from_reader(r.stdout.as_bytes());
    assert_eq!(&rows.headers().unwrap()[0], "id");
    assert_eq!(rows.records().count(), 120, "the demo has 120 locations");
    assert!(r.stderr.contains("Verdict: FAIL"), "{r}");
    assert!(files(&r, "o").is_empty(), "{r}");
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
    assert!(r.path("elsewhere/p.csv").is_file(), "{r}");
    assert_eq!(files(&r, "o"), ["summary.json"], "{r}");
}

#[test]
fn true_strain_axes_on_request() {
    let r = check_demo(&["--out", "o", "--format", "svg", "--plot-strain", "true"]);
    assert_eq!(r.code, 0, "{r}");
    let svg = std::fs::read_to_string(r.path("o/fld.svg")).unwrap();
    assert!(svg.contains("major strain ε1, true %"), "{r}");
}

#[test]
fn bad_output_path_fails_before_the_work() {
    // The out folder is a file, and the measurement file does not exist: the output path is
    // checked first, so the error names it.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("taken"), "x").unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run_in(
        dir.path(),
        &[
            "check",
            "nowhere.csv",
            "--d0",
            "2.5",
            "--out",
            "taken",
            "--limit",
            &lim,
        ],
    );
    let stderr = &r.stderr;
    assert_eq!(r.code, 2, "{r}");
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
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run_in(
        dir.path(),
        &[
            "check",
            "m.csv",
            "--d0",
            "2.5",
            "--out",
            "o",
            "--format",
            "svg,png,html",
            "--limit",
            &lim,
        ],
    );
    let stdout = &r.stdout;
    assert_eq!(r.code, 0, "{r}");
    assert!(
        stdout.contains("no location has x, y: the part map was not drawn"),
        "{stdout}"
    );
    assert!(dir.path().join("o/fld.svg").is_file() && dir.path().join("o/fld.png").is_file());
    assert!(!dir.path().join("o/map.svg").exists() && !dir.path().join("o/map.png").exists());
    let html = std::fs::read_to_string(dir.path().join("o/report.html")).unwrap();
    assert!(html.contains("No map: no location carries x, y coordinates."));
}
