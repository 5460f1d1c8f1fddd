//! One run's outputs are one set: staged beside the targets and moved in whole, or not at all.
//! Faults made for real where the test can (a small tmpfs that fills up, a read-only mount, a
//! FIFO, /dev/null, a folder locked by another process), checked through the real binary.
//!
//! The SHA-256 that summary.json records for its points.csv is checked against the `sha2`
//! crate's digest of the file (FIPS 180-4 SHA-256, a general-purpose library).

// FIFOs, devices, mounts and pids are Unix's.
#![cfg(unix)]

mod common;
use common::{demo_tryout, neckline, read_json, repo_arg, run_in};
use sha2::{Digest, Sha256};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

const CURVE: &str = "name = \"c\"\nsource = \"test only\"\nstrain = \"engineering\"\n\
                     points = [[-40, 60], [0, 30], [20, 42]]\n";

/// A measurement file of `rows` rows; `shift` changes every major axis so two files differ.
fn measurements(rows: usize, shift: f64) -> String {
    let mut s = String::with_capacity(rows * 40);
    s.push_str("id,major,minor,x,y\n");
    for i in 0..rows {
        let major = 2.6 + shift + (i % 500) as f64 * 0.001;
        s.push_str(&format!("P{i},{major:.4},2.5,{},{}\n", i % 1000, i / 1000));
    }
    s
}

/// SHA-256 of a file's bytes, lowercase hex (the `sha2` crate).
fn sha256(p: &Path) -> String {
    let bytes = std::fs::read(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()));
    Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect()
}

/// The names in a folder, sorted.
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .map(|d| {
            d.map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
                .collect()
        })
        .unwrap_or_default();
    v.sort();
    v
}

/// Every file in a folder with its bytes.
fn contents(dir: &Path) -> Vec<(String, Vec<u8>)> {
    names(dir)
        .into_iter()
        .map(|n| {
            let b = std::fs::read(dir.join(&n)).unwrap();
            (n, b)
        })
        .collect()
}

/// `check` of demo tryout `t` in `dir` with more arguments.
fn check_demo(dir: &Path, t: u8, more: &[&str]) -> common::Run {
    let [csv, job] = demo_tryout(t);
    let mut args = vec!["check", &csv, "--job", &job];
    args.extend_from_slice(more);
    run_in(dir, &args)
}

/// A tmpfs mounted on `dir` for the test's length (root only; `None` where it cannot be).
struct Mount(PathBuf);

impl Mount {
    fn tmpfs(dir: &Path, options: &str) -> Option<Mount> {
        // SAFETY: geteuid has no preconditions.
        if unsafe { libc::geteuid() } != 0 {
            return None;
        }
        std::fs::create_dir_all(dir).unwrap();
        let ok = Command::new("mount")
            .args(["-t", "tmpfs", "-o", options, "none"])
            .arg(dir)
            .stderr(Stdio::null())
            .status()
            .is_ok_and(|s| s.success());
        ok.then(|| Mount(dir.to_path_buf()))
    }

    fn remount(&self, options: &str) {
        let ok = Command::new("mount")
            .args(["-o", &format!("remount,{options}")])
            .arg(&self.0)
            .status()
            .unwrap();
        assert!(ok.success());
    }
}

impl Drop for Mount {
    fn drop(&mut self) {
        let _ = Command::new("umount").arg("-l").arg(&self.0).status();
    }
}

#[test]
fn fewer_formats_replace_the_whole_older_set() {
    let dir = tempfile::tempdir().unwrap();
    check_demo(dir.path(), 1, &["--out", "out"]).ok();
    std::fs::write(dir.path().join("out/notes.txt"), "the engineer's own file").unwrap();
    let r = check_demo(dir.path(), 2, &["--out", "out", "--format", "csv"]).ok();
    assert_eq!(
        names(&dir.path().join("out")),
        ["notes.txt", "points.csv"],
        "{r}"
    );
    assert!(r.stdout.contains("note: removed"), "{r}");
    assert!(r.stdout.contains("summary.json"), "{r}");
    // The points are the second tryout's.
    let [t2, _] = demo_tryout(2);
    let first_id = std::fs::read_to_string(&t2).unwrap();
    let id = first_id.lines().nth(1).unwrap().split(',').next().unwrap();
    assert!(r.read("out/points.csv").contains(id), "{r}");
}

#[test]
fn an_input_named_like_an_output_is_never_removed() {
    let dir = tempfile::tempdir().unwrap();
    let [t1, job] = demo_tryout(1);
    std::fs::create_dir(dir.path().join("out")).unwrap();
    std::fs::copy(&t1, dir.path().join("out/points.csv")).unwrap();
    let before = std::fs::read(dir.path().join("out/points.csv")).unwrap();
    let r = run_in(
        dir.path(),
        &[
            "check",
            "out/points.csv",
            "--job",
            &job,
            "--out",
            "out",
            "--format",
            "json",
        ],
    )
    .ok();
    assert_eq!(
        names(&dir.path().join("out")),
        ["points.csv", "summary.json"],
        "{r}"
    );
    assert_eq!(
        std::fs::read(dir.path().join("out/points.csv")).unwrap(),
        before
    );
}

#[test]
fn summary_records_its_points_and_compare_refuses_a_pair_that_does_not_match() {
    let dir = tempfile::tempdir().unwrap();
    check_demo(dir.path(), 1, &["--out", "a", "--format", "csv,json"]).ok();
    check_demo(dir.path(), 2, &["--out", "b", "--format", "csv,json"]).ok();
    for f in ["a", "b"] {
        let s = read_json(&dir.path().join(f).join("summary.json"));
        assert_eq!(s["points_file"]["name"], "points.csv");
        assert_eq!(
            s["points_file"]["sha256"].as_str().unwrap(),
            sha256(&dir.path().join(f).join("points.csv"))
        );
    }
    run_in(dir.path(), &["compare", "a/points.csv", "b/points.csv"]).ok();
    // b's points beside a's summary: refused, naming both files.
    std::fs::copy(
        dir.path().join("b/points.csv"),
        dir.path().join("a/points.csv"),
    )
    .unwrap();
    let r = run_in(dir.path(), &["compare", "a/points.csv", "b/points.csv"]).expect(2);
    assert!(r.stderr.contains("a/points.csv"), "{r}");
    assert!(r.stderr.contains("a/summary.json"), "{r}");
    assert!(r.stderr.contains("different runs"), "{r}");
}

/// The SHA-256 that compare checks and records is that of each table's bytes (computed
/// here on its own), by id and by position; a table that does not match its summary is refused
/// before any fault of the comparison itself (here an id met twice).
#[test]
fn compare_records_each_tables_sha256_and_refuses_a_mismatch_first() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    check_demo(d, 1, &["--out", "a", "--format", "csv,json"]).ok();
    check_demo(d, 2, &["--out", "b", "--format", "csv,json"]).ok();
    let (a, b) = (
        sha256(&d.join("a/points.csv")),
        sha256(&d.join("b/points.csv")),
    );
    for how in [&["--match", "id"][..], &["--match", "xy", "--within", "5"]] {
        let mut args = vec!["compare", "a/points.csv", "b/points.csv", "--out", "pack"];
        args.extend_from_slice(how);
        run_in(d, &args).ok();
        let page = std::fs::read_to_string(d.join("pack/compare.html")).unwrap();
        assert!(page.contains(&a) && page.contains(&b), "{how:?}");
    }
    // b's points, with a row repeated, beside a's summary.
    let mut text = std::fs::read_to_string(d.join("b/points.csv")).unwrap();
    let row = text.lines().nth(3).unwrap().to_string();
    text.push_str(&row);
    text.push('\n');
    std::fs::write(d.join("a/points.csv"), &text).unwrap();
    for how in [&["--match", "id"][..], &["--match", "xy", "--within", "5"]] {
        let mut args = vec!["compare", "a/points.csv", "b/points.csv"];
        args.extend_from_slice(how);
        let r = run_in(d, &args).expect(2);
        assert!(r.stderr.contains("different runs"), "{how:?} {r}");
        assert!(!r.stderr.contains("duplicate"), "{how:?} {r}");
    }
    // Its summary recording no table: the repeat is the error.
    let mut summary = read_json(&d.join("a/summary.json"));
    summary["points_file"] = serde_json::Value::Null;
    std::fs::write(d.join("a/summary.json"), summary.to_string()).unwrap();
    let r = run_in(d, &["compare", "a/points.csv", "b/points.csv"]).expect(2);
    assert!(r.stderr.contains("duplicate id"), "{r}");
}

#[test]
fn decimal_comma_points_are_recorded_as_written() {
    let dir = tempfile::tempdir().unwrap();
    check_demo(
        dir.path(),
        1,
        &["--out", "o", "--format", "csv,json,xlsx", "--decimal-comma"],
    )
    .ok();
    let s = read_json(&dir.path().join("o/summary.json"));
    assert_eq!(
        s["points_file"]["sha256"].as_str().unwrap(),
        sha256(&dir.path().join("o/points.csv"))
    );
    assert!(std::fs::read_to_string(dir.path().join("o/points.csv"))
        .unwrap()
        .contains(';'));
    assert_eq!(
        names(&dir.path().join("o")),
        ["points.csv", "points.xlsx", "summary.json"]
    );
}

#[test]
fn two_runs_into_one_folder_never_leave_it_mixed() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), CURVE).unwrap();
    std::fs::write(dir.path().join("a.csv"), measurements(8_000, 0.0)).unwrap();
    std::fs::write(dir.path().join("b.csv"), measurements(8_000, 0.05)).unwrap();
    for round in 0..3 {
        let start = |input: &str| {
            Command::new(env!("CARGO_BIN_EXE_neckline"))
                .current_dir(dir.path())
                .args(["check", input, "--d0", "2.5", "--limit", "c.toml"])
                .args(["--out", "out", "--format", "csv,json,svg"])
                .env("NO_COLOR", "1")
                .stdout(Stdio::null())
                .stderr(Stdio::piped())
                .spawn()
                .unwrap()
        };
        let (a, b) = (start("a.csv"), start("b.csv"));
        let (a, b) = (a.wait_with_output().unwrap(), b.wait_with_output().unwrap());
        for o in [&a, &b] {
            let err = String::from_utf8_lossy(&o.stderr);
            // Either it waited for the other run and wrote, or it refused naming its pid.
            assert!(
                o.status.code() == Some(0)
                    || (o.status.code() == Some(2) && err.contains("another neckline run (pid ")),
                "round {round}: {:?} {err}",
                o.status
            );
        }
        assert!(a.status.success() || b.status.success(), "round {round}");
        let out = dir.path().join("out");
        assert_eq!(
            names(&out),
            ["fld.svg", "map.svg", "points.csv", "summary.json"],
            "round {round}"
        );
        let s = read_json(&out.join("summary.json"));
        assert_eq!(
            s["points_file"]["sha256"].as_str().unwrap(),
            sha256(&out.join("points.csv")),
            "round {round}: points.csv and summary.json of different runs"
        );
        // The points are those of the input the summary names (b's majors are 0.05 larger).
        let input = s["input"].as_str().unwrap();
        let first = common::read_rows(&out.join("points.csv"))[0]["major_eng_pct"].clone();
        let expected = if input == "a.csv" { "4.000" } else { "6.000" };
        assert_eq!(first, expected, "round {round}: {input}");
    }
}

#[test]
fn a_folder_held_by_another_run_is_refused_naming_its_pid() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    std::fs::create_dir(&out).unwrap();
    // This test process plays the other run: it holds the folder's lock, as a run does.
    let mut lock = std::fs::File::create(out.join(".neckline.lock")).unwrap();
    lock.lock().unwrap();
    std::io::Write::write_all(&mut lock, format!("{}\n", std::process::id()).as_bytes()).unwrap();
    let r = check_demo(dir.path(), 1, &["--out", "out"]).expect(2);
    assert!(
        r.stderr.contains(&format!(
            "another neckline run (pid {})",
            std::process::id()
        )),
        "{r}"
    );
    assert_eq!(names(&out), [".neckline.lock"], "nothing written: {r}");
    drop(lock);
}

#[test]
fn temporaries_of_dead_runs_are_removed_when_the_folder_is_taken() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    // Above Linux's largest pid (2^22, proc(5) /proc/sys/kernel/pid_max): no such process.
    let dead = 999_999_999u32;
    let alive = std::process::id();
    for (name, is_dir) in [
        (format!(".neckline-stage.{dead}.0"), true),
        (format!(".neckline-old.{dead}.3"), true),
        (format!(".points.csv.{dead}.tmp"), false),
        (format!(".neckline-stage.{alive}.0"), true),
    ] {
        let p = out.join(name);
        if is_dir {
            std::fs::create_dir_all(&p).unwrap();
            std::fs::write(p.join("points.csv"), "half").unwrap();
        } else {
            std::fs::write(p, "half").unwrap();
        }
    }
    let r = check_demo(dir.path(), 1, &["--out", "out", "--format", "csv"]).ok();
    assert_eq!(
        names(&out),
        [
            format!(".neckline-stage.{alive}.0"),
            "points.csv".to_string()
        ],
        "{r}"
    );
}

#[test]
fn a_full_disk_partway_keeps_the_older_set_whole() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let Some(_mount) = Mount::tmpfs(&out, "size=2m") else {
        eprintln!("skipped: needs root to mount a small tmpfs");
        return;
    };
    std::fs::write(dir.path().join("c.toml"), CURVE).unwrap();
    std::fs::write(dir.path().join("small.csv"), measurements(2_000, 0.0)).unwrap();
    // About 3 MB of points.csv: more than the 2 MB the folder holds.
    std::fs::write(dir.path().join("large.csv"), measurements(20_000, 0.05)).unwrap();
    let args = |input: &'static str| {
        [
            "check",
            input,
            "--d0",
            "2.5",
            "--limit",
            "c.toml",
            "--out",
            "out",
            "--format",
            "csv,json,svg",
        ]
    };
    run_in(dir.path(), &args("small.csv")).ok();
    let before = contents(&out);
    assert_eq!(before.len(), 4, "{:?}", names(&out));
    let r = run_in(dir.path(), &args("large.csv")).expect(2);
    assert!(r.stderr.contains("No space left"), "{r}");
    assert_eq!(contents(&out), before, "the older set, byte for byte: {r}");
}

#[test]
fn a_read_only_folder_is_refused_before_anything_is_written() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("out");
    let Some(mount) = Mount::tmpfs(&out, "size=1m") else {
        eprintln!("skipped: needs root to mount a read-only tmpfs");
        return;
    };
    mount.remount("ro");
    let r = check_demo(
        dir.path(),
        1,
        &["--out", "out", "--points", "elsewhere/points.csv"],
    )
    .expect(2);
    assert!(r.stderr.contains("cannot write into"), "{r}");
    assert!(r.stderr.contains("out"), "{r}");
    assert!(names(&dir.path().join("elsewhere")).is_empty(), "{r}");
    assert!(names(&out).is_empty(), "{r}");
}

#[test]
fn a_fifo_as_points_is_written_through() {
    let dir = tempfile::tempdir().unwrap();
    let fifo = dir.path().join("pipe");
    let c = std::ffi::CString::new(fifo.as_os_str().as_encoded_bytes()).unwrap();
    // SAFETY: a valid NUL-terminated path.
    assert_eq!(unsafe { libc::mkfifo(c.as_ptr(), 0o600) }, 0);
    let reader = {
        let fifo = fifo.clone();
        std::thread::spawn(move || std::fs::read(fifo).unwrap())
    };
    let r = check_demo(
        dir.path(),
        1,
        &["--points", "pipe", "--out", "out", "--format", "csv,json"],
    )
    .ok();
    let bytes = reader.join().unwrap();
    use std::os::unix::fs::FileTypeExt;
    assert!(
        std::fs::symlink_metadata(&fifo)
            .unwrap()
            .file_type()
            .is_fifo(),
        "{r}"
    );
    assert!(bytes.starts_with(b"id,"), "{r}");
    let s = read_json(&dir.path().join("out/summary.json"));
    let sum: String = Sha256::digest(&bytes)
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    assert_eq!(s["points_file"]["sha256"].as_str().unwrap(), sum);
    assert_eq!(names(&dir.path().join("out")), ["summary.json"], "{r}");
}

#[test]
fn dev_null_as_points_stays_a_device() {
    let dir = tempfile::tempdir().unwrap();
    let r = check_demo(dir.path(), 1, &["--points", "/dev/null", "--out", "out"]).ok();
    use std::os::unix::fs::FileTypeExt;
    let m = std::fs::symlink_metadata("/dev/null").unwrap();
    assert!(m.file_type().is_char_device(), "{r}");
    assert!(dir.path().join("out/summary.json").is_file(), "{r}");
    assert!(!names(&dir.path().join("out")).contains(&"points.csv".to_string()));
}

#[test]
fn every_command_makes_the_folders_of_its_outputs() {
    let dir = tempfile::tempdir().unwrap();
    let parts = repo_arg("demo-parts/rear-floor-pan-shop-curve/parts.csv");
    let [_, job] = demo_tryout(1);
    let r = neckline(&[
        "limit",
        "from-parts",
        &parts,
        "--job",
        &job,
        "--out",
        "new/dir/x.toml",
        "--plot",
        "pictures/x.svg",
    ])
    .run_in(dir.path())
    .ok();
    assert!(r.read("new/dir/x.toml").contains("points"), "{r}");
    assert!(dir.path().join("pictures/x.svg").is_file(), "{r}");
    assert_eq!(names(&dir.path().join("new/dir")), ["x.toml"], "{r}");
    let r = run_in(
        dir.path(),
        &[
            "limit",
            "keeler-brazier",
            "--n",
            "0.2",
            "--thickness",
            "0.8",
            "--out",
            "kb/kb.toml",
        ],
    )
    .ok();
    assert!(r.path("kb/kb.toml").is_file(), "{r}");
}
