//! The review page in a real browser: `compare` writes compare.html from the demo's two
//! tryouts, headless Chromium prints it to PDF and takes a screenshot. Asserts: no request from
//! the page other than the page itself, one printed page per section, a screenshot that is not
//! blank, and the newly at-risk locations named in their section.
//!
//! Skipped with a message when `chromium` is not installed and `CI` is unset; in CI its absence
//! fails (`.ci/run` installs Debian's `chromium`).

mod common;
use common::browser::{chromium, page_requests, pdf_pages, run_chromium};
use common::{demo_tryout, read_json, run_in};
use std::path::{Path, PathBuf};

/// The demo's review pack, as the README makes it: returns compare.html.
fn demo_pack(dir: &Path) -> PathBuf {
    for t in [1, 2] {
        let [csv, job] = demo_tryout(t);
        let out = format!("out/t{t}");
        let r = run_in(
            dir,
            &[
                "check", &csv, "--job", &job, "--out", &out, "--format", "csv,json",
            ],
        );
        assert_eq!(r.code, 0, "{r}");
    }
    let r = run_in(
        dir,
        &[
            "compare",
            "out/t1/points.csv",
            "out/t2/points.csv",
            "--out",
            "out/review",
        ],
    );
    assert_eq!(r.code, 0, "{r}");
    dir.join("out/review/compare.html")
}

#[test]
fn review_page_is_self_contained_printable_and_names_the_newly_at_risk() {
    let Some(chromium) = chromium("compare_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let page = demo_pack(dir.path());
    let html = std::fs::read_to_string(&page).unwrap();
    for bad in [
        "http://", "https://", "src=", "href=", "@import", "url(", "<script", "<link",
    ] {
        assert!(!html.contains(bad), "compare.html contains `{bad}`");
    }
    // The newly failed or marginal locations of the demo (J02 and K04 went from safe to
    // marginal, by compare.json) are in the page's at-risk section.
    let json = read_json(&dir.path().join("out/review/compare.json"));
    let newly: Vec<&str> = json["newly_at_risk"]
        .as_array()
        .unwrap()
        .iter()
        .map(|e| e["id"].as_str().unwrap())
        .collect();
    assert_eq!(newly, ["J02", "K04"]);
    let at_risk = html
        .split("<section class=\"page\" id=\"at-risk\">")
        .nth(1)
        .and_then(|s| s.split("</section>").next())
        .expect("at-risk section");
    let newly_part = at_risk.split("<h3>Fixed").next().unwrap();
    for id in newly {
        assert!(
            newly_part.contains(&format!("<td>{id}</td>")),
            "{id} not listed"
        );
    }
    let sections = html.matches("<section class=\"page\"").count();

    let pdf_path = dir.path().join("page.pdf");
    let log = run_chromium(
        &chromium,
        &page,
        &[
            "--no-pdf-header-footer".into(),
            format!("--print-to-pdf={}", pdf_path.display()),
        ],
    );
    assert_eq!(page_requests(&log, &page), Vec::<String>::new());
    let pdf = std::fs::read(&pdf_path).unwrap();
    // One printed page per section, but the still-at-risk list (every failed or marginal
    // location of the later tryout) may take two.
    let printed = pdf_pages(&pdf);
    assert!(
        (sections..=sections + 1).contains(&printed),
        "{printed} pages for {sections} sections"
    );

    let shot = dir.path().join("shot.png");
    let log = run_chromium(
        &chromium,
        &page,
        &[
            format!("--screenshot={}", shot.display()),
            "--window-size=1200,1600".into(),
        ],
    );
    assert_eq!(page_requests(&log, &page), Vec::<String>::new());
    let img = image::open(&shot).unwrap().to_rgb8();
    let mut colours: Vec<[u8; 3]> = img.pixels().map(|p| p.0).collect();
    colours.sort_unstable();
    colours.dedup();
    assert!(
        colours.len() > 100,
        "only {} colours: blank page?",
        colours.len()
    );
    let dark = img.pixels().filter(|p| p.0.iter().all(|&c| c < 80)).count();
    assert!(dark > 5_000, "only {dark} dark (text) pixels");
}
