//! `points.csv`: one row per judged location, strains in percent, written row by row as the
//! locations stream past (never from a list of every location).
//!
//! Precision per column, chosen so that a points.csv judged again gives itself back and no
//! digit is noise: strains and margins 3 decimals of a percent (0.001 pp, well below any
//! reading's resolution of 0.5 pp or more; the true strains, which a points.csv judged again
//! is read from, 4), limit use 2 decimals, `beta` 3 decimals, thickness
//! 4 decimals in mm and 5 in inches (0.1 µm, 0.01 thou), positions 3 decimals, d0 4 decimals.

pub use crate::measure::{GRID_COLUMNS, PATH_COLUMNS, PATH_READING_COLUMNS};
use crate::output::push_fixed_bytes;
use crate::point::PointResult;
use crate::units::LengthUnit;

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
/// `reason` says which rule put the location in its zone: `curve`, `thinning`, `band`,
/// `thickening`, `low-stretch`, `no-curve` or `none` (see [`crate::assess`]).
pub const JUDGEMENT_COLUMNS: [&str; 5] = [
    "limit_major_eng_pct",
    "margin_pct",
    "limit_use_pct",
    "zone",
    "reason",
];

/// Input columns carried at the end.
pub const CARRIED_COLUMNS: [&str; 7] = [
    "d0",
    "x",
    "y",
    "stage",
    "thickness_measured",
    "thickness_diff_pct",
    "note",
];

/// Columns added when the input has them: height, and the measured thinning with its
/// difference from the computed one (percentage points).
pub const OPTIONAL_COLUMNS: [&str; 3] = ["z", "thinning_measured_pct", "thinning_diff_pp"];

/// Columns added when a reading error is set: the margin's uncertainty (percentage points) and
/// `yes` where the zone could change within it.
pub const READING_COLUMNS: [&str; 2] = ["margin_uncertainty_pct", "borderline"];

/// Which columns a points table has: decided from the input's header and the settings before
/// the first row.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Layout {
    /// Strain columns only (the `strains` command).
    pub strains_only: bool,
    /// The input has `z`.
    pub z: bool,
    /// The input has a measured thinning.
    pub thinning: bool,
    /// A reading error is set.
    pub reading: bool,
    /// Locations come from grid nodes.
    pub grid: bool,
    /// Locations were measured after several stages.
    pub path: bool,
    /// The length unit (for the thickness's decimals).
    pub unit: LengthUnit,
}

impl Layout {
    /// The header row.
    pub fn header(&self) -> Vec<&'static str> {
        let mut h: Vec<&str> = STRAIN_COLUMNS.to_vec();
        if self.strains_only {
            return h;
        }
        h.extend(JUDGEMENT_COLUMNS);
        h.extend(CARRIED_COLUMNS);
        if self.z {
            h.push(OPTIONAL_COLUMNS[0]);
        }
        if self.thinning {
            h.extend(&OPTIONAL_COLUMNS[1..]);
        }
        if self.reading {
            h.extend(READING_COLUMNS);
        }
        if self.path {
            h.extend(PATH_COLUMNS);
            if self.reading {
                h.extend(PATH_READING_COLUMNS);
            }
        }
        if self.grid {
            h.extend(GRID_COLUMNS);
        }
        h
    }

    /// The header as a CSV line.
    pub fn header_line(&self) -> String {
        let mut s = self.header().join(",");
        s.push('\n');
        s
    }

    fn thickness_decimals(&self) -> usize {
        match self.unit {
            LengthUnit::Mm => 4,
            LengthUnit::In => 5,
        }
    }

    /// Append the row of `p` to `out`.
    pub fn push_row(&self, out: &mut Vec<u8>, p: &PointResult) {
        let mut f = Fields { out, first: true };
        let s = &p.strain;
        f.text(&p.input.id);
        f.num(Some(s.eng.major.percent()), 3);
        f.num(Some(s.eng.minor.percent()), 3);
        // One more decimal on the true strains: a points.csv judged again reads them, and
        // should land on the same side of every zone edge as the engineering values shown.
        f.num(Some(s.true_strain.major.percent()), 4);
        f.num(Some(s.true_strain.minor.percent()), 4);
        f.num(Some(s.thickness_strain.percent()), 3);
        f.num(p.thickness, self.thickness_decimals());
        for v in [
            s.thinning,
            s.green.major.value(),
            s.green.minor.value(),
            s.almansi.major.value(),
            s.almansi.minor.value(),
        ] {
            f.num(Some(v * 100.0), 3);
        }
        f.num(s.beta, 3);
        f.num(Some(s.effective.value() * 100.0), 3);
        if !self.strains_only {
            self.judged(&mut f, p);
        }
        f.out.push(b'\n');
    }

    fn judged(&self, f: &mut Fields<'_>, p: &PointResult) {
        let j = &p.judgement;
        let m = &p.input;
        f.num(j.limit_major.map(|l| l.percent()), 3);
        f.num(j.margin_pct, 3);
        f.num(j.limit_use_pct, 2);
        f.text(j.zone.name());
        f.text(j.reason.name());
        f.num(p.d0, 4);
        f.num(m.x, 3);
        f.num(m.y, 3);
        f.text(m.stage.as_deref().unwrap_or(""));
        f.num(m.thickness, self.thickness_decimals());
        f.num(p.thickness_diff_pct(), 2);
        f.text(m.note.as_deref().unwrap_or(""));
        if self.z {
            f.num(m.z, 3);
        }
        if self.thinning {
            f.num(m.thinning.map(|t| t * 100.0), 3);
            f.num(p.thinning_diff_pp(), 3);
        }
        if self.reading {
            f.num(j.uncertainty_pct, 2);
            f.text(if j.borderline { "yes" } else { "" });
        }
        if self.path {
            path_fields(f, p);
            if self.reading {
                f.num(p.path.as_ref().and_then(|j| j.use_uncertainty_pct), 2);
            }
        }
        if self.grid {
            grid_fields(f, p);
        }
    }
}

/// Fields of one row, written straight into the output text.
struct Fields<'a> {
    out: &'a mut Vec<u8>,
    first: bool,
}

impl Fields<'_> {
    fn sep(&mut self) {
        if !self.first {
            self.out.push(b',');
        }
        self.first = false;
    }
    fn num(&mut self, v: Option<f64>, decimals: usize) {
        self.sep();
        if let Some(v) = v {
            push_fixed_bytes(self.out, v, decimals);
        }
    }
    /// Text, quoted (RFC 4180) when it holds a comma, a quote or a line break.
    fn text(&mut self, s: &str) {
        self.sep();
        if s.bytes().any(|b| matches!(b, b',' | b'"' | b'\n' | b'\r')) {
            self.out.push(b'"');
            self.out
                .extend_from_slice(s.replace('"', "\"\"").as_bytes());
            self.out.push(b'"');
        } else {
            self.out.extend_from_slice(s.as_bytes());
        }
    }
}

fn path_fields(f: &mut Fields<'_>, p: &PointResult) {
    let Some(j) = &p.path else {
        f.text("1");
        for _ in &PATH_COLUMNS[1..6] {
            f.text("");
        }
        f.text(p.zone().name());
        f.text("");
        f.text("");
        f.text("");
        return;
    };
    f.text(&j.stages.len().to_string());
    f.num(Some(j.effective * 100.0), 3);
    f.num(j.angle_deg, 2);
    f.num(j.limit.map(|l| l * 100.0), 3);
    f.num(j.use_pct, 2);
    f.num(j.bend_deg, 2);
    f.text(j.strain_zone.name());
    f.text(j.zone.name());
    f.text(if j.turned { "yes" } else { "" });
    let mut notes = j.notes.clone();
    if j.straight && j.angle_deg.is_some() && j.stages.len() > 1 {
        notes.push("straight within the noise: judged by the strain curve".into());
    }
    f.text(&notes.join("; "));
}

fn grid_fields(f: &mut Fields<'_>, p: &PointResult) {
    let Some(g) = &p.grid else {
        for _ in GRID_COLUMNS {
            f.text("");
        }
        return;
    };
    f.num(g.major_angle_deg, 2);
    f.num(g.rotation_deg, 3);
    for i in 0..3 {
        f.num(g.normal.map(|n| n[i]), 6);
    }
    f.num(g.z, 3);
    f.num(Some(g.reference_centre[0]), 3);
    f.num(Some(g.reference_centre[1]), 3);
    f.text(&g.nodes.to_string());
}

/// The whole table of `points` as text (for in-memory inputs and tests).
pub fn table(layout: &Layout, points: &[PointResult]) -> String {
    let mut s = layout.header_line().into_bytes();
    for p in points {
        layout.push_row(&mut s, p);
    }
    String::from_utf8(s).expect("the table is built from text")
}
