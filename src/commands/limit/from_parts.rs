//! `neckline limit from-parts`: a press-shop curve fitted to circles read on necked and split
//! parts. The parts file is read once into memory and hashed, so that the curve's `source`
//! records the SHA-256 of the very bytes it was fitted to; the fit itself is
//! [`neckline_core::limit::from_parts::fit`].

use super::emit::{emit_curve, CurveOutArgs, CurveWrite, PictureFormat};
use crate::args::LengthArgs;
use crate::commands::{paragraph, Outcome};
use clap::Args;
use neckline_core::digest::sha256_hex;
use neckline_core::error::{Error, Result};
use neckline_core::job::Job;
use neckline_core::limit::from_parts::{self, Band, FitSettings, PartCircle, PartsFit};
use neckline_core::limit::writer::{GeneratedCurve, SHOP_CURVE_WORDS, SHOP_HEADER, TOOL_VERSION};
use neckline_core::limit::LimitCurve;
use neckline_core::measure::{Measurement, RejectedRow};
use neckline_core::output::input_name;
use neckline_core::strain::{StrainMeasure, TrueStrain};
use neckline_core::units::Lengths;
use neckline_core::CAUTION;
use neckline_render::parts;
use std::io::Read;
use std::path::{Path, PathBuf};

/// Arguments of `limit from-parts`. Shared flags whose meaning differs here get their own help
/// text.
#[derive(Debug, Clone, Args)]
#[command(
    mut_arg("job", |a| a.help(
        "Job file (TOML): d0, t0, unit, [columns], and the material and lot recorded in the \
         curve. Flags given here override it"
    )),
    mut_arg("t0", |a| a.help(
        "Initial sheet thickness, in --unit, recorded as the curve's thickness"
    )),
    mut_arg("out", |a| a.help(
        "Write the curve to this file (atomically) and print the fit's summary: counts per \
         condition, evidence, boundary width, the overlap table per knot and the plane-strain \
         limit [default: the curve to standard output, the summary to standard error]"
    )),
    mut_arg("name", |a| a.help(
        "Curve name shown on outputs [default: \"Press-shop curve, \" and the file's name]"
    )),
    mut_arg("material", |a| a.help(
        "Material grade and lot, recorded in the file [default: the job file's material and lot]"
    )),
    mut_arg("plot", |a| a.help(
        "Also draw the curve with the circles by condition and the overlap band at each knot, \
         in true strain: FILE.svg or FILE.png"
    )),
)]
pub struct FromPartsArgs {
    /// Circles read on necked or split parts: a measurement CSV (id, major, minor[, d0, ...])
    /// with a `condition` column (safe, necked, split; empty = not observed); `-` = stdin.
    #[arg(value_name = "PARTS.csv")]
    pub parts: PathBuf,
    /// Lengths and job file (d0 for the strains; t0 recorded as the curve's thickness).
    #[command(flatten)]
    pub lengths: LengthArgs,
    /// Knot spacing, percent true minor strain; also the width of a range of evidence.
    #[arg(long, value_name = "PCT", default_value_t = 5.0)]
    pub knot_spacing: f64,
    /// Weight of the smoothness penalty on the squared changes of slope at the knots.
    #[arg(long, value_name = "LAMBDA", default_value_t = 0.1)]
    pub smoothing: f64,
    /// Smallest boundary width (logistic scale) the fit may find, percent true strain.
    #[arg(long, value_name = "PCT", default_value_t = 0.5)]
    pub scatter_min: f64,
    /// Output file and name.
    #[command(flatten)]
    pub out: CurveOutArgs,
}

/// Run `limit from-parts`.
pub fn run(a: &FromPartsArgs) -> Result<Outcome> {
    let settings = FitSettings {
        knot_spacing: a.knot_spacing / 100.0,
        smoothing: a.smoothing,
        scale_min: a.scatter_min / 100.0,
        balanced: true,
    };
    settings
        .validate()
        .map_err(|m| Error::Usage(format!("from-parts: {m}")))?;
    let mut inputs = vec![a.parts.clone()];
    inputs.extend(a.lengths.job.clone());
    let set = a.out.begin(&inputs)?;
    let data = read_parts(&a.parts, &a.lengths)?;
    require_circles(&data, &a.parts)?;
    const SHOWN: usize = 10;
    for r in data.rejected.iter().take(SHOWN) {
        eprintln!("warning: row left out: {r}");
    }
    if data.rejected.len() > SHOWN {
        eprintln!(
            "warning: ... and {} more rows left out",
            data.rejected.len() - SHOWN
        );
    }
    let fit = from_parts::fit(&data.circles, &settings)
        .map_err(|m| Error::Usage(format!("{}: {m}", input_name(&a.parts))))?;
    for flag in fit.flags() {
        eprintln!("warning: {}: {flag}", input_name(&a.parts));
    }
    let curve = parts_curve(a, &data, &fit);
    emit_curve(
        &curve,
        &a.out,
        CurveWrite {
            header: SHOP_HEADER,
            inputs: &inputs,
            set,
            picture: |c: &LimitCurve, format: PictureFormat| {
                parts_picture(c, &fit, &data.circles, &a.parts, format)
            },
            summary: |c: &LimitCurve, written: Option<&Path>| {
                parts_summary(c, written, &fit, &data)
            },
        },
    )
}

/// Refuse a file that gave no circle with a condition, saying why: no row usable (the first
/// rejection quoted), or no condition marked.
fn require_circles(data: &PartsData, path: &Path) -> Result<()> {
    if !data.circles.is_empty() {
        return Ok(());
    }
    let name = input_name(path);
    if let Some(first) = data.rejected.first() {
        return Err(Error::Usage(format!(
            "{name}: no circle with a condition could be read ({} rows left out; first: {first})",
            data.rejected.len()
        )));
    }
    Err(Error::Usage(format!(
        "{name}: none of its {} circles has a condition: the file needs a `condition` column \
         marking each circle read on a necked or split part `safe`, `necked` or `split`",
        data.unmarked
    )))
}

/// The circles of a parts file with a condition, and what was left out.
#[derive(Debug, Clone)]
pub struct PartsData {
    /// Circles with a condition, in file order.
    pub circles: Vec<PartCircle>,
    /// Rows read but with no condition marked.
    pub unmarked: usize,
    /// Rows rejected (unreadable, or no usable d0), with reasons.
    pub rejected: Vec<RejectedRow>,
    /// Lowercase hex SHA-256 of the file's bytes as read.
    pub sha256: String,
    /// The lengths used.
    pub lengths: Lengths,
    /// The job file, if any.
    pub job: Job,
}

/// Read the parts file (`-` = stdin) once into memory, hash those bytes, and read the circles
/// from the same bytes, so that the recorded hash is that of the data the curve was fitted to.
/// Strains: d0 from the row, else `--d0`, else the job file, as `check` does.
pub fn read_parts(path: &Path, lengths: &LengthArgs) -> Result<PartsData> {
    let job = crate::commands::load_job(lengths)?;
    let l = crate::commands::resolve_lengths(lengths, &job)?;
    let mut bytes = Vec::new();
    neckline_core::measure::open_input(path)?
        .read_to_end(&mut bytes)
        .map_err(|e| Error::io(path, e))?;
    let sha256 = sha256_hex(&bytes);
    let map = crate::commands::column_map(lengths, &job);
    let set = neckline_core::measure::read_measurements_from(&bytes[..], path, &map)?;
    let mut data = PartsData {
        circles: Vec::new(),
        unmarked: 0,
        rejected: set.rejected,
        sha256,
        lengths: l,
        job,
    };
    for m in set.points {
        match part_circle(&m, path, &l) {
            Ok(Some(c)) => data.circles.push(c),
            Ok(None) => data.unmarked += 1,
            Err(r) => data.rejected.push(r),
        }
    }
    data.rejected.sort_by_key(|r| r.location.line);
    Ok(data)
}

/// The true strains of one marked circle; `Ok(None)` when no condition is marked.
fn part_circle(
    m: &Measurement,
    file: &Path,
    l: &Lengths,
) -> std::result::Result<Option<PartCircle>, RejectedRow> {
    let Some(condition) = m.condition else {
        return Ok(None);
    };
    // The same strains, from axes or strain columns, with the same refusals as `check`.
    let s = neckline_core::point::state_of(m.clone(), file, l)?.strain;
    Ok(Some(PartCircle {
        id: m.id.clone(),
        minor: s.true_strain.minor.value(),
        major: s.true_strain.major.value(),
        condition,
    }))
}

/// The curve file of a fit: the knots in true strain, and a `source` that records the data file
/// and its SHA-256, the counts per condition, the method and its settings, the version and the
/// words of [`SHOP_CURVE_WORDS`].
fn parts_curve(a: &FromPartsArgs, data: &PartsData, fit: &PartsFit) -> GeneratedCurve {
    let c = fit.counts;
    let s = fit.settings;
    let first = fit.knots[0];
    let last = fit.knots[fit.knots.len() - 1];
    let d0 = data.lengths.d0.map_or_else(
        || "d0 from each row".into(),
        |d| format!("d0 = {d} {} unless a row gives its own", data.lengths.unit),
    );
    let source = format!(
        "{SHOP_CURVE_WORDS}. Data: {} (SHA-256 {}); circles: {} safe, {} necked, {} split ({} \
         rows without a condition, {} rows rejected); {d0}. Method: class-balanced penalised \
         logistic likelihood of the condition (necked or split = at or above the limit; each \
         kind weighted to half the total) in the vertical true-strain distance to a \
         piecewise-linear curve; {} knots from {:.2} to {:.2} % true minor strain (ends and \
         multiples of {} %), smoothness lambda = {} on the squared changes of slope, logistic \
         scale s fitted = {:.3} % (floor {} %, grid ratio {}); {} of {} circles on the wrong \
         side of the 50 % line. Points: the {} % necking-probability line less {} standard \
         errors of the 50 % line (a lower bound); the 50 % line is in points_50; supported \
         (both kinds of circle) {}; true strain; generated by neckline {TOOL_VERSION}",
        input_name(&a.parts),
        data.sha256,
        c.safe,
        c.necked,
        c.split,
        data.unmarked,
        data.rejected.len(),
        fit.knots.len(),
        100.0 * first,
        100.0 * last,
        100.0 * s.knot_spacing,
        s.smoothing,
        100.0 * fit.scale,
        100.0 * s.scale_min,
        from_parts::SCALE_RATIO,
        fit.wrong_side(),
        c.safe + c.failed(),
        100.0 * fit.level,
        from_parts::CONFIDENCE_Z,
        fit.supported.map_or_else(
            || "nowhere".to_string(),
            |(a, b)| format!("from {:.2} to {:.2} % minor strain", 100.0 * a, 100.0 * b)
        ),
    );
    let mut extra = Vec::new();
    if let Some((lo, hi)) = fit.supported {
        extra.push(format!(
            "supported = [{:.4}, {:.4}]",
            100.0 * lo,
            100.0 * hi
        ));
    }
    extra.push("points_50 = [".to_string());
    for p in fit.median_pct() {
        extra.push(format!("  [{:.4}, {:.4}],", p[0], p[1]));
    }
    extra.push("]".to_string());
    let material = a.out.material.clone().or_else(|| {
        let j = &data.job;
        match (&j.material, &j.lot) {
            (Some(m), Some(l)) => Some(format!("{m}, {l}")),
            (m, l) => m.clone().or_else(|| l.clone()),
        }
    });
    let file = a.parts.file_name().map_or_else(
        || "standard input".into(),
        |n| n.to_string_lossy().into_owned(),
    );
    GeneratedCurve {
        name: a
            .out
            .name
            .clone()
            .unwrap_or_else(|| format!("Press-shop curve, {file}")),
        source,
        material,
        thickness_mm: data
            .lengths
            .t0
            .map(|t| neckline_core::units::Length::new(t, data.lengths.unit).mm()),
        measure: StrainMeasure::True,
        points_pct: fit.points_pct(),
        notes: overlap_table(fit),
        extra,
    }
}

/// The overlap per knot, as text lines (true strain, percent).
pub fn overlap_table(fit: &PartsFit) -> Vec<String> {
    let mut v = vec![
        "Overlap per knot (true strain, %), from the circles nearest each knot:".to_string(),
        "50 % = the fitted boundary; written = the curve's points (lower bound);".to_string(),
        "wrong = safe on or above the 50 % line, necked or split below it;".to_string(),
        "band = where safe and necked-or-split circles mix, or the gap between them.".to_string(),
        format!(
            "{:>8} {:>8} {:>8} {:>5} {:>7} {:>6} {:>6}  band",
            "minor", "50 %", "written", "safe", "necked", "split", "wrong"
        ),
    ];
    for (r, w) in fit.overlap.iter().zip(&fit.conservative) {
        let band = match r.band {
            Band::Mix(lo, hi) => format!("mix {:.1} to {:.1}", 100.0 * lo, 100.0 * hi),
            Band::Gap(lo, hi) => format!("gap {:.1} to {:.1}", 100.0 * lo, 100.0 * hi),
            Band::OneSided => "one kind only".into(),
        };
        v.push(format!(
            "{:>8.2} {:>8.2} {:>8.2} {:>5} {:>7} {:>6} {:>6}  {band}",
            100.0 * r.minor,
            100.0 * r.major,
            100.0 * w,
            r.counts.safe,
            r.counts.necked,
            r.counts.split,
            r.wrong_side()
        ));
    }
    v
}

/// What `from-parts` tells the user after writing the curve.
fn parts_summary(c: &LimitCurve, path: Option<&Path>, fit: &PartsFit, data: &PartsData) -> String {
    let n = fit.counts;
    let plane = c.limit_major_eng(TrueStrain(0.0)).map_or_else(
        || "not covered (no circles at plane strain)".into(),
        |e| format!("{:.2} %", e.percent()),
    );
    let mut s = String::new();
    if let Some(path) = path {
        s.push_str(&format!(
            "Wrote {} ({} knots, true strain): {}\n",
            path.display(),
            c.points.len(),
            c.name
        ));
    }
    s.push_str(&format!(
        "Circles: {} safe, {} necked, {} split; {} rows without a condition, {} rejected\n\
         Evidence (both kinds) on {} ranges of minor strain {:.1} % wide\n\
         Boundary width (logistic scale s): {:.2} % true strain{}\n\n",
        n.safe,
        n.necked,
        n.split,
        data.unmarked,
        data.rejected.len(),
        fit.evidence.len(),
        100.0 * fit.settings.knot_spacing,
        100.0 * fit.scale,
        if fit.scale_at_floor {
            ",\n  at its floor: safe and necked circles barely mix; the curve runs through the gap"
        } else {
            ""
        }
    ));
    for line in overlap_table(fit) {
        s.push_str(&line);
        s.push('\n');
    }
    let median = if fit.knots[0] <= 0.0 && fit.knots[fit.knots.len() - 1] >= 0.0 {
        format!("{:.2} %", 100.0 * fit.major_at(0.0).exp_m1())
    } else {
        "not covered".into()
    };
    s.push_str(&format!(
        "\nCircles on the wrong side of the 50 % line: {} of {}\n\
         Circles near the boundary (within {:.0} % of the 50 % line): {} safe, {} necked or split\n\
         Plane-strain limit (FLC0), written curve ({} % line less {} standard errors): {plane} \
         engineering major strain\n\
         Plane-strain 50 % line: {median} engineering major strain\n\
         Supported (both kinds of circle): {}\n",
        fit.wrong_side(),
        n.safe + n.failed(),
        100.0 * from_parts::NEAR_BAND,
        fit.near.0,
        fit.near.1,
        100.0 * fit.level,
        from_parts::CONFIDENCE_Z,
        fit.supported.map_or_else(
            || "nowhere".to_string(),
            |(a, b)| format!("{:.2} to {:.2} % true minor strain", 100.0 * a, 100.0 * b)
        ),
    ));

    let words = format!("A {SHOP_CURVE_WORDS}.");
    s.push_str(&paragraph(&words));
    s.push_str(&paragraph(CAUTION));
    s
}

/// The press-shop curve on a diagram in true strain with the circles by condition, the overlap
/// band at each knot and the reference strain paths, in the plotting style of `check`.
fn parts_picture(
    curve: &LimitCurve,
    fit: &PartsFit,
    circles: &[PartCircle],
    input: &Path,
    format: PictureFormat,
) -> std::io::Result<Vec<u8>> {
    format.render(
        || parts::parts_svg(curve, fit, circles, input),
        || parts::parts_png(curve, fit, circles, input),
    )
}
