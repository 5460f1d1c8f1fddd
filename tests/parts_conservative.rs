//! `neckline limit from-parts` as a lower bound: the evidence thresholds, the warning about
//! contradictory labels (with ids), the supported range written to the curve file, and the
//! warning of `check` for locations judged beyond it. The real binary, through tests/common.

mod common;
use common::{read_json, run_in, write};
use neckline_core::limit::LimitCurve;
use std::path::Path;
use tempfile::TempDir;

/// The generating curve, true strain: Hill's localized neck ε1 = n − ε2 on the left (Hill
/// 1952, J. Mech. Phys. Solids 1) with n = 0.25, a straight rise of slope 0.5 on the right (an
/// invented shape, for the test only).
fn truth(minor: f64) -> f64 {
    if minor < 0.0 {
        0.25 - minor
    } else {
        0.25 + 0.5 * minor
    }
}

/// One circle row: axes d0·exp(ε) with d0 = 2.5 mm.
fn row(id: &str, minor: f64, major: f64, condition: &str) -> String {
    format!(
        "{id},{:.5},{:.5},{condition}\n",
        2.5 * major.exp(),
        2.5 * minor.exp()
    )
}

/// Circles every 1 % of true minor strain from −20 % to +15 %: safe 3 and 1.5 points below
/// the curve, necked 1.5 above, split 4 above (144 circles, all within 5 % of the curve).
fn bracketing() -> String {
    let mut s = String::from("id,major,minor,condition\n");
    for k in -20..=15 {
        let e2 = k as f64 / 100.0;
        for (tag, off, c) in [
            ("a", -0.03, "safe"),
            ("b", -0.015, "safe"),
            ("c", 0.015, "necked"),
            ("d", 0.04, "split"),
        ] {
            s.push_str(&row(&format!("{k}{tag}"), e2, truth(e2) + off, c));
        }
    }
    s
}

fn from_parts(dir: &Path, csv: &str) -> common::Run {
    write(dir, "parts.csv", csv);
    run_in(
        dir,
        &[
            "limit",
            "from-parts",
            "parts.csv",
            "--d0",
            "2.5",
            "--out",
            "shop.toml",
        ],
    )
}

// 14 safe and 11 necked circles near the boundary are fitted but flagged, with the counts and
// the number wanted (20 of each: the written line is a 1-in-20 line); 9 necked are refused
// (at least 10 of each kind).
#[test]
fn few_circles_near_the_boundary_are_flagged_and_too_few_refused() {
    let dir = TempDir::new().unwrap();
    let mut s = String::from("id,major,minor,condition\n");
    for i in 0..14 {
        let e2 = [-0.10, 0.0, 0.10][i % 3] + 0.002 * i as f64;
        s.push_str(&row(&format!("s{i}"), e2, truth(e2) - 0.02, "safe"));
    }
    for i in 0..11 {
        let e2 = [-0.10, 0.0, 0.10][i % 3] + 0.002 * i as f64;
        s.push_str(&row(&format!("n{i}"), e2, truth(e2) + 0.02, "necked"));
    }
    let r = from_parts(dir.path(), &s).ok();
    assert!(
        r.stderr
            .contains("few circles near the boundary: 14 safe and 11 necked-or-split")
            && r.stderr.contains("at least 20 of each"),
        "{r}"
    );
    // Two necked circles fewer: refused.
    let fewer: String = s
        .lines()
        .filter(|l| !l.starts_with("n9,") && !l.starts_with("n10,"))
        .map(|l| format!("{l}\n"))
        .collect();
    let r = from_parts(dir.path(), &fewer);
    assert_ne!(r.code, 0, "{r}");
    assert!(
        r.stderr
            .contains("9 necked-or-split circles (at least 10 needed)"),
        "{r}"
    );
    // Plenty of circles near the boundary: no flag.
    let r = from_parts(dir.path(), &bracketing()).ok();
    assert!(!r.stderr.contains("few circles"), "{r}");
}

// Necked circles 9 points below the curve half way between two columns of safe circles 3 and
// 1.5 points below it (0.5 % of minor strain either side, within the 1 % stated; at least 5.5
// points above them, beyond the 5 points stated): each is in 4 pairs, so 5 + 20 = 25 of 149
// circles (16.8 %, above the 5 % stated) are in such pairs, and the warning names them.
#[test]
fn contradictory_labels_are_warned_about_with_ids() {
    let dir = TempDir::new().unwrap();
    let r = from_parts(dir.path(), &bracketing()).ok();
    assert!(!r.stderr.contains("contradictory"), "{r}");
    let mut s = bracketing();
    for k in [-15, -8, 0, 6, 12] {
        let e2 = k as f64 / 100.0 + 0.005;
        s.push_str(&row(&format!("bad{k}"), e2, truth(e2) - 0.09, "necked"));
    }
    let r = from_parts(dir.path(), &s).ok();
    assert!(
        r.stderr
            .contains("contradictory labels: 25 of 149 circles (16.8 %, more than 5 %)"),
        "{r}"
    );
    // The first pairs are listed by id (the first 12 of 20, then a count).
    for k in [-15, -8] {
        assert!(r.stderr.contains(&format!("bad{k} below {k}a")), "{k}: {r}");
    }
    assert!(r.stderr.contains("and 8 more pairs"), "{r}");
}

// Safe circles alone from −26 to −21 % minor strain: the curve spans them but is supported
// only from the −20 % knot (the first whose nearest circles are of both kinds); the file says
// so in `supported`, the 50 % line is in `points_50` above the written points, and `check`
// warns, with the count and the id, for a location judged beyond the supported range.
#[test]
fn unsupported_ends_are_marked_and_check_warns() {
    let dir = TempDir::new().unwrap();
    let mut s = bracketing();
    for k in -26..=-21 {
        let e2 = k as f64 / 100.0;
        s.push_str(&row(&format!("end{k}"), e2, truth(e2) - 0.03, "safe"));
    }
    let r = from_parts(dir.path(), &s).ok();
    assert!(
        r.stderr
            .contains("only one kind of circle near the curve's ends"),
        "{r}"
    );
    let text = r.read("shop.toml");
    assert!(text.contains("supported = [-20.0000, 15.00"), "{text}");
    let curve = LimitCurve::parse(&text, Path::new("shop.toml")).unwrap();
    assert!(
        (curve.points[0][0] + 0.26).abs() < 1e-5,
        "{:?}",
        curve.points
    );
    // The 50 % line lies above the written points at every knot.
    let median: Vec<f64> = text
        .split("points_50 = [")
        .nth(1)
        .unwrap()
        .lines()
        .filter_map(|l| l.trim().strip_prefix('[')?.strip_suffix("],"))
        .map(|l| l.split(',').nth(1).unwrap().trim().parse().unwrap())
        .collect();
    assert_eq!(median.len(), curve.points.len());
    for (m, p) in median.iter().zip(&curve.points) {
        assert!(m / 100.0 > p[1], "{m} vs {p:?}");
    }
    // A location at −23 % true minor strain (beyond), one at plane strain (inside).
    let meas = format!(
        "id,major,minor\n{}{}",
        row("far", -0.23, 0.30, "")
            .trim_end_matches(",\n")
            .to_owned()
            + "\n",
        row("near", 0.0, 0.10, "")
            .trim_end_matches(",\n")
            .to_owned()
            + "\n"
    );
    write(dir.path(), "meas.csv", meas);
    let c = run_in(
        dir.path(),
        &[
            "check",
            "meas.csv",
            "--d0",
            "2.5",
            "--limit",
            "shop.toml",
            "--out",
            "res",
        ],
    );
    let summary = read_json(&c.path("res/summary.json"));
    let warnings = summary["warnings"].to_string();
    assert!(
        warnings.contains("1 location was judged on an unsupported part of the curve")
            && warnings.contains("outside -20.00 to 15.00 % true minor strain")
            && warnings.contains("far")
            && !warnings.contains("near"),
        "{warnings}\n{c}"
    );
}
