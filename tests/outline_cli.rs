//! The part's outline on the map through the real binary: a job's `outline` file is drawn and
//! named in the legend, a job without one gets the outline traced from the points, and a bad
//! outline file stops the run with its file, line and column before anything is written.

mod common;
use common::{neckline, repo_arg};

/// A job for the demo's hand-read tryout (points over 0..620 × 0..420 mm) with `extra` keys.
fn job(extra: &str) -> String {
    format!(
        "part = \"outline test (invented)\"\nlimit = \"{}\"\nunit = \"mm\"\nd0 = 2.5\nt0 = 0.8\n{extra}",
        repo_arg("limits/steel-0.80mm-n0.20-keeler-brazier.toml").replace('\\', "/")
    )
}

/// The trim line round the tryout's points and one hole, as two rings.
const EDGE: &str = "ring,x,y\ntrim,-10,-10\ntrim,630,-10\ntrim,630,430\ntrim,-10,430\n\
hole,300,200\nhole,330,200\nhole,315,225\n";

/// The ink of the part's outline (`chart::PART_EDGE`).
const EDGE_INK: &str = "stroke=\"#445566\"";

fn check(files: &[(&str, &str)]) -> common::Run {
    neckline(&[
        "check",
        &repo_arg("demo-parts/rear-floor-pan/tryout-1.csv"),
        "--job",
        "job.toml",
        "--format",
        "svg,json",
        "--out",
        "out",
    ])
    .files(files)
    .run()
}

#[test]
fn the_jobs_outline_file_is_drawn_and_named() {
    let r = check(&[
        ("job.toml", &job("outline = \"edge.csv\"\n")),
        ("edge.csv", EDGE),
    ])
    .ok();
    let svg = r.read("out/map.svg");
    assert!(svg.contains("outline: edge.csv"), "{r}");
    // Both rings, and the legend's sample of the line.
    let lines = svg
        .split('<')
        .filter(|e| e.starts_with("polyline") && e.contains(EDGE_INK))
        .count();
    assert!(lines >= 3, "{lines} outline lines\n{r}");
    // The file is an input of the run, with its digest.
    let json = r.read("out/summary.json");
    assert!(json.contains("\"role\": \"outline\""), "{json}");
}

#[test]
fn without_an_outline_file_the_outline_is_traced() {
    let r = check(&[("job.toml", &job(""))]).ok();
    let svg = r.read("out/map.svg");
    assert!(svg.contains("outline: traced from the points"), "{r}");
    assert!(svg
        .split('<')
        .any(|e| e.starts_with("polyline") && e.contains(EDGE_INK)));
}

#[test]
fn a_bad_outline_file_names_file_line_and_column() {
    for (text, place, what) in [
        ("x,y\n0,0\n600,zero\n600,400\n", "edge.csv:3:2", "number"),
        (
            "ring,x,y\na,0,0\na,600,0\na,600,400\nb,1,1\nb,2,1\nb,2,2\na,0,400\n",
            "edge.csv:8:1",
            "ring `a`",
        ),
        ("x,y\n0,0\n600,0\n", "edge.csv:2", "at least 3"),
    ] {
        let r = check(&[
            ("job.toml", &job("outline = \"edge.csv\"\n")),
            ("edge.csv", text),
        ])
        .expect(2);
        assert!(
            r.stderr.contains(place) && r.stderr.contains(what),
            "expected {place} and {what}\n{r}"
        );
        assert!(!r.path("out").exists(), "an output was written\n{r}");
    }
    let r = check(&[("job.toml", &job("outline = \"missing.csv\"\n"))]).expect(2);
    assert!(r.stderr.contains("missing.csv"), "{r}");
}
