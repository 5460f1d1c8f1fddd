//! The hostile corpus: every file in tests/hostile/ (and a few generated here, too big to
//! commit) given to the real binary through the parser it targets. Each must end in exit
//! status 2 with a message naming the file (and its line where the problem has one), without a
//! panic, within 5 s, leaving the inputs as they were and writing nothing.
//!
//! File names say the parser: `nodes-*` (grid nodes), `elements-*` (grid elements), `outlines-*`
//! (`fit`), `curve-*` (limit curves), `job-*` (job files).

use assert_cmd::Command;
use std::path::{Path, PathBuf};
use std::time::{Duration, Instant};

const CURVE: &str =
    "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\npoints = [[-40, 60], [0, 30], [20, 42]]\n";
const NODES_ID: &str = "id,X,Y,x,y\nA,0,0,0,0\nB,2.5,0,3,0\nC,2.5,2.5,3,2.5\nD,0,2.5,0,2.5\n";
const MEASURED: &str = "id,major,minor\nA,3.0,2.6\n";

fn corpus() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/hostile");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    v.sort();
    v
}

/// The command line that feeds `name` to its parser (inputs beside it in the run folder).
fn args_for(name: &str) -> Vec<String> {
    let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect();
    match name.split('-').next().unwrap() {
        "nodes" => s(&["grid", name, "--limit", "good.toml", "--out", "out"]),
        "elements" => s(&[
            "grid",
            "nodes-id.csv",
            "--elements",
            name,
            "--limit",
            "good.toml",
            "--out",
            "out",
        ]),
        "outlines" => s(&["fit", name, "--out", "out/fitted.csv"]),
        "curve" => s(&[
            "check", "good.csv", "--d0", "2.5", "--limit", name, "--out", "out",
        ]),
        "job" => s(&["check", "good.csv", "--job", name, "--out", "out"]),
        other => panic!("no parser for the corpus file prefix `{other}`"),
    }
}

/// Run `args` in a fresh folder holding the good inputs and `files`; check the outcome.
/// `line`: the message must also name this line of the hostile file.
fn refused(files: &[(&str, &[u8])], args: &[String], hostile: &str, line: Option<u64>) {
    let dir = tempfile::tempdir().unwrap();
    let good: [(&str, &[u8]); 3] = [
        ("good.toml", CURVE.as_bytes()),
        ("nodes-id.csv", NODES_ID.as_bytes()),
        ("good.csv", MEASURED.as_bytes()),
    ];
    for (name, bytes) in good.iter().chain(files) {
        std::fs::write(dir.path().join(name), bytes).unwrap();
    }
    let before = snapshot(dir.path());
    let start = Instant::now();
    let out = Command::cargo_bin("neckline")
        .unwrap()
        .current_dir(dir.path())
        .args(args)
        .env("NO_COLOR", "1")
        .timeout(Duration::from_secs(20))
        .output()
        .unwrap();
    let took = start.elapsed();
    let stderr = String::from_utf8_lossy(&out.stderr);
    let context = format!(
        "{hostile}: {args:?}\nexit {:?} in {took:?}\nstdout:\n{}\nstderr:\n{stderr}",
        out.status.code(),
        String::from_utf8_lossy(&out.stdout)
    );
    assert_eq!(out.status.code(), Some(2), "{context}");
    assert!(!stderr.contains("panicked"), "{context}");
    assert!(took < Duration::from_secs(5), "{context}");
    let error = stderr
        .lines()
        .find(|l| l.starts_with("error: "))
        .unwrap_or("");
    assert!(
        error.contains(hostile),
        "the message names the file: {context}"
    );
    if let Some(l) = line {
        assert!(
            error.contains(&format!("{hostile}:{l}")),
            "the message names line {l}: {context}"
        );
    }
    let after = snapshot(dir.path());
    let out_dir = dir.path().join("out");
    let written: Vec<_> = after
        .iter()
        .filter(|(p, _)| p.starts_with(&out_dir))
        .collect();
    assert!(
        written.is_empty(),
        "nothing written: {written:?}\n{context}"
    );
    assert_eq!(before, after, "inputs unchanged: {context}");
}

/// Every file under `dir` with its bytes.
fn snapshot(dir: &Path) -> Vec<(PathBuf, Vec<u8>)> {
    let mut v = Vec::new();
    let mut stack = vec![dir.to_path_buf()];
    while let Some(d) = stack.pop() {
        for e in std::fs::read_dir(&d).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() {
                stack.push(p);
            } else {
                let bytes = std::fs::read(&p).unwrap();
                v.push((p, bytes));
            }
        }
    }
    v.sort();
    v
}

/// The line each committed file's message must name, where the problem sits on one line.
fn expected_line(name: &str) -> Option<u64> {
    match name {
        "nodes-duplicate-header.csv"
        | "elements-missing-column.csv"
        | "outlines-missing-column.csv" => Some(1),
        "nodes-huge-row.csv"
        | "nodes-inf-nan.csv"
        | "nodes-quoted-newline.csv"
        | "nodes-nul.csv" => Some(2),
        "nodes-latin1.csv" => Some(1),
        "curve-one-point.toml"
        | "curve-nan.toml"
        | "curve-1e308.toml"
        | "curve-three-numbers.toml" => Some(4),
        "curve-inf.toml" => Some(4),
        "curve-duplicate-key.toml"
        | "job-self-limit.toml"
        | "job-inf-t0.toml"
        | "job-nan-margin.toml"
        | "job-unknown-key.toml"
        | "job-1e308-reading.toml" => Some(2),
        "job-negative-d0.toml" | "job-limit-is-folder.toml" => Some(1),
        _ => None,
    }
}

#[test]
fn every_corpus_file_is_refused_cleanly() {
    let files = corpus();
    assert!(files.len() >= 40, "{} files", files.len());
    for path in files {
        let name = path.file_name().unwrap().to_str().unwrap().to_string();
        let bytes = std::fs::read(&path).unwrap();
        refused(
            &[(&name, &bytes)],
            &args_for(&name),
            &name,
            expected_line(&name),
        );
        // The committed file itself is never touched.
        assert_eq!(std::fs::read(&path).unwrap(), bytes, "{name}");
    }
}

// Too big to commit: made here.
#[test]
fn generated_hostile_files_are_refused_cleanly() {
    // A curve of 200 000 points: refused at the first point past the cap (line 5 + 10 000).
    let mut curve = String::from(
        "name = \"big\"\nsource = \"hostile test\"\nstrain = \"engineering\"\npoints = [\n",
    );
    for i in 0..200_000 {
        curve += &format!("[{}, 40],\n", -50.0 + f64::from(i) * 1e-4);
    }
    curve += "]\n";
    let args = args_for("curve-200000.toml");
    refused(
        &[("curve-200000.toml", curve.as_bytes())],
        &args,
        "curve-200000.toml",
        Some(10_005),
    );
    // A 5 MB field in a nodes file, an outlines file and an elements file.
    let big = "7".repeat(5 << 20);
    let nodes = format!("row,col,X,Y,x,y\n0,0,{big},0,0,0\n");
    refused(
        &[("nodes-5mb.csv", nodes.as_bytes())],
        &args_for("nodes-5mb.csv"),
        "nodes-5mb.csv",
        Some(2),
    );
    let outlines = format!("id,x,y\n{big},1,2\n");
    refused(
        &[("outlines-5mb.csv", outlines.as_bytes())],
        &args_for("outlines-5mb.csv"),
        "outlines-5mb.csv",
        Some(2),
    );
    let elements = format!("id,n1,n2,n3\nT1,A,B,{big}\n");
    refused(
        &[("elements-5mb.csv", elements.as_bytes())],
        &args_for("elements-5mb.csv"),
        "elements-5mb.csv",
        Some(2),
    );
    // A line with a million fields, as a header and as a row.
    let million = ",".repeat(1_000_000);
    let header = format!("row,col,X,Y,x,y{million}\n0,0,0,0,0,0\n");
    refused(
        &[("nodes-wide.csv", header.as_bytes())],
        &args_for("nodes-wide.csv"),
        "nodes-wide.csv",
        Some(1),
    );
    let row = format!("id,x,y\nE,1,2{million}\n");
    refused(
        &[("outlines-wide.csv", row.as_bytes())],
        &args_for("outlines-wide.csv"),
        "outlines-wide.csv",
        Some(2),
    );
}
