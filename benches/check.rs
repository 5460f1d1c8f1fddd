//! Throughput of the main data path (read CSV -> strains -> judgement -> points.csv) against a
//! baseline in the same run: the csv crate alone reading the same bytes into numbers.
//!
//! Run: `cargo bench --bench check` (optionally `-- 1000000` for the number of rows).
//! Target: the whole path within 4x the bare CSV parse, and at least 500 000 rows/s on one core.

use neckline::analysis::{analyse, Lengths};
use neckline::assess::Settings;
use neckline::job::Job;
use neckline::limit::LimitCurve;
use neckline::measure::read_measurements_from;
use neckline::output::points_csv::write_points;
use std::path::Path;
use std::time::{Duration, Instant};

fn synthetic(rows: usize) -> String {
    let mut s = String::with_capacity(rows * 40);
    s.push_str("id,major,minor,x,y\n");
    let mut state = 2207u64;
    let mut next = || {
        state = state
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    for i in 0..rows {
        let major = 2.5 * (1.0 + 0.5 * next());
        let minor = (2.5 * (0.8 + 0.4 * next())).min(major);
        s.push_str(&format!(
            "P{i},{major:.3},{minor:.3},{:.1},{:.1}\n",
            i % 1000,
            i / 1000
        ));
    }
    s
}

fn baseline(text: &str) -> f64 {
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let mut sum = 0.0;
    for rec in r.records() {
        let rec = rec.unwrap();
        let a: f64 = rec[1].parse().unwrap();
        let b: f64 = rec[2].parse().unwrap();
        sum += a - b;
    }
    sum
}

fn full_path(text: &str, curve: &LimitCurve) -> usize {
    let set = read_measurements_from(text.as_bytes(), Path::new("bench.csv")).unwrap();
    let lengths = Lengths {
        unit: Default::default(),
        d0: Some(2.5),
        t0: Some(0.8),
    };
    let a = analyse(
        set,
        Job::default(),
        lengths,
        curve.clone(),
        Settings::default(),
    );
    write_points(&a, &mut std::io::sink()).unwrap();
    a.points.len()
}

fn median_of(runs: usize, mut f: impl FnMut()) -> Duration {
    let mut t: Vec<Duration> = (0..runs)
        .map(|_| {
            let s = Instant::now();
            f();
            s.elapsed()
        })
        .collect();
    t.sort();
    t[runs / 2]
}

fn peak_rss_mib() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kib: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kib / 1024.0)
}

fn main() {
    let rows: usize = std::env::args()
        .skip(1)
        .find_map(|a| a.parse().ok())
        .unwrap_or(200_000);
    let text = synthetic(rows);
    let curve = LimitCurve::load(
        &Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("limits/steel-0.80mm-n0.20-keeler-brazier.toml"),
    )
    .unwrap();
    let base = median_of(9, || {
        std::hint::black_box(baseline(&text));
    });
    let full = median_of(9, || {
        std::hint::black_box(full_path(&text, &curve));
    });
    let rate = rows as f64 / full.as_secs_f64();
    println!(
        "rows: {rows} ({:.1} MiB of CSV)",
        text.len() as f64 / 1048576.0
    );
    println!(
        "baseline (csv parse only): {:>8.1} ms",
        base.as_secs_f64() * 1e3
    );
    println!(
        "check path (parse+judge+write): {:>8.1} ms  = {:.0} rows/s",
        full.as_secs_f64() * 1e3,
        rate
    );
    println!(
        "ratio check/baseline: {:.2}x",
        full.as_secs_f64() / base.as_secs_f64()
    );
    if let Some(m) = peak_rss_mib() {
        println!(
            "peak resident memory: {m:.0} MiB ({:.0} bytes/row incl. the input text)",
            m * 1048576.0 / rows as f64
        );
    }
}
