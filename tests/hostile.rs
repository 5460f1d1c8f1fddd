//! The hostile corpus: every file in tests/hostile/ (and a few generated here, too big to
//! commit) given to the real binary through the parser it targets. Each must end in exit
//! status 2 with a message naming the file (and its line where the problem has one), without a
//! panic, within 5 s (on an idle machine, see `quick`), leaving the inputs as they were and writing nothing.
//!
//! File names say the parser: `nodes-*` (grid nodes), `elements-*` (grid elements), `outlines-*`
//! (`fit`), `curve-*` (limit curves), `job-*` (job files), `measure-*` (measured axes, through
//! `check`'s streaming pass), `strains-*` (strain columns, the same), `points-*` (a points.csv
//! given to `compare`). tests/hostile/recovered/ holds inputs that are read with a documented
//! recovery (README, "What input is refused, and why") rather than refused.

mod common;
use common::{neckline, repo, write};
use std::path::{Path, PathBuf};
use std::time::Duration;

/// A hung parser fails its test instead of hanging it.
const TIMEOUT: Duration = Duration::from_secs(20);

const CURVE: &str =
    "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\npoints = [[-40, 60], [0, 30], [20, 42]]\n";
const NODES_ID: &str = "id,X,Y,x,y\nA,0,0,0,0\nB,2.5,0,3,0\nC,2.5,2.5,3,2.5\nD,0,2.5,0,2.5\n";
const MEASURED: &str = "id,major,minor\nA,3.0,2.6\n";
const POINTS: &str = "id,major_eng_pct,minor_eng_pct,margin_pct,zone,x,y\n\
                      A1,18,3,7,marginal,1,2\nA2,10,1,15,safe,2,2\n";

fn corpus() -> Vec<PathBuf> {
    let dir = repo("tests/hostile");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.is_file())
        .collect();
    v.sort();
    v
}

/// The command line that feeds `name` to its parser (inputs beside it in the run folder).
fn args_for(name: &str) -> Vec<String> {
    let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect();
    match name.split('-').next().unwrap() {
        "nodes" => s(&["grid", name, "--limit", "good.toml", "--out", "out"]),
        "elements" => s(&[
            "grid",
            "nodes-id.csv",
            "--elements",
            name,
            "--limit",
            "good.toml",
            "--out",
            "out",
        ]),
        "outlines" => s(&["fit", name, "--out", "out/fitted.csv"]),
        "curve" => s(&[
            "check", "good.csv", "--d0", "2.5", "--limit", name, "--out", "out",
        ]),
        "job" => s(&["check", "good.csv", "--job", name, "--out", "out"]),
        "measure" => s(&[
            "check",
            name,
            "--d0",
            "2.5",
            "--limit",
            "good.toml",
            "--out",
            "out",
        ]),
        "strains" => s(&["check", name, "--limit", "good.toml", "--out", "out"]),
        "points" => s(&["compare", "good-points.csv", name, "--out", "out"]),
        other => panic!("no parser for the corpus file prefix `{other}`"),
    }
}

/// Run `args` in a fresh folder holding the good inputs and `files`; check the outcome.
/// `line`: the message must also name this line of the hostile file.
fn refused(files: &[(&str, &[u8])], args: &[String], hostile: &str, line: Option<u64>) {
    let dir = tempfile::tempdir().unwrap();
    let good: [(&str, &[u8]); 4] = [
        ("good.toml", CURVE.as_bytes()),
        ("nodes-id.csv", NODES_ID.as_bytes()),
        ("good.csv", MEASURED.as_bytes()),
        ("good-points.csv", POINTS.as_bytes()),
    ];
    for (name, bytes) in good.iter().chain(files) {
        write(dir.path(), name, bytes);
    }
    let before = snapshot(dir.path());
    let r = neckline(args).timeout(TIMEOUT).run_in(dir.path());
    let (took, stderr) = (r.took, &r.stderr);
    let context = format!("{hostile}:\n{r}");
    assert_eq!(r.code, 2, "{context}");
    assert!(!stderr.contains("panicked"), "{context}");
    assert!(took < quick(), "{context}");
    let error = stderr
        .lines()
        .find(|l| l.starts_with("error: "))
        .unwrap_or("");
    assert!(
        error.contains(hostile),
        "the message names the file: {context}"
    );
    if let Some(l) = line {
        assert!(
            error.contains(&format!("{hostile}:{l}")),
            "the message names line {l}: {context}"
        );
    }
    let after = snapshot(dir.path());
    let out_dir = dir.path().join("out");
    let written: Vec<_> = after
        .iter()
        .filter(|(p, _)| p.starts_with(&out_dir))
        .collect();
    assert!(
        written.is_empty(),
        "nothing written: {written:?}\n{context}"
    );
    assert_eq!(before, after, "inputs unchanged: {context}");
}

/// Every file under `dir` with its bytes.
fn snapshot(dir: &Path) -> Vec<(PathBuf, Vec<u8>)> {
    let mut v = Vec::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p);
            } else {
                let bytes = std::fs::read(&p).unwrap();
                v.push((p, bytes));
            }
        }
    }
    v.sort();
    v
}

/// The line each committed file's message must name, where the problem sits on one line.
fn expected_line(name: &str) -> Option<u64> {
    match name {
        "nodes-duplicate-header.csv"
        | "elements-missing-column.csv"
        | "outlines-missing-column.csv" => Some(1),
        "nodes-huge-row.csv"
        | "nodes-i64-min.csv"
        | "nodes-inf-nan.csv"
        | "nodes-quoted-newline.csv"
        | "nodes-nul.csv" => Some(2),
        "curve-one-point.toml"
        | "curve-nan.toml"
        | "curve-1e308.toml"
        | "curve-three-numbers.toml" => Some(4),
        "curve-inf.toml" => Some(4),
        "curve-duplicate-key.toml"
        | "job-self-limit.toml"
        | "job-inf-t0.toml"
        | "job-nan-margin.toml"
        | "job-unknown-key.toml"
        | "job-1e308-reading.toml" => Some(2),
        "job-negative-d0.toml" | "job-limit-is-folder.toml" => Some(1),
        "measure-duplicate-header.csv"
        | "measure-missing-column.csv"
        | "measure-axes-and-strains.csv"
        | "strains-duplicate-header.csv"
        | "strains-half-pair.csv"
        | "points-duplicate-header.csv"
        | "points-missing-column.csv"
        | "points-header-only.csv" => Some(1),
        "measure-nul.csv"
        | "measure-inf-nan.csv"
        | "measure-1e308.csv"
        | "measure-inches.csv"
        | "measure-negative.csv"
        | "measure-swapped.csv"
        | "measure-unclosed-quote.csv"
        | "measure-text-numbers.csv"
        | "strains-inf-nan.csv"
        | "strains-1e308.csv"
        | "strains-fraction-of-axis.csv"
        | "strains-swapped.csv"
        | "points-inf-nan.csv"
        | "points-nan-margin.csv"
        | "points-1e308.csv"
        | "points-unknown-zone.csv" => Some(2),
        "measure-percent.csv" => Some(3),
        "points-nul.csv" | "points-duplicate-id.csv" => Some(3),
        _ => None,
    }
}

#[test]
fn every_corpus_file_is_refused_cleanly() {
    let files = corpus();
    assert!(files.len() >= 40, "{} files", files.len());
    for path in files {
        let name = path.file_name().unwrap().to_str().unwrap().to_string();
        let bytes = std::fs::read(&path).unwrap();
        refused(
            &[(&name, &bytes)],
            &args_for(&name),
            &name,
            expected_line(&name),
        );
        // The committed file itself is never touched.
        assert_eq!(std::fs::read(&path).unwrap(), bytes, "{name}");
    }
}

// Too big to commit: made here.
#[test]
fn generated_hostile_files_are_refused_cleanly() {
    // A curve of 200 000 points: refused at the first point past the cap (line 5 + 10 000).
    let mut curve = String::from(
        "name = \"big\"\nsource = \"hostile test\"\nstrain = \"engineering\"\npoints = [\n",
    );
    for i in 0..200_000 {
        curve += &format!("[{}, 40],\n", -50.0 + f64::from(i) * 1e-4);
    }
    curve += "]\n";
    let args = args_for("curve-200000.toml");
    refused(
        &[("curve-200000.toml", curve.as_bytes())],
        &args,
        "curve-200000.toml",
        Some(10_005),
    );
    // A 5 MB field in a nodes file, an outlines file and an elements file.
    let big = "7".repeat(5 << 20);
    let nodes = format!("row,col,X,Y,x,y\n0,0,{big},0,0,0\n");
    refused(
        &[("nodes-5mb.csv", nodes.as_bytes())],
        &args_for("nodes-5mb.csv"),
        "nodes-5mb.csv",
        Some(2),
    );
    let outlines = format!("id,x,y\n{big},1,2\n");
    refused(
        &[("outlines-5mb.csv", outlines.as_bytes())],
        &args_for("outlines-5mb.csv"),
        "outlines-5mb.csv",
        Some(2),
    );
    let elements = format!("id,n1,n2,n3\nT1,A,B,{big}\n");
    refused(
        &[("elements-5mb.csv", elements.as_bytes())],
        &args_for("elements-5mb.csv"),
        "elements-5mb.csv",
        Some(2),
    );
    // A line with a million fields, as a header and as a row.
    let million = ",".repeat(1_000_000);
    let header = format!("row,col,X,Y,x,y{million}\n0,0,0,0,0,0\n");
    refused(
        &[("nodes-wide.csv", header.as_bytes())],
        &args_for("nodes-wide.csv"),
        "nodes-wide.csv",
        Some(1),
    );
    let row = format!("id,x,y\nE,1,2{million}\n");
    refused(
        &[("outlines-wide.csv", row.as_bytes())],
        &args_for("outlines-wide.csv"),
        "outlines-wide.csv",
        Some(2),
    );
}

/// The time a refusal or a recovery may take: 5 s on an idle machine (a refusal reads a few
/// lines, a hostile file must stay cheap), stretched by the load average over the cores when
/// other work shares the machine (wall time, not CPU time, is what the run reports), at most 30 s.
fn quick() -> Duration {
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get()) as f64;
    let load = std::fs::read_to_string("/proc/loadavg")
        .ok()
        .and_then(|t| t.split_whitespace().next()?.parse::<f64>().ok())
        .unwrap_or(0.0);
    Duration::from_secs_f64((5.0 * (load / cores).max(1.0)).min(30.0))
}

/// Run `args` in a fresh folder holding the good inputs and `files`, expecting a documented
/// recovery: exit 0, no panic, under 5 s, inputs unchanged. Returns stdout, stderr and the
/// folder.
fn recovered(files: &[(&str, &[u8])], args: &[&str]) -> (String, String, tempfile::TempDir) {
    let dir = tempfile::tempdir().unwrap();
    let good: [(&str, &[u8]); 2] = [
        ("good.toml", CURVE.as_bytes()),
        ("good-points.csv", POINTS.as_bytes()),
    ];
    for (name, bytes) in good.iter().chain(files) {
        write(dir.path(), name, bytes);
    }
    let before = snapshot(dir.path());
    let r = neckline(args).timeout(TIMEOUT).run_in(dir.path());
    let (took, stdout, stderr) = (r.took, r.stdout.clone(), r.stderr.clone());
    let context = r.to_string();
    assert_eq!(r.code, 0, "{context}");
    assert!(!stderr.contains("panicked"), "{context}");
    assert!(took < quick(), "{context}");
    let after: Vec<_> = snapshot(dir.path())
        .into_iter()
        .filter(|(p, _)| !p.starts_with(dir.path().join("out")))
        .collect();
    assert_eq!(before, after, "inputs unchanged: {context}");
    (stdout, stderr, dir)
}

fn recovered_file(name: &str) -> Vec<u8> {
    std::fs::read(repo("tests/hostile/recovered").join(name)).unwrap()
}

fn check_args(name: &str) -> Vec<&str> {
    vec![
        "check",
        name,
        "--d0",
        "2.5",
        "--limit",
        "good.toml",
        "--out",
        "out",
    ]
}

// Spreadsheets end rows with empty fields: accepted (the row is read by its first fields).
#[test]
fn trailing_empty_fields_are_accepted() {
    let name = "measure-trailing-commas.csv";
    let (stdout, _, dir) = recovered(&[(name, &recovered_file(name))], &check_args(name));
    assert!(stdout.contains("2 locations judged"), "{stdout}");
    assert!(!stdout.contains("Rejected rows"), "{stdout}");
    let points = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    assert_eq!(points.lines().count(), 3, "{points}");
}

// A quoted line break in a note is part of the note; the next row's line number counts it.
#[test]
fn a_quoted_newline_in_a_note_is_read_and_lines_stay_right() {
    let name = "measure-quoted-newline.csv";
    let (stdout, _, dir) = recovered(&[(name, &recovered_file(name))], &check_args(name));
    assert!(
        stdout.contains("1 location judged, 1 row rejected"),
        "{stdout}"
    );
    assert!(
        stdout.contains("measure-quoted-newline.csv:4:3"),
        "{stdout}"
    );
    let points = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    assert!(points.contains("\"split at the\nradius\""), "{points}");
}

// The dome top: 2.26 / 2.28 with d0 2.5. The minor reads 0.02 above the major, within
// 1 % of d0 (0.025, the default), so the two are swapped with a note; with a reading error of
// 0.01 the same row is rejected (0.02 is more than the reading error).
#[test]
fn near_equal_axes_are_swapped_within_the_reading_error() {
    let name = "measure-near-equal.csv";
    let bytes = recovered_file(name);
    let (stdout, _, dir) = recovered(&[(name, &bytes)], &check_args(name));
    assert!(stdout.contains("2 locations judged"), "{stdout}");
    assert!(stdout.contains("taken as"), "{stdout}");
    assert!(stdout.contains("first at line 2"), "{stdout}");
    let points = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    let a1 = points.lines().find(|l| l.starts_with("A1,")).unwrap();
    assert!(a1.contains("near-equal axes swapped"), "{a1}");
    // ln(2.28/2.5) = -9.2115 % true major strain (the larger axis is the major).
    assert!(a1.starts_with("A1,-8.800,-9.600,-9.2115,"), "{a1}");

    let mut args = check_args(name);
    args.extend(["--reading-error", "0.01"]);
    let (stdout, _, _) = recovered(&[(name, &bytes)], &args);
    assert!(
        stdout.contains("1 location judged, 1 row rejected"),
        "{stdout}"
    );
    assert!(
        stdout.contains("more than the reading error 0.01"),
        "{stdout}"
    );
}

// Strains given directly: 0.05 pp apart is within the default 0.1 pp; with a reading error of
// 0.01 pp it is not.
#[test]
fn near_equal_strains_are_swapped_within_the_reading_error() {
    let name = "strains-near-equal.csv";
    let bytes = recovered_file(name);
    let args = ["check", name, "--limit", "good.toml", "--out", "out"];
    let (stdout, _, dir) = recovered(&[(name, &bytes)], &args);
    assert!(stdout.contains("2 locations judged"), "{stdout}");
    let points = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    let a1 = points.lines().find(|l| l.starts_with("A1,")).unwrap();
    assert!(a1.starts_with("A1,12.450,12.400,"), "{a1}");
    assert!(a1.contains("near-equal strains swapped"), "{a1}");
    let mut args = args.to_vec();
    args.extend(["--reading-error", "0.01"]);
    let (stdout, _, _) = recovered(&[(name, &bytes)], &args);
    assert!(
        stdout.contains("1 location judged, 1 row rejected"),
        "{stdout}"
    );
}

// A quoted line break inside an id of a points.csv is part of the id.
#[test]
fn compare_reads_a_quoted_newline_in_an_id() {
    let name = "points-quoted-newline.csv";
    let args = ["compare", "good-points.csv", name];
    let (stdout, _, _) = recovered(&[(name, &recovered_file(name))], &args);
    assert!(stdout.contains("A2"), "{stdout}");
}

// Plausibility: the messages name the likely cause and the fix.
#[test]
fn implausible_files_name_the_cause_and_the_fix() {
    let cases: [(&str, &[&str], &str); 4] = [
        (
            "measure-percent.csv",
            &[],
            "major_eng_pct and minor_eng_pct",
        ),
        ("measure-negative.csv", &[], "strains in percent"),
        ("measure-inches.csv", &[], "--unit in"),
        ("measure-inches.csv", &["--d0", "0.1", "--unit", "in"], ""),
    ];
    for (name, extra, wanted) in cases {
        let bytes = std::fs::read(repo("tests/hostile").join(name)).unwrap();
        let mut args = vec!["check", name, "--limit", "good.toml", "--out", "out"];
        if extra.is_empty() {
            args.extend(["--d0", "2.5"]);
        }
        args.extend(extra);
        if wanted.is_empty() {
            // The same inches with d0 in inches: judged.
            let (stdout, _, _) = recovered(&[(name, &bytes)], &args);
            assert!(stdout.contains("3 locations judged"), "{stdout}");
            continue;
        }
        let r = neckline(&args)
            .files(&[(name, bytes.as_slice()), ("good.toml", CURVE.as_bytes())])
            .timeout(TIMEOUT)
            .run();
        let stderr = &r.stderr;
        assert_eq!(r.code, 2, "{r}");
        assert!(stderr.contains(wanted), "{name}: {stderr}");
        assert!(stderr.contains("nothing was written"), "{stderr}");
    }
    // Millimetres read as inches: 25.4 times too large against a job's d0 of 2.5 mm.
    let mm = "id,major,minor\nA1,3.0,2.6\nA2,2.9,2.5\n";
    let job = "d0 = 2.5\nunit = \"mm\"\n";
    let r = neckline(&[
        "check",
        "mm.csv",
        "--job",
        "job.toml",
        "--unit",
        "in",
        "--limit",
        "good.toml",
        "--out",
        "out",
    ])
    .files(&[("mm.csv", mm), ("job.toml", job), ("good.toml", CURVE)])
    .timeout(TIMEOUT)
    .run();
    let stderr = &r.stderr;
    assert_eq!(r.code, 2, "{r}");
    assert!(stderr.contains("--unit mm"), "{r}");
    let written = std::fs::read_dir(r.path("out")).map_or(0, |d| d.count());
    assert_eq!(written, 0, "{r}");
}

// Too big to commit: the measurement and points.csv cases made here.
#[test]
fn generated_measurement_and_points_files_are_refused_cleanly() {
    let big = "7".repeat(5 << 20);
    let million = ",".repeat(1_000_000);
    let m = |name: &str| args_for(name);
    // A 5 MB id, alone: the row is rejected (field cap) and nothing is judged.
    let five = format!("id,major,minor\n{big},3.0,2.6\n");
    let name = "measure-5mb.csv";
    refused(&[(name, five.as_bytes())], &m(name), name, Some(2));
    // A header and a row with a million fields.
    let wide = format!("id,major,minor{million}\nA,3.0,2.6\n");
    let name = "measure-wide-header.csv";
    refused(&[(name, wide.as_bytes())], &m(name), name, Some(1));
    let wide = format!("id,major,minor\nA,3.0,2.6{million}\n");
    let name = "measure-wide-row.csv";
    refused(&[(name, wide.as_bytes())], &m(name), name, Some(2));
    // The same in a points.csv for compare.
    let p = format!("id,major_eng_pct,minor_eng_pct,margin_pct,zone\n{big},20,4,5,safe\n");
    let name = "points-5mb.csv";
    refused(&[(name, p.as_bytes())], &m(name), name, Some(2));
    let p = format!("id,major_eng_pct,minor_eng_pct,margin_pct,zone\nA1,20,4,5,safe{million}\n");
    let name = "points-wide.csv";
    refused(&[(name, p.as_bytes())], &m(name), name, Some(2));
}

// The hang: a 5 MB id beside a good row. The long row is rejected by the field cap
// (naming its line) and the rest is judged, well within 5 s; an id just under the cap goes
// through every output (the diagram shortens it) as fast.
#[test]
fn a_5_mb_id_does_not_hang_check() {
    let text = format!(
        "id,major,minor,x,y\n{},3.0,2.6,1,1\nB,3.1,2.5,2,1\n",
        "A".repeat(5_000_000)
    );
    let name = "measure-5mb-id.csv";
    let (stdout, _, _) = recovered(&[(name, text.as_bytes())], &check_args(name));
    assert!(
        stdout.contains("1 location judged, 1 row rejected"),
        "{stdout}"
    );
    assert!(
        stdout.contains("measure-5mb-id.csv:2:1 (column `id`): a field of 5000000 bytes"),
        "{stdout}"
    );
    let text = format!(
        "id,major,minor,x,y\n{},3.0,2.6,1,1\nB,3.1,2.5,2,1\n",
        "A".repeat(4000)
    );
    let name = "measure-4k-id.csv";
    let (stdout, _, dir) = recovered(&[(name, text.as_bytes())], &check_args(name));
    assert!(stdout.contains("2 locations judged"), "{stdout}");
    assert!(dir.path().join("out/report.html").exists(), "{stdout}");
}

// A job file saved as UTF-16 LE with its byte-order mark (Notepad's "Unicode") is read:
// its d0 = 2.5 judges the good readings (3.0 / 2.6 mm on 2.5 mm is 20.0 % / 4.0 %).
#[test]
fn a_utf16_job_file_is_read() {
    let name = "job-utf16.toml";
    let (stdout, _, dir) = recovered(
        &[
            (name, &recovered_file(name)),
            ("good.csv", MEASURED.as_bytes()),
        ],
        &[
            "check",
            "good.csv",
            "--job",
            name,
            "--limit",
            "good.toml",
            "--out",
            "out",
        ],
    );
    assert!(stdout.contains("1 location judged"), "{stdout}");
    let points = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    let row = common::rows(&points).remove(0);
    // Engineering strain (d1 - d0) / d0: (3.0 - 2.5) / 2.5 = 20 %, (2.6 - 2.5) / 2.5 = 4 %.
    assert!(
        (common::num(&row, "major_eng_pct") - 20.0).abs() < 1e-9,
        "{points}"
    );
    assert!(
        (common::num(&row, "minor_eng_pct") - 4.0).abs() < 1e-9,
        "{points}"
    );
}
