//! Integration tests: run the real `neckline` binary on good and bad files.

mod common;
use common::{demo_tryout as demo, neckline, read_json, repo, repo_arg, run, run_in};

#[test]
fn check_on_demo_writes_points_and_summary() {
    let [csv, job] = demo(1);
    let r = run(&["check", &csv, "--job", &job, "--out", "res"]);
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("Verdict: FAIL"), "{r}");
    assert!(r.stdout.contains("Keeler-Brazier"), "{r}");
    assert!(r.stdout.contains("aid to judgement"), "{r}");
    let points = std::fs::read_to_string(r.path("res/points.csv")).unwrap();
    let header = points.lines().next().unwrap();
    assert!(header.starts_with(
        "id,major_eng_pct,minor_eng_pct,major_true_pct,minor_true_pct,thickness_true_pct,\
         thickness,thinning_pct,major_green_pct,minor_green_pct,major_almansi_pct,\
         minor_almansi_pct,beta,effective_true_pct,limit_major_eng_pct,margin_pct,\
         limit_use_pct,zone"
    ));
    assert_eq!(points.lines().count(), 121);
    let s = read_json(&r.path("res/summary.json"));
    assert_eq!(s["points"], 120);
    assert_eq!(s["verdict"], "fail");
    let zone_total: u64 = s["zones"]
        .as_object()
        .unwrap()
        .values()
        .map(|v| v.as_u64().unwrap())
        .sum();
    assert_eq!(zone_total, 120);
    // The zone counts in the summary agree with the zone column of points.csv.
    let failed_rows = points.lines().filter(|l| l.contains(",failed,")).count() as u64;
    assert_eq!(s["zones"]["failed"].as_u64().unwrap(), failed_rows);
    assert!(s["worst"]["margin_pct"].as_f64().unwrap() < 0.0);
    assert!(s["limit"]["source"].as_str().unwrap().contains("Keeler"));
    // Nothing half-written is left behind.
    let leftovers: Vec<_> = std::fs::read_dir(r.path("res"))
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
        .collect();
    assert!(leftovers.is_empty());
}

#[test]
fn fail_on_sets_exit_status() {
    let [csv1, job1] = demo(1);
    let [csv2, job2] = demo(2);
    let r = run(&[
        "check",
        &csv1,
        "--job",
        &job1,
        "--out",
        "o",
        "--fail-on",
        "failed",
    ]);
    assert_eq!(r.code, 1, "{r}");
    let r = run(&[
        "check",
        &csv2,
        "--job",
        &job2,
        "--out",
        "o",
        "--fail-on",
        "failed",
    ]);
    assert_eq!(r.code, 0, "{r}");
    let r = run(&[
        "check",
        &csv2,
        "--job",
        &job2,
        "--out",
        "o",
        "--fail-on",
        "marginal",
    ]);
    assert_eq!(r.code, 1, "{r}");
}

// Check values of the strains (project field notes, section 2, computed from the textbook
// formulas): d0 = 2.5, d1 = 3.25, d2 = 2.40 -> e = 30 %, -4 %; eps = 26.236 %, -4.082 %.
#[test]
fn strains_command_gives_reference_values() {
    let r = run(&[
        "strains",
        &repo_arg("tests/data/good.csv"),
        "--d0",
        "2.5",
        "--t0",
        "1",
    ]);
    assert_eq!(r.code, 0, "{r}");
    let mut rdr = csv::Reader::from_reader(r.stdout.as_bytes());
    let row = rdr.records().next().unwrap().unwrap();
    assert_eq!(&row[0], "P1");
    let f = |i: usize| row[i].parse::<f64>().unwrap();
    assert!(
        (f(1) - 30.0).abs() < 1e-3 && (f(2) + 4.0).abs() < 1e-3,
        "{r}"
    );
    assert!(
        (f(3) - 26.236).abs() < 1e-3 && (f(4) + 4.082).abs() < 1e-3,
        "{r}"
    );
    assert!((f(5) + 22.154).abs() < 1e-3, "{r}");
    assert!((f(6) - 0.8013).abs() < 1e-4, "{r}");
    assert!(
        (f(10) - 20.414).abs() < 1e-3 && (f(11) + 4.254).abs() < 1e-3,
        "{r}"
    );
}

#[test]
fn semicolon_file_gives_the_same_strains() {
    let comma = run(&["strains", &repo_arg("tests/data/good.csv"), "--d0", "2.5"]);
    let semi = run(&[
        "strains",
        &repo_arg("tests/data/good-semicolon.csv"),
        "--d0",
        "2.5",
    ]);
    assert_eq!(comma.code, 0, "{comma}");
    assert_eq!(comma.stdout, semi.stdout, "{semi}");
}

#[test]
fn bad_rows_are_listed_not_dropped() {
    let csv = repo_arg("tests/data/bad-rows.csv");
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run(&["check", &csv, "--limit", &lim, "--d0", "2.5", "--out", "o"]);
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout.contains("1 location judged, 5 rows rejected"),
        "{r}"
    );
    for needle in [
        "bad-rows.csv:3:2 (column `major`): expected a finite number, found `abc`",
        "bad-rows.csv:4:3 (column `minor`): major axis 2.3 is smaller than minor axis 2.4",
        "bad-rows.csv:5:2 (column `major`): the major axis must be greater than zero",
        "bad-rows.csv:6:1 (column `id`): duplicate id `P1`",
        "bad-rows.csv:7: expected 3 fields as in the header, found 2",
    ] {
        assert!(r.stdout.contains(needle), "missing `{needle}`\n{r}");
    }
    let s = read_json(&r.path("o/summary.json"));
    assert_eq!(s["rejected_rows"], 5);
    assert_eq!(s["rejected"][0]["line"], 3);
    // --strict refuses the whole file and writes nothing.
    let r = run(&[
        "check", &csv, "--limit", &lim, "--d0", "2.5", "--out", "o", "--strict",
    ]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("--strict: 5 rows rejected"), "{r}");
    assert!(!r.path("o/points.csv").exists());
}

#[test]
fn whole_file_errors_exit_2_with_location() {
    let lim = repo_arg("tests/data/flat-30.toml");
    let cases = [
        (
            "missing-column.csv",
            "missing-column.csv:1: missing column `minor`",
        ),
        ("empty.csv", "empty.csv: the file is empty"),
    ];
    for (file, needle) in cases {
        let csv = repo_arg(&format!("tests/data/{file}"));
        let r = run(&["check", &csv, "--limit", &lim, "--d0", "2.5"]);
        assert_eq!(r.code, 2, "{r}");
        assert!(
            r.stderr.starts_with("error: ") && r.stderr.contains(needle),
            "{r}"
        );
    }
}

#[test]
fn usage_errors_exit_2() {
    let csv = repo_arg("tests/data/good.csv");
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run(&[
        "check", &csv, "--limit", &lim, "--d0", "2.5", "--unit", "cm",
    ]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("expected `mm` or `in`"), "{r}");
    let r = run(&["check", &csv, "--d0", "2.5"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("no limit curve"), "{r}");
    // A missing file is named once, with the system's reason once.
    let r = run(&["check", "no-such.csv", "--limit", &lim, "--d0", "2.5"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.starts_with("error: no-such.csv: "), "{r}");
    assert_eq!(r.stderr.lines().count(), 1, "{r}");
    let r = run(&["check", &csv, "--limit", &lim]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("no initial circle diameter"), "{r}");
    let r = run(&["check", &csv, "--limit", &lim, "--d0", "-1"]);
    assert_eq!(r.code, 2, "{r}");
    let r = run(&[
        "check",
        &csv,
        "--limit",
        &lim,
        "--d0",
        "2.5",
        "--fail-on",
        "bad",
    ]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("expected `failed` or `marginal`, found `bad`"),
        "{r}"
    );
    // Only the two zones that stop a qualification are accepted.
    let r = run(&[
        "check",
        &csv,
        "--limit",
        &lim,
        "--d0",
        "2.5",
        "--fail-on",
        "safe",
    ]);
    assert_eq!(r.code, 2, "{r}");
    let unsorted = repo_arg("tests/data/unsorted.toml");
    let r = run(&["check", &csv, "--limit", &unsorted, "--d0", "2.5"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("unsorted.toml:6:") && r.stderr.contains("does not increase"),
        "{r}"
    );
}

#[test]
fn never_writes_over_an_input() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::copy(repo("tests/data/good.csv"), dir.path().join("points.csv")).unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run_in(
        dir.path(),
        &[
            "check",
            "points.csv",
            "--limit",
            &lim,
            "--d0",
            "2.5",
            "--out",
            ".",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("refusing to write"), "{r}");
    let kept = std::fs::read_to_string(dir.path().join("points.csv")).unwrap();
    assert_eq!(
        kept,
        std::fs::read_to_string(repo("tests/data/good.csv")).unwrap()
    );
}

#[test]
fn reads_measurements_from_stdin() {
    let dir = tempfile::tempdir().unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let input = std::fs::read_to_string(repo("tests/data/good.csv")).unwrap();
    let r = neckline(&["check", "-", "--limit", &lim, "--d0", "2.5", "--out", "o"])
        .stdin(input)
        .run_in(dir.path());
    assert_eq!(r.code, 0, "{r}");
    // P1: e1 = 30 % on a flat 30 % curve is on the curve: failed (on or above counts).
    let points = std::fs::read_to_string(dir.path().join("o/points.csv")).unwrap();
    assert!(
        points.lines().nth(1).unwrap().contains(",failed,"),
        "{points}"
    );
}

#[test]
fn help_lists_commands_and_exit_codes() {
    let r = run(&["--help"]);
    assert_eq!(r.code, 0);
    assert!(
        r.stdout.contains("check") && r.stdout.contains("strains"),
        "{r}"
    );
    assert!(r.stdout.contains("Exit status"), "{r}");
    let r = run(&["check"]);
    assert_eq!(r.code, 2, "{r}");
}

// A 0.100 in grid (common practice in inch shops) gives the same strains as a metric one:
// 0.130/0.100 = 3.25/2.50 = 1.30 (field notes, section 2 check values); thickness stays in inches.
#[test]
fn inch_files_give_the_same_strains() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("in.csv"),
        "id,major,minor\nP1,0.130,0.096\n",
    )
    .unwrap();
    std::fs::write(
        dir.path().join("job.toml"),
        "unit = \"in\"\nd0 = 0.1\nt0 = 0.0315\n",
    )
    .unwrap();
    let r = run_in(dir.path(), &["strains", "in.csv", "--job", "job.toml"]);
    assert_eq!(r.code, 0, "{r}");
    let row: Vec<String> = r
        .stdout
        .lines()
        .nth(1)
        .unwrap()
        .split(',')
        .map(String::from)
        .collect();
    assert_eq!(row[1], "30.000", "{r}");
    assert_eq!(row[2], "-4.000", "{r}");
    let t: f64 = row[6].parse().unwrap();
    assert!((t - 0.0315 * 0.80128).abs() < 1e-4, "{r}");
    // A unit the tool does not know is refused with the file and line.
    std::fs::write(dir.path().join("bad.toml"), "unit = \"cm\"\n").unwrap();
    let r = run_in(dir.path(), &["strains", "in.csv", "--job", "bad.toml"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("bad.toml:1:8"), "{r}");
}

// `grid` and `check` share one output path: the same files come out of both.
#[test]
fn grid_writes_the_same_outputs_as_check() {
    let nodes = repo_arg("demo-parts/rear-floor-pan-grid/nodes.csv");
    let job = repo_arg("demo-parts/rear-floor-pan-grid/job.toml");
    let r = run(&["grid", &nodes, "--job", &job, "--out", "g"]);
    assert_eq!(r.code, 0, "{r}");
    for f in [
        "points.csv",
        "summary.json",
        "fld.svg",
        "fld.png",
        "map.svg",
        "map.png",
        "report.html",
    ] {
        assert!(r.path("g").join(f).is_file(), "missing {f}\n{r}");
    }
    assert!(r.stdout.starts_with("Grid: 384 elements"), "{r}");
}

#[test]
fn generated_curve_can_be_drawn() {
    let r = run(&[
        "limit",
        "keeler-brazier",
        "--n",
        "0.2",
        "--thickness",
        "0.8",
        "--out",
        "kb.toml",
        "--plot",
        "kb.png",
    ]);
    assert_eq!(r.code, 0, "{r}");
    let img = image::open(r.path("kb.png")).unwrap();
    assert!(img.width() > 600 && img.height() > 400);
    let r = run(&[
        "limit",
        "keeler-brazier",
        "--n",
        "0.2",
        "--thickness",
        "0.8",
        "--plot",
        "kb.pdf",
    ]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("must end in .svg or .png"), "{r}");
}

// Measured thickness is carried and checked against t0·exp(ε3) (incompressibility): for
// d0 = 2.5, axes 3.25 x 2.40, t0 = 1.0 the computed thickness is 0.80128 (field notes, section 2).
#[test]
fn measured_thickness_is_cross_checked() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("t.csv"),
        "id,major,minor,thickness\nP1,3.25,2.40,0.78\nP2,2.6,2.55,\n",
    )
    .unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run_in(
        dir.path(),
        &[
            "check", "t.csv", "--limit", &lim, "--d0", "2.5", "--t0", "1.0", "--out", "o",
            "--format", "csv,json",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    // (0.78 − 0.80128) / 0.80128 = −2.66 %
    assert!(
        r.stdout
            .contains("Thickness cross-check: 1 location measured; largest difference -2.7 %"),
        "{r}"
    );
    let points = std::fs::read_to_string(dir.path().join("o/points.csv")).unwrap();
    let mut rdr = csv::Reader::from_reader(points.as_bytes());
    let h = rdr.headers().unwrap().clone();
    let col = h.iter().position(|c| c == "thickness_diff_pct").unwrap();
    let rows: Vec<csv::StringRecord> = rdr.records().map(|r| r.unwrap()).collect();
    assert_eq!(&rows[0][col], "-2.66");
    assert_eq!(&rows[1][col], "");
    let s = read_json(&dir.path().join("o/summary.json"));
    assert_eq!(s["thickness_check"]["id"], "P1");
}

#[test]
fn reading_error_flags_borderline_locations() {
    let [csv, job] = demo(2);
    let r = run(&[
        "check",
        &csv,
        "--job",
        &job,
        "--out",
        "o",
        "--format",
        "csv,json",
        "--reading-error",
        "0.02",
    ]);
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout
            .contains("Borderline (zone could change within a reading error of 0.02 mm)"),
        "{r}"
    );
    let s = read_json(&r.path("o/summary.json"));
    let n = s["borderline"]["count"].as_u64().unwrap();
    let points = std::fs::read_to_string(r.path("o/points.csv")).unwrap();
    let mut rdr = csv::Reader::from_reader(points.as_bytes());
    let h = rdr.headers().unwrap().clone();
    let (mi, bi, ui) = (
        h.iter().position(|c| c == "margin_pct").unwrap(),
        h.iter().position(|c| c == "borderline").unwrap(),
        h.iter()
            .position(|c| c == "margin_uncertainty_pct")
            .unwrap(),
    );
    let mut yes = 0;
    for rec in rdr.records() {
        let rec = rec.unwrap();
        let (m, u): (f64, f64) = (rec[mi].parse().unwrap(), rec[ui].parse().unwrap());
        // Every uncertainty is at least δd/d0 = 0.02/2.5 = 0.8 pp (common practice: δe ≈ δd/d0).
        assert!(u >= 0.8 - 1e-9, "{u}");
        let near = m.abs() < u || (m - 10.0).abs() < u;
        // The flag is consistent with the printed margin and uncertainty (to their rounding).
        if (m.abs() - u).abs() > 0.01 && ((m - 10.0).abs() - u).abs() > 0.01 {
            assert_eq!(&rec[bi] == "yes", near, "{rec:?}");
        }
        yes += usize::from(&rec[bi] == "yes");
    }
    assert_eq!(yes as u64, n);
    assert!(n > 0);
    // Without the flag, the columns are not written.
    let r = run(&[
        "check", &csv, "--job", &job, "--out", "o", "--format", "csv",
    ]);
    let points = std::fs::read_to_string(r.path("o/points.csv")).unwrap();
    assert!(!points.lines().next().unwrap().contains("borderline"));
}

#[test]
fn job_lengths_are_converted_to_the_unit_in_use() {
    let dir = tempfile::tempdir().unwrap();
    // Axes in mm; the job gives d0 = 0.1 in = 2.54 mm (NIST SP 811: 1 in = 25.4 mm exactly).
    std::fs::write(dir.path().join("mm.csv"), "id,major,minor\nP1,3.302,2.54\n").unwrap();
    std::fs::write(dir.path().join("job.toml"), "unit = \"in\"\nd0 = 0.1\n").unwrap();
    let r = run_in(
        dir.path(),
        &["strains", "mm.csv", "--job", "job.toml", "--unit", "mm"],
    );
    assert_eq!(r.code, 0, "{r}");
    let row: Vec<&str> = r.stdout.lines().nth(1).unwrap().split(',').collect();
    assert_eq!(row[1], "30.000", "{r}"); // 3.302 / 2.54 = 1.30
}

#[test]
fn rejected_rows_make_the_verdict_incomplete_and_trip_fail_on() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("m.csv"),
        "id,major,minor\nP1,2.60,2.55\nP2,3x,2.5\n",
    )
    .unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let args = [
        "check", "m.csv", "--limit", &lim, "--d0", "2.5", "--out", "o", "--format", "json",
    ];
    let r = run_in(dir.path(), &args);
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("Verdict: INCOMPLETE"), "{r}");
    assert_eq!(
        read_json(&dir.path().join("o/summary.json"))["verdict"],
        "incomplete"
    );
    let mut with_fail_on = args.to_vec();
    with_fail_on.extend(["--fail-on", "failed"]);
    let r = run_in(dir.path(), &with_fail_on);
    assert_eq!(r.code, 1, "{r}");
}

#[test]
fn implausible_axes_are_rejected_not_judged() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("m.csv"),
        "id,major,minor\nP1,1e308,2.5\nP2,2.6,1e-300\nP3,2.6,2.5\n",
    )
    .unwrap();
    let lim = repo_arg("tests/data/flat-30.toml");
    let r = run_in(
        dir.path(),
        &[
            "check", "m.csv", "--limit", &lim, "--d0", "2.5", "--out", "o", "--format", "csv",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout.contains("m.csv:2 (column `major`)") && r.stdout.contains("plausible"),
        "{r}"
    );
    assert!(r.stdout.contains("m.csv:3 (column `minor`)"), "{r}");
    let points = std::fs::read_to_string(dir.path().join("o/points.csv")).unwrap();
    assert!(
        !points.contains("inf") && !points.contains("NaN"),
        "{points}"
    );
    assert_eq!(points.lines().count(), 2);
}

#[test]
fn strains_with_no_usable_row_exits_2() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("m.csv"), "id,major,minor\nP1,2.4,2.5\n").unwrap();
    let r = run_in(dir.path(), &["strains", "m.csv", "--d0", "2.5"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("smaller than minor")
            && r.stderr.contains("no location could be computed"),
        "{r}"
    );
}

#[test]
fn outputs_left_from_an_earlier_run_are_removed_and_named() {
    let [csv, job] = demo(1);
    let r = run(&["check", &csv, "--job", &job, "--out", "o"]);
    assert_eq!(r.code, 0, "{r}");
    let r = run_in(
        &r.dir,
        &[
            "check", &csv, "--job", &job, "--out", "o", "--format", "csv",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("note: removed "), "{r}");
    assert!(r.stdout.contains("o/report.html"), "{r}");
    assert!(!r.path("o/report.html").exists(), "{r}");
    assert!(!r.stdout.contains("o/points.csv,"), "{r}");
}

#[test]
fn a_curve_for_other_sheet_is_warned_about() {
    let [csv, job] = demo(1);
    let r = run(&[
        "check", &csv, "--job", &job, "--out", "o", "--format", "json", "--t0", "1.5",
    ]);
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout
            .contains("warning: the limit curve is for 0.8 mm sheet, but t0 is 1.500 mm"),
        "{r}"
    );
    let s = read_json(&r.path("o/summary.json"));
    assert!(s["warnings"][0].as_str().unwrap().contains("0.8 mm sheet"));
    let r = run(&[
        "check", &csv, "--job", &job, "--out", "o", "--format", "json",
    ]);
    assert!(!r.stdout.contains("warning:"), "{r}");
}
