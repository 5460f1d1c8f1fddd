//! Size and opening time of review.html at 1 000, 100 000 and 1 000 000 locations: an invented
//! full-field file is checked (`--format review`), the page's size is measured, and headless
//! Chromium opens it; the page writes the milliseconds from navigation start to its first
//! complete drawing (every view drawn, the hook ready) as `data-ready-ms`, read back from the
//! dumped DOM. Chromium's own start is timed apart (wall time of the whole run).
//!
//! Run: `cargo bench --bench review [-- ROWS...]` (default 1000 100000 1000000), or with
//! `NECKLINE_BIN=target/debug/neckline` to use another build (the page is the same).
//! Targets: at most 5 MB and interactive within 2 s at 1 000 000 locations.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

/// An invented full-field file: `rows` locations on a 0.5 mm grid, strains spread over the
/// diagram (some past the curve, some in the band, most safe).
fn synthetic(path: &Path, rows: usize) {
    use std::io::Write;
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "id,major,minor,d0,x,y").unwrap();
    let mut state = 2207u64;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    let side = (rows as f64).sqrt().ceil() as usize;
    for i in 0..rows {
        let (u, v) = ((i % side) as f64, (i / side) as f64);
        // A hot spot in one corner of the panel: strains rise towards it.
        let heat = 1.0 - ((u / side as f64).powi(2) + (v / side as f64).powi(2)).sqrt() / 1.5;
        let major = 2.5 + 40.0 * heat * (0.6 + 0.4 * next());
        let minor = ((next() - 0.5) * 0.8 * major).min(major);
        let (a, b) = (2.5 * (1.0 + major / 100.0), 2.5 * (1.0 + minor / 100.0));
        writeln!(f, "P{i},{a:.4},{b:.4},2.5,{:.1},{:.1}", u * 0.5, v * 0.5).unwrap();
    }
}

/// Open `page` in headless Chromium: (the page's own milliseconds to interactive, wall time of
/// the Chromium run in seconds).
fn open(chromium: &Path, page: &Path) -> (f64, f64) {
    let profile = tempfile::tempdir().unwrap();
    let t = Instant::now();
    let out = Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--window-size=1400,1000",
            "--dump-dom",
        ])
        .arg(format!("--user-data-dir={}", profile.path().display()))
        .arg(format!("file://{}", page.display()))
        .output()
        .unwrap();
    let wall = t.elapsed().as_secs_f64();
    let dom = String::from_utf8_lossy(&out.stdout);
    let ms = dom
        .split("data-ready-ms=\"")
        .nth(1)
        .and_then(|s| s.split('"').next())
        .and_then(|s| s.parse().ok())
        .expect("the page did not finish drawing");
    (ms, wall)
}

fn main() {
    let sizes: Vec<usize> = std::env::args()
        .skip(1)
        .filter_map(|a| a.parse().ok())
        .collect();
    let sizes = if sizes.is_empty() {
        vec![1_000, 100_000, 1_000_000]
    } else {
        sizes
    };
    let exe = std::env::var_os("NECKLINE_BIN")
        .map(PathBuf::from)
        .unwrap_or_else(|| PathBuf::from(env!("CARGO_BIN_EXE_neckline")));
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let limit = root.join("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let chromium = PathBuf::from("/usr/bin/chromium");
    println!("locations   review.html   to interactive (page)   chromium run (wall)");
    for n in sizes {
        let dir = tempfile::tempdir().unwrap();
        let input = dir.path().join("field.csv");
        synthetic(&input, n);
        let out = dir.path().join("out");
        let status = Command::new(&exe)
            .arg("check")
            .arg(&input)
            .arg("--limit")
            .arg(&limit)
            .arg("--out")
            .arg(&out)
            .args(["--format", "review"])
            .status()
            .unwrap();
        assert!(status.code().is_some_and(|c| c <= 1), "check failed");
        let page = out.join("review.html");
        let bytes = std::fs::metadata(&page).unwrap().len();
        let (ms, wall) = if chromium.is_file() {
            // The second opening: the first warms Chromium's own files.
            open(&chromium, &page);
            open(&chromium, &page)
        } else {
            (f64::NAN, f64::NAN)
        };
        println!(
            "{n:>9}   {:>8.2} MB   {:>10.0} ms            {wall:>6.2} s",
            bytes as f64 / 1e6,
            ms
        );
        if n >= 1_000_000 {
            assert!(
                bytes <= 5_000_000,
                "review.html is {bytes} bytes at {n} locations"
            );
        }
    }
}
