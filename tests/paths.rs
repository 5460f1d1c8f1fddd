//! Multi-stage files through the real binary: the path criterion beside the strain curve.
//! Reference: the polar effective plastic strain criterion as published (Stoughton & Yoon
//! 2012, Int. J. Solids Struct. 49); the numbers follow from the curve file.

mod common;
use common::{read_json, read_rows, repo, repo_arg, run_in};

fn bracket() -> (String, String) {
    (
        repo_arg("demo-parts/tunnel-bracket-two-stage/bracket.csv"),
        repo_arg("demo-parts/tunnel-bracket-two-stage/job.toml"),
    )
}

#[test]
fn the_demo_corner_is_safe_on_the_strain_curve_and_failed_by_path() {
    let dir = tempfile::tempdir().unwrap();
    let (csv, job) = bracket();
    let r = run_in(dir.path(), &["check", &csv, "--job", &job, "--out", "o"]);
    assert_eq!(r.code, 0, "{r}");
    assert!(r.stdout.contains("hidden by the strain curve"), "{r}");
    let rows = read_rows(&dir.path().join("o/points.csv"));
    let a1 = rows.iter().find(|r| r["id"] == "A1").unwrap();
    assert_eq!(a1["stages"], "2");
    assert_eq!(a1["strain_zone"], "safe");
    assert_eq!(a1["peps_zone"], "failed");
    assert_eq!(a1["zone"], "failed");
    assert_eq!(a1["peps_angle_deg"], "90.00");
    // The worked example read through 0.01 mm axes: about 113 % (113.5 % unrounded).
    let used: f64 = a1["peps_use_pct"].parse().unwrap();
    assert!((used - 113.5).abs() < 1.5, "{used}");
    let margin: f64 = a1["margin_pct"].parse().unwrap();
    assert!(margin > 10.0, "safe on the strain curve: {margin}");
    let s = read_json(&dir.path().join("o/summary.json"));
    let hidden = &s["paths"]["hidden_by_strain_curve"];
    assert!(
        hidden["ids"].as_array().unwrap().iter().any(|v| v == "A1"),
        "{s}"
    );
    assert!(dir.path().join("o/peps.svg").is_file());
    assert!(dir.path().join("o/peps.png").is_file());
    let svg = std::fs::read_to_string(dir.path().join("o/peps.svg")).unwrap();
    assert!(svg.contains("Effective strain path diagram"));
    assert!(svg.contains("β = dε2/dε1 of the last strain increment"));
}

#[test]
fn the_job_files_stage_order_wins_and_an_unknown_stage_is_an_error() {
    let dir = tempfile::tempdir().unwrap();
    let (csv, job) = bracket();
    let lim = repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    // Without the job file's order, the file's order (restrike rows first) is taken: the path
    // then runs backwards and A1's last increment is no longer plane strain.
    let r = run_in(
        dir.path(),
        &[
            "check",
            &csv,
            "--limit",
            &lim,
            "--d0",
            "2.5",
            "--out",
            "file-order",
            "--format",
            "csv",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let r = run_in(
        dir.path(),
        &[
            "check",
            &csv,
            "--job",
            &job,
            "--out",
            "job-order",
            "--format",
            "csv",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let angle = |d: &str| {
        let rows = read_rows(&dir.path().join(d).join("points.csv"));
        rows.iter().find(|r| r["id"] == "A1").unwrap()["peps_angle_deg"].clone()
    };
    assert_eq!(angle("job-order"), "90.00");
    assert_ne!(angle("file-order"), "90.00");
    // A stage the job file does not list.
    let text =
        std::fs::read_to_string(repo("demo-parts/tunnel-bracket-two-stage/job.toml")).unwrap();
    std::fs::write(
        dir.path().join("job.toml"),
        text.replace(
            "stages = [\"draw\", \"restrike\"]",
            "stages = [\"draw\", \"flange\"]",
        )
        .replace("../../limits/", &format!("{}/", repo("limits").display())),
    )
    .unwrap();
    let r = run_in(
        dir.path(),
        &["check", &csv, "--job", "job.toml", "--out", "x"],
    );
    assert_eq!(r.code, 2, "{r}");
    assert!(r.stderr.contains("bracket.csv:3:2 (column `stage`)"), "{r}");
    assert!(
        r.stderr
            .contains("stage `restrike` is not in the job file's stages"),
        "{r}"
    );
}

#[test]
fn one_stage_files_give_the_same_outputs_as_before() {
    let dir = tempfile::tempdir().unwrap();
    let t1 = repo("demo-parts/rear-floor-pan/tryout-1.csv");
    let text = std::fs::read_to_string(&t1).unwrap();
    // The same file without its stage column (all rows are `draw`).
    let without: String = text
        .lines()
        .map(|l| {
            if l.starts_with('#') {
                return format!("{l}\n");
            }
            let mut f: Vec<&str> = l.split(',').collect();
            f.remove(5);
            format!("{}\n", f.join(","))
        })
        .collect();
    std::fs::write(dir.path().join("nostage.csv"), without).unwrap();
    let job = repo_arg("demo-parts/rear-floor-pan/job-t1.toml");
    let t1 = t1.display().to_string();
    for (f, out) in [(t1.as_str(), "a"), ("nostage.csv", "b")] {
        let r = run_in(
            dir.path(),
            &[
                "check", f, "--job", &job, "--out", out, "--format", "csv,json",
            ],
        );
        assert_eq!(r.code, 0, "{r}");
        assert!(!r.stdout.contains("Path criterion"), "{r}");
    }
    let (a, b) = (
        read_rows(&dir.path().join("a/points.csv")),
        read_rows(&dir.path().join("b/points.csv")),
    );
    assert!(!a[0].contains_key("peps_use_pct"));
    assert_eq!(a.len(), b.len());
    for (p, q) in a.iter().zip(&b) {
        let mut p = p.clone();
        p.insert("stage".into(), String::new());
        assert_eq!(&p, q);
    }
}
