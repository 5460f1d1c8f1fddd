//! Headless Chromium for the tests of the printable pages: finding it (skipped outside CI when
//! absent), running it with its log, the requests a page made, the pages of a PDF.

use std::path::{Path, PathBuf};

/// `chromium` on PATH, or `None` (after the skip message) outside CI.
pub fn chromium(test: &str) -> Option<PathBuf> {
    let found = std::env::var_os("PATH").and_then(|paths| {
        std::env::split_paths(&paths)
            .map(|d| d.join("chromium"))
            .find(|p| p.is_file())
    });
    match found {
        Some(p) => Some(p),
        None if std::env::var_os("CI").is_some() => {
            panic!("CI is set but `chromium` is not on PATH: install it (apt-get install chromium)")
        }
        None => {
            eprintln!(
                "SKIPPED {test}: `chromium` is not installed (apt-get install chromium); \
                 in CI this test fails instead"
            );
            None
        }
    }
}

/// Run headless Chromium on `page` with `action` flags and verbose logging; returns its log.
pub fn run_chromium(chromium: &Path, page: &Path, action: &[String]) -> String {
    chromium_output(chromium, page, action).1
}

/// Run headless Chromium on `page` with `action` flags and verbose logging; returns what it
/// wrote to standard output (e.g. `--dump-dom`) and its log.
pub fn chromium_output(chromium: &Path, page: &Path, action: &[String]) -> (String, String) {
    let profile = tempfile::tempdir().unwrap();
    let out = std::process::Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--enable-logging=stderr",
            "--v=1",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .args(action)
        .arg(format!("file://{}", page.display()))
        .output()
        .unwrap();
    let log = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(
        out.status.success(),
        "chromium failed: {}\n{log}",
        out.status
    );
    (String::from_utf8_lossy(&out.stdout).into_owned(), log)
}

/// URLs the page asked for: every file loaded other than the page itself, and every network
/// request to a host that the page's own text names. Without scripts a page can only request
/// what its text names; Chromium's own background calls (updates, clock, accounts), which it
/// makes with any page, even a blank one, go to hosts the page never mentions.
pub fn page_requests(log: &str, page: &Path) -> Vec<String> {
    let own = format!("file://{}", page.display());
    let text = std::fs::read_to_string(page).unwrap_or_default();
    let url_after = |line: &str, key: &str| {
        line.split_once(key)
            .map(|(_, rest)| rest.split_whitespace().next().unwrap_or("").to_string())
    };
    let named_by_page = |u: &str| {
        let host = u
            .split("://")
            .nth(1)
            .unwrap_or("")
            .split(['/', '?', ':'])
            .next()
            .unwrap_or("");
        !host.is_empty() && text.contains(host)
    };
    log.lines()
        .filter_map(|l| {
            url_after(l, "FileURLLoader::Start:")
                .filter(|u| *u != own)
                .or_else(|| url_after(l, "NotifyBeforeURLRequest:").filter(|u| named_by_page(u)))
        })
        .collect()
}

/// Number of page objects in a PDF: `/Type /Page` not followed by `s` (which is `/Pages`).
pub fn pdf_pages(pdf: &[u8]) -> usize {
    let key = b"/Type /Page";
    pdf.windows(key.len() + 1)
        .filter(|w| &w[..key.len()] == key && w[key.len()] != b's')
        .count()
}
