//! Judgements that hold under reading noise, through the real binary: noise-aware strain paths,
//! fixed material axes, one rule for the two criteria, limit use outside the curve's range and
//! the reading error of true-strain input.
//!
//! References: the polar effective plastic strain criterion as published (Stoughton & Yoon 2012,
//! Int. J. Solids Struct. 49); effective strain by von Mises, plane stress (Hill 1950),
//! ε̄ = (2/√3)√(Δε1² + Δε1Δε2 + Δε2²); rotation of a plane strain tensor and its principal values
//! by Mohr's circle (any continuum mechanics text). The curve is the 0.80 mm Keeler-Brazier file
//! of limits/: FLC0 = (23.3 + 14.13 · 0.8) · 0.20/0.21 = 32.96 % engineering, ε1 = ln 1.3296 =
//! 0.2849 true at plane strain, ε̄* = (2/√3) · 0.2849 = 0.3290 there.

mod common;
use common::{neckline, read_rows, repo_arg, Run};
use std::collections::HashMap;

fn kb() -> String {
    repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml")
}

/// `check FILE --limit KB EXTRA... --out o` on a file written into the run's folder.
fn check(csv: &str, extra: &[&str]) -> Run {
    let mut args = vec!["check".to_string(), "in.csv".into(), "--limit".into(), kb()];
    args.extend(extra.iter().map(|s| s.to_string()));
    args.extend(["--out".into(), "o".into()]);
    neckline(&args).file("in.csv", csv).run()
}

fn rows(r: &Run) -> HashMap<String, HashMap<String, String>> {
    read_rows(&r.path("o/points.csv"))
        .into_iter()
        .map(|row| (row["id"].clone(), row.into_iter().collect()))
        .collect()
}

fn num(row: &HashMap<String, String>, col: &str) -> f64 {
    row[col]
        .parse()
        .unwrap_or_else(|e| panic!("{col} = {:?}: {e}", row[col]))
}

/// The two-stage worked path (10, 10) → (25, 10) true percent (major, minor), with a third
/// reading that differs from the second by reading noise only (±1 pp), for ids 1a-1d; W is the
/// two-stage path itself.
const CASE_1: &str = "id,stage,major_true_pct,minor_true_pct
W,s1,10,10
W,s2,25,10
1a,s1,10,10
1a,s2,25,10
1a,s3,25.6,9.8
1b,s1,10,10
1b,s2,25,10
1b,s3,25.5,9.5
1c,s1,10,10
1c,s2,25,10
1c,s3,25.6,10.4
1d,s1,10,10
1d,s2,25,10
1d,s3,24.4,10.0
";

// Expected by hand: the third reading is within ±1 pp + ±1 pp of the second, so it is no change;
// the path runs (0, 0) → (10, 10) → final reading, the last increment the chord from (10, 10).
// 1a: chord (Δε1, Δε2) = (15.6, −0.2) pp: ε̄ = 0.2000 + (2/√3)√(0.156² − 0.156·0.002 + 0.002²)
//     = 0.2000 + 0.1790 = 0.3790; θ = atan2(15.6, −0.2) = 90.73°; the ray meets the curve's left
//     side (ε1 + ε2 = 0.2849) at k·(−0.002, 0.156), k = 0.2849/0.154 = 1.850: ε̄* = 0.3311,
//     use 114.5 %.
// 1b: chord (15.5, −0.5): ε̄ = 0.3762, ε̄* = 0.3345, use 112.4 %.
// 1c: chord (15.6, 0.4): ε̄ = 0.3825, on the right side ε̄* = 0.3371, use 113.5 %.
// 1d: chord (14.4, 0): ε̄ = 0.2000 + 0.1663 = 0.3663, ε̄* = 0.3290, use 111.4 %.
// W: ε̄ = 0.2000 + 0.1732 = 0.3732, use 113.5 %.
#[test]
fn a_noise_only_third_reading_judges_as_the_two_stage_path() {
    let expected = [
        ("W", 113.46),
        ("1a", 114.47),
        ("1b", 112.44),
        ("1c", 113.46),
        ("1d", 111.36),
    ];
    for extra in [&["--reading-error", "1"][..], &[][..]] {
        let r = check(CASE_1, extra).ok();
        let rows = rows(&r);
        for (id, use_pct) in expected {
            let row = &rows[id];
            assert_eq!(row["zone"], "failed", "{id} {extra:?}: {row:?}");
            assert_eq!(row["reason"], "path", "{id}: {row:?}");
            assert_eq!(row["peps_zone"], "failed", "{id}: {row:?}");
            assert!(
                (num(row, "peps_use_pct") - use_pct).abs() < 0.05,
                "{id} {extra:?}: {row:?}"
            );
            let angle = num(row, "peps_angle_deg");
            assert!((angle - 90.0).abs() < 2.0, "{id}: {angle}");
        }
    }
}

// With a reading error the path verdict carries its uncertainty (worst case to first order over
// the kept readings). W: the last increment is (Δε1, Δε2) = (0.15, 0); ∂ε̄/∂Δε1 =
// (2/√3)(2Δε1 + Δε2)/(2√(Δε1² + Δε1Δε2 + Δε2²)) = 1.1547, so ±1 pp on the final major alone moves
// ε̄ by ±0.0115, i.e. use by ±0.0115/0.3290 = ±3.5 %; the other readings add to it (and the
// curve bends at plane strain). Borderline exactly when the use is within it of 100 %.
#[test]
fn the_path_verdict_carries_an_uncertainty() {
    let r = check(CASE_1, &["--reading-error", "1"]).ok();
    let rows = rows(&r);
    let w = &rows["W"];
    let u = num(w, "peps_use_uncertainty_pct");
    // Lower bound from the final major alone: (2/√3)·0.01/0.3290 = 3.51 % of use.
    assert!(u > 3.5, "{u}");
    let near = (num(w, "peps_use_pct") - 100.0).abs() < u;
    assert_eq!(w["borderline"] == "yes", near, "{w:?}");
    // Without a reading error there is no such column.
    let r = check(CASE_1, &[]).ok();
    assert!(!r.read("o/points.csv").contains("peps_use_uncertainty_pct"));
}

// A fall of the major strain beyond the noise is named; within the noise it is no change (1d).
#[test]
fn unloading_beyond_the_noise_is_named() {
    let csv = "id,stage,major_true_pct,minor_true_pct\nU,s1,10,10\nU,s2,25,10\nU,s3,20,10\n";
    let r = check(csv, &["--reading-error", "1"]);
    let rows = rows(&r);
    assert!(
        rows["U"]["path_note"].contains("major strain fell 5.0 pp by stage 3"),
        "{:?}",
        rows["U"]
    );
    let r = check(CASE_1, &["--reading-error", "1"]);
    assert_eq!(rows_of(&r, "1d")["path_note"], "");
}

fn rows_of(r: &Run, id: &str) -> HashMap<String, String> {
    rows(r).remove(id).unwrap()
}

// Case 2: (15, −7) with the major axis at 0°, then (20, 15) with it at 90° (true percent).
// In the part's fixed frame (x, y): stage 1 is diag(15, −7); stage 2, major along y, is
// diag(15, 20). The increment is diag(0, 27): principal values 27 and 0, plane strain, θ = 90°.
// ε̄ = (2/√3)(√(15² − 15·7 + 7²) + 27) = 1.1547 · (13 + 27) = 46.19 %; ε̄* = 32.90 %;
// use = 46.19/32.90 = 140.4 %: failed.
#[test]
fn turned_axes_are_taken_in_the_parts_fixed_frame() {
    let csv = "id,stage,major_true_pct,minor_true_pct,angle_deg\nT,s1,15,-7,0\nT,s2,20,15,90\n";
    let r = check(csv, &[]).ok();
    let t = rows_of(&r, "T");
    assert!(
        (num(&t, "peps_effective_pct") - 46.188).abs() < 0.01,
        "{t:?}"
    );
    assert!((num(&t, "peps_angle_deg") - 90.0).abs() < 0.01, "{t:?}");
    assert!((num(&t, "peps_use_pct") - 140.42).abs() < 0.05, "{t:?}");
    assert_eq!(
        (t["zone"].as_str(), t["path_turned"].as_str()),
        ("failed", "yes")
    );
    // Without the directions the increment as read, (Δε1, Δε2) = (5, 22), stretches more across
    // the recorded major axis than along it: named, not a silent uncovered.
    let csv = "id,stage,major_true_pct,minor_true_pct\nT,s1,15,-7\nT,s2,20,15\n";
    let r = check(csv, &[]).ok();
    let t = rows_of(&r, "T");
    assert_eq!(t["zone"], "uncovered", "{t:?}");
    assert!(t["path_note"].contains("principal axes may have turned: give angle_deg"));
    assert!(r.stdout.contains("principal axes may have turned"), "{r}");
}

// Case 3. S runs straight at β = 0.9 (ratio of true strains) in three stages with noise of
// 0.2 pp: the strain curve alone judges it (minor 5.5 % engineering, inside the curve's range up
// to 20 %), although the ray at β = 0.9 passes beyond the curve's right end (β = 0.49 there:
// ln 1.20 / ln 1.4496). M is bent: plane strain to (24, 0), then equibiaxial to (27, 3): on the
// strain curve e1 = exp 0.27 − 1 = 31.0 %, e2 = 3.05 %, limit 32.96 + 0.6 · 3.05 = 34.79 %,
// margin 3.8 pp: marginal; its last increment points beyond the curve's end: uncovered by path.
// The ranking failed > uncovered > marginal puts it uncovered, and the reason shows both.
#[test]
fn a_straight_path_is_the_strain_curves_and_the_ranking_is_shown() {
    let csv = "id,stage,major_true_pct,minor_true_pct
S,s1,2,1.8
S,s2,4.1,3.6
S,s3,6,5.4
M,s1,24,0
M,s2,27,3
";
    let r = check(csv, &[]).ok();
    let rows = rows(&r);
    let s = &rows["S"];
    assert_eq!(s["peps_zone"], "uncovered", "{s:?}");
    assert_eq!(
        (s["zone"].as_str(), s["reason"].as_str()),
        ("safe", "none"),
        "{s:?}"
    );
    assert!(s["path_note"].contains("straight"), "{s:?}");
    let m = &rows["M"];
    assert_eq!(m["strain_zone"], "marginal", "{m:?}");
    assert_eq!(
        (m["zone"].as_str(), m["reason"].as_str()),
        ("uncovered", "path")
    );
    assert!(
        r.stdout.contains("no path limit; curve: 3.8 pp marginal"),
        "{r}"
    );
}

// Case 4: (90.6 %, 30.0 %) engineering is outside the curve's minor range (to 20 %), but the
// straight path from the origin, true (ln 1.906, ln 1.30) = (64.50, 26.24) %, β = 0.407, meets
// the curve's right side (e1 = 32.96 + 0.6 e2, engineering) at true (14.51, 35.66) %: limit use
// = 69.63/38.00 = 183.2 %. Its straight path has already crossed the curve: failed.
#[test]
fn a_location_outside_the_range_past_the_curve_is_failed() {
    let csv = "id,major_eng_pct,minor_eng_pct\nP,90.6,30.0\nQ,25,22\n";
    let r = check(csv, &[]).ok();
    let rows = rows(&r);
    let p = &rows["P"];
    assert_eq!(
        (p["zone"].as_str(), p["reason"].as_str()),
        ("failed", "crossed")
    );
    assert!((num(p, "limit_use_pct") - 183.23).abs() < 0.05, "{p:?}");
    assert_eq!(p["margin_pct"], "");
    assert!(
        r.stdout.contains("crossed the curve: 183.2 % of limit"),
        "{r}"
    );
    // Q, true (22.31, 19.89) %, β = 0.89, passes beyond the curve's right end (β = 0.49 there):
    // no limit use, uncovered still.
    let q = &rows["Q"];
    assert_eq!(
        (q["zone"].as_str(), q["reason"].as_str()),
        ("uncovered", "no-curve")
    );
    assert_eq!(q["limit_use_pct"], "", "{q:?}");
}

// Case 5: true strains read to ±1 pp. At ε1 = 20 %, ε2 = 10 % true, e = exp ε − 1 = 22.14 % and
// 10.52 %; δe = (1 + e) δε = 1.2214 and 1.1052 pp; the curve's right-side slope is 0.6, so
// u = 1.2214 + 0.6 · 1.1052 = 1.8845 pp (first-order propagation), printed 1.88. The same reading error on
// engineering strains gives 1 + 0.6 = 1.6 pp.
#[test]
fn the_reading_error_of_true_strains_is_converted_once() {
    let r = check(
        "id,major_true_pct,minor_true_pct\nA,20,10\n",
        &["--reading-error", "1"],
    );
    let a = rows_of(&r, "A");
    assert!(
        (num(&a, "margin_uncertainty_pct") - 1.8845).abs() < 0.006,
        "{a:?}"
    );
    let r = check(
        "id,major_eng_pct,minor_eng_pct\nA,22.14,10.52\n",
        &["--reading-error", "1"],
    );
    let a = rows_of(&r, "A");
    assert!(
        (num(&a, "margin_uncertainty_pct") - 1.6).abs() < 0.005,
        "{a:?}"
    );
}
