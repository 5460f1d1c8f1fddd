//! The `grid` and `fit` commands, run as the real binary on the files in tests/grid-data/.
//!
//! The files were made from known deformation gradients (see their first lines), so the
//! expected strains follow from the textbook formulas: stretches are the singular values of F,
//! e = λ − 1 (project field notes, sections 2-3). The 3-D file is the field notes' section 3
//! check: stretches 1.281413, 0.920858, major direction 18.15° in the blank.

mod common;
use common::{neckline, num, read_json, read_text, repo, rows};
use std::path::PathBuf;
use tempfile::TempDir;

const CURVE: &str = "name = \"test curve\"\nsource = \"test only\"\nstrain = \"engineering\"\n\
                     points = [[-40, 60], [0, 30], [20, 42]]\n";

fn data(name: &str) -> PathBuf {
    repo("tests/grid-data").join(name)
}

/// A fresh folder holding the test curve as limit.toml.
fn folder() -> TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("limit.toml"), CURVE).unwrap();
    dir
}

#[test]
fn grid_2d_homogeneous_stretch() {
    let dir = folder();
    let d = dir.path();
    let nodes = data("nodes-2d.csv");
    let out = neckline(&[
        "grid",
        nodes.to_str().unwrap(),
        "--limit",
        "limit.toml",
        "--out",
        "o",
        "--t0",
        "0.8",
    ])
    .run_in(d)
    .expect(0);
    let stdout = &out.stdout;
    assert!(
        stdout.contains("9 locations judged") && stdout.contains("Caution"),
        "{stdout}"
    );
    let points = rows(&read_text(&d.join("o/points.csv")));
    assert_eq!(points.len(), 9);
    // F = R(10°) diag(1.2, 0.95): e = 20 %, −5 %, major along X, rotation 10°.
    for p in &points {
        assert!((num(p, "major_eng_pct") - 20.0).abs() < 1e-3, "{p:?}");
        assert!((num(p, "minor_eng_pct") + 5.0).abs() < 1e-3, "{p:?}");
        assert!(num(p, "major_dir_deg").abs() < 1e-2, "{p:?}");
        assert!((num(p, "rotation_deg") - 10.0).abs() < 1e-3, "{p:?}");
        // t = t0 / (λ1 λ2) = 0.8 / 1.14
        assert!((num(p, "thickness") - 0.8 / 1.14).abs() < 1e-4, "{p:?}");
        assert_eq!(p["normal_z"], "");
    }
    assert_eq!(points[4]["id"], "r1c1");
    let summary: serde_json::Value = read_json(&d.join("o/summary.json"));
    assert_eq!(summary["points"], 9);
    assert_eq!(summary["verdict"], "pass");
    assert!(summary["caution"]
        .as_str()
        .unwrap()
        .contains("aid to judgement"));
}

#[test]
fn grid_3d_field_notes_check() {
    let dir = folder();
    let d = dir.path();
    let nodes = data("nodes-3d.csv");
    neckline(&[
        "grid",
        nodes.to_str().unwrap(),
        "--limit",
        "limit.toml",
        "--out",
        "o",
    ])
    .run_in(d)
    .expect(0);
    let points = rows(&read_text(&d.join("o/points.csv")));
    assert_eq!(points.len(), 4);
    let (s20, c20) = 20f64.to_radians().sin_cos();
    for p in &points {
        // λ = 1.281413, 0.920858 (field notes section 3); direction 18.15°.
        assert!((num(p, "major_eng_pct") - 28.1413).abs() < 1e-3, "{p:?}");
        assert!((num(p, "minor_eng_pct") + 7.9142).abs() < 1e-3, "{p:?}");
        assert!((num(p, "major_true_pct") - 24.7964).abs() < 1e-3, "{p:?}");
        assert!(
            (num(p, "thickness_true_pct") + 16.5514).abs() < 1e-3,
            "{p:?}"
        );
        assert!((num(p, "major_dir_deg") - 18.15).abs() < 0.01, "{p:?}");
        // normal = Rz(20°) Rx(30°) e_z = (0.5 sin 20°, −0.5 cos 20°, cos 30°)
        assert!((num(p, "normal_x") - 0.5 * s20).abs() < 1e-6, "{p:?}");
        assert!((num(p, "normal_y") + 0.5 * c20).abs() < 1e-6, "{p:?}");
        assert!(
            (num(p, "normal_z") - 30f64.to_radians().cos()).abs() < 1e-6,
            "{p:?}"
        );
        assert_eq!(p["rotation_deg"], "");
    }
}

#[test]
fn grid_elements_with_bad_rows_and_degenerate_elements() {
    let dir = folder();
    let d = dir.path();
    let (nodes, elements) = (data("nodes-id.csv"), data("elements.csv"));
    let args = [
        "grid",
        nodes.to_str().unwrap(),
        "--elements",
        elements.to_str().unwrap(),
        "--limit",
        "limit.toml",
        "--out",
        "o",
    ];
    let out = neckline(&args).run_in(d).expect(0);
    let stdout = &out.stdout;
    assert!(
        stdout.contains("4 locations judged, 5 rows rejected"),
        "{stdout}"
    );
    assert!(
        stdout.contains("elements.csv:5: element `T3` not evaluated"),
        "{stdout}"
    );
    assert!(stdout.contains("turned"), "{stdout}");
    assert!(
        stdout.contains("nodes-id.csv:10:5 (column `y`)"),
        "{stdout}"
    );
    let text = read_text(&d.join("o/points.csv"));
    assert!(!text.to_lowercase().contains("nan"), "{text}");
    let points = rows(&text);
    let ids: Vec<&str> = points.iter().map(|p| p["id"].as_str()).collect();
    assert_eq!(ids, ["Q1", "T1", "T2", "T4"]);
    for p in &points {
        assert!((num(p, "major_eng_pct") - 10.0).abs() < 1e-3, "{p:?}");
        assert!(num(p, "minor_eng_pct").abs() < 1e-3, "{p:?}");
    }
    assert_eq!(points[0]["nodes"], "4");
    assert_eq!(points[1]["nodes"], "3");
    let summary: serde_json::Value = read_json(&d.join("o/summary.json"));
    let rejected = summary["rejected"].as_array().unwrap();
    let ids: Vec<&str> = rejected.iter().filter_map(|v| v["id"].as_str()).collect();
    assert_eq!(ids, ["T3", "T5", "T6", "T7", "K"]);
    // --strict refuses the run and writes no file (the output folder is made, and checked,
    // before the work starts).
    let mut strict = args.to_vec();
    strict[7] = "o2";
    strict.push("--strict");
    let out = neckline(&strict).run_in(d).expect(2);
    let err = &out.stderr;
    assert!(
        err.contains("--strict: 1 node row and 4 elements rejected"),
        "{err}"
    );
    assert!(!d.join("o2/points.csv").exists() && !d.join("o2/summary.json").exists());
}

#[test]
fn grid_input_errors_name_file_and_line() {
    let dir = folder();
    let d = dir.path();
    std::fs::write(d.join("bad.csv"), "row,col,X,Y,x\n0,0,0,0,0\n").unwrap();
    let out = neckline(&["grid", "bad.csv", "--limit", "limit.toml"])
        .run_in(d)
        .expect(2);
    let err = &out.stderr;
    assert!(
        err.contains("bad.csv:1") && err.contains("missing column `y`"),
        "{err}"
    );
    std::fs::write(d.join("ids.csv"), "id,X,Y,x,y\nA,0,0,0,0\n").unwrap();
    let out = neckline(&["grid", "ids.csv", "--limit", "limit.toml"])
        .run_in(d)
        .expect(2);
    assert!(out.stderr.contains("--elements"), "{out}");
}

#[test]
fn fit_then_check_agrees_with_the_mapping() {
    let dir = folder();
    let d = dir.path();
    let outlines = data("outlines.csv");
    let out = neckline(&["fit", outlines.to_str().unwrap(), "--out", "fitted.csv"])
        .run_in(d)
        .expect(0);
    let err = &out.stderr;
    assert!(err.contains("outline `E4`: 5 points, at least 6"), "{err}");
    assert!(
        err.contains("outline `E5`: the points lie on a straight line"),
        "{err}"
    );
    assert!(err.contains("fitted 3 of 5"), "{err}");
    let fitted = rows(&read_text(&d.join("fitted.csv")));
    assert_eq!(fitted.len(), 3);
    // d0 = 2.5 mapped by R(10°) diag(1.2, 0.95): axes 3.0 and 2.375, major axis at 10°.
    assert!(
        (num(&fitted[0], "major") - 3.0).abs() < 1e-6,
        "{:?}",
        fitted[0]
    );
    assert!(
        (num(&fitted[0], "minor") - 2.375).abs() < 1e-6,
        "{:?}",
        fitted[0]
    );
    assert!(
        (num(&fitted[0], "angle_deg") - 10.0).abs() < 1e-3,
        "{:?}",
        fitted[0]
    );
    assert!((num(&fitted[0], "centre_x") - 10.0).abs() < 1e-6);
    assert_eq!(fitted[0]["x"], fitted[0]["centre_x"]);
    // E3: R(−35°) diag(1.3, 0.9).
    assert!(
        (num(&fitted[2], "major") - 3.25).abs() < 1e-6,
        "{:?}",
        fitted[2]
    );
    assert!(
        (num(&fitted[2], "angle_deg") + 35.0).abs() < 1e-3,
        "{:?}",
        fitted[2]
    );

    neckline(&[
        "check",
        "fitted.csv",
        "--d0",
        "2.5",
        "--limit",
        "limit.toml",
        "--out",
        "c",
    ])
    .run_in(d)
    .expect(0);
    let points = rows(&read_text(&d.join("c/points.csv")));
    // The same F in nodes-2d.csv gives 20 % and −5 % through `grid`: the two paths agree.
    assert!(
        (num(&points[0], "major_eng_pct") - 20.0).abs() < 1e-3,
        "{:?}",
        points[0]
    );
    assert!(
        (num(&points[0], "minor_eng_pct") + 5.0).abs() < 1e-3,
        "{:?}",
        points[0]
    );
    assert_eq!(points[0]["x"], "10.000");

    // fit | check -: the fitted CSV on stdout read by check from stdin.
    let piped = neckline(&["fit", outlines.to_str().unwrap()])
        .run_in(d)
        .expect(0)
        .stdout
        .clone();
    neckline(&[
        "check",
        "-",
        "--d0",
        "2.5",
        "--limit",
        "limit.toml",
        "--out",
        "p",
    ])
    .stdin(piped)
    .run_in(d)
    .expect(0);
    assert_eq!(rows(&read_text(&d.join("p/points.csv"))).len(), 3);
}

#[test]
fn fit_with_nothing_fitted_exits_2() {
    let dir = folder();
    let d = dir.path();
    std::fs::write(
        d.join("o.csv"),
        "id,x,y\nA,0,0\nA,1,1\nA,2,2\nA,3,3\nA,4,4\nA,5,5\nB,1,x\n",
    )
    .unwrap();
    let out = neckline(&["fit", "o.csv"]).run_in(d).expect(2);
    let err = &out.stderr;
    assert!(
        err.contains("`A`") && err.contains("straight line"),
        "{err}"
    );
    assert!(
        err.contains("o.csv:8:3 (column `y`)") && err.contains("`B` not fitted"),
        "{err}"
    );
    assert!(err.contains("no outline could be fitted"), "{err}");
    assert!(out.stdout.is_empty());
}
