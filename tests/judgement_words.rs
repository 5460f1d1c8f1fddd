//! The judgement's words, run through the real binary: the reason column, a thinning failure
//! where the curve has no range, the thickening threshold, `fail_on` from the job file, the
//! SHA-256 of every input in summary.json (file and standard input) and printed margins that
//! keep their side of the zone edges.

mod common;
use common::{neckline, read_json, read_text, repo, run_in};
use sha2::{Digest, Sha256};

/// A curve from −10 % to +10 % minor strain, flat at 40 % engineering major strain.
const NARROW: &str = "name = \"narrow\"\nsource = \"test only\"\nstrain = \"engineering\"\n\
                      points = [[-10, 40], [10, 40]]\n";

fn sha256(bytes: &[u8]) -> String {
    Sha256::digest(bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// Rows as (id, zone, reason) from points.csv.
fn zones(points: &str) -> Vec<(String, String, String)> {
    let mut r = csv::Reader::from_reader(points.as_bytes());
    let h = r.headers().unwrap().clone();
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (i, z, w) = (col("id"), col("zone"), col("reason"));
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            (rec[i].into(), rec[z].into(), rec[w].into())
        })
        .collect()
}

// Axes on d0 = 2.5 mm. T: 3.5 × 3.375 -> e = 40 %, 35 %: minor strain outside the curve's
// −10..10 %, thinning 1 − 1/(1.40 · 1.35) = 47.1 % (constant volume). C: 3.6 × 2.5: 44 % at
// minor 0, over the 40 % curve. B: 3.3 × 2.5: 32 %, margin 8 pp, in the band. K: 2.6 × 2.3
// -> (1.04)(0.92) = 0.9568, 4.5 % thicker. L: 2.525 × 2.5, 1 % major. S: 2.875 × 2.5, 15 %.
const CSV: &str = "id,major,minor,stage,note\nT,3.5,3.375,draw,neck visible at corner radius\n\
C,3.6,2.5,draw,\nB,3.3,2.5,draw,\nK,2.6,2.3,draw,\nL,2.525,2.5,draw,\nS,2.875,2.5,draw,\n";

#[test]
fn reasons_thinning_beyond_the_range_and_checksums() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("narrow.toml"), NARROW).unwrap();
    std::fs::write(d.join("m.csv"), CSV).unwrap();
    let job = "part = \"test panel (invented)\"\nlimit = \"narrow.toml\"\nd0 = 2.5\n\
               max_thinning = 25\nfail_on = \"failed\"\nrevision = \"A\"\n";
    std::fs::write(d.join("job.toml"), job).unwrap();
    let r = run_in(d, &["check", "m.csv", "--job", "job.toml", "--out", "o"]);
    // fail_on from the job file: a failed location exits 1.
    assert_eq!(r.code, 1, "{}\n{}", r.stdout, r.stderr);
    let points = read_text(&d.join("o/points.csv"));
    let z = zones(&points);
    let expect = [
        ("T", "failed", "thinning"),
        ("C", "failed", "curve"),
        ("B", "marginal", "band"),
        ("K", "thickening", "thickening"),
        ("L", "low-stretch", "low-stretch"),
        ("S", "safe", "none"),
    ];
    for ((id, zone, reason), got) in expect.iter().zip(&z) {
        assert_eq!(
            (got.0.as_str(), got.1.as_str(), got.2.as_str()),
            (*id, *zone, *reason)
        );
    }
    // The thinning failure reads as thinning, never as a bare positive margin.
    assert!(
        r.stdout.contains("thinning 47.1 % (max 25)"),
        "{}",
        r.stdout
    );
    assert!(r.stdout.contains("Verdict: FAIL"), "{}", r.stdout);
    let html = read_text(&d.join("o/report.html"));
    assert!(html.contains("neck visible at corner radius"));
    assert!(html.contains("thinning 47.1 % (max 25)"));
    // summary.json: the SHA-256 of each input file, as a general-purpose library computes it.
    let s = read_json(&d.join("o/summary.json"));
    let files = s["files"].as_array().unwrap();
    for (role, name) in [
        ("measurements", "m.csv"),
        ("curve", "narrow.toml"),
        ("job", "job.toml"),
    ] {
        let f = files.iter().find(|f| f["role"] == role).unwrap();
        assert_eq!(
            f["sha256"].as_str().unwrap(),
            sha256(&std::fs::read(d.join(name)).unwrap()),
            "{role}"
        );
    }
    assert_eq!(s["worst_list"][0]["reason"], "curve");
    assert!(s["run_time_utc"].as_str().unwrap().ends_with('Z'));
    assert_eq!(s["tool"]["version"], env!("CARGO_PKG_VERSION"));
}

#[test]
fn standard_input_is_hashed_as_it_streams() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("narrow.toml"), NARROW).unwrap();
    // Large enough to pass through several read buffers.
    let mut text = String::from("id,major,minor\n");
    for i in 0..20_000 {
        text.push_str(&format!("P{i},2.{:03},2.5\n", 500 + i % 300));
    }
    let r = neckline(&[
        "check",
        "-",
        "--limit",
        "narrow.toml",
        "--d0",
        "2.5",
        "--out",
        "o",
        "--format",
        "json",
    ])
    .stdin(text.as_bytes())
    .run_in(d);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let s = read_json(&d.join("o/summary.json"));
    assert_eq!(s["files"][0]["path"], "-");
    assert_eq!(s["files"][0]["sha256"], sha256(text.as_bytes()));
}

// The default thickening threshold of 2 % and --thickening: K is 4.5 % thicker (above).
#[test]
fn thickening_threshold_is_a_setting() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("narrow.toml"), NARROW).unwrap();
    std::fs::write(d.join("m.csv"), "id,major,minor\nK,2.6,2.3\n").unwrap();
    let zone = |extra: &[&str]| {
        let mut args = vec![
            "check",
            "m.csv",
            "--limit",
            "narrow.toml",
            "--d0",
            "2.5",
            "--out",
            "o",
        ];
        args.extend(extra);
        let r = run_in(d, &args);
        assert_eq!(r.code, 0, "{}", r.stderr);
        zones(&read_text(&d.join("o/points.csv")))[0].1.clone()
    };
    assert_eq!(zone(&[]), "thickening");
    assert_eq!(zone(&["--thickening", "5"]), "safe");
}

// Margins at 0 ± 0.04 and the band edge ± 0.04 print on the side of their zone, in the
// terminal and the report. d1 = 2.5 (1 + e) for e = 39.96 %, 40.04 %, 30.04 %, 29.96 % on the
// flat 40 % curve: margins +0.04, −0.04, 9.96, 10.04.
#[test]
fn printed_margins_keep_their_side_at_the_edges() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    std::fs::write(d.join("narrow.toml"), NARROW).unwrap();
    let csv = "id,major_eng_pct,minor_eng_pct\nA,39.96,0\nB,40.04,0\nC,30.04,0\nD,29.96,0\n";
    std::fs::write(d.join("s.csv"), csv).unwrap();
    let r = run_in(
        d,
        &["check", "s.csv", "--limit", "narrow.toml", "--out", "o"],
    );
    assert_eq!(r.code, 0, "{}", r.stderr);
    let html = read_text(&d.join("o/report.html"));
    for (id, zone, shown) in [
        ("A", "marginal", "margin 0.04 pp < band 10"),
        ("B", "failed", "margin 0.0 pp, over curve"),
        ("C", "marginal", "margin 9.96 pp < band 10"),
        ("D", "safe", "margin 10.0 pp"),
    ] {
        let line = r
            .stdout
            .lines()
            .find(|l| l.starts_with(&format!("  {id} ")))
            .unwrap_or_else(|| panic!("{id} not listed:\n{}", r.stdout));
        assert!(line.contains(zone) && line.contains(shown), "{line}");
        // The report prints the same margin in its margin column (the reason is a code there).
        let margin = shown.split_whitespace().nth(1).unwrap();
        assert!(
            html.contains(&format!(">{margin}</td>")),
            "report lacks the margin `{margin}` of {id}"
        );
    }
    assert!(!r.stdout.contains("0.0 pp < band"));
    assert!(!r.stdout.contains("10.0 pp < band"));
}

// The demo's job files are valid (a real date) and a curve without `strain` is refused.
#[test]
fn demo_jobs_load_and_curves_need_their_measure() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let r = run_in(
        d,
        &[
            "check",
            repo("demo-parts/rear-floor-pan/tryout-2.csv")
                .to_str()
                .unwrap(),
            "--job",
            repo("demo-parts/rear-floor-pan/job-t2.toml")
                .to_str()
                .unwrap(),
            "--out",
            "o",
            "--format",
            "json",
        ],
    );
    assert!(r.code == 0 || r.code == 1, "{}", r.stderr);
    std::fs::write(
        d.join("c.toml"),
        "name = \"c\"\nsource = \"s\"\npoints = [[0, 30], [10, 35]]\n",
    )
    .unwrap();
    std::fs::write(d.join("m.csv"), "id,major,minor\nA,3,2.5\n").unwrap();
    let r = run_in(d, &["check", "m.csv", "--limit", "c.toml", "--d0", "2.5"]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr.contains("c.toml") && r.stderr.contains("strain = \"true\""),
        "{}",
        r.stderr
    );
}
