//! The report in a real browser: `check` writes report.html, headless Chromium prints it to PDF
//! (Letter and A4) and takes a screenshot. Asserts: the expected number of pages, "page N of M"
//! and the running header on every printed page, the sign-off block on page 1 (the PDF's text,
//! read by `pdftotext`), a screenshot that is not blank, and no request from the page other
//! than the report file itself.
//!
//! Skipped with a message when `chromium` is not installed and `CI` is unset; in CI its absence
//! fails (`.ci/run` installs Debian's `chromium`).

mod common;
use common::browser::{chromium, page_requests, pdf_pages, run_chromium};
use common::{neckline, repo};
use std::path::{Path, PathBuf};

/// Width and height of the first page's MediaBox, points.
fn media_box(pdf: &[u8]) -> (f64, f64) {
    let text = String::from_utf8_lossy(pdf);
    let at = text.find("/MediaBox [").expect("MediaBox");
    let nums: Vec<f64> = text[at + 11..]
        .split(']')
        .next()
        .unwrap()
        .split_whitespace()
        .map(|n| n.parse().unwrap())
        .collect();
    (nums[2] - nums[0], nums[3] - nums[1])
}

/// The text of each page of a PDF, by `pdftotext` (poppler-utils; pages end with a form feed).
fn pdf_text_pages(pdf: &Path) -> Vec<String> {
    let out = std::process::Command::new("pdftotext")
        .args(["-layout"])
        .arg(pdf)
        .arg("-")
        .output()
        .expect("pdftotext is installed with chromium (apt-get install poppler-utils)");
    assert!(out.status.success());
    let text = String::from_utf8_lossy(&out.stdout).into_owned();
    let mut pages: Vec<String> = text.split('\u{c}').map(str::to_string).collect();
    if pages.last().is_some_and(|p| p.trim().is_empty()) {
        pages.pop();
    }
    pages
}

fn check(dir: &Path, csv: &Path, extra: &[&str]) -> PathBuf {
    let out = dir.join("out");
    let mut args = vec![
        "check".to_string(),
        csv.display().to_string(),
        "--out".to_string(),
        out.display().to_string(),
        "--format".to_string(),
        "html".to_string(),
    ];
    args.extend(extra.iter().map(|a| a.to_string()));
    let r = neckline(&args).run_in(dir);
    assert_eq!(r.code, 0, "{r}");
    out.join("report.html")
}

#[test]
fn report_prints_on_letter_and_a4_and_loads_nothing_else() {
    let Some(chromium) = chromium("report_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    // Four located points: every section fits on one page (the all-locations table follows the
    // worst locations on theirs), so 6 sections give 6 pages.
    let report = check(
        dir.path(),
        &repo("tests/data/good.csv"),
        &[
            "--limit",
            repo("tests/data/flat-30.toml").to_str().unwrap(),
            "--d0",
            "2.5",
        ],
    );
    let html = std::fs::read_to_string(&report).unwrap();
    for bad in [
        "http://", "https://", "src=", "href=", "@import", "url(", "<script", "<link",
    ] {
        assert!(!html.contains(bad), "report.html contains `{bad}`");
    }
    let sections = html.matches("<section class=\"page\"").count();
    assert_eq!(sections, 6);

    // Letter: Chromium's default paper when the page does not set one.
    let letter = dir.path().join("letter.pdf");
    let log = run_chromium(
        &chromium,
        &report,
        &[
            "--no-pdf-header-footer".into(),
            format!("--print-to-pdf={}", letter.display()),
        ],
    );
    assert_eq!(page_requests(&log, &report), Vec::<String>::new());
    let pdf = std::fs::read(&letter).unwrap();
    let (w, h) = media_box(&pdf);
    assert!(
        (w - 612.0).abs() < 1.0 && (h - 792.0).abs() < 1.0,
        "Letter is 612 x 792 pt: {w} x {h}"
    );
    assert_eq!(pdf_pages(&pdf), sections, "one page per section on Letter");
    let pages = pdf_text_pages(&letter);
    assert_eq!(pages.len(), sections);
    for (k, text) in pages.iter().enumerate() {
        let number = format!("page {} of {}", k + 1, sections);
        assert!(
            text.contains(&number),
            "page {}: no `{number}`:\n{text}",
            k + 1
        );
        assert!(
            text.contains("Forming-limit check") && text.contains("revision"),
            "page {}: no running header:\n{text}",
            k + 1
        );
    }
    for words in [
        "Sign-off",
        "Prepared",
        "Checked",
        "Approved",
        "Signature",
        "Verdict: FAIL",
    ] {
        assert!(
            pages[0].contains(words),
            "page 1 lacks `{words}`:\n{}",
            pages[0]
        );
    }

    // A4: the same report with the paper size set, as a printer set to A4 would use.
    let a4_html = dir.path().join("out/report-a4.html");
    std::fs::write(
        &a4_html,
        html.replace("</style>", "@page { size: A4; }\n</style>"),
    )
    .unwrap();
    let a4 = dir.path().join("a4.pdf");
    run_chromium(
        &chromium,
        &a4_html,
        &[
            "--no-pdf-header-footer".into(),
            format!("--print-to-pdf={}", a4.display()),
        ],
    );
    let pdf = std::fs::read(&a4).unwrap();
    let (w, h) = media_box(&pdf);
    // ISO 216: A4 is 210 x 297 mm = 595.3 x 841.9 pt.
    assert!(
        (w - 595.3).abs() < 1.0 && (h - 841.9).abs() < 1.0,
        "A4: {w} x {h}"
    );
    assert_eq!(pdf_pages(&pdf), sections, "one page per section on A4");
}

#[test]
fn demo_report_screenshot_is_not_blank() {
    let Some(chromium) = chromium("report_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let report = check(
        dir.path(),
        &repo("demo-parts/rear-floor-pan/tryout-1.csv"),
        &[
            "--job",
            repo("demo-parts/rear-floor-pan/job-t1.toml")
                .to_str()
                .unwrap(),
        ],
    );
    let shot = dir.path().join("shot.png");
    let log = run_chromium(
        &chromium,
        &report,
        &[
            format!("--screenshot={}", shot.display()),
            "--window-size=1200,1600".into(),
        ],
    );
    assert_eq!(page_requests(&log, &report), Vec::<String>::new());
    let img = image::open(&shot).unwrap().to_rgb8();
    assert_eq!((img.width(), img.height()), (1200, 1600));
    let mut colours: Vec<[u8; 3]> = img.pixels().map(|p| p.0).collect();
    colours.sort_unstable();
    colours.dedup();
    assert!(
        colours.len() > 200,
        "only {} distinct colours: blank page?",
        colours.len()
    );
    let dark = img.pixels().filter(|p| p.0.iter().all(|&c| c < 80)).count();
    assert!(dark > 5_000, "only {dark} dark (text) pixels");
}

#[test]
fn request_check_catches_a_page_that_loads_things() {
    // Control: the detector must see both a local file and a network request made by a page.
    let Some(chromium) = chromium("report_browser") else {
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let page = dir.path().join("control.html");
    std::fs::write(
        &page,
        "<html><body><img src=\"missing.png\"><img src=\"https://example.invalid/x.png\">x</body></html>",
    )
    .unwrap();
    let log = run_chromium(
        &chromium,
        &page,
        &[
            format!("--screenshot={}", dir.path().join("c.png").display()),
            "--window-size=300,200".into(),
        ],
    );
    let got = page_requests(&log, &page);
    assert!(got.iter().any(|u| u.ends_with("/missing.png")), "{got:?}");
    assert!(got.iter().any(|u| u.contains("example.invalid")), "{got:?}");
}
