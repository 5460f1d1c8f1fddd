//! Full-field input through the real binary: strain columns, the column map, points.csv judged
//! again, several files at once, and picture sizes that stay bounded at 100 000 points.
//!
//! The reference for the strain input is the strain definitions themselves (engineering
//! e = exp(ε) − 1, any continuum mechanics text): the same locations given as axes, as
//! engineering percent and as true percent must be judged alike.

mod common;
use common::{read_json, read_rows, repo, repo_arg, run_in};
use std::path::Path;

const CURVE: &str = "limits/steel-0.80mm-n0.20-keeler-brazier.toml";

fn limit() -> String {
    repo_arg(CURVE)
}

/// The demo's hand-read tryout written three ways: axes, engineering percent, true percent (to
/// 6 decimals, so that rounding stays far below the compared precision).
fn three_forms(dir: &Path) {
    let text = std::fs::read_to_string(repo("demo-parts/rear-floor-pan/tryout-1.csv")).unwrap();
    let mut axes = String::from("id,major,minor,x,y\n");
    let mut eng = String::from("id,major_eng_pct,minor_eng_pct,x,y\n");
    let mut tru = String::from("id,major_true_pct,minor_true_pct,x,y\n");
    for line in text.lines().skip(2) {
        let f: Vec<&str> = line.split(',').collect();
        let (d1, d2): (f64, f64) = (f[1].parse().unwrap(), f[2].parse().unwrap());
        let (e1, e2) = (d1 / 2.5 - 1.0, d2 / 2.5 - 1.0);
        axes.push_str(&format!("{},{d1},{d2},{},{}\n", f[0], f[3], f[4]));
        eng.push_str(&format!(
            "{},{:.6},{:.6},{},{}\n",
            f[0],
            100.0 * e1,
            100.0 * e2,
            f[3],
            f[4]
        ));
        tru.push_str(&format!(
            "{},{:.6},{:.6},{},{}\n",
            f[0],
            100.0 * (1.0 + e1).ln(),
            100.0 * (1.0 + e2).ln(),
            f[3],
            f[4]
        ));
    }
    std::fs::write(dir.join("axes.csv"), axes).unwrap();
    std::fs::write(dir.join("eng.csv"), eng).unwrap();
    std::fs::write(dir.join("true.csv"), tru).unwrap();
}

#[test]
fn axes_and_strains_give_the_same_judgement() {
    let dir = tempfile::tempdir().unwrap();
    three_forms(dir.path());
    let lim = limit();
    for name in ["axes", "eng", "true"] {
        let r = run_in(
            dir.path(),
            &[
                "check",
                &format!("{name}.csv"),
                "--limit",
                &lim,
                "--d0",
                "2.5",
                "--out",
                name,
                "--format",
                "csv,json",
            ],
        );
        assert_eq!(r.code, 0, "{r}");
        if name != "axes" {
            assert!(r.stdout.contains("d0 is not used"), "{r}");
        }
    }
    let base = read_rows(&dir.path().join("axes/points.csv"));
    for name in ["eng", "true"] {
        let other = read_rows(&dir.path().join(format!("{name}/points.csv")));
        assert_eq!(base.len(), other.len());
        for (a, b) in base.iter().zip(&other) {
            assert_eq!(a["id"], b["id"]);
            assert_eq!(a["zone"], b["zone"], "{} as {name}", a["id"]);
            let m = |r: &std::collections::HashMap<String, String>| -> f64 {
                r["margin_pct"].parse().unwrap()
            };
            assert!(
                (m(a) - m(b)).abs() < 2e-3,
                "{}: {} vs {}",
                a["id"],
                m(a),
                m(b)
            );
            assert_eq!(b["d0"], "", "no d0 for strain input");
        }
    }
}

#[test]
fn points_csv_judged_again_gives_itself_back() {
    let dir = tempfile::tempdir().unwrap();
    let lim = limit();
    let t1 = repo_arg("demo-parts/rear-floor-pan/tryout-1.csv");
    let r = run_in(
        dir.path(),
        &[
            "check", &t1, "--limit", &lim, "--d0", "2.5", "--t0", "0.8", "--out", "a", "--format",
            "csv,json",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let r = run_in(
        dir.path(),
        &[
            "check",
            "a/points.csv",
            "--limit",
            &lim,
            "--t0",
            "0.8",
            "--out",
            "b",
            "--format",
            "csv,json",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    assert!(
        !r.stdout.contains("ignored columns"),
        "its own columns are known:\n{r}"
    );
    let (a, b) = (
        read_rows(&dir.path().join("a/points.csv")),
        read_rows(&dir.path().join("b/points.csv")),
    );
    assert_eq!(a.len(), b.len());
    for (p, q) in a.iter().zip(&b) {
        assert_eq!((&p["id"], &p["zone"]), (&q["id"], &q["zone"]));
        for col in [
            "major_eng_pct",
            "minor_eng_pct",
            "margin_pct",
            "thinning_pct",
            "limit_use_pct",
        ] {
            if p[col].is_empty() || q[col].is_empty() {
                assert_eq!(p[col], q[col], "{} {col}", p["id"]);
                continue;
            }
            let (x, y): (f64, f64) = (p[col].parse().unwrap(), q[col].parse().unwrap());
            // The strains were written to 0.001 pp: read back, they give the same to that.
            assert!((x - y).abs() <= 0.011, "{} {col}: {x} vs {y}", p["id"]);
        }
        assert_eq!(p["note"], q["note"]);
        assert_eq!(p["stage"], q["stage"]);
    }
    let (sa, sb) = (
        read_json(&dir.path().join("a/summary.json")),
        read_json(&dir.path().join("b/summary.json")),
    );
    assert_eq!(sa["zones"], sb["zones"]);
    assert_eq!(sa["worst"]["id"], sb["worst"]["id"]);
}

#[test]
fn column_map_reads_an_export_with_its_own_headers() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("export.csv"),
        "Point No.;Major strain (%);Minor strain (%);X [mm];Y [mm]\n1;12,5;-3,1;0;0\n2;40,2;-10,3;5;0\n",
    )
    .unwrap();
    let lim = limit();
    let args = [
        "check",
        "export.csv",
        "--limit",
        &lim,
        "--out",
        "o",
        "--format",
        "csv,json",
        "--column",
        "id=Point No.",
        "--column",
        "major_true_pct=Major strain (%)",
        "--column",
        "minor_true_pct=Minor strain (%)",
        "--column",
        "x=X [mm]",
        "--column",
        "y=Y [mm]",
    ];
    let r = run_in(dir.path(), &args);
    assert_eq!(r.code, 0, "{r}");
    let rows = read_rows(&dir.path().join("o/points.csv"));
    assert_eq!(rows.len(), 2);
    // True 12.5 % is engineering exp(0.125) − 1 = 13.315 %.
    assert_eq!(rows[0]["major_eng_pct"], "13.315");
    assert_eq!(rows[1]["x"], "5.000");
    // A map that leaves a required column unmapped: the message names the map.
    let r = run_in(
        dir.path(),
        &[
            "check",
            "export.csv",
            "--limit",
            &lim,
            "--out",
            "p",
            "--column",
            "x=X [mm]",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("export.csv:1") && r.stderr.contains("column map (--column)"),
        "{r}"
    );
    // A map to a header the file does not have.
    let r = run_in(
        dir.path(),
        &[
            "check",
            "export.csv",
            "--limit",
            &lim,
            "--out",
            "p",
            "--column",
            "x=Xpos",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("no column `Xpos`"), "{r}");
    // An unknown name.
    let r = run_in(
        dir.path(),
        &[
            "check",
            "export.csv",
            "--limit",
            &lim,
            "--column",
            "majr=X [mm]",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("`majr` is not a column neckline reads"),
        "{r}"
    );
}

#[test]
fn axes_with_strains_is_refused_and_disagreeing_strains_warn() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("both.csv"),
        "id,major,minor,major_true_pct,minor_true_pct\nA,3,2.5,18,-2\n",
    )
    .unwrap();
    let lim = limit();
    let r = run_in(
        dir.path(),
        &["check", "both.csv", "--limit", &lim, "--d0", "2.5"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("`major`") && r.stderr.contains("`major_true_pct`"),
        "{r}"
    );
    // Engineering 20 % is true 18.232 %: a file giving 18.30 disagrees beyond rounding.
    std::fs::write(
        dir.path().join("pairs.csv"),
        "id,major_eng_pct,minor_eng_pct,major_true_pct,minor_true_pct\nA,20,0,18.23,0\nB,20,0,18.30,0\n",
    )
    .unwrap();
    let r = run_in(
        dir.path(),
        &[
            "check",
            "pairs.csv",
            "--limit",
            &lim,
            "--out",
            "o",
            "--format",
            "csv",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let text = r.stdout.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        text.contains("disagree beyond rounding (0.01 pp) in 1 row, first at B"),
        "{r}"
    );
}

#[test]
fn several_files_each_get_a_folder_and_an_index() {
    let dir = tempfile::tempdir().unwrap();
    let lim = limit();
    let t1 = repo_arg("demo-parts/rear-floor-pan/tryout-1.csv");
    let t2 = repo_arg("demo-parts/rear-floor-pan/tryout-2.csv");
    let r = run_in(
        dir.path(),
        &[
            "check",
            &t1,
            &t2,
            "--limit",
            &lim,
            "--d0",
            "2.5",
            "--out",
            "o",
            "--format",
            "csv,json",
            "--fail-on",
            "failed",
        ],
    );
    // Tryout 1 has failed locations: the worst status of the two.
    assert_eq!(r.code, 1, "{r}");
    assert!(
        r.stdout.contains("FAIL") && r.stdout.contains("tryout-2.csv"),
        "{r}"
    );
    for stem in ["tryout-1", "tryout-2"] {
        assert!(dir.path().join(format!("o/{stem}/points.csv")).is_file());
        assert!(dir.path().join(format!("o/{stem}/summary.json")).is_file());
    }
    let index = read_rows(&dir.path().join("o/index.csv"));
    assert_eq!(index.len(), 2);
    let s1 = read_json(&dir.path().join("o/tryout-1/summary.json"));
    assert_eq!(index[0]["points"], s1["points"].to_string());
    assert_eq!(index[0]["failed"], s1["zones"]["failed"].to_string());
    assert_eq!(index[0]["verdict"], "fail");
    // Two files with one name would share a folder: refused before anything is written.
    let r = run_in(
        dir.path(),
        &[
            "check", &t1, &t1, "--limit", &lim, "--d0", "2.5", "--out", "p",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(!dir.path().join("p").exists());
}

/// 100 000 synthetic points (invented): the pictures and the report stay small.
#[test]
fn pictures_stay_bounded_at_100k_points() {
    let dir = tempfile::tempdir().unwrap();
    let mut s = String::from("id,major_true_pct,minor_true_pct,x,y,z\n");
    let mut state = 7u64;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    for i in 0..100_000 {
        let minor = -20.0 + 35.0 * next();
        let major = minor.abs() + 45.0 * next();
        s.push_str(&format!(
            "{i},{major:.2},{minor:.2},{},{},{:.1}\n",
            i % 400,
            i / 400,
            next()
        ));
    }
    std::fs::write(dir.path().join("big.csv"), s).unwrap();
    let lim = limit();
    let r = run_in(
        dir.path(),
        &[
            "check",
            "big.csv",
            "--limit",
            &lim,
            "--out",
            "o",
            "--format",
            "json,svg,html",
            "--map-value",
            "thinning",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let size = |f: &str| {
        std::fs::metadata(dir.path().join("o").join(f))
            .unwrap()
            .len()
    };
    assert!(size("fld.svg") <= 2_000_000, "fld.svg {}", size("fld.svg"));
    assert!(size("map.svg") <= 2_000_000, "map.svg {}", size("map.svg"));
    assert!(
        size("report.html") <= 5_000_000,
        "report.html {}",
        size("report.html")
    );
    let html = std::fs::read_to_string(dir.path().join("o/report.html")).unwrap();
    assert!(html.contains("all 100000 locations are in points.csv"));
    let svg = std::fs::read_to_string(dir.path().join("o/map.svg")).unwrap();
    assert!(
        svg.contains("Thinning, %"),
        "the map shows the value asked for"
    );
    let s = read_json(&dir.path().join("o/summary.json"));
    assert_eq!(s["points"], 100_000);
    let zones: u64 = s["zones"]
        .as_object()
        .unwrap()
        .values()
        .map(|v| v.as_u64().unwrap())
        .sum();
    assert_eq!(zones, 100_000);
}
