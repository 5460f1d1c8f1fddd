//! `neckline limit`: the real binary, run in a fresh temporary directory. On failure each test
//! prints the directory, the exit status, stdout and stderr.

use approx::assert_abs_diff_eq;
mod common;
use common::{read_json, run_in};
use neckline_core::limit::LimitCurve;
use std::path::Path;
use tempfile::TempDir;

fn load(dir: &TempDir, name: &str) -> LimitCurve {
    LimitCurve::load(&dir.path().join(name)).unwrap()
}

/// Engineering major strain, percent, of a curve at engineering minor strain `minor_pct`.
fn major_eng_pct(c: &LimitCurve, minor_pct: f64) -> f64 {
    let t = neckline_core::strain::EngStrain::from_percent(minor_pct)
        .to_true()
        .unwrap();
    c.limit_major_eng(t).unwrap().percent()
}

// Invented circles (d0 = 2.5 mm) at plane strain: 40 %, 28 % and 5 % engineering major strain.
const CIRCLES: &str = "id,major,minor\nA,3.5,2.5\nB,3.2,2.5\nC,2.625,2.5\n";

// A Keeler-Brazier curve written by `limit` is read by `check`: FLC0 = 32.96 % for t = 0.8 mm,
// n = 0.20 (check value of the project field notes, section 5, from the Keeler-Brazier formula),
// and the three circles fall in the zones that FLC0 and the 10-point band give.
#[test]
fn keeler_brazier_curve_feeds_check() {
    let dir = TempDir::new().unwrap();
    let r = run_in(
        dir.path(),
        &[
            "limit",
            "keeler-brazier",
            "--n",
            "0.2",
            "--thickness",
            "0.8",
            "--out",
            "kb.toml",
        ],
    )
    .ok();
    assert!(
        r.stdout.contains("32.96 %") && r.stdout.contains("Caution"),
        "{r}"
    );
    let c = load(&dir, "kb.toml");
    assert_abs_diff_eq!(major_eng_pct(&c, 0.0), 32.96, epsilon = 0.01);
    assert!(c.source.contains("n = 0.2") && c.source.contains(env!("CARGO_PKG_VERSION")));
    std::fs::write(dir.path().join("m.csv"), CIRCLES).unwrap();
    let r = run_in(
        dir.path(),
        &[
            "check", "m.csv", "--limit", "kb.toml", "--d0", "2.5", "--out", "out",
        ],
    )
    .ok();
    let pts = std::fs::read_to_string(dir.path().join("out/points.csv")).unwrap();
    let zone_of = |id: &str| {
        let line = pts
            .lines()
            .find(|l| l.starts_with(&format!("{id},")))
            .unwrap_or_else(|| panic!("no row {id}\n{pts}\n{r}"));
        ["failed", "marginal", "safe"]
            .into_iter()
            .find(|z| line.split(',').any(|f| f == *z))
            .unwrap_or("other")
    };
    assert_eq!(
        [zone_of("A"), zone_of("B"), zone_of("C")],
        ["failed", "marginal", "safe"],
        "{pts}"
    );
}

// The inch and mm forms of Keeler-Brazier agree (14.13 × 25.4 = 358.9 ≈ 359): 0.0315 in is
// 0.8001 mm, and the two curves agree within 0.05 percentage points.
#[test]
fn inch_and_mm_thickness_give_the_same_curve() {
    let dir = TempDir::new().unwrap();
    run_in(
        dir.path(),
        &[
            "limit",
            "keeler-brazier",
            "--n",
            "0.18",
            "--thickness",
            "0.0315",
            "--unit",
            "in",
            "--out",
            "in.toml",
        ],
    )
    .ok();
    run_in(
        dir.path(),
        &[
            "limit",
            "keeler-brazier",
            "--n",
            "0.18",
            "--thickness",
            "0.8001",
            "--out",
            "mm.toml",
        ],
    )
    .ok();
    let (a, b) = (load(&dir, "in.toml"), load(&dir, "mm.toml"));
    for m in [-30.0, -10.0, 0.0, 10.0, 20.0] {
        assert_abs_diff_eq!(major_eng_pct(&a, m), major_eng_pct(&b, m), epsilon = 0.05);
    }
    assert!(a.source.contains("0.0315 in"));
}

// Clamps act with a warning on stderr; without --out the curve goes to stdout.
// FLC0 at the clamps n = 0.21, t = 3 mm: (23.3 + 14.13 × 3) × 0.21 / 0.21 = 65.69 % (calc).
#[test]
fn clamps_warn_and_stdout_is_a_curve() {
    let dir = TempDir::new().unwrap();
    let r = run_in(
        dir.path(),
        &["limit", "keeler-brazier", "--n", "0.25", "--thickness", "4"],
    )
    .ok();
    assert_eq!(r.stderr.matches("clamped").count(), 2, "{r}");
    let c = LimitCurve::parse(&r.stdout, Path::new("<stdout>")).unwrap();
    assert_abs_diff_eq!(major_eng_pct(&c, 0.0), 65.69, epsilon = 0.01);
}

// Hill 1952: the left side of the analytic curve has ε1 + ε2 = n in true strain, also between
// the written points (the file is linear in true strain); Swift 1952 gives n at plane strain.
#[test]
fn necking_curve_in_true_strain() {
    let dir = TempDir::new().unwrap();
    let r = run_in(
        dir.path(),
        &["limit", "necking", "--n", "0.22", "--name", "analytic"],
    )
    .ok();
    let c = LimitCurve::parse(&r.stdout, Path::new("<stdout>")).unwrap();
    assert_eq!(c.measure.name(), "true");
    assert_eq!(c.name, "analytic");
    for minor in [-0.2, -0.13, -0.05] {
        assert_abs_diff_eq!(c.major_at(minor).unwrap() + minor, 0.22, epsilon = 2e-6);
    }
    assert_abs_diff_eq!(c.major_at(0.0).unwrap(), 0.22, epsilon = 2e-6);
    let r = run_in(
        dir.path(),
        &["limit", "necking", "--n", "0.22", "--right", "storen-rice"],
    )
    .ok();
    assert!(r.stdout.contains("Storen-Rice 1975"), "{r}");
}

// An isotropic M-K curve: its plane-strain limit matches the closed form
// ε^n e^(−ε) = f0 nⁿ e^(−n) -> 0.1431 for n = 0.2, f0 = 0.99 (project field notes, section 5),
// its source records every parameter, and `check` accepts it.
#[test]
fn mk_curve_feeds_check() {
    let dir = TempDir::new().unwrap();
    run_in(
        dir.path(),
        &[
            "limit", "mk", "--n", "0.2", "--r0", "1", "--r45", "1", "--r90", "1", "--f0", "0.99",
            "--k", "520", "--out", "mk.toml",
        ],
    )
    .ok();
    let c = load(&dir, "mk.toml");
    assert_eq!(c.points.len(), 31);
    assert_abs_diff_eq!(c.major_at(0.0).unwrap(), 0.1431, epsilon = 1e-3);
    for p in [
        "r0 = 1",
        "r45 = 1",
        "r90 = 1",
        "f0 = 0.99",
        "K = 520",
        "eps0 = 0",
        "n = 0.2",
    ] {
        assert!(c.source.contains(p), "{p} missing in {}", c.source);
    }
    std::fs::write(dir.path().join("m.csv"), CIRCLES).unwrap();
    let r = run_in(
        dir.path(),
        &[
            "check", "m.csv", "--limit", "mk.toml", "--d0", "2.5", "--out", "out",
        ],
    )
    .ok();
    let json = read_json(&dir.path().join("out/summary.json"));
    assert_eq!(json["limit"]["strain"], "true", "{r}");
    assert_eq!(json["points"], 3);
}

// `compare` at the plane-strain point: Keeler-Brazier 32.96 % against Hill/Swift n = 0.2,
// whose ε1 = 0.2 true is e^0.2 − 1 = 22.14 % engineering (calc): difference −10.82.
#[test]
fn compare_prints_both_curves_and_the_difference() {
    let dir = TempDir::new().unwrap();
    run_in(
        dir.path(),
        &[
            "limit",
            "keeler-brazier",
            "--n",
            "0.2",
            "--thickness",
            "0.8",
            "--out",
            "a.toml",
        ],
    )
    .ok();
    run_in(
        dir.path(),
        &["limit", "necking", "--n", "0.2", "--out", "b.toml"],
    )
    .ok();
    let r = run_in(
        dir.path(),
        &[
            "limit",
            "compare",
            "a.toml",
            "b.toml",
            "--at",
            "-40,-20,0,20",
        ],
    )
    .ok();
    let row = r
        .stdout
        .lines()
        .find(|l| l.trim_start().starts_with("0.00"))
        .unwrap_or_else(|| panic!("{r}"));
    let cells: Vec<&str> = row.split_whitespace().collect();
    assert_eq!(cells, ["0.00", "32.96", "22.14", "-10.82"], "{r}");
    let left = r
        .stdout
        .lines()
        .find(|l| l.trim_start().starts_with("-40.00"))
        .unwrap();
    assert!(
        left.contains('-') && left.split_whitespace().nth(2) == Some("-"),
        "{left}"
    );
    assert!(r.stdout.contains("Caution"));
}

#[test]
fn bad_inputs_exit_2_with_a_clear_message() {
    let dir = TempDir::new().unwrap();
    let r = run_in(
        dir.path(),
        &[
            "limit", "mk", "--n", "0.2", "--r0", "1", "--r45", "1", "--r90", "1", "--f0", "1.2",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr.contains("f0 = 1.2") && r.stderr.contains("0.9 ..= 0.9999"),
        "{r}"
    );
    let r = run_in(
        dir.path(),
        &["limit", "compare", "missing.toml", "also.toml"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("missing.toml"), "{r}");
    let r = run_in(dir.path(), &["limit", "necking", "--n", "0.9"]);
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("0.01 <= n <= 0.6"), "{r}");
    let r = run_in(
        dir.path(),
        &["limit", "necking", "--n", "0.2", "--right", "vertex"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("storen-rice"), "{r}");
    assert!(!dir.path().join("mk.toml").exists());
}
