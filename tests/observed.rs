//! The condition observed on the part against the judgement, through the real binary: where a
//! circle the part showed necked or split is judged to pass, the curve is not conservative for
//! this part (the press-shop use of forming-limit diagrams, ISO 12004-1, from memory). The
//! circles are the invented demo set of demo-parts/rear-floor-pan-shop-curve.

mod common;
use common::{read_json, repo_arg, run_in};

fn curve(dir: &std::path::Path, name: &str, level: f64) -> String {
    let text = format!(
        "name = \"flat {level} (test)\"\nsource = \"test curve\"\nstrain = \"engineering\"\n\
         points = [[-40, {level}], [40, {level}]]\n"
    );
    let p = dir.join(name);
    std::fs::write(&p, text).unwrap();
    p.display().to_string()
}

#[test]
fn necked_circles_judged_safe_name_the_curve_not_conservative() {
    let dir = tempfile::tempdir().unwrap();
    let parts = repo_arg("demo-parts/rear-floor-pan-shop-curve/parts.csv");
    // Too high: at 80 % engineering major strain every circle of the demo passes.
    let high = curve(dir.path(), "high.toml", 80.0);
    let r = run_in(
        dir.path(),
        &[
            "check", &parts, "--limit", &high, "--d0", "2.5", "--out", "h", "--format", "json,svg",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let s = read_json(&dir.path().join("h/summary.json"));
    let ob = &s["observed"];
    let necked = ob["against_judged"]["necked"].as_object().unwrap();
    let split = ob["against_judged"]["split"].as_object().unwrap();
    let failing: u64 = necked
        .values()
        .chain(split.values())
        .map(|v| v.as_u64().unwrap())
        .sum();
    assert!(failing > 0);
    assert_eq!(ob["non_conservative"]["count"], failing, "{ob}");
    assert_eq!(ob["curve_conservative"], false);
    let text = r.stdout.split_whitespace().collect::<Vec<_>>().join(" ");
    assert!(
        text.contains("Warning: the limit curve is not conservative for this part"),
        "{r}"
    );
    let svg = std::fs::read_to_string(dir.path().join("h/fld.svg")).unwrap();
    assert!(svg.contains("observed necked or split"));
    // Too low: at 10 % (on a range of minor strain up to 10 %) every circle the curve covers is
    // failed, so none observed necked passes.
    let low = dir.path().join("low.toml");
    std::fs::write(
        &low,
        "name = \"flat 10 (test)\"\nsource = \"test curve\"\nstrain = \"engineering\"\n\
         points = [[-40, 10], [10, 10]]\n",
    )
    .unwrap();
    let low = low.display().to_string();
    let r = run_in(
        dir.path(),
        &[
            "check", &parts, "--limit", &low, "--d0", "2.5", "--out", "l", "--format", "json",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    let s = read_json(&dir.path().join("l/summary.json"));
    assert_eq!(s["observed"]["non_conservative"]["count"], 0);
    assert_eq!(s["observed"]["curve_conservative"], true);
    assert!(
        s["observed"]["conservative"].as_u64().unwrap() > 0,
        "safe circles judged failed"
    );
    assert!(!r.stdout.contains("not conservative for this part"), "{r}");
}
