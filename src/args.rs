//! Arguments shared by several commands (clap only), and the command-line faces of core
//! types that must not depend on clap.

use clap::{Args, ValueEnum};
use neckline_core::assess::Zone;
use neckline_core::summary::MapPlane;
use neckline_core::units::LengthUnit;
use neckline_render::map::MapValue;
use std::path::PathBuf;

/// Lengths and the job file, shared by the commands that read measurements.
#[derive(Debug, Clone, Args)]
pub struct LengthArgs {
    /// Job file (TOML): d0, t0 and unit, and for `check` also the limit curve, the settings and
    /// the part, tryout and material shown on the outputs. Flags given here override it.
    #[arg(long, value_name = "JOB.toml")]
    pub job: Option<PathBuf>,
    /// Initial circle diameter, in --unit (a `d0` column in the file overrides it per row).
    #[arg(long, value_name = "LENGTH")]
    pub d0: Option<f64>,
    /// Initial sheet thickness, in --unit (for thickness; thinning needs no t0).
    #[arg(long, value_name = "LENGTH")]
    pub t0: Option<f64>,
    /// Length unit of the file, --d0 and --t0 [default: mm, or the job file's].
    #[arg(long, value_name = "mm|in")]
    pub unit: Option<LengthUnit>,
    /// Read the file's column HEADER as neckline's column NAME (repeatable; over the job
    /// file's `[columns]`), e.g. --column "major_true_pct=Major strain (%)". Names: id, major,
    /// minor, d0, x, y, z, stage, thickness, thinning_pct, note, major_eng_pct, minor_eng_pct,
    /// major_true_pct, minor_true_pct.
    #[arg(long = "column", value_name = "NAME=HEADER", value_parser = neckline_core::measure::ColumnMap::parse_arg)]
    pub columns: Vec<(String, String)>,
    /// The header's line in the measurement file (1-based), every line before it left aside
    /// (an export's preamble) [default: the job file's `header_row`, else the first line that
    /// holds the needed columns].
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u64).range(1..))]
    pub header_row: Option<u64>,
    /// How the input files are read (encoding, workbook sheet).
    #[command(flatten)]
    pub input: InputArgs,
}

/// How input files are read: their text encoding and a workbook's sheet.
#[derive(Debug, Clone, Default, Args)]
pub struct InputArgs {
    /// Text encoding of the input files: utf-8, utf-16le, utf-16be or windows-1252
    /// [default: from a byte-order mark; else UTF-8 when the whole file is valid UTF-8; else
    /// Windows-1252, with a note].
    #[arg(long, value_name = "NAME", value_parser = neckline_core::text::TextEncoding::parse)]
    pub encoding: Option<neckline_core::text::TextEncoding>,
    /// The sheet of a workbook input (.xlsx, .xlsm, .xls, .xlsb, .ods): its name, or its number
    /// from 1 [default: the job file's `sheet`, else the first].
    #[arg(long, value_name = "NAME|NUMBER")]
    pub sheet: Option<String>,
}

/// The limit curve and the judgement settings.
#[derive(Debug, Clone, Args)]
pub struct JudgeArgs {
    /// Forming-limit curve file (TOML, see limits/) [default: the job file's `limit`].
    #[arg(long, value_name = "LIMIT.toml")]
    pub limit: Option<PathBuf>,
    /// Safety band below the curve, percentage points of engineering major strain [default: 10].
    #[arg(long, value_name = "PCT")]
    pub margin: Option<f64>,
    /// Under-stretch threshold, percent engineering major strain [default: 2].
    #[arg(long, value_name = "PCT")]
    pub low_stretch: Option<f64>,
    /// Maximum thinning, percent of t0; a point at or past it is failed, whatever the curve's
    /// range (thinning needs no curve) [default: not checked].
    #[arg(long, value_name = "PCT")]
    pub max_thinning: Option<f64>,
    /// Thickening threshold: the thickness increase, percent of t0, at which a location is
    /// called thickening (wrinkle tendency) [default: 2, a judgement of ours: beyond the
    /// √2 · 1 % thickness-strain error of a 1 % reading error per axis].
    #[arg(long, value_name = "PCT")]
    pub thickening: Option<f64>,
    /// Reading error of one axis, in --unit (e.g. 0.02 for a measuring microscope, 0.05 for a
    /// flexible scale); for a file that gives strains, in percentage points of strain (e.g.
    /// 0.5 for an optical system): locations whose zone could change within it are flagged
    /// borderline [default: not flagged].
    #[arg(long, value_name = "LENGTH")]
    pub reading_error: Option<f64>,
    /// Exit with status 1 when any location is failed (`failed`), or failed or marginal
    /// (`marginal`); uncovered locations and rejected rows always count [default: the job
    /// file's `fail_on`, else never].
    #[arg(long, value_name = "failed|marginal", value_parser = parse_fail_on)]
    pub fail_on: Option<Zone>,
}

/// `--fail-on` takes the two zones that stop a qualification: failed and marginal.
fn parse_fail_on(s: &str) -> Result<Zone, String> {
    match s.parse::<Zone>() {
        Ok(z @ (Zone::Failed | Zone::Marginal)) => Ok(z),
        _ => Err(format!("expected `failed` or `marginal`, found `{s}`")),
    }
}

/// The plane of the part map (`--map-plane`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub enum MapPlaneArg {
    /// x across, y up (a part whose main face lies in x-y).
    #[default]
    Xy,
    /// x across, z up.
    Xz,
    /// y across, z up.
    Yz,
}

impl From<MapPlaneArg> for MapPlane {
    fn from(a: MapPlaneArg) -> Self {
        match a {
            MapPlaneArg::Xy => MapPlane::Xy,
            MapPlaneArg::Xz => MapPlane::Xz,
            MapPlaneArg::Yz => MapPlane::Yz,
        }
    }
}

/// What the map colours each location (or cell) by (`--map-value`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, ValueEnum)]
pub enum MapValueArg {
    /// The vertical margin to the limit curve, pp (the worst = the smallest).
    #[default]
    Margin,
    /// The thinning, percent of t0 (the worst = the largest).
    Thinning,
    /// The engineering major strain, percent (the worst = the largest).
    Major,
}

impl From<MapValueArg> for MapValue {
    fn from(a: MapValueArg) -> Self {
        match a {
            MapValueArg::Margin => MapValue::Margin,
            MapValueArg::Thinning => MapValue::Thinning,
            MapValueArg::Major => MapValue::Major,
        }
    }
}
