//! `points.csv`: one row per judged location, strains in percent.

use crate::analysis::{Analysis, PointResult};
use crate::output::fmt_opt;
use std::io::{self, Write};

/// The strain columns, in order (shared by `check` and `strains`).
pub const STRAIN_COLUMNS: [&str; 14] = [
    "id",
    "major_eng_pct",
    "minor_eng_pct",
    "major_true_pct",
    "minor_true_pct",
    "thickness_true_pct",
    "thickness",
    "thinning_pct",
    "major_green_pct",
    "minor_green_pct",
    "major_almansi_pct",
    "minor_almansi_pct",
    "beta",
    "effective_true_pct",
];

/// The judgement columns that follow the strain columns.
pub const JUDGEMENT_COLUMNS: [&str; 4] =
    ["limit_major_eng_pct", "margin_pct", "limit_use_pct", "zone"];

/// Input columns carried at the end.
pub const CARRIED_COLUMNS: [&str; 6] = ["d0", "x", "y", "stage", "thickness_measured", "note"];

fn pct(v: f64) -> String {
    format!("{:.3}", v * 100.0)
}

/// The strain fields of one point, in [`STRAIN_COLUMNS`] order.
pub fn strain_fields(p: &PointResult) -> Vec<String> {
    let s = &p.strain;
    vec![
        p.input.id.clone(),
        pct(s.eng.major.value()),
        pct(s.eng.minor.value()),
        pct(s.true_strain.major.value()),
        pct(s.true_strain.minor.value()),
        pct(s.thickness_strain.value()),
        fmt_opt(p.thickness, 4),
        pct(s.thinning),
        pct(s.green.major.value()),
        pct(s.green.minor.value()),
        pct(s.almansi.major.value()),
        pct(s.almansi.minor.value()),
        fmt_opt(s.beta, 4),
        pct(s.effective.value()),
    ]
}

fn judgement_fields(p: &PointResult) -> Vec<String> {
    let j = &p.judgement;
    vec![
        fmt_opt(j.limit_major.map(|l| l.percent()), 3),
        fmt_opt(j.margin_pct, 3),
        fmt_opt(j.limit_use_pct, 2),
        j.zone.name().to_string(),
    ]
}

fn carried_fields(p: &PointResult) -> Vec<String> {
    let m = &p.input;
    vec![
        format!("{}", p.d0),
        fmt_opt(m.x, 3),
        fmt_opt(m.y, 3),
        m.stage.clone().unwrap_or_default(),
        fmt_opt(m.thickness, 4),
        m.note.clone().unwrap_or_default(),
    ]
}

/// Columns added at the end when the locations were computed from grid nodes: major direction
/// in the blank (degrees from +X), in-plane rotation (2-D), formed-surface normal and centre
/// height (3-D), element centre in the blank, node count.
pub const GRID_COLUMNS: [&str; 9] = [
    "major_dir_deg",
    "rotation_deg",
    "normal_x",
    "normal_y",
    "normal_z",
    "z",
    "ref_x",
    "ref_y",
    "nodes",
];

/// `fmt_opt` without a `-0.000` for a value that rounds to zero.
fn fmt_signed(v: Option<f64>, decimals: usize) -> String {
    let s = fmt_opt(v, decimals);
    if s.starts_with('-') && s[1..].chars().all(|c| c == '0' || c == '.') {
        s[1..].to_string()
    } else {
        s
    }
}

fn grid_fields(p: &PointResult) -> Vec<String> {
    let Some(g) = &p.grid else {
        return vec![String::new(); GRID_COLUMNS.len()];
    };
    let n = |i: usize| fmt_signed(g.normal.map(|n| n[i]), 6);
    vec![
        fmt_signed(g.major_angle_deg, 2),
        fmt_signed(g.rotation_deg, 3),
        n(0),
        n(1),
        n(2),
        fmt_opt(g.z, 3),
        format!("{:.3}", g.reference_centre[0]),
        format!("{:.3}", g.reference_centre[1]),
        g.nodes.to_string(),
    ]
}

/// Write the full points table (with [`GRID_COLUMNS`] when any location came from grid nodes).
pub fn write_points(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    let with_grid = a.points.iter().any(|p| p.grid.is_some());
    let extra: &[&str] = if with_grid { &GRID_COLUMNS } else { &[] };
    let header = STRAIN_COLUMNS
        .iter()
        .chain(&JUDGEMENT_COLUMNS)
        .chain(&CARRIED_COLUMNS)
        .chain(extra);
    w.write_record(header)?;
    for p in &a.points {
        let mut row = strain_fields(p);
        row.extend(judgement_fields(p));
        row.extend(carried_fields(p));
        if with_grid {
            row.extend(grid_fields(p));
        }
        w.write_record(&row)?;
    }
    w.flush()
}

/// Write the strain columns alone (the `strains` command).
pub fn write_strains(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(STRAIN_COLUMNS)?;
    for p in &a.points {
        w.write_record(strain_fields(p))?;
    }
    w.flush()
}
