//! `compare`: the real binary on the demo's two tryouts and on small hand-made results.

mod common;
use common::{demo_tryout, read_json, read_rows, repo_arg, run_in, write, Run};
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// `check` the demo's tryout `t` into `dir/t<t>` (points.csv and summary.json only).
fn check_demo(dir: &Path, t: u8, extra: &[&str]) -> Run {
    let [csv, job] = demo_tryout(t);
    let out = format!("t{t}");
    let mut args = vec![
        "check", &csv, "--job", &job, "--out", &out, "--format", "csv,json",
    ];
    args.extend_from_slice(extra);
    let r = run_in(dir, &args);
    assert_eq!(r.code, 0, "{r}");
    r
}

fn both_demo_tryouts() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    check_demo(dir.path(), 1, &[]);
    check_demo(dir.path(), 2, &[]);
    dir
}

#[test]
fn every_id_appears_once_with_its_status_and_one_sided_ids_are_named() {
    let dir = both_demo_tryouts();
    let d = dir.path();
    // T2 re-measured without two of the corners that failed in T1, with one new location
    // and a comment line before the header.
    let t2 = std::fs::read_to_string(d.join("t2/points.csv")).unwrap();
    let mut lines: Vec<String> = t2
        .lines()
        .filter(|l| !l.starts_with("A01,") && !l.starts_with("L10,"))
        .map(str::to_string)
        .collect();
    let extra = lines[5].replacen(&lines[5][..3], "M01", 1);
    lines.push(extra);
    let text = format!("# T2 re-measured (invented)\n{}\n", lines.join("\n"));
    write(d, "t2x/points.csv", &text);
    // The summary beside the edited table records no table (as an earlier version's did):
    // one that records t2's table would refuse the pair as of different runs.
    let mut summary = read_json(&d.join("t2/summary.json"));
    summary["points_file"] = serde_json::Value::Null;
    write(d, "t2x/summary.json", summary.to_string());
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2x/points.csv",
            "--out",
            "pack",
            "--show",
            "1",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(!r.stderr.contains("warning"), "{r}");
    // Expected from the two input files themselves.
    let ids = |text: &str| -> BTreeSet<String> {
        text.lines()
            .filter(|l| !l.starts_with('#') && !l.starts_with("id,"))
            .map(|l| l.split(',').next().unwrap().to_string())
            .collect()
    };
    let before = ids(&std::fs::read_to_string(d.join("t1/points.csv")).unwrap());
    let after = ids(&text);
    let rows = read_rows(&d.join("pack/compare.csv"));
    let got: Vec<&str> = rows.iter().map(|r| r["id"].as_str()).collect();
    let unique: BTreeSet<&str> = got.iter().copied().collect();
    assert_eq!(got.len(), unique.len(), "an id appears twice");
    assert_eq!(unique.len(), before.union(&after).count());
    for row in &rows {
        let id = &row["id"];
        let expected = match (before.contains(id), after.contains(id)) {
            (true, true) => "both",
            (true, false) => "only_before",
            (false, true) => "only_after",
            (false, false) => panic!("{id} is in neither file"),
        };
        assert_eq!(row["status"], expected, "{id}");
    }
    // The terminal names them (up to --show), with the right plural.
    assert!(
        r.stdout
            .contains("Only in T1 (2 locations): A01 (failed), ... and 1 more"),
        "{r}"
    );
    assert!(r.stdout.contains("Only in T2 (1 location): M01"), "{r}");
    let j = read_json(&d.join("pack/compare.json"));
    assert_eq!(j["only_before"], serde_json::json!(["A01", "L10"]));
    assert_eq!(j["only_after"], serde_json::json!(["M01"]));
    let page = std::fs::read_to_string(d.join("pack/compare.html")).unwrap();
    assert!(page.contains("Only in T1 (2 locations)"), "page lists them");
}

#[test]
fn margin_change_is_after_minus_before_from_the_inputs() {
    let dir = both_demo_tryouts();
    let d = dir.path();
    let r = run_in(
        d,
        &["compare", "t1/points.csv", "t2/points.csv", "--out", "pack"],
    );
    assert_eq!(r.code, 0, "{r}");
    let margins = |p: &str| -> BTreeMap<String, String> {
        read_rows(&d.join(p))
            .into_iter()
            .map(|r| (r["id"].clone(), r["margin_pct"].clone()))
            .collect()
    };
    let (b, a) = (margins("t1/points.csv"), margins("t2/points.csv"));
    for row in read_rows(&d.join("pack/compare.csv")) {
        let id = &row["id"];
        assert_eq!(row["margin_pct_before"], b[id], "{id}");
        assert_eq!(row["margin_pct_after"], a[id], "{id}");
        if let (Ok(x), Ok(y)) = (b[id].parse::<f64>(), a[id].parse::<f64>()) {
            let d: f64 = row["margin_change_pct"].parse().unwrap();
            assert!((d - (y - x)).abs() < 1.5e-3, "{id}: {d} vs {}", y - x);
        }
    }
    // The demo's four corners that failed in T1 are marginal after the rework (invented data).
    let j = read_json(&d.join("pack/compare.json"));
    assert_eq!(j["transitions"]["failed"]["marginal"], 4);
    assert_eq!(j["tryouts"][0]["verdict"], "fail");
    assert_eq!(j["tryouts"][1]["verdict"], "marginal");
}

const HEAD: &str = "id,major_eng_pct,minor_eng_pct,margin_pct,zone,x,y\n";

#[test]
fn change_follows_the_tolerance_at_its_edges() {
    // The rule (README, "Compare one tryout with the next"): a change must exceed the
    // tolerance to count; equal to it is unchanged. Without a margin, major strain decides
    // and more strain is worse (common practice: strain is what uses up the forming limit).
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    let cases = [
        // id, margin before, margin after, major before, major after, expected at ±1 pp
        ("up_edge", "10.000", "11.000", 30.0, 29.0, "unchanged"),
        ("up_past", "10.000", "11.001", 30.0, 29.0, "improved"),
        ("up_short", "10.000", "10.999", 30.0, 29.0, "unchanged"),
        ("down_edge", "10.000", "9.000", 30.0, 31.0, "unchanged"),
        ("down_past", "10.000", "8.999", 30.0, 31.0, "worsened"),
        ("fine_edge", "10.123", "11.123", 30.0, 29.0, "unchanged"),
        ("no_margin_up", "", "", 30.0, 31.5, "worsened"),
        ("no_margin_down", "", "", 30.0, 28.5, "improved"),
        ("no_margin_edge", "", "", 30.0, 31.0, "unchanged"),
    ];
    let zone = |m: &str| if m.is_empty() { "uncovered" } else { "safe" };
    let (mut b, mut a) = (HEAD.to_string(), HEAD.to_string());
    for (id, mb, ma, jb, ja, _) in cases {
        b.push_str(&format!("{id},{jb},0,{mb},{},,\n", zone(mb)));
        a.push_str(&format!("{id},{ja},0,{ma},{},,\n", zone(ma)));
    }
    write(d, "b/points.csv", &b);
    write(d, "a/points.csv", &a);
    let r = run_in(
        d,
        &["compare", "b/points.csv", "a/points.csv", "--out", "p"],
    );
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&d.join("p/compare.csv"));
    for (id, .., expected) in cases {
        let row = rows.iter().find(|r| r["id"] == id).unwrap();
        assert_eq!(row["change"], expected, "{id} at ±1: {row:?}");
    }
    // No x, y anywhere: no map, and the run says so.
    assert!(!d.join("p/compare-map.svg").exists());
    assert!(r.stdout.contains("no location has x, y"), "{r}");
    // A tolerance of 0.5 makes the ±1 edges count.
    let r = run_in(
        d,
        &[
            "compare",
            "b/points.csv",
            "a/points.csv",
            "--out",
            "p",
            "--tolerance",
            "0.5",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&d.join("p/compare.csv"));
    let change = |id: &str| rows.iter().find(|r| r["id"] == id).unwrap()["change"].clone();
    assert_eq!(change("up_edge"), "improved");
    assert_eq!(change("down_edge"), "worsened");
    assert_eq!(change("no_margin_edge"), "worsened");
    // A negative tolerance is refused.
    let r = run_in(
        d,
        &["compare", "b/points.csv", "a/points.csv", "--tolerance=-1"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("--tolerance"), "{r}");
}

/// A small deterministic pseudo-random number in `[-1, 1]` (a linear congruential generator,
/// Numerical Recipes' constants).
fn jitter(state: &mut u64) -> f64 {
    *state = state.wrapping_mul(1664525).wrapping_add(1013904223) % (1 << 32);
    *state as f64 / (1u64 << 31) as f64 - 1.0
}

#[test]
fn position_matching_pairs_a_shuffled_jittered_copy_back_to_its_ids() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    check_demo(d, 1, &[]);
    let mut r = csv::Reader::from_path(d.join("t1/points.csv")).unwrap();
    let head = r.headers().unwrap().clone();
    let col = |n: &str| head.iter().position(|h| h == n).unwrap();
    let (id, x, y) = (col("id"), col("x"), col("y"));
    let records: Vec<csv::StringRecord> = r.records().map(|r| r.unwrap()).collect();
    let n = records.len();
    // Every row renamed, moved by up to 1 mm each way, and the order scrambled (37 is prime to
    // 120, so k -> 37 k mod n is a permutation).
    let mut seed = 7u64;
    let mut w = csv::Writer::from_path(d.join("copy.csv")).unwrap();
    w.write_record(&head).unwrap();
    for k in 0..n {
        let rec = &records[(37 * k) % n];
        let mut fields: Vec<String> = rec.iter().map(str::to_string).collect();
        fields[id] = format!("R-{}", rec[id].to_lowercase());
        for c in [x, y] {
            let v: f64 = rec[c].parse().unwrap();
            fields[c] = format!("{:.3}", v + jitter(&mut seed));
        }
        w.write_record(&fields).unwrap();
    }
    w.flush().unwrap();
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "copy.csv",
            "--match",
            "xy",
            "--within",
            "5",
            "--out",
            "pack",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&d.join("pack/compare.csv"));
    assert_eq!(rows.len(), n);
    for row in &rows {
        assert_eq!(row["status"], "both", "{row:?}");
        assert_eq!(
            row["id_after"],
            format!("R-{}", row["id_before"].to_lowercase()),
            "{row:?}"
        );
        let dist: f64 = row["distance"].parse().unwrap();
        assert!(dist <= 2f64.sqrt() + 1e-3, "{row:?}");
    }
    // No summary.json beside the copy: said, not silently assumed.
    assert!(r.stderr.contains("no summary.json beside copy.csv"), "{r}");
}

#[test]
fn position_matching_takes_the_nearer_and_nothing_beyond_reach() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "b.csv", format!("{HEAD}P1,20,0,5,marginal,0,0\n"));
    // Two candidates within reach of P1: Q1 at 3 and Q2 at 1 (a 3-4-5 triangle would do too;
    // distances here are plain).
    write(
        d,
        "a.csv",
        format!("{HEAD}Q1,20,0,5,marginal,3,0\nQ2,20,0,6,marginal,0,1\n"),
    );
    let r = run_in(
        d,
        &[
            "compare", "b.csv", "a.csv", "--match", "xy", "--within", "5", "--out", "p",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&d.join("p/compare.csv"));
    let paired = rows.iter().find(|r| r["status"] == "both").unwrap();
    assert_eq!(
        (paired["id_before"].as_str(), paired["id_after"].as_str()),
        ("P1", "Q2")
    );
    assert_eq!(paired["distance"], "1.000");
    let left = rows.iter().find(|r| r["status"] == "only_after").unwrap();
    assert_eq!(left["id_after"], "Q1");
    assert!(r.stdout.contains("Only in a (1 location): Q1"), "{r}");
    // A location 6 away with --within 5: nothing paired, nothing to compare.
    write(d, "far.csv", format!("{HEAD}Q9,20,0,5,marginal,6,0\n"));
    let r = run_in(
        d,
        &[
            "compare", "b.csv", "far.csv", "--match", "xy", "--within", "5",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("no two locations within 5"), "{r}");
    // --match xy needs --within; --within needs --match xy.
    let r = run_in(d, &["compare", "b.csv", "a.csv", "--match", "xy"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("--match xy needs --within"), "{r}");
    let r = run_in(d, &["compare", "b.csv", "a.csv", "--within", "5"]);
    assert_eq!(r.code, 2, "{r}");
}

#[test]
fn fail_on_gate_trips_only_on_a_new_failure() {
    let dir = both_demo_tryouts();
    let d = dir.path();
    // T1 -> T2: nothing newly failed, two locations newly marginal (demo scenario).
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "--fail-on",
            "new-failed",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("--fail-on new-failed: passed"), "{r}");
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "--fail-on",
            "new-marginal",
        ],
    );
    assert_eq!(r.code, 1, "{r}");
    assert!(
        r.stdout.contains("tripped by 2 locations (J02, K04)"),
        "{r}"
    );
    // Backwards, T2 -> T1: the four corners fail again.
    let r = run_in(
        d,
        &[
            "compare",
            "t2/points.csv",
            "t1/points.csv",
            "--fail-on",
            "new-failed",
        ],
    );
    assert_eq!(r.code, 1, "{r}");
    assert!(r.stdout.contains("tripped by 4 locations"), "{r}");
    assert!(
        r.stdout.contains("16 locations newly failed or marginal"),
        "{r}"
    );
    // A gate that is not offered is refused by name.
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "--fail-on",
            "failed",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("new-failed"), "{r}");
}

#[test]
fn refusals_and_warnings() {
    let dir = both_demo_tryouts();
    let d = dir.path();
    // No shared id: refused, with the way out.
    let renamed: String = std::fs::read_to_string(d.join("t2/points.csv"))
        .unwrap()
        .lines()
        .enumerate()
        .map(|(k, l)| {
            if k == 0 {
                format!("{l}\n")
            } else {
                format!("Z{l}\n")
            }
        })
        .collect();
    write(d, "z/points.csv", &renamed);
    let r = run_in(
        d,
        &["compare", "t1/points.csv", "z/points.csv", "--out", "zz"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("share no location id"), "{r}");
    assert!(r.stderr.contains("--match xy --within"), "{r}");
    assert!(!d.join("zz").exists(), "nothing written on a refusal");
    // The same file twice: a warning, in the terminal and on the page.
    let r = run_in(
        d,
        &["compare", "t1/points.csv", "t1/points.csv", "--out", "same"],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stderr.contains("warning: t1/points.csv is given twice"),
        "{r}"
    );
    let page = std::fs::read_to_string(d.join("same/compare.html")).unwrap();
    assert!(page.contains("is given twice"), "page warns too");
    // Another part name.
    std::fs::create_dir_all(d.join("t2p")).unwrap();
    std::fs::copy(d.join("t2/points.csv"), d.join("t2p/points.csv")).unwrap();
    let summary = std::fs::read_to_string(d.join("t2/summary.json"))
        .unwrap()
        .replace("RFP-2207 rear floor pan, LH", "RFP-2208 rear floor pan, RH");
    write(d, "t2p/summary.json", &summary);
    let r = run_in(d, &["compare", "t1/points.csv", "t2p/points.csv"]);
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stderr.contains("warning: the part names differ"), "{r}");
    // Another safety band.
    std::fs::remove_dir_all(d.join("t1")).unwrap();
    check_demo(d, 1, &["--margin", "8"]);
    let r = run_in(d, &["compare", "t1/points.csv", "t2/points.csv"]);
    assert!(
        r.stderr
            .contains("warning: the safety bands differ: 8.0 pp (T1), 10.0 pp (T2)"),
        "{r}"
    );
    // A duplicate id, named with its line.
    let mut dup = std::fs::read_to_string(d.join("t2/points.csv")).unwrap();
    let second = dup.lines().nth(1).unwrap().to_string();
    dup.push_str(&second);
    dup.push('\n');
    write(d, "dup.csv", &dup);
    let r = run_in(d, &["compare", "t1/points.csv", "dup.csv"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("dup.csv:122:1 (column `id`): duplicate id `A01`"),
        "{r}"
    );
    // A measurement file is not a result of `check`.
    let good = repo_arg("tests/data/good.csv");
    let r = run_in(d, &["compare", &good, "t2/points.csv"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("good.csv:1: missing column `major_eng_pct`"),
        "{r}"
    );
    // --out is a folder.
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "--out",
            "c.csv",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("--out takes a folder"), "{r}");
    // One input is not a comparison.
    let r = run_in(d, &["compare", "t1/points.csv"]);
    assert_eq!(r.code, 2, "{r}");
}

#[test]
fn three_tryouts_get_a_column_each_and_the_lists_compare_the_last_two() {
    let dir = both_demo_tryouts();
    let d = dir.path();
    let r = run_in(
        d,
        &[
            "compare",
            "t1/points.csv",
            "t2/points.csv",
            "t1/points.csv",
            "--out",
            "three",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout
            .contains("The lists compare the last two: T2 with T1 #3."),
        "{r}"
    );
    let rows = read_rows(&d.join("three/compare.csv"));
    for c in [
        "zone_t1",
        "zone_t2",
        "zone_t3",
        "margin_pct_t1",
        "margin_pct_t3",
    ] {
        assert!(rows[0].contains_key(c), "no column {c}");
    }
    // T3 is T1 again: every change between the last two is the T1 -> T2 change reversed.
    for row in &rows {
        assert_eq!(row["zone_t1"], row["zone_t3"]);
        if let (Ok(a), Ok(b)) = (
            row["margin_pct_t2"].parse::<f64>(),
            row["margin_pct_t3"].parse::<f64>(),
        ) {
            let d: f64 = row["margin_change_pct"].parse().unwrap();
            assert!((d - (b - a)).abs() < 1.5e-3);
        }
    }
}
