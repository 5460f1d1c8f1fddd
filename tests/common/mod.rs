//! What the integration tests share: running the real binary in a folder and showing all of a
//! run when an assertion fails.
#![allow(dead_code)]

use assert_cmd::Command;
use std::path::{Path, PathBuf};

/// A path in the repository.
pub fn repo(p: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join(p)
}

/// The outcome of one run, printed in full when an assertion fails.
pub struct Run {
    /// The folder it ran in.
    pub dir: PathBuf,
    /// Exit status (-1 when killed).
    pub code: i32,
    /// Standard output.
    pub stdout: String,
    /// Standard error.
    pub stderr: String,
}

impl std::fmt::Display for Run {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "dir: {}\nexit: {}\n--- stdout\n{}\n--- stderr\n{}",
            self.dir.display(),
            self.code,
            self.stdout,
            self.stderr
        )
    }
}

/// Run `neckline ARGS` in `dir`.
pub fn run_in(dir: &Path, args: &[&str]) -> Run {
    let mut cmd = Command::cargo_bin("neckline").unwrap();
    cmd.current_dir(dir).args(args).env("NO_COLOR", "1");
    let out = cmd.output().unwrap();
    Run {
        dir: dir.to_path_buf(),
        code: out.status.code().unwrap_or(-1),
        stdout: String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr: String::from_utf8_lossy(&out.stderr).into_owned(),
    }
}

/// Parse a JSON file.
pub fn read_json(p: &Path) -> serde_json::Value {
    serde_json::from_str(&std::fs::read_to_string(p).unwrap()).unwrap()
}

/// The rows of a CSV file as maps from header to field.
pub fn read_rows(p: &Path) -> Vec<std::collections::HashMap<String, String>> {
    let mut r = csv::Reader::from_path(p).unwrap();
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

pub mod browser;
