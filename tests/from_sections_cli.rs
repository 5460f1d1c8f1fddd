//! `neckline limit from-sections`: the real binary on the invented laboratory series of
//! demo-parts/lab-sections, and the curve it writes judging the demo part like any curve.

mod common;
use common::{demo_tryout, read_rows, repo_arg, run_in};
use neckline_core::limit::LimitCurve;
use neckline_core::strain::StrainMeasure;
use tempfile::TempDir;

/// The true limit strains the demo's script built its profiles around, `[minor, major]` true %,
/// geometries in file order (TRUE_LIMITS in demo-parts/lab-sections/make-sections.py; the
/// specimens lie −0.4, 0 and +0.4 points about them, so the geometry means are these).
const TRUTH: [(&str, [f64; 2]); 5] = [
    ("20", [-18.0, 42.0]),
    ("50", [-9.0, 33.0]),
    ("90", [0.8, 27.5]),
    ("125", [10.0, 30.0]),
    ("200", [24.0, 33.0]),
];

fn lab_curve(dir: &TempDir) -> common::Run {
    run_in(
        dir.path(),
        &[
            "limit",
            "from-sections",
            &repo_arg("demo-parts/lab-sections/sections.csv"),
            "--out",
            "lab.toml",
            "--plot",
            "plots",
            "--lab",
            "forming lab (invented)",
            "--material",
            "DX54 class (invented)",
            "--lot",
            "coil 11 (invented)",
        ],
    )
    .ok()
}

// The curve reads back through the parser `check` uses, in true strain, with each geometry's
// mean within 0.5 pp of the truth (the recovery the method promises with noise, ISO 12004-2's
// evaluation as implemented), the scatter per point, the file's SHA-256 (as the library
// computes it; FIPS 180-4) and the lab words in its source; the pictures and the page exist.
#[test]
fn the_demo_series_gives_back_its_true_limits() {
    let dir = TempDir::new().unwrap();
    let r = lab_curve(&dir);
    let c = LimitCurve::load(&dir.path().join("lab.toml")).unwrap();
    assert_eq!(c.measure, StrainMeasure::True);
    assert_eq!(c.points.len(), 5, "{r}");
    let mut truth: Vec<[f64; 2]> = TRUTH.iter().map(|t| t.1).collect();
    truth.sort_by(|a, b| a[0].total_cmp(&b[0]));
    for (p, t) in c.points.iter().zip(&truth) {
        for k in 0..2 {
            assert!(
                (100.0 * p[k] - t[k]).abs() < 0.5,
                "{:?} vs {t:?}\n{r}",
                [100.0 * p[0], 100.0 * p[1]]
            );
        }
    }
    let sc = c.scatter.as_ref().expect("scatter");
    assert_eq!(sc.len(), 5);
    // The specimens lie 0.4 points apart (the script's offsets): the scatter of the major strain
    // is about 0.4, between 0.2 and 0.7 points.
    assert!(
        sc.iter().all(|s| 100.0 * s[1] > 0.2 && 100.0 * s[1] < 0.7),
        "{sc:?}"
    );
    let bytes = std::fs::read(common::repo("demo-parts/lab-sections/sections.csv")).unwrap();
    let sha = neckline_core::digest::sha256_hex(&bytes);
    for part in [
        sha.as_str(),
        "ISO 12004-2",
        "forming lab (invented)",
        "20 (3 specimens, 9 of 9 sections valid, 9 used)",
    ] {
        assert!(c.source.contains(part), "missing `{part}` in {}", c.source);
    }
    assert_eq!(
        c.material.as_deref(),
        Some("DX54 class (invented), coil 11 (invented)")
    );
    for f in [
        "plots/curve.svg",
        "plots/sections.html",
        "plots/sections-20.svg",
    ] {
        assert!(dir.path().join(f).is_file(), "{f}\n{r}");
    }
    let page = r.read("plots/sections.html");
    assert!(
        page.contains("Sign-off") && page.contains(&sha),
        "sign-off and digest"
    );
    assert!(r.stdout.contains("Plane-strain limit (FLC0)"), "{r}");
}

// A curve from sections judges the demo part as a hand-written curve of the same points does:
// `check` runs with each and every location gets the same zone and limit use.
#[test]
fn a_lab_curve_judges_the_demo_part_like_any_curve() {
    let dir = TempDir::new().unwrap();
    lab_curve(&dir);
    let c = LimitCurve::load(&dir.path().join("lab.toml")).unwrap();
    let mut hand = String::from(
        "name = \"hand-written\"\nsource = \"the same points typed by hand\"\n\
         strain = \"true\"\npoints = [\n",
    );
    for p in &c.points {
        hand.push_str(&format!("  [{:.4}, {:.4}],\n", 100.0 * p[0], 100.0 * p[1]));
    }
    hand.push_str("]\n");
    std::fs::write(dir.path().join("hand.toml"), hand).unwrap();
    let [tryout, job] = demo_tryout(1);
    let mut zones = Vec::new();
    for (curve, out) in [("lab.toml", "o-lab"), ("hand.toml", "o-hand")] {
        let r = run_in(
            dir.path(),
            &[
                "check", &tryout, "--job", &job, "--limit", curve, "--out", out, "--format", "csv",
            ],
        );
        assert!(r.code == 0 || r.code == 1, "{r}");
        let rows = read_rows(&r.path(&format!("{out}/points.csv")));
        assert!(rows.len() > 100, "{r}");
        zones.push(
            rows.iter()
                .map(|row| (row["zone"].clone(), row["limit_use_pct"].clone()))
                .collect::<Vec<_>>(),
        );
    }
    assert_eq!(zones[0], zones[1]);
    assert!(zones[0].iter().any(|z| z.0 != "uncovered"));
}

// A file without the section columns is refused, naming the file and the header line.
#[test]
fn a_file_without_section_columns_is_refused() {
    let dir = TempDir::new().unwrap();
    std::fs::write(
        dir.path().join("s.csv"),
        "id,major_true_pct,minor_true_pct\nA,30,-10\n",
    )
    .unwrap();
    let r = run_in(dir.path(), &["limit", "from-sections", "s.csv"]).expect(2);
    assert!(
        r.stderr.contains("s.csv:1: missing column `geometry`"),
        "{r}"
    );
}
