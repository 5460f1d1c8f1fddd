//! What the integration tests share: running the real binary in a folder, showing all of a run
//! when an assertion fails, and reading its outputs back.
//!
//! One way to run: `neckline(&args)`, optionally with `.stdin(..)`, `.file(..)`, `.timeout(..)`
//! or `.env_remove(..)`, then `.run()` (a fresh temporary folder, owned by the [`Run`]) or
//! `.run_in(dir)` (a folder the test holds). [`run`] and [`run_in`] are the short forms.
//! Format a [`Run`] with `{r}` in an assertion's message: it prints the arguments, the folder,
//! the exit status, stdout and stderr. A temporary folder owned by a run is kept (not deleted)
//! when the test panics, so that the printed folder can be looked at.
#![allow(dead_code)]

use assert_cmd::Command;
use std::collections::HashMap;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

/// A path in the repository (`repo("")` is its root).
pub fn repo(p: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(p)
}

/// [`repo`] as text, for a command line.
pub fn repo_arg(p: &str) -> String {
    repo(p).display().to_string()
}

/// The demo's tryout `t` (1 or 2) of the rear floor pan and its job file, as arguments.
pub fn demo_tryout(t: u8) -> [String; 2] {
    [
        repo_arg(&format!("demo-parts/rear-floor-pan/tryout-{t}.csv")),
        repo_arg(&format!("demo-parts/rear-floor-pan/job-t{t}.toml")),
    ]
}

/// A run of the real `neckline` binary being set up: `NO_COLOR=1` unless removed.
pub struct Invocation {
    args: Vec<String>,
    stdin: Option<Vec<u8>>,
    files: Vec<(String, Vec<u8>)>,
    env_remove: Vec<String>,
    timeout: Option<Duration>,
}

/// `neckline ARGS`, to be run with [`Invocation::run`] or [`Invocation::run_in`].
pub fn neckline<S: AsRef<str>>(args: &[S]) -> Invocation {
    Invocation {
        args: args.iter().map(|a| a.as_ref().to_string()).collect(),
        stdin: None,
        files: Vec::new(),
        env_remove: Vec::new(),
        timeout: None,
    }
}

/// `neckline ARGS` in a fresh temporary folder.
pub fn run(args: &[&str]) -> Run {
    neckline(args).run()
}

/// `neckline ARGS` in `dir`.
pub fn run_in(dir: &Path, args: &[&str]) -> Run {
    neckline(args).run_in(dir)
}

impl Invocation {
    /// Give `bytes` on standard input.
    pub fn stdin(mut self, bytes: impl Into<Vec<u8>>) -> Self {
        self.stdin = Some(bytes.into());
        self
    }

    /// Write `bytes` to `name` (folders made as needed) in the run's folder before the run.
    pub fn file(mut self, name: &str, bytes: impl Into<Vec<u8>>) -> Self {
        self.files.push((name.to_string(), bytes.into()));
        self
    }

    /// [`Invocation::file`] for each `(name, bytes)`.
    pub fn files<B: AsRef<[u8]>>(mut self, files: &[(&str, B)]) -> Self {
        for (name, bytes) in files {
            self = self.file(name, bytes.as_ref());
        }
        self
    }

    /// Run without the environment variable `key` (e.g. `NO_COLOR`, set by default).
    pub fn env_remove(mut self, key: &str) -> Self {
        self.env_remove.push(key.to_string());
        self
    }

    /// Kill the run after `limit` (a hung run then fails its test instead of hanging it).
    pub fn timeout(mut self, limit: Duration) -> Self {
        self.timeout = Some(limit);
        self
    }

    /// Run in a fresh temporary folder, which the returned [`Run`] holds.
    pub fn run(self) -> Run {
        let tmp = tempfile::tempdir().unwrap();
        let mut r = self.run_in(tmp.path());
        r.tmp = Some(tmp);
        r
    }

    /// Run in `dir` (which the caller holds).
    pub fn run_in(self, dir: &Path) -> Run {
        for (name, bytes) in &self.files {
            write(dir, name, bytes);
        }
        let mut cmd = Command::cargo_bin("neckline").unwrap();
        cmd.current_dir(dir).args(&self.args).env("NO_COLOR", "1");
        for key in &self.env_remove {
            cmd.env_remove(key);
        }
        if let Some(bytes) = self.stdin {
            cmd.write_stdin(bytes);
        }
        if let Some(limit) = self.timeout {
            cmd.timeout(limit);
        }
        let start = Instant::now();
        let out = cmd.output().unwrap();
        Run {
            args: self.args,
            dir: dir.to_path_buf(),
            code: out.status.code().unwrap_or(-1),
            stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
            stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
            took: start.elapsed(),
            tmp: None,
        }
    }
}

/// The outcome of one run, printed in full (`{r}`) when an assertion fails.
pub struct Run {
    /// The arguments it was given.
    pub args: Vec<String>,
    /// The folder it ran in.
    pub dir: PathBuf,
    /// Exit status (-1 when killed by a signal, as on a timeout).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
    /// Wall time of the run.
    pub took: Duration,
    /// The temporary folder, when the run made it.
    tmp: Option<tempfile::TempDir>,
}

impl Run {
    /// A path in the run's folder.
    pub fn path(&self, rel: &str) -> PathBuf {
        self.dir.join(rel)
    }

    /// The text of a file in the run's folder.
    pub fn read(&self, rel: &str) -> String {
        std::fs::read_to_string(self.path(rel))
            .unwrap_or_else(|e| panic!("reading {rel}: {e}\n{self}"))
    }

    /// Assert the exit status `code` (the whole run printed if not); the run back.
    pub fn expect(self, code: i32) -> Self {
        assert_eq!(self.code, code, "{self}");
        self
    }

    /// Assert success (exit status 0); the run back.
    pub fn ok(self) -> Self {
        self.expect(0)
    }
}

impl std::fmt::Display for Run {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "args: {:?}\ndir: {}\nexit: {} (in {:?})\n--- stdout\n{}\n--- stderr\n{}",
            self.args,
            self.dir.display(),
            self.code,
            self.took,
            self.stdout,
            self.stderr
        )
    }
}

impl Drop for Run {
    /// Keep the run's own temporary folder when its test is failing.
    fn drop(&mut self) {
        if std::thread::panicking() {
            if let Some(tmp) = self.tmp.take() {
                let kept = tmp.keep();
                eprintln!("kept the folder of the failed run: {}", kept.display());
            }
        }
    }
}

/// Write `bytes` to `dir/name`, making its folders.
pub fn write(dir: &Path, name: &str, bytes: impl AsRef<[u8]>) {
    let p = dir.join(name);
    if let Some(parent) = p.parent() {
        std::fs::create_dir_all(parent).unwrap();
    }
    std::fs::write(p, bytes).unwrap();
}

/// The text of a file (its path named if it cannot be read).
pub fn read_text(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("reading {}: {e}", p.display()))
}

/// Parse a JSON file.
pub fn read_json(p: &Path) -> serde_json::Value {
    serde_json::from_str(&read_text(p)).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// A CSV row: column name to field.
pub type Row = HashMap<String, String>;

/// The rows of a CSV text as maps from column name to field.
pub fn rows(text: &str) -> Vec<Row> {
    let mut r = csv::Reader::from_reader(text.as_bytes());
    let head = r.headers().unwrap().clone();
    r.records()
        .map(|rec| {
            let rec = rec.unwrap();
            head.iter()
                .zip(rec.iter())
                .map(|(h, v)| (h.to_string(), v.to_string()))
                .collect()
        })
        .collect()
}

/// The rows of a CSV file as maps from column name to field.
pub fn read_rows(p: &Path) -> Vec<Row> {
    rows(&read_text(p))
}

/// The field `col` of `row` as a number (the row printed if it is not one).
pub fn num(row: &Row, col: &str) -> f64 {
    row[col]
        .parse()
        .unwrap_or_else(|_| panic!("{col} = `{}` in {row:?}", row[col]))
}

pub mod browser;
