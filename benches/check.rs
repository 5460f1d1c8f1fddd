//! Throughput and memory of `neckline check` on a full-field-size file, against baselines in the
//! same run: a bare CSV parse of the same bytes (the csv crate, one core) and a polars script
//! doing the same job (benches/polars_check.py: parse, every strain column, curve look-up,
//! margin, limit use, zone, CSV out).
//!
//! Run: `cargo bench --bench check [-- ROWS [full]]` (default 1 000 000 rows; `full` also times
//! the default outputs: diagram, map and report). Needs `pip install polars` for the polars
//! baseline (skipped with a note otherwise).
//! Targets: >= 1 000 000 rows/s end to end, >= 2x polars, < 100 MB peak.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

/// An invented full-field file: `rows` rows of axes on a 2.5 mm grid, spread over the diagram.
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
    for i in 0..rows {
        let major = 2.5 * (1.0 + 0.5 * next());
        let minor = (2.5 * (0.8 + 0.4 * next())).min(major);
        writeln!(
            f,
            "P{i},{major:.3},{minor:.3},2.5,{:.1},{:.1}",
            (i % 1000) as f64 * 0.5,
            (i / 1000) as f64 * 0.5
        )
        .unwrap();
    }
}

/// Wall time and peak resident memory (MiB) of a child process.
// The child is reaped by `wait4`, which also gives its peak memory.
#[allow(clippy::zombie_processes)]
fn run(cmd: &mut Command) -> (Duration, f64, bool) {
    let t = Instant::now();
    let child = cmd
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::inherit())
        .spawn()
        .expect("spawn");
    let pid = child.id() as libc::pid_t;
    let mut status = 0;
    let mut usage: libc::rusage = unsafe { std::mem::zeroed() };
    // SAFETY: waits for our own child; `status` and `usage` are valid for writes.
    let r = unsafe { libc::wait4(pid, &mut status, 0, &mut usage) };
    let ok = r == pid && libc::WIFEXITED(status) && libc::WEXITSTATUS(status) == 0;
    (t.elapsed(), usage.ru_maxrss as f64 / 1024.0, ok)
}

fn bare_parse(path: &Path) -> (Duration, f64) {
    let t = Instant::now();
    let mut r = csv::Reader::from_path(path).unwrap();
    let mut sum = 0.0;
    let mut rec = csv::StringRecord::new();
    while r.read_record(&mut rec).unwrap() {
        let a: f64 = rec[1].parse().unwrap();
        let b: f64 = rec[2].parse().unwrap();
        sum += a - b;
    }
    (t.elapsed(), sum)
}

fn median(mut v: Vec<Duration>) -> Duration {
    v.sort();
    v[v.len() / 2]
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    let rows: usize = args
        .first()
        .and_then(|a| a.parse().ok())
        .unwrap_or(1_000_000);
    let full = args.iter().any(|a| a == "full");
    let dir = tempfile::tempdir().unwrap();
    let input = dir.path().join("field.csv");
    synthetic(&input, rows);
    let mb = std::fs::metadata(&input).unwrap().len() as f64 / 1e6;
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let limit = root.join("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let exe = env!("CARGO_BIN_EXE_neckline");
    println!(
        "{rows} rows, {mb:.1} MB, {} threads",
        std::thread::available_parallelism().map_or(1, |n| n.get())
    );

    let (parse, _) = bare_parse(&input);
    let rate = |d: Duration| rows as f64 / d.as_secs_f64();
    println!(
        "bare csv parse (1 core):     {:>7.3} s  {:>9.0} rows/s",
        parse.as_secs_f64(),
        rate(parse)
    );

    let core = |out: &str, format: &str| {
        let mut c = Command::new(exe);
        c.args(["check"]).arg(&input).arg("--limit").arg(&limit);
        c.args(["--out"])
            .arg(dir.path().join(out))
            .args(["--format", format]);
        c
    };
    let mut times = Vec::new();
    let mut peak: f64 = 0.0;
    for _ in 0..5 {
        let (t, m, ok) = run(&mut core("core", "csv,json"));
        assert!(ok, "check failed");
        times.push(t);
        peak = peak.max(m);
    }
    let ours = median(times);
    println!(
        "neckline check csv,json:     {:>7.3} s  {:>9.0} rows/s  {peak:>6.1} MiB peak  (median of 5)",
        ours.as_secs_f64(),
        rate(ours)
    );
    println!(
        "  ratio to the bare parse: {:.2}x the time",
        ours.as_secs_f64() / parse.as_secs_f64()
    );

    // The polars baseline, given the same curve: its own (engineering) points and the
    // true-strain polyline neckline searches for the limit use.
    let curve = neckline_core::limit::LimitCurve::load(&limit).unwrap();
    let own: String = curve
        .points
        .iter()
        .map(|p| format!("{},{}\n", p[0], p[1]))
        .collect();
    let tru: String = curve
        .true_polyline(16)
        .iter()
        .map(|p| format!("{},{}\n", p[0], p[1]))
        .collect();
    std::fs::write(dir.path().join("own.csv"), own).unwrap();
    std::fs::write(dir.path().join("true.csv"), tru).unwrap();
    let script = root.join("benches/polars_check.py");
    let polars = || {
        let mut c = Command::new("python3");
        c.arg(&script).arg(&input).arg(dir.path().join("own.csv"));
        c.arg(dir.path().join("true.csv"))
            .arg(dir.path().join("polars.csv"));
        run(&mut c)
    };
    let (_, _, ok) = polars();
    if ok {
        // Paired runs, alternating, so that a load from elsewhere on the machine falls on both
        // sides of each pair alike; the ratio of each pair is the figure, its median reported.
        let mut times = Vec::new();
        let mut ratios = Vec::new();
        let mut ppeak: f64 = 0.0;
        for _ in 0..5 {
            let (ours, _, ok) = run(&mut core("paired", "csv,json"));
            assert!(ok, "check failed");
            let (t, m, _) = polars();
            times.push(t);
            ratios.push(t.as_secs_f64() / ours.as_secs_f64());
            ppeak = ppeak.max(m);
        }
        let p = median(times);
        ratios.sort_by(f64::total_cmp);
        println!(
            "polars script, same job:     {:>7.3} s  {:>9.0} rows/s  {ppeak:>6.1} MiB peak  (median of 5)",
            p.as_secs_f64(),
            rate(p)
        );
        println!(
            "  neckline is {:.2}x as fast as polars (median of 5 paired runs, {:.2}-{:.2}; target >= 2x)",
            ratios[2], ratios[0], ratios[4]
        );
    } else {
        println!("polars script: not run (python3 with polars and numpy needed: pip install polars numpy)");
    }

    if full {
        let (t, m, ok) = run(&mut core("full", "csv,json,svg,png,html"));
        assert!(ok, "check with default outputs failed");
        println!(
            "neckline check, all outputs: {:>7.3} s  {:>9.0} rows/s  {m:>6.1} MiB peak  ({:.2}x the core path; target <= 2x)",
            t.as_secs_f64(),
            rate(t),
            t.as_secs_f64() / ours.as_secs_f64()
        );
        for f in ["fld.svg", "map.svg", "report.html", "fld.png", "map.png"] {
            let size = std::fs::metadata(dir.path().join("full").join(f)).map_or(0, |m| m.len());
            println!("  {f:<12} {:>8.2} MB", size as f64 / 1e6);
        }
    }
}
