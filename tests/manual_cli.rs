//! `neckline manual` and `neckline completions`: the real binary. The man pages and the
//! completion scripts are made from the same clap definitions as `--help`, so each is checked
//! against what `--help` prints.

use assert_cmd::Command;
use std::collections::BTreeSet;
use std::path::Path;
use tempfile::TempDir;

/// Run the binary in `dir`; (exit status, stdout, stderr).
fn run(dir: &Path, args: &[&str]) -> (i32, String, String) {
    let out = Command::cargo_bin("neckline")
        .unwrap()
        .current_dir(dir)
        .args(args)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

fn help(dir: &Path, args: &[&str]) -> String {
    let (status, stdout, stderr) = run(dir, args);
    assert_eq!(status, 0, "{args:?}: {stderr}");
    stdout
}

/// The long options of a `--help` text: every option line (`  -h, --help ...` or
/// `      --out <DIR> ...`) gives the word after its `--`.
fn long_options(help: &str) -> BTreeSet<String> {
    help.lines()
        .map(str::trim_start)
        .filter(|l| l.starts_with('-'))
        .filter_map(|l| {
            let first = l.split_whitespace().find(|w| w.starts_with("--"))?;
            let name = first.trim_start_matches("--").trim_end_matches(',');
            Some(name.to_string())
        })
        .collect()
}

/// The subcommands listed under `Commands:` in a `--help` text (two-space indent, name first).
fn subcommands(help: &str) -> Vec<String> {
    help.lines()
        .skip_while(|l| *l != "Commands:")
        .skip(1)
        .take_while(|l| !l.is_empty())
        .filter(|l| l.starts_with("  ") && !l.starts_with("   "))
        .filter_map(|l| l.split_whitespace().next().map(str::to_string))
        .collect()
}

/// roff text as read: `\-` is the minus/hyphen escape of roff (groff_char(7); man-pages(7):
/// option names are written with `\-`).
fn unescape_roff(text: &str) -> String {
    text.replace("\\-", "-")
}

#[test]
fn the_man_page_of_check_names_every_long_option_of_check_help() {
    let dir = TempDir::new().unwrap();
    let options = long_options(&help(dir.path(), &["check", "--help"]));
    // The parser must have found the options (not an empty set that passes trivially).
    for known in ["strict", "out", "limit", "fail-on", "column", "help"] {
        assert!(
            options.contains(known),
            "{known} not parsed from {options:?}"
        );
    }
    let (status, _, stderr) = run(dir.path(), &["manual", "--out", "man/pages"]);
    assert_eq!(status, 0, "{stderr}");
    let page = std::fs::read_to_string(dir.path().join("man/pages/neckline-check.1")).unwrap();
    let page = unescape_roff(&page);
    // man(7): the page opens with `.TH title section`.
    assert!(
        page.lines().any(|l| l.starts_with(".TH neckline-check 1 ")),
        "no .TH line:\n{page}"
    );
    // groff(7): `\fB` turns bold on and `\fR` back to roman; an option name is set in bold.
    for o in &options {
        let bold = format!("\\fB--{o}\\fR");
        assert!(page.contains(&bold), "--{o} missing from neckline-check.1");
    }
}

#[test]
fn manual_writes_one_page_per_subcommand_into_a_new_folder() {
    let dir = TempDir::new().unwrap();
    let top = help(dir.path(), &["--help"]);
    let limit = help(dir.path(), &["limit", "--help"]);
    let (status, stdout, stderr) = run(dir.path(), &["manual", "--out", "a/b"]);
    assert_eq!(status, 0, "{stderr}");
    assert!(stdout.starts_with("Wrote "), "{stdout}");
    let out = dir.path().join("a/b");
    let mut expected: BTreeSet<String> = ["neckline.1".to_string()].into();
    for s in subcommands(&top).iter().filter(|s| *s != "help") {
        expected.insert(format!("neckline-{s}.1"));
    }
    for s in subcommands(&limit).iter().filter(|s| *s != "help") {
        expected.insert(format!("neckline-limit-{s}.1"));
    }
    assert!(expected.contains("neckline-manual.1") && expected.contains("neckline-limit-mk.1"));
    // Exactly the pages, and no temporary file left behind by the atomic writes.
    let found: BTreeSet<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(found, expected);
    // A second run writes the same bytes over them.
    let first = std::fs::read(out.join("neckline.1")).unwrap();
    assert_eq!(run(dir.path(), &["manual", "--out", "a/b"]).0, 0);
    assert_eq!(std::fs::read(out.join("neckline.1")).unwrap(), first);
    // A file where the folder should be is a usage error (exit 2).
    std::fs::write(dir.path().join("file"), "x").unwrap();
    let (status, _, stderr) = run(dir.path(), &["manual", "--out", "file"]);
    assert_eq!(status, 2, "{stderr}");
    assert!(stderr.contains("not a folder"), "{stderr}");
}

#[test]
fn the_bash_completion_script_names_every_subcommand() {
    let dir = TempDir::new().unwrap();
    let mut names = subcommands(&help(dir.path(), &["--help"]));
    for known in ["check", "limit", "completions", "manual"] {
        assert!(names.iter().any(|n| n == known), "{known} not in {names:?}");
    }
    names.extend(subcommands(&help(dir.path(), &["limit", "--help"])));
    let (status, script, stderr) = run(dir.path(), &["completions", "bash"]);
    assert_eq!(status, 0, "{stderr}");
    let words: BTreeSet<&str> = script
        .split(|c: char| !(c.is_ascii_alphanumeric() || c == '-' || c == '_'))
        .collect();
    for n in &names {
        assert!(words.contains(n.as_str()), "{n} not in the bash script");
    }
    // Bash reference manual, "Programmable Completion Builtins": `complete -F FUNCTION NAME`
    // registers FUNCTION to complete the command NAME.
    assert!(
        script
            .lines()
            .any(|l| l.trim_start().starts_with("complete -F _neckline")
                && l.trim_end().ends_with(" neckline")),
        "no `complete -F` line for neckline"
    );
    // `bash -n` reads the script without running it (bash(1), -n): it must parse.
    if let Ok(out) = std::process::Command::new("bash")
        .args(["-n", "-c", &script])
        .output()
    {
        assert!(
            out.status.success(),
            "bash -n: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
}

#[test]
fn every_listed_shell_gets_a_script_and_an_unknown_one_is_refused() {
    let dir = TempDir::new().unwrap();
    for shell in ["bash", "zsh", "fish", "powershell", "elvish"] {
        let (status, script, stderr) = run(dir.path(), &["completions", shell]);
        assert_eq!(status, 0, "{shell}: {stderr}");
        assert!(script.contains("neckline"), "{shell}: {script}");
        assert!(
            script.contains("keeler-brazier"),
            "{shell}: no nested subcommand"
        );
    }
    let (status, _, stderr) = run(dir.path(), &["completions", "tcsh"]);
    assert_eq!(status, 2, "{stderr}");
    assert!(stderr.contains("possible values"), "{stderr}");
}
