//! `grid` streams its elements: a generated grid large enough to be read in many chunks and
//! judged in several batches gives, cell for cell, the strains of its known homogeneous
//! deformation, in grid order; a bad row far into a file is rejected with its own line.

mod common;
use common::{neckline, num, read_json, read_rows, read_text, write};

const CURVE: &str = "name = \"test curve\"\nsource = \"test only\"\nstrain = \"engineering\"\n\
                     points = [[-40, 60], [0, 30], [20, 42]]\n";

/// Grid rows and columns: 36 001 cells, more than one batch of elements (32 768), in a nodes
/// file of about 1.3 MB (several 256 KiB chunks).
const ROWS: usize = 140;
const COLS: usize = 260;

/// The deformation gradient of the uniform stretch and shear applied to every node.
const F: [[f64; 2]; 2] = [[1.25, 0.10], [0.0, 0.90]];

/// A regular grid, pitch 2 mm, every node moved by `x = F X + (3, -1)`; a comment and a blank
/// line before the header, a blank line every 1000 rows (so that lines and records differ).
fn nodes_text() -> String {
    let mut s = String::from("# generated: a homogeneous deformation\n\nrow,col,X,Y,x,y\n");
    for r in 0..ROWS {
        for c in 0..COLS {
            let (bx, by) = (2.0 * c as f64, 2.0 * r as f64);
            let x = F[0][0] * bx + F[0][1] * by + 3.0;
            let y = F[1][0] * bx + F[1][1] * by - 1.0;
            s += &format!("{r},{c},{bx},{by},{x:.9},{y:.9}\n");
            if (r * COLS + c) % 1000 == 999 {
                s.push('\n');
            }
        }
    }
    s
}

/// Principal Green-Lagrange strains of `F`: the eigenvalues of `E = (FᵀF − I)/2` (the
/// definition of the Green-Lagrange strain tensor: Bonet & Wood, *Nonlinear Continuum
/// Mechanics for Finite Element Analysis*, ch. 3), from the trace and determinant of the
/// symmetric 2×2 `C = FᵀF`: `c = tr/2 ± √(tr²/4 − det)`, `E_i = (c_i − 1)/2`.
fn green() -> [f64; 2] {
    let c11 = F[0][0] * F[0][0] + F[1][0] * F[1][0];
    let c22 = F[0][1] * F[0][1] + F[1][1] * F[1][1];
    let c12 = F[0][0] * F[0][1] + F[1][0] * F[1][1];
    let (tr, det) = (c11 + c22, c11 * c22 - c12 * c12);
    let root = (tr * tr / 4.0 - det).sqrt();
    [(tr / 2.0 + root - 1.0) / 2.0, (tr / 2.0 - root - 1.0) / 2.0]
}

#[test]
fn a_homogeneous_grid_gives_its_closed_form_strains_in_every_cell_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "limit.toml", CURVE);
    write(d, "nodes.csv", nodes_text());
    let args = ["grid", "nodes.csv", "--limit", "limit.toml", "--out", "o"];
    neckline(&[&args[..], &["--format", "csv,json", "--t0", "0.8"]].concat())
        .run_in(d)
        .expect(0);
    let points = read_rows(&d.join("o/points.csv"));
    assert_eq!(points.len(), (ROWS - 1) * (COLS - 1));
    let [e1, e2] = green();
    // Engineering strain from the stretch λ = √(1 + 2E) (C = 1 + 2E, λ² its eigenvalue).
    let (eng1, eng2) = ((1.0 + 2.0 * e1).sqrt() - 1.0, (1.0 + 2.0 * e2).sqrt() - 1.0);
    for (k, p) in points.iter().enumerate() {
        let (r, c) = (k / (COLS - 1), k % (COLS - 1));
        assert_eq!(p["id"], format!("r{r}c{c}"), "cells in grid order");
        assert!(
            (num(p, "major_green_pct") - 100.0 * e1).abs() < 2e-3,
            "{p:?}"
        );
        assert!(
            (num(p, "minor_green_pct") - 100.0 * e2).abs() < 2e-3,
            "{p:?}"
        );
        assert!(
            (num(p, "major_eng_pct") - 100.0 * eng1).abs() < 2e-3,
            "{p:?}"
        );
        assert!(
            (num(p, "minor_eng_pct") - 100.0 * eng2).abs() < 2e-3,
            "{p:?}"
        );
        // The cell's centre on the part: F applied to its blank centre, plus the shift.
        let (bx, by) = (2.0 * c as f64 + 1.0, 2.0 * r as f64 + 1.0);
        let x = F[0][0] * bx + F[0][1] * by + 3.0;
        assert!((num(p, "x") - x).abs() < 2e-3, "{p:?}");
    }
    let s = read_json(&d.join("o/summary.json"));
    assert_eq!(s["rejected_rows"], 0, "{s}");
}

/// The same grid written with its grid rows last to first: a file not in order of grid row is
/// held whole instead of read a few rows at a time, and gives the same cells, in grid order,
/// with the same values (only the lines they were read from differ).
#[test]
fn a_grid_written_backwards_gives_the_same_cells_as_in_order() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "limit.toml", CURVE);
    let text = nodes_text();
    let (head, body) = text.split_at(text.find("row,col").unwrap());
    let (header, rows) = body.split_once('\n').unwrap();
    let mut by_row: Vec<Vec<&str>> = vec![Vec::new(); ROWS];
    for line in rows.lines().filter(|l| !l.is_empty()) {
        let r: usize = line.split(',').next().unwrap().parse().unwrap();
        by_row[r].push(line);
    }
    let backwards: Vec<&str> = by_row.iter().rev().flatten().copied().collect();
    write(d, "ordered.csv", &text);
    write(
        d,
        "backwards.csv",
        format!("{head}{header}\n{}\n", backwards.join("\n")),
    );
    for name in ["ordered", "backwards"] {
        let args = [
            "grid",
            &format!("{name}.csv"),
            "--limit",
            "limit.toml",
            "--out",
            name,
        ];
        neckline(&[&args[..], &["--format", "csv", "--t0", "0.8"]].concat())
            .run_in(d)
            .expect(0);
    }
    let ordered = read_rows(&d.join("ordered/points.csv"));
    let backwards = read_rows(&d.join("backwards/points.csv"));
    assert_eq!(ordered.len(), (ROWS - 1) * (COLS - 1));
    assert_eq!(ordered.len(), backwards.len());
    for (a, b) in ordered.iter().zip(&backwards) {
        for (k, v) in a {
            if !k.contains("line") {
                assert_eq!(Some(v), b.get(k), "{k} of {a:?} against {b:?}");
            }
        }
    }
}

/// A nodes file that can be read only once (a named pipe) is read once, held whole.
#[cfg(unix)]
#[test]
fn nodes_through_a_named_pipe_are_read_once() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "limit.toml", CURVE);
    let fifo = d.join("nodes.csv");
    let made = std::process::Command::new("mkfifo").arg(&fifo).status();
    if !made.is_ok_and(|s| s.success()) {
        eprintln!("no mkfifo here: skipped");
        return;
    }
    let text = nodes_text();
    let writer = std::thread::spawn(move || std::fs::write(&fifo, text));
    let args = ["grid", "nodes.csv", "--limit", "limit.toml", "--out", "o"];
    neckline(&[&args[..], &["--format", "csv"]].concat())
        .run_in(d)
        .expect(0);
    writer.join().unwrap().unwrap();
    assert_eq!(
        read_rows(&d.join("o/points.csv")).len(),
        (ROWS - 1) * (COLS - 1)
    );
}

#[test]
fn a_bad_node_far_into_the_file_is_rejected_at_its_own_line() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "limit.toml", CURVE);
    let mut text = nodes_text();
    // The node r120c7 on its line, found by its text; its x made unreadable.
    let at = text.find("\n120,7,").unwrap() + 1;
    let line = text[..at].matches('\n').count() + 1;
    let end = at + text[at..].find('\n').unwrap();
    let fields: Vec<&str> = text[at..end].split(',').collect();
    let bad = format!(
        "{},{},{},{},oops,{}",
        fields[0], fields[1], fields[2], fields[3], fields[5]
    );
    text.replace_range(at..end, &bad);
    write(d, "nodes.csv", &text);
    let args = ["grid", "nodes.csv", "--limit", "limit.toml", "--out", "o"];
    let out = neckline(&[&args[..], &["--format", "csv", "--strict"]].concat())
        .run_in(d)
        .expect(2);
    assert!(
        out.stderr.contains("--strict") && out.stderr.contains(&format!("(rejected, line {line})")),
        "{out}"
    );
    assert!(!d.join("o/points.csv").exists(), "nothing written: {out}");
    // Without --strict: the row is rejected with its line and column, and the four cells
    // around it name the node's line.
    let out = neckline(&[&args[..], &["--format", "csv,json"]].concat())
        .run_in(d)
        .expect(0);
    assert!(
        out.stdout
            .contains(&format!("nodes.csv:{line}:5 (column `x`)"))
            && out.stdout.contains("`oops`"),
        "{out}"
    );
    let s = read_text(&d.join("o/summary.json"));
    assert!(
        s.contains(&format!(
            "its corner node r120c7 (rejected, line {line}) is missing"
        )),
        "{out}"
    );
    let points = read_rows(&d.join("o/points.csv"));
    assert_eq!(points.len(), (ROWS - 1) * (COLS - 1) - 4);
}

#[test]
fn an_element_naming_a_missing_node_is_rejected_with_file_and_line() {
    let dir = tempfile::tempdir().unwrap();
    let d = dir.path();
    write(d, "limit.toml", CURVE);
    // Nodes by id: a row of 20 001 nodes stretched 10 % in x; 20 000 triangles between them
    // and a second row, one of them (far into the file) naming a node that is not there.
    let mut nodes = String::from("id,X,Y,x,y\n");
    let mut elements = String::from("id,n1,n2,n3\n");
    for i in 0..=20_000 {
        for (row, y) in [("a", 0.0), ("b", 1.0)] {
            nodes += &format!("{row}{i},{i},{y},{},{y}\n", 1.1 * i as f64);
        }
    }
    let mut missing_line = 0;
    for i in 0..20_000 {
        let third = if i == 15_000 {
            "zz".to_string()
        } else {
            format!("b{i}")
        };
        elements += &format!("t{i},a{i},a{},{third}\n", i + 1);
        if i == 15_000 {
            missing_line = i + 2;
        }
    }
    write(d, "nodes.csv", nodes);
    write(d, "elements.csv", elements);
    let args = [
        "grid",
        "nodes.csv",
        "--elements",
        "elements.csv",
        "--limit",
        "limit.toml",
    ];
    let out = neckline(&[&args[..], &["--out", "o", "--format", "csv"]].concat())
        .run_in(d)
        .expect(0);
    assert!(
        out.stdout.contains(&format!(
            "elements.csv:{missing_line}:4 (column `n3`): node `zz` is not in nodes.csv"
        )),
        "{out}"
    );
    let points = read_rows(&d.join("o/points.csv"));
    assert_eq!(points.len(), 19_999);
    // x = 1.1 X, y = Y: engineering strains 10 % and 0 in every triangle.
    for p in &points {
        assert!((num(p, "major_eng_pct") - 10.0).abs() < 1e-6, "{p:?}");
        assert!(num(p, "minor_eng_pct").abs() < 1e-6, "{p:?}");
    }
    let out = neckline(&[&args[..], &["--out", "s", "--strict"]].concat())
        .run_in(d)
        .expect(2);
    assert!(
        out.stderr
            .contains(&format!("elements.csv:{missing_line}:4")),
        "{out}"
    );
}
