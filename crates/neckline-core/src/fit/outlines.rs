//! Outline files for `fit`: points grouped by id, fitted one outline at a time, written as
//! the measurement CSV that `check` reads.

use super::{fit_robust, RobustFit};
use crate::error::{Location, Result};
use crate::table::Table;
use nalgebra::Vector2;
use std::io::Write;
use std::path::Path;

/// The columns written: the fitted axes as `major, minor` (what `check` reads), the fit's
/// details, `x, y` repeating the centre so that `check` places each location on the part, then
/// `discarded` (points set aside as off the ellipse), `coverage_deg` (how much of the outline
/// the kept points cover) and `quality`: `good`, or `suspect: <reasons>` (thresholds and why
/// in [`crate::fit`]).
pub const FIT_COLUMNS: [&str; 13] = [
    "id",
    "major",
    "minor",
    "angle_deg",
    "centre_x",
    "centre_y",
    "rms_residual",
    "points",
    "x",
    "y",
    "discarded",
    "coverage_deg",
    "quality",
];

/// The points of one outline as read, or the first reason it cannot be fitted.
#[derive(Debug, Clone)]
pub struct Outline {
    /// The outline's id.
    pub id: String,
    /// Line of its first point.
    pub line: u64,
    /// Its points.
    pub points: Vec<Vector2<f64>>,
    /// A bad row of this id, if any (the id is then not fitted).
    pub bad_row: Option<String>,
}

/// Group the rows of an outlines table by id, in order of first appearance. Rows without an id
/// are returned as failures.
pub fn outlines(t: &Table) -> Result<(Vec<Outline>, Vec<String>)> {
    let lower: Vec<String> = t.header.iter().map(|h| h.to_ascii_lowercase()).collect();
    let find = |n: &str| {
        lower.iter().position(|c| c == n).ok_or_else(|| {
            t.header_error(
                None,
                format!(
                    "missing column `{n}`: an outlines file needs id, x, y; found: {}",
                    t.header.join(", ")
                ),
            )
        })
    };
    let (ci, cx, cy) = (find("id")?, find("x")?, find("y")?);
    let mut list: Vec<Outline> = Vec::new();
    let mut index = std::collections::HashMap::new();
    let mut orphans = Vec::new();
    for (line, r) in &t.rows {
        let id = match t.text(*line, r, ci) {
            Ok(id) => id,
            Err(e) => {
                orphans.push(format!("{e} (row not fitted)"));
                continue;
            }
        };
        let k = *index.entry(id.clone()).or_insert_with(|| {
            list.push(Outline {
                id: id.clone(),
                line: *line,
                points: Vec::new(),
                bad_row: None,
            });
            list.len() - 1
        });
        let point = t.check_len(*line, r).and_then(|_| {
            Ok(Vector2::new(
                t.number(*line, r, cx)?,
                t.number(*line, r, cy)?,
            ))
        });
        match point {
            Ok(p) => list[k].points.push(p),
            Err(e) => {
                list[k].bad_row.get_or_insert_with(|| e.to_string());
            }
        }
    }
    Ok((list, orphans))
}

/// Fit one outline, or say why it cannot be fitted (with file and line).
pub fn fit_outline(o: &Outline, file: &Path) -> std::result::Result<RobustFit, String> {
    let at = Location::file(file).at_line(o.line);
    if let Some(bad) = &o.bad_row {
        return Err(format!("{bad} (outline `{}` not fitted)", o.id));
    }
    fit_robust(&o.points).map_err(|e| format!("{at}: outline `{}`: {e}", o.id))
}

/// Write fitted ellipses as the measurement CSV that `check` reads ([`FIT_COLUMNS`]).
pub fn write_fits(fits: &[(String, RobustFit)], out: &mut dyn Write) -> std::io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(FIT_COLUMNS)?;
    for (id, r) in fits {
        let f = &r.fit;
        let l = |v: f64| format!("{v:.6}");
        w.write_record([
            id.clone(),
            l(f.major),
            l(f.minor),
            format!("{:.3}", f.angle_deg),
            l(f.centre.x),
            l(f.centre.y),
            format!("{:.6}", f.rms_residual),
            f.points.to_string(),
            l(f.centre.x),
            l(f.centre.y),
            r.discarded.len().to_string(),
            format!("{:.0}", r.coverage_deg),
            r.quality.to_string(),
        ])?;
    }
    w.flush()
}
