//! Faults found by re-computing neckline's results independently, each reproduced from its
//! description and run through the real binary in a fresh temporary directory.

mod common;
use common::{neckline, num, read_rows, repo};

const FLAT: &str = "name = \"flat\"\nsource = \"test only\"\nstrain = \"engineering\"\npoints = [[-30, 30], [30, 30]]\n";

// The job file gives the reading error in its own unit (mm); the circles are in inches. On a
// flat curve the margin's uncertainty is 100·δd/d0 (δe ≈ δd/d0, common practice: 0.025 mm on a
// 2.5 mm circle is 1 % strain), whatever the unit: 1.00 pp, not 25.4 pp.
#[test]
fn job_reading_error_is_converted_to_the_unit_in_use() {
    let job = "unit = \"mm\"\nd0 = 2.5\nreading_error = 0.025\nlimit = \"flat.toml\"\n";
    // 2.9 mm and 2.6 mm in inches: 16 % and 4 % on d0 2.5 mm, margin 14 pp.
    let csv = format!("id,major,minor\nP1,{},{}\n", 2.9 / 25.4, 2.6 / 25.4);
    let r = neckline(&[
        "check", "in.csv", "--job", "job.toml", "--unit", "in", "--out", "o", "--format", "csv",
    ])
    .files(&[("job.toml", job), ("flat.toml", FLAT), ("in.csv", &csv)])
    .run();
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&r.path("o/points.csv"));
    assert!((num(&rows[0], "major_eng_pct") - 16.0).abs() < 1e-3, "{r}");
    assert!(
        (num(&rows[0], "margin_uncertainty_pct") - 1.0).abs() < 0.01,
        "{rows:?}"
    );
    assert_ne!(rows[0]["borderline"], "yes", "{rows:?}");
}

// d0 = -2.5 in a job file: the message names the job file, the line and the key.
#[test]
fn job_out_of_range_names_the_job_file_and_key() {
    let job = "part = \"x\"\nd0 = -2.5\n";
    let r = neckline(&[
        "check",
        "m.csv",
        "--job",
        "job.toml",
        "--limit",
        "flat.toml",
        "--out",
        "o",
    ])
    .files(&[
        ("job.toml", job),
        ("flat.toml", FLAT),
        ("m.csv", "id,major,minor\nA,3,2.6\n"),
    ])
    .run();
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("job.toml:2:6") && r.stderr.contains("`d0` = -2.5"),
        "{r}"
    );
    assert!(!r.path("o/points.csv").exists(), "{r}");
}

// A curve from -30 % to +10 % and d0 2.5: minor axes 1.75 mm and 2.75 mm are -30 % and +10 %
// exactly (e = d/d0 − 1), the curve's own ends, and must be judged, not left uncovered.
#[test]
fn readings_at_the_curve_ends_are_covered() {
    let curve = "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\npoints = [[-30, 60], [0, 30], [10, 36]]\n";
    let csv = "id,major,minor\nLEFT,3.0,1.75\nRIGHT,3.0,2.75\n";
    let r = neckline(&[
        "check", "m.csv", "--d0", "2.5", "--limit", "c.toml", "--out", "o", "--format", "csv",
    ])
    .files(&[("c.toml", curve), ("m.csv", csv)])
    .run();
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&r.path("o/points.csv"));
    for (row, limit) in rows.iter().zip([60.0, 36.0]) {
        assert_ne!(row["zone"], "uncovered", "{row:?}");
        assert!(
            (num(row, "limit_major_eng_pct") - limit).abs() < 1e-3,
            "{row:?}"
        );
    }
}

// `limit compare` of the demo curve with itself at its own last point, 30 %: the curve's value
// there (46 %) on both sides and a difference of 0, not `-`.
#[test]
fn limit_compare_at_a_curves_own_last_point() {
    let c = repo("limits/demo-tabulated-invented.toml");
    let c = c.to_str().unwrap();
    let r = neckline(&["limit", "compare", c, c, "--at", "-35,30"]).run();
    assert_eq!(r.code, 0, "{r}");
    let row = |m: &str| {
        r.stdout
            .lines()
            .find(|l| l.split_whitespace().next() == Some(m))
            .unwrap_or_else(|| panic!("no row {m}: {r}"))
            .split_whitespace()
            .map(str::to_string)
            .collect::<Vec<_>>()
    };
    assert_eq!(row("30.00"), ["30.00", "46.00", "46.00", "0.00"], "{r}");
    assert_eq!(row("-35.00"), ["-35.00", "72.00", "72.00", "0.00"], "{r}");
}

// With --paths 30 the strain ratios used to miss plane strain, and FLC0 read 22.57 %.
// Hill 1952: ε1 = n at β = 0, so for n = 0.2 the plane-strain limit is e^0.2 − 1 = 22.14 %.
#[test]
fn necking_curve_always_holds_plane_strain() {
    let r = neckline(&[
        "limit", "necking", "--n", "0.2", "--paths", "30", "--out", "n.toml",
    ])
    .run();
    assert_eq!(r.code, 0, "{r}");
    assert!(
        r.stdout.contains("Plane-strain limit (FLC0): 22.14 %"),
        "{r}"
    );
    let curve = neckline_core::limit::LimitCurve::load(&r.path("n.toml")).unwrap();
    assert_eq!(curve.points.len(), 30);
    assert!(curve.points.iter().any(|p| p[0].abs() < 1e-12), "{r}");
    // Two paths cannot hold both ends and plane strain: refused with the range.
    let r = neckline(&["limit", "necking", "--n", "0.2", "--paths", "2"]).run();
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("3 ..= 301"), "{r}");
}

// A regular grid whose one cell is turned over: the message names the cell, and the refusal
// counts elements, not rows.
#[test]
fn grid_messages_name_the_element_and_count_elements() {
    // Cell r0c0 with its deformed corners mirrored in x: turned over (det F < 0).
    let nodes = "row,col,X,Y,x,y\n0,0,0,0,0,0\n0,1,2.5,0,-2.5,0\n1,1,2.5,2.5,-2.5,2.5\n\
                 1,0,0,2.5,0,2.5\n";
    let r = neckline(&["grid", "nodes.csv", "--limit", "flat.toml", "--out", "o"])
        .files(&[("nodes.csv", nodes), ("flat.toml", FLAT)])
        .run();
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("(1 element rejected; first: nodes.csv:2: grid cell r0c0 not evaluated")
            && r.stderr.contains("turned over"),
        "{r}"
    );
    assert!(!r.stderr.contains("rows"), "{r}");
}

// `grid --reading-error`: a 2.5 mm cell stretched 20 % along x on a flat curve. Every corner
// feeds the centre gradient, so δ = 0.01 mm on each node coordinate moves the major strain by
// up to 2δ/h = 0.8 % (the derivation in crates/neckline-core/src/grid/uncertainty.rs), not δ/d0 = 0.35 % of a circle of
// the cell's area.
#[test]
fn grid_reading_error_counts_every_corner() {
    let nodes = "row,col,X,Y,x,y\n0,0,0,0,0,0\n0,1,2.5,0,3,0\n1,1,2.5,2.5,3,2.5\n1,0,0,2.5,0,2.5\n";
    let r = neckline(&[
        "grid",
        "nodes.csv",
        "--limit",
        "flat.toml",
        "--out",
        "o",
        "--format",
        "csv",
        "--reading-error",
        "0.01",
    ])
    .files(&[("nodes.csv", nodes), ("flat.toml", FLAT)])
    .run();
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&r.path("o/points.csv"));
    assert!(
        (num(&rows[0], "major_eng_pct") - 20.0).abs() < 1e-6,
        "{rows:?}"
    );
    assert!(
        (num(&rows[0], "margin_uncertainty_pct") - 0.80).abs() < 0.005,
        "{rows:?}"
    );
}

/// Outline rows `id, x, y` of an ellipse with full axes `major`, `minor` centred at `(cx, cy)`,
/// `n` points evenly spaced in parametric angle.
fn outline(id: &str, major: f64, minor: f64, cx: f64, cy: f64, n: usize) -> String {
    (0..n)
        .map(|i| {
            let t = i as f64 * std::f64::consts::TAU / n as f64;
            format!(
                "{id},{},{}\n",
                cx + major / 2.0 * t.cos(),
                cy + minor / 2.0 * t.sin()
            )
        })
        .collect()
}

// `fit` with a stray point, two outlines under one id and a 90° arc: the stray point is set
// aside (2.8 mm comes back, quality good), the other two are written with `suspect: ...` in the
// quality column, and each is named on standard error.
#[test]
fn fit_sets_aside_outliers_and_flags_suspect_fits() {
    let mut csv = String::from("id,x,y\n");
    csv += &outline("STRAY", 2.8, 2.8, 0.0, 0.0, 16);
    csv += "STRAY,2.3,0\n";
    csv += &outline("TWO", 2.5, 2.5, 10.0, 0.0, 12);
    csv += &outline("TWO", 2.9, 2.7, 14.0, 0.5, 12);
    for i in 0..12 {
        let t = f64::from(i) / 11.0 * std::f64::consts::FRAC_PI_2;
        let noise = 0.01 * (5.1 * f64::from(i)).sin();
        csv += &format!("ARC,{},{}\n", 20.0 + (1.4 + noise) * t.cos(), 1.3 * t.sin());
    }
    let r = neckline(&["fit", "o.csv", "--out", "f.csv"])
        .files(&[("o.csv", &csv)])
        .run();
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&r.path("f.csv"));
    assert_eq!(rows.len(), 3, "{rows:?}");
    assert!((num(&rows[0], "major") - 2.8).abs() < 1e-5, "{rows:?}");
    assert_eq!(rows[0]["discarded"], "1");
    assert_eq!(rows[0]["quality"], "good");
    assert!(
        rows[1]["quality"].starts_with("suspect: 12 of 24 points"),
        "{rows:?}"
    );
    assert!(rows[2]["quality"].contains("cover only"), "{rows:?}");
    assert!(
        r.stderr
            .contains("outline `STRAY`: 1 of 17 points set aside"),
        "{r}"
    );
    assert!(r.stderr.contains("outline `ARC`: suspect:"), "{r}");
}
