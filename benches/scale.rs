//! Time and peak memory of every command at a million rows, each against the streamed `check`
//! (`--format csv,json`) on the same machine in the same run, from invented inputs:
//! - `check` of a file with a `stage` column: ROWS/3 locations measured after three stages,
//!   and the same ROWS rows all of one stage;
//! - `grid`: a regular row, col grid of ROWS nodes (1000 columns), its rows in order (read a
//!   few grid rows at a time) and written backwards (held whole);
//! - `compare` of two `check` outputs of ROWS rows each, by id and by position (`--match xy`);
//! - `limit from-parts` of 100 000 circles (a tenth of ROWS).
//!
//! Run: `cargo bench --bench scale [-- ROWS] [only NAME]` (default 1 000 000 rows; NAME one
//! of `staged`, `single`, `grid`, `compare`, `from-parts`). `cargo bench --bench scale -- gen
//! DIR [ROWS]` only writes the inputs into DIR (for `/usr/bin/time -v` by hand).

use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

/// A seeded generator (a 64-bit linear congruential generator, Knuth's MMIX constants).
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

fn create(path: &Path) -> std::io::BufWriter<std::fs::File> {
    std::io::BufWriter::with_capacity(1 << 20, std::fs::File::create(path).unwrap())
}

/// `rows` rows of axes on a 0.5 mm grid (as benches/check.rs), the reading scaled by `grow`.
fn flat(path: &Path, rows: usize, seed: u64, grow: f64) {
    let mut f = create(path);
    writeln!(f, "id,major,minor,d0,x,y").unwrap();
    let mut r = Rng(seed);
    for i in 0..rows {
        let major = 2.5 * (1.0 + 0.5 * grow * r.next());
        let minor = (2.5 * (0.8 + 0.4 * r.next())).min(major);
        let (x, y) = ((i % 1000) as f64 * 0.5, (i / 1000) as f64 * 0.5);
        writeln!(f, "P{i},{major:.3},{minor:.3},2.5,{x:.1},{y:.1}").unwrap();
    }
    f.flush().unwrap();
}

/// `rows` rows with a `stage` column: `stages` stages of `rows / stages` locations, written
/// stage after stage (as a measuring system exports them), each stage stretching further.
fn staged(path: &Path, rows: usize, stages: usize) {
    let mut f = create(path);
    writeln!(f, "id,stage,major,minor,d0,x,y").unwrap();
    let n = rows / stages;
    for s in 0..stages {
        let mut r = Rng(2207);
        let share = (s + 1) as f64 / stages as f64;
        for i in 0..n {
            let major = 2.5 * (1.0 + 0.5 * share * r.next());
            let minor = (2.5 * (1.0 + 0.2 * share * (r.next() - 0.5))).min(major);
            let (x, y) = ((i % 1000) as f64 * 0.5, (i / 1000) as f64 * 0.5);
            writeln!(
                f,
                "P{i},op{}0,{major:.3},{minor:.3},2.5,{x:.1},{y:.1}",
                s + 1
            )
            .unwrap();
        }
    }
    f.flush().unwrap();
}

/// A row, col grid of `nodes` nodes, 1000 columns, pitch 2 mm, stretched by a smooth field;
/// `backwards`: its grid rows written last to first (a file not in order of grid row, which
/// `grid` holds whole).
fn grid(path: &Path, nodes: usize, backwards: bool) {
    let mut f = create(path);
    writeln!(f, "row,col,X,Y,x,y").unwrap();
    let rows = nodes.div_ceil(1000);
    for k in 0..nodes {
        let (mut i, j) = (k / 1000, k % 1000);
        if backwards {
            i = rows - 1 - i;
        }
        let (bx, by) = (2.0 * j as f64, 2.0 * i as f64);
        let x = bx * (1.0 + 0.1 * (by / 300.0).sin().abs());
        let y = by * (1.0 + 0.05 * (bx / 400.0).cos().abs());
        writeln!(f, "{i},{j},{bx:.1},{by:.1},{x:.4},{y:.4}").unwrap();
    }
    f.flush().unwrap();
}

/// `n` circles about a known curve, each marked safe, necked or split by where it lies.
fn parts(path: &Path, n: usize) {
    let mut f = create(path);
    writeln!(f, "id,major,minor,condition").unwrap();
    let mut r = Rng(11);
    // A Keeler-Brazier-like line in true strain: 0.28 at plane strain, rising both sides.
    let truth = |e2: f64| 0.28 + if e2 < 0.0 { -0.9 * e2 } else { 0.6 * e2 };
    for i in 0..n {
        let e2 = -0.25 + 0.38 * r.next();
        let u = -0.12 + 0.18 * r.next();
        let e1 = truth(e2) + u;
        let c = if u > 0.04 {
            "split"
        } else if u > 0.0 {
            "necked"
        } else {
            "safe"
        };
        let (major, minor) = (2.5 * e1.exp(), 2.5 * e2.exp());
        writeln!(f, "c{i},{:.4},{:.4},{c}", major.max(minor), minor).unwrap();
    }
    f.flush().unwrap();
}

/// Wall time and peak resident memory (MiB) of a child process.
// The child is reaped by `wait4`, which also gives its peak memory.
#[allow(clippy::zombie_processes)]
fn run(cmd: &mut Command) -> (Duration, f64) {
    // The previous command's outputs go to disk first, so that their write-back does not fall
    // on this command's time.
    // SAFETY: `sync` takes no arguments and only schedules and waits for writes.
    unsafe { libc::sync() };
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
    let ok = r == pid && libc::WIFEXITED(status) && libc::WEXITSTATUS(status) <= 1;
    assert!(ok, "{cmd:?} failed");
    (t.elapsed(), usage.ru_maxrss as f64 / 1024.0)
}

/// The inputs, written into `dir`.
struct Inputs {
    flat: PathBuf,
    flat2: PathBuf,
    staged: PathBuf,
    single: PathBuf,
    nodes: PathBuf,
    nodes_backwards: PathBuf,
    parts: PathBuf,
}

fn inputs(dir: &Path, rows: usize) -> Inputs {
    let i = Inputs {
        flat: dir.join("flat.csv"),
        flat2: dir.join("flat2.csv"),
        staged: dir.join("staged.csv"),
        single: dir.join("single.csv"),
        nodes: dir.join("nodes.csv"),
        nodes_backwards: dir.join("nodes-backwards.csv"),
        parts: dir.join("parts.csv"),
    };
    flat(&i.flat, rows, 2207, 1.0);
    flat(&i.flat2, rows, 2207, 1.1);
    staged(&i.staged, rows, 3);
    staged(&i.single, rows, 1);
    grid(&i.nodes, rows, false);
    grid(&i.nodes_backwards, rows, true);
    parts(&i.parts, rows / 10);
    i
}

fn main() {
    let args: Vec<String> = std::env::args()
        .skip(1)
        .filter(|a| a != "--bench")
        .collect();
    if args.first().is_some_and(|a| a == "gen") {
        let dir = PathBuf::from(args.get(1).expect("gen DIR [ROWS]"));
        let rows = args
            .get(2)
            .and_then(|a| a.parse().ok())
            .unwrap_or(1_000_000);
        std::fs::create_dir_all(&dir).unwrap();
        inputs(&dir, rows);
        return;
    }
    let rows: usize = args
        .first()
        .and_then(|a| a.parse().ok())
        .unwrap_or(1_000_000);
    let only = args
        .iter()
        .position(|a| a == "only")
        .and_then(|k| args.get(k + 1).cloned());
    let dir = tempfile::tempdir().unwrap();
    let i = inputs(dir.path(), rows);
    let root = PathBuf::from(env!("CARGO_MANIFEST_DIR"));
    let limit = root.join("limits/steel-0.80mm-n0.20-keeler-brazier.toml");
    let exe = env!("CARGO_BIN_EXE_neckline");
    let check = |input: &Path, out: &str| {
        let mut c = Command::new(exe);
        c.arg("check").arg(input).arg("--limit").arg(&limit);
        c.arg("--out").arg(dir.path().join(out));
        c.args(["--format", "csv,json"]);
        c
    };
    let (base, base_mem) = run(&mut check(&i.flat, "flat"));
    println!(
        "{rows} rows, {} threads",
        std::thread::available_parallelism().map_or(1, |n| n.get())
    );
    let line = |name: &str, rows: usize, t: Duration, m: f64| {
        println!(
            "{name:<34} {:>7.2} s  {:>5.2}x check  {m:>7.1} MiB peak  {:>6.1} B/row over check",
            t.as_secs_f64(),
            t.as_secs_f64() / base.as_secs_f64(),
            (m - base_mem).max(0.0) * 1048576.0 / rows as f64
        )
    };
    line("check (streamed), csv,json", rows, base, base_mem);
    let want = |name: &str| only.as_deref().is_none_or(|o| o == name);
    if want("staged") {
        let (t, m) = run(&mut check(&i.staged, "staged"));
        line("check, 3 stages", rows, t, m);
    }
    if want("single") {
        let (t, m) = run(&mut check(&i.single, "single"));
        line("check, one stage", rows, t, m);
    }
    if want("grid") {
        for (nodes, out, name) in [
            (&i.nodes, "grid", "grid, rows in order"),
            (&i.nodes_backwards, "grid-backwards", "grid, rows backwards"),
        ] {
            let mut c = Command::new(exe);
            c.arg("grid").arg(nodes).arg("--limit").arg(&limit);
            c.arg("--out").arg(dir.path().join(out));
            c.args(["--format", "csv,json"]);
            let (t, m) = run(&mut c);
            line(name, rows, t, m);
        }
    }
    if want("compare") {
        run(&mut check(&i.flat2, "flat2"));
        let mut c = Command::new(exe);
        c.arg("compare")
            .arg(dir.path().join("flat/points.csv"))
            .arg(dir.path().join("flat2/points.csv"));
        c.arg("--out").arg(dir.path().join("cmp"));
        let (t, m) = run(&mut c);
        line("compare (all outputs)", rows, t, m);
        let mut xy = Command::new(exe);
        xy.arg("compare")
            .arg(dir.path().join("flat/points.csv"))
            .arg(dir.path().join("flat2/points.csv"));
        xy.args(["--match", "xy", "--within", "0.2", "--out"])
            .arg(dir.path().join("cmp-xy"));
        let (t, m) = run(&mut xy);
        line("compare --match xy --within 0.2", rows, t, m);
        for f in [
            "compare.html",
            "compare-fld.svg",
            "compare-map.svg",
            "compare.json",
        ] {
            let size = std::fs::metadata(dir.path().join("cmp").join(f)).map_or(0, |m| m.len());
            println!("  {f:<16} {:>8.2} MB", size as f64 / 1e6);
        }
    }
    if want("from-parts") {
        let mut c = Command::new(exe);
        c.args(["limit", "from-parts"]).arg(&i.parts);
        c.args(["--d0", "2.5", "--out"])
            .arg(dir.path().join("shop.toml"));
        let (t, m) = run(&mut c);
        line("limit from-parts (rows/10 circles)", rows / 10, t, m);
    }
}
