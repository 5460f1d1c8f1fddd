//! `points.csv`: one row per judged location, strains in percent.

use crate::analysis::{Analysis, PointResult};
use crate::output::push_fixed;
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
pub const CARRIED_COLUMNS: [&str; 7] = [
    "d0",
    "x",
    "y",
    "stage",
    "thickness_measured",
    "thickness_diff_pct",
    "note",
];

/// Columns added when a reading error is set: the margin's uncertainty (percentage points) and
/// `yes` where the zone could change within it.
pub const READING_COLUMNS: [&str; 2] = ["margin_uncertainty_pct", "borderline"];

/// Writes one record field by field through a reused buffer (no allocation per field).
struct Fields<'a, W: Write> {
    w: &'a mut csv::Writer<W>,
    buf: String,
}

impl<W: Write> Fields<'_, W> {
    fn num(&mut self, v: Option<f64>, decimals: usize) -> csv::Result<()> {
        self.buf.clear();
        if let Some(v) = v {
            push_fixed(&mut self.buf, v, decimals);
        }
        self.w.write_field(&self.buf)
    }
    fn pct(&mut self, fraction: f64) -> csv::Result<()> {
        self.num(Some(fraction * 100.0), 3)
    }
    fn text(&mut self, s: &str) -> csv::Result<()> {
        self.w.write_field(s)
    }
    fn end(&mut self) -> csv::Result<()> {
        self.w.write_record(None::<&[u8]>)
    }
}

fn strain_fields<W: Write>(f: &mut Fields<'_, W>, p: &PointResult) -> csv::Result<()> {
    let s = &p.strain;
    f.text(&p.input.id)?;
    f.pct(s.eng.major.value())?;
    f.pct(s.eng.minor.value())?;
    f.pct(s.true_strain.major.value())?;
    f.pct(s.true_strain.minor.value())?;
    f.pct(s.thickness_strain.value())?;
    f.num(p.thickness, 4)?;
    f.pct(s.thinning)?;
    f.pct(s.green.major.value())?;
    f.pct(s.green.minor.value())?;
    f.pct(s.almansi.major.value())?;
    f.pct(s.almansi.minor.value())?;
    f.num(s.beta, 4)?;
    f.pct(s.effective.value())
}

fn judgement_fields<W: Write>(f: &mut Fields<'_, W>, p: &PointResult) -> csv::Result<()> {
    let j = &p.judgement;
    f.num(j.limit_major.map(|l| l.percent()), 3)?;
    f.num(j.margin_pct, 3)?;
    f.num(j.limit_use_pct, 2)?;
    f.text(j.zone.name())
}

fn carried_fields<W: Write>(f: &mut Fields<'_, W>, p: &PointResult) -> csv::Result<()> {
    let m = &p.input;
    f.num(Some(p.d0), 4)?;
    f.num(m.x, 3)?;
    f.num(m.y, 3)?;
    f.text(m.stage.as_deref().unwrap_or(""))?;
    f.num(m.thickness, 4)?;
    f.num(p.thickness_diff_pct(), 2)?;
    f.text(m.note.as_deref().unwrap_or(""))
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

fn grid_fields<W: Write>(f: &mut Fields<'_, W>, p: &PointResult) -> csv::Result<()> {
    let Some(g) = &p.grid else {
        for _ in GRID_COLUMNS {
            f.text("")?;
        }
        return Ok(());
    };
    f.num(g.major_angle_deg, 2)?;
    f.num(g.rotation_deg, 3)?;
    for i in 0..3 {
        f.num(g.normal.map(|n| n[i]), 6)?;
    }
    f.num(g.z, 3)?;
    f.num(Some(g.reference_centre[0]), 3)?;
    f.num(Some(g.reference_centre[1]), 3)?;
    f.text(&g.nodes.to_string())
}

/// Write the full points table (with [`GRID_COLUMNS`] when any location came from grid nodes).
pub fn write_points(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    let with_grid = a.points.iter().any(|p| p.grid.is_some());
    let with_reading = a.settings.reading_error.is_some();
    let extra: &[&str] = if with_grid { &GRID_COLUMNS } else { &[] };
    let reading: &[&str] = if with_reading { &READING_COLUMNS } else { &[] };
    let header = STRAIN_COLUMNS
        .iter()
        .chain(&JUDGEMENT_COLUMNS)
        .chain(&CARRIED_COLUMNS)
        .chain(reading)
        .chain(extra);
    w.write_record(header)?;
    let mut f = Fields {
        w: &mut w,
        buf: String::new(),
    };
    for p in &a.points {
        strain_fields(&mut f, p)?;
        judgement_fields(&mut f, p)?;
        carried_fields(&mut f, p)?;
        if with_reading {
            f.num(p.judgement.uncertainty_pct, 2)?;
            f.text(if p.judgement.borderline { "yes" } else { "" })?;
        }
        if with_grid {
            grid_fields(&mut f, p)?;
        }
        f.end()?;
    }
    w.flush()
}

/// Write the strain columns alone (the `strains` command).
pub fn write_strains(a: &Analysis, out: &mut dyn Write) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(out);
    w.write_record(STRAIN_COLUMNS)?;
    let mut f = Fields {
        w: &mut w,
        buf: String::new(),
    };
    for p in &a.points {
        strain_fields(&mut f, p)?;
        f.end()?;
    }
    w.flush()
}
