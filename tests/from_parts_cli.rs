//! `neckline limit from-parts`: the real binary, run in a fresh temporary directory. On failure
//! each test prints the directory, the exit status, stdout and stderr.

mod common;
use common::{repo_arg, run_in};
use neckline_core::limit::LimitCurve;
use neckline_core::strain::{StrainMeasure, TrueStrain};
use std::path::Path;
use tempfile::TempDir;

/// The generating curve of the synthetic parts, true strain: Hill's localized neck
/// ε1 = n − ε2 on the left (Hill 1952, J. Mech. Phys. Solids 1) with n = 0.25, and a straight
/// rise of slope 0.5 on the right (an invented shape, for the test only).
fn truth(minor: f64) -> f64 {
    if minor < 0.0 {
        0.25 - minor
    } else {
        0.25 + 0.5 * minor
    }
}

/// Invented circles (d0 = 2.5 mm, axes d0·exp(ε)) every 1 % of true minor strain from −20 % to
/// +15 %: safe ones 3 and 1.5 points below the curve, a necked one 1.5 above, a split one 4
/// above; every fifth position also has a circle read but not marked.
fn parts_csv() -> String {
    let mut s = String::from("# invented test circles\nid,major,minor,condition\n");
    for k in -20..=15 {
        let e2 = k as f64 / 100.0;
        for (tag, off, c) in [
            ("a", -0.03, "safe"),
            ("b", -0.015, "Safe"),
            ("c", 0.015, "necked"),
            ("d", 0.04, "SPLIT"),
        ] {
            let e1 = truth(e2) + off;
            s.push_str(&format!(
                "{k}{tag},{:.5},{:.5},{c}\n",
                2.5 * e1.exp(),
                2.5 * e2.exp()
            ));
        }
        if k % 5 == 0 {
            s.push_str(&format!("{k}u,3.0,2.5,\n"));
        }
    }
    s
}

fn setup() -> TempDir {
    let dir = TempDir::new().unwrap();
    std::fs::write(dir.path().join("parts.csv"), parts_csv()).unwrap();
    dir
}

/// SHA-256 of a file by coreutils' `sha256sum`, a tool independent of this program.
fn sha256sum(path: &Path) -> Option<String> {
    let out = std::process::Command::new("sha256sum")
        .arg(path)
        .output()
        .ok()?;
    let text = String::from_utf8(out.stdout).ok()?;
    Some(text.split_whitespace().next()?.to_string())
}

// The derived curve reads back through the curve parser `check` uses, states true strain, and
// its source records the data file with the SHA-256 that coreutils' sha256sum gives for it, the
// counts per condition, the method and its settings, the version and the stated words. Where
// the circles bracket it, the written curve is at or below the generating curve and within 4 points (the circles sit
// 1.5 points either side of it, so the boundary is known to ±1.5 points; the middle of the gap
// is what a separating fit should find).
#[test]
fn derived_curve_reads_back_and_records_the_input_hash() {
    let dir = setup();
    let r = run_in(
        dir.path(),
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
    .ok();
    let c = LimitCurve::load(&dir.path().join("shop.toml")).unwrap();
    assert_eq!(c.measure, StrainMeasure::True);
    let hash = sha256sum(&dir.path().join("parts.csv"));
    if let Some(h) = &hash {
        assert_eq!(h.len(), 64);
        assert!(
            c.source.contains(&format!("parts.csv (SHA-256 {h})")),
            "{}",
            c.source
        );
    } else {
        eprintln!("sha256sum not found: hash checked against the library only");
    }
    let own =
        neckline_core::digest::sha256_hex(&std::fs::read(dir.path().join("parts.csv")).unwrap());
    assert!(c.source.contains(&own));
    for part in [
        "press-shop curve from parts: holds for this material lot, thickness and process; not a \
         laboratory curve (ISO 12004-2)",
        "circles: 72 safe, 36 necked, 36 split (8 rows without a condition, 0 rows rejected)",
        "class-balanced penalised logistic likelihood",
        "5 % necking-probability line less 1.645 standard errors",
        "smoothness lambda = 0.1",
        "multiples of 5 %",
        env!("CARGO_PKG_VERSION"),
    ] {
        assert!(c.source.contains(part), "missing `{part}` in {}", c.source);
    }
    for k in -19..=14 {
        let x = k as f64 / 100.0;
        let own = c.measure.from_true(TrueStrain(x));
        let y = c.major_at(own).unwrap();
        // The written curve is a lower bound: at or below the generating curve (the circles
        // bracket it at ±1.5 points), by less than 4 points (5 % line and allowance).
        assert!(
            y <= truth(x) + 0.001 && y > truth(x) - 0.04,
            "at {k} %: {:.2} vs {:.2}\n{r}",
            100.0 * y,
            100.0 * truth(x),
        );
    }
    assert!(r
        .stdout
        .contains("Circles on the wrong side of the 50 % line: 0 of 144"));
    assert!(r
        .stdout
        .contains("Caution: neckline is an aid to judgement"));
}

// SHA-256 of "abc" is the first example of FIPS 180-2, appendix B.1.
#[test]
fn sha256_of_the_standard_example() {
    assert_eq!(
        neckline_core::digest::sha256_hex(b"abc"),
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
    );
}

// Too little evidence is refused with a message saying what is missing, and nothing is written.
#[test]
fn too_little_evidence_is_refused_and_nothing_is_written() {
    let dir = TempDir::new().unwrap();
    let few: String = parts_csv()
        .lines()
        .filter(|l| !l.contains("necked") && !l.contains("SPLIT") || l.starts_with("-20"))
        .map(|l| format!("{l}\n"))
        .collect();
    std::fs::write(dir.path().join("few.csv"), few).unwrap();
    let r = run_in(
        dir.path(),
        &[
            "limit",
            "from-parts",
            "few.csv",
            "--d0",
            "2.5",
            "--out",
            "c.toml",
            "--plot",
            "c.svg",
        ],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(
        r.stderr
            .contains("few.csv: too little evidence for a press-shop curve")
            && r.stderr
                .contains("2 necked-or-split circles (at least 10 needed)")
            && r.stderr.contains("on only 1 range of minor strain"),
        "{r}"
    );
    assert!(!dir.path().join("c.toml").exists() && !dir.path().join("c.svg").exists());
}

// Wrong arguments: no condition column, a plot that is neither SVG nor PNG, the output over
// the input. Each is refused with exit 2 and a message naming the problem.
#[test]
fn wrong_arguments_are_refused() {
    let dir = setup();
    std::fs::write(dir.path().join("plain.csv"), "id,major,minor\nA,3,2.5\n").unwrap();
    let cases: [(&[&str], &str); 4] = [
        (
            &["limit", "from-parts", "plain.csv", "--d0", "2.5"],
            "plain.csv: none of its 1 circles has a condition",
        ),
        (
            &[
                "limit",
                "from-parts",
                "parts.csv",
                "--d0",
                "2.5",
                "--plot",
                "p.pdf",
            ],
            "--plot p.pdf: the file name must end in .svg or .png",
        ),
        (
            &[
                "limit",
                "from-parts",
                "parts.csv",
                "--d0",
                "2.5",
                "--out",
                "parts.csv",
            ],
            "refusing to write parts.csv",
        ),
        (
            &["limit", "from-parts", "parts.csv"],
            "no initial circle diameter",
        ),
    ];
    for (args, expected) in cases {
        let r = run_in(dir.path(), args);
        assert_eq!(r.code, 2, "{args:?}\n{r}");
        assert!(r.stderr.contains(expected), "{args:?}\n{r}");
    }
    assert_eq!(
        std::fs::read_to_string(dir.path().join("parts.csv")).unwrap(),
        parts_csv()
    );
}

// The plot shows the circles by condition with their counts, the fitted curve and the overlap
// band, and carries the caution; the PNG decodes at the size of the other diagrams.
#[test]
fn plot_shows_circles_by_condition_curve_and_band() {
    let dir = setup();
    run_in(
        dir.path(),
        &[
            "limit",
            "from-parts",
            "parts.csv",
            "--d0",
            "2.5",
            "--out",
            "c.toml",
            "--plot",
            "c.svg",
        ],
    )
    .ok();
    let svg = std::fs::read_to_string(dir.path().join("c.svg")).unwrap();
    for text in [
        "Circles (condition)",
        "curve written (lower bound)",
        "50 % line",
        "overlap: safe and necked mix",
        "gap: they do not mix",
        "minor strain ε2, true %",
        "Caution: neckline is an aid to judgement.",
    ] {
        assert!(svg.contains(text), "missing `{text}`");
    }
    for n in ["72", "36"] {
        assert!(
            svg.contains(&format!(">\n{n}\n<")),
            "legend lacks count {n}"
        );
    }
    run_in(
        dir.path(),
        &[
            "limit",
            "from-parts",
            "parts.csv",
            "--d0",
            "2.5",
            "--out",
            "c.toml",
            "--plot",
            "c.png",
        ],
    )
    .ok();
    let img = image::open(dir.path().join("c.png")).unwrap();
    assert_eq!((img.width(), img.height()), (1200, 860));
}

// The demo: the curve derived from the invented parts judges the invented tryout through
// `check`; the corners that split are failed against it, as against the model curve.
#[test]
fn demo_curve_judges_the_demo_tryout() {
    let dir = TempDir::new().unwrap();
    let shop = dir.path().join("shop.toml");
    let out = dir.path().join("t1");
    let demo = repo_arg;
    run_in(
        dir.path(),
        &[
            "limit",
            "from-parts",
            &demo("demo-parts/rear-floor-pan-shop-curve/parts.csv"),
            "--job",
            &demo("demo-parts/rear-floor-pan/job-t1.toml"),
            "--out",
            &shop.display().to_string(),
        ],
    )
    .ok();
    let c = LimitCurve::load(&shop).unwrap();
    assert_eq!(c.thickness_mm, Some(0.8));
    assert!(c.material.as_deref().unwrap_or("").contains("K-4417"));
    run_in(
        dir.path(),
        &[
            "check",
            &demo("demo-parts/rear-floor-pan/tryout-1.csv"),
            "--job",
            &demo("demo-parts/rear-floor-pan/job-t1.toml"),
            "--limit",
            &shop.display().to_string(),
            "--out",
            &out.display().to_string(),
        ],
    )
    .ok();
    let summary = std::fs::read_to_string(out.join("summary.json")).unwrap();
    assert!(summary.contains("\"verdict\": \"fail\""), "{summary}");
}
