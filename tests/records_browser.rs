//! The documents a review signs, printed by headless Chromium and read back by `pdftotext`:
//! the report's running header carries the generation time on every page, page 1 states the
//! measurement and the kind of limit curve, the two-stage bracket's worst list starts with its
//! highest path use, the review page lists every location failed or marginal in the later
//! tryout with the SHA-256 of its inputs, and each failed corner of the demo part is a hot spot
//! of its own, labelled on the map.
//!
//! Skipped with a message when `chromium` is not installed and `CI` is unset; in CI its absence
//! fails (`.ci/run` installs Debian's `chromium` and `poppler-utils`).

mod common;
use common::browser::{chromium, run_chromium};
use common::{demo_tryout, num, read_json, read_rows, repo_arg, run_in};
use std::path::{Path, PathBuf};
use std::time::{SystemTime, UNIX_EPOCH};

/// Print `page` to PDF and return the text of each printed page (`pdftotext -layout`; pages
/// end with a form feed).
fn printed(chromium: &Path, page: &Path) -> Vec<String> {
    let pdf = page.with_extension("pdf");
    run_chromium(
        chromium,
        page,
        &[
            "--no-pdf-header-footer".into(),
            format!("--print-to-pdf={}", pdf.display()),
        ],
    );
    let out = std::process::Command::new("pdftotext")
        .arg("-layout")
        .arg(&pdf)
        .arg("-")
        .output()
        .expect("pdftotext is installed with chromium (apt-get install poppler-utils)");
    assert!(out.status.success());
    let mut pages: Vec<String> = String::from_utf8_lossy(&out.stdout)
        .split('\u{c}')
        .map(str::to_string)
        .collect();
    if pages.last().is_some_and(|p| p.trim().is_empty()) {
        pages.pop();
    }
    pages
}

/// `check` of the demo's tryout `t` into `out/t{t}` (every output).
fn demo_check(dir: &Path, t: u8) -> PathBuf {
    let [csv, job] = demo_tryout(t);
    let out = format!("out/t{t}");
    let r = run_in(dir, &["check", &csv, "--job", &job, "--out", &out]);
    assert_eq!(r.code, 0, "{r}");
    dir.join(out)
}

/// Seconds since the epoch of an ISO 8601 UTC time `YYYY-MM-DDThh:mm:ssZ`, by the days-from-
/// civil algorithm (H. Hinnant, "chrono-Compatible Low-Level Date Algorithms").
fn epoch_of(iso: &str) -> i64 {
    let n = |r: std::ops::Range<usize>| iso[r].parse::<i64>().unwrap();
    let (y, m, d) = (n(0..4), n(5..7), n(8..10));
    let y = if m <= 2 { y - 1 } else { y };
    let era = y.div_euclid(400);
    let yoe = y - era * 400;
    let mp = (m + 9) % 12;
    let doy = (153 * mp + 2) / 5 + d - 1;
    let doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    let days = era * 146_097 + doe - 719_468;
    days * 86_400 + n(11..13) * 3600 + n(14..16) * 60 + n(17..19)
}

fn now() -> i64 {
    SystemTime::now()
        .duration_since(UNIX_EPOCH)
        .unwrap()
        .as_secs() as i64
}

#[test]
fn report_pages_carry_the_time_and_page_one_the_measurement_and_curve_kind() {
    let Some(chromium) = chromium("records_browser") else {
        return;
    };
    // Known instant (Hinnant's algorithm): 2000-02-29T00:00:00Z is 951 782 400 s.
    assert_eq!(epoch_of("2000-02-29T00:00:00Z"), 951_782_400);
    let dir = tempfile::tempdir().unwrap();
    let start = now();
    let out = demo_check(dir.path(), 1);
    let end = now();
    let pages = printed(&chromium, &out.join("report.html"));
    assert!(pages.len() >= 5, "{} pages", pages.len());
    // The generation time, read from the running header of each printed page, is the run's
    // own (by the system clock around it) and the one summary.json records.
    let recorded = read_json(&out.join("summary.json"))["run_time_utc"]
        .as_str()
        .unwrap()
        .to_string();
    for (k, text) in pages.iter().enumerate() {
        let head: String = text.lines().take(3).collect::<Vec<_>>().join(" ");
        let at = head
            .find("generated ")
            .unwrap_or_else(|| panic!("page {}: no time in the header:\n{head}", k + 1));
        let time = &head[at + 10..at + 30];
        assert_eq!(time, recorded, "page {}", k + 1);
        let t = epoch_of(time);
        assert!((start..=end).contains(&t), "{time} outside the run");
        assert!(
            head.contains("local") && head.contains("UTC+") || head.contains("UTC-"),
            "page {}: no local offset",
            k + 1
        );
    }
    let one = &pages[0];
    for words in [
        "Measurement:",
        "hand: loupe and transparent scale",
        "±0.05 mm per axis",
        "Limit curve: an estimate from material data",
        "Warning: an estimated curve is the weakest evidence",
        "limits/steel-0.80mm-n0.20-keeler-brazier.toml",
        "Sign-off",
    ] {
        assert!(one.contains(words), "page 1 lacks `{words}`:\n{one}");
    }
    assert!(!one.contains(".."), "a path with `..` on page 1:\n{one}");
    // L10: 60.8 % major, 29.0 % thinning (points.csv): over the curve and past the 25 %
    // maximum, both reasons on its one line.
    let l10 = one
        .lines()
        .find(|l| l.trim_start().starts_with("L10"))
        .unwrap();
    assert!(l10.trim_end().ends_with("C T"), "{l10}");
}

#[test]
fn job_without_measurement_says_not_stated() {
    let Some(chromium) = chromium("records_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let r = run_in(
        dir.path(),
        &[
            "check",
            &repo_arg("demo-parts/tunnel-bracket-two-stage/bracket.csv"),
            "--job",
            &repo_arg("demo-parts/tunnel-bracket-two-stage/job.toml"),
            "--out",
            "out",
        ],
    );
    assert!(r.code <= 1, "{r}");
    let pages = printed(&chromium, &dir.path().join("out/report.html"));
    let one = &pages[0];
    assert!(
        one.contains("method not stated") && one.contains("reading uncertainty not stated"),
        "{one}"
    );
    // The bracket's worst list: every failed location was judged along its path, so the
    // first is the one of highest path use in points.csv.
    let rows = read_rows(&dir.path().join("out/points.csv"));
    let top = rows
        .iter()
        .filter(|r| r["zone"] == "failed" && !r["peps_use_pct"].is_empty())
        .max_by(|a, b| num(a, "peps_use_pct").total_cmp(&num(b, "peps_use_pct")))
        .unwrap();
    let at = one.find("Worst locations").expect("worst list on page 1");
    let first = one[at..]
        .lines()
        .skip(2)
        .find(|l| !l.trim().is_empty())
        .unwrap()
        .split_whitespace()
        .next()
        .unwrap();
    assert_eq!(first, top["id"], "{}", &one[at..]);
}

#[test]
fn review_page_is_a_record_and_names_every_location_still_at_risk() {
    let Some(chromium) = chromium("records_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let t1 = demo_check(dir.path(), 1);
    let t2 = demo_check(dir.path(), 2);
    let r = run_in(
        dir.path(),
        &[
            "compare",
            "out/t1/points.csv",
            "out/t2/points.csv",
            "--out",
            "out/review",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let pages = printed(&chromium, &dir.path().join("out/review/compare.html"));
    let all = pages.join("\n");
    // The still-at-risk section: every location failed or marginal in T2 by its points.csv.
    let at = all.find("Still at risk").expect("still-at-risk section");
    let end = all[at..].find("Fixed:").map_or(all.len(), |e| at + e);
    let section = &all[at..end];
    let later = read_rows(&t2.join("points.csv"));
    let risky: Vec<&str> = later
        .iter()
        .filter(|r| r["zone"] == "failed" || r["zone"] == "marginal")
        .map(|r| r["id"].as_str())
        .collect();
    assert!(risky.len() >= 9, "{risky:?}");
    for id in &risky {
        assert!(
            section
                .lines()
                .any(|l| l.trim_start().starts_with(&format!("{id} "))),
            "{id} is not in the still-at-risk section:\n{section}"
        );
    }
    // Its record: report number, generation time, sign-off and the SHA-256 of each input, as
    // sha256sum (GNU coreutils, FIPS 180-4) computes it.
    for words in ["Report", "revision", "Generated", "Sign-off", "Approved"] {
        assert!(pages[0].contains(words), "page 1 lacks `{words}`");
    }
    for input in [
        t1.join("points.csv"),
        t2.join("points.csv"),
        t2.join("summary.json"),
    ] {
        let out = std::process::Command::new("sha256sum")
            .arg(&input)
            .output()
            .unwrap();
        let sum = String::from_utf8_lossy(&out.stdout)
            .split_whitespace()
            .next()
            .unwrap()
            .to_string();
        let html = std::fs::read_to_string(dir.path().join("out/review/compare.html")).unwrap();
        assert!(html.contains(&sum), "no SHA-256 of {}", input.display());
    }
}

#[test]
fn each_failed_corner_is_a_labelled_hot_spot() {
    let dir = tempfile::tempdir().unwrap();
    let [csv, job] = demo_tryout(1);
    let r = run_in(dir.path(), &["check", &csv, "--job", &job, "--out", "out"]);
    assert_eq!(r.code, 0, "{r}");
    let failed: Vec<String> = read_rows(&dir.path().join("out/points.csv"))
        .into_iter()
        .filter(|r| r["zone"] == "failed")
        .map(|r| r["id"].clone())
        .collect();
    // The demo's four failed locations in the first tryout, one at each corner of its grid.
    assert_eq!(failed.len(), 4, "{failed:?}");
    let lines: Vec<&str> = r
        .stdout
        .lines()
        .skip_while(|l| !l.starts_with("Hot spots"))
        .collect();
    assert!(lines[0].contains("4 failed"), "{}", r.stdout);
    let svg = std::fs::read_to_string(dir.path().join("out/map.svg")).unwrap();
    for id in &failed {
        assert!(
            lines
                .iter()
                .any(|l| l.contains(" failed ") && l.contains(&format!(" {id} "))),
            "{id} is not the worst of a failed hot spot:\n{}",
            r.stdout
        );
        assert!(
            svg.contains(&format!("\n{id} (")),
            "{id} not labelled on the map"
        );
    }
}
