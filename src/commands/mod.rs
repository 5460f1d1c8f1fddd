//! One module per subcommand: its arguments, its help text and a short `run`.

pub mod check;
pub mod compare;
pub mod completions;
pub mod fit;
pub mod grid;
pub mod limit;
pub mod manual;
pub mod outputs;
pub mod progress;
pub mod strains;

use crate::args::{JudgeArgs, LengthArgs};
use neckline_core::analysis::Analysis;
use neckline_core::assess::Settings;
use neckline_core::error::{Error, Result};
use neckline_core::job::Job;
use neckline_core::limit::LimitCurve;
use neckline_core::measure::ColumnMap;
use neckline_core::part_outline::{self, PartOutline};
use neckline_core::summary::MapPlane;
use neckline_core::units::Lengths;
use neckline_core::units::{Length, LengthUnit};
use std::path::{Path, PathBuf};

/// `text` as a paragraph for the terminal: wrapped at word boundaries to
/// [`neckline_render::terminal::WIDTH`] columns, without indent, each line ending in a newline.
pub fn paragraph(text: &str) -> String {
    neckline_render::terminal::wrap(text, neckline_render::terminal::WIDTH, "")
}

/// What a command asks `main` to exit with.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Outcome {
    /// Done (exit 0).
    Done,
    /// Done, and a `--fail-on` zone was reached (exit 1).
    Tripped,
}

/// Read the job file, if any.
pub fn load_job(args: &LengthArgs) -> Result<Job> {
    let job = args
        .job
        .as_deref()
        .map_or_else(|| Ok(Job::default()), Job::load)?;
    set_input_options(&args.input, &job);
    Ok(job)
}

/// How the inputs are read from here on: the flags over the job file's `encoding` and `sheet`
/// (the job's encoding was checked when it was read).
pub fn set_input_options(args: &crate::args::InputArgs, job: &Job) {
    let encoding = args.encoding.or_else(|| {
        job.encoding
            .as_deref()
            .and_then(|e| neckline_core::text::TextEncoding::parse(e).ok())
    });
    let sheet = args
        .sheet
        .clone()
        .or_else(|| job.sheet.as_ref().map(|s| s.to_string()));
    neckline_core::text::set_options(neckline_core::text::InputOptions { encoding, sheet });
}

/// The lengths from flags over the job file; each given length must be positive. The unit in
/// use is `--unit`, else the job's, else mm; the job's d0 and t0 are converted from the job's
/// unit into it, and flags are read in it.
pub fn resolve_lengths(args: &LengthArgs, job: &Job) -> Result<Lengths> {
    let positive = |v: Option<f64>, what: &str| match v {
        Some(x) if !(x.is_finite() && x > 0.0) => Err(Error::Usage(format!(
            "{what} must be a positive length, found {x}"
        ))),
        _ => Ok(v),
    };
    let job_unit = job.unit.unwrap_or_default();
    let unit = args.unit.unwrap_or(job_unit);
    let from_job = |v: Option<f64>| v.map(|x| Length::new(x, job_unit).in_unit(unit));
    Ok(Lengths {
        unit,
        d0: positive(args.d0.or(from_job(job.d0)), "d0")?,
        t0: positive(args.t0.or(from_job(job.t0)), "t0")?,
    })
}

/// The settings from flags over the job file over the defaults. `unit` is the unit in use
/// (see [`resolve_lengths`]): the job's `reading_error` is converted into it from the job's
/// unit, like its d0 and t0; `--reading-error` is read in it.
pub fn resolve_settings(args: &JudgeArgs, job: &Job, unit: LengthUnit) -> Result<Settings> {
    let d = Settings::default();
    let job_unit = job.unit.unwrap_or_default();
    let job_reading = job
        .reading_error
        .map(|x| Length::new(x, job_unit).in_unit(unit));
    let s = Settings {
        margin_pct: args.margin.or(job.margin).unwrap_or(d.margin_pct),
        low_stretch_pct: args
            .low_stretch
            .or(job.low_stretch)
            .unwrap_or(d.low_stretch_pct),
        max_thinning_pct: args.max_thinning.or(job.max_thinning),
        thickening_pct: args
            .thickening
            .or(job.thickening)
            .unwrap_or(d.thickening_pct),
        reading_error: args.reading_error.or(job_reading),
    };
    s.validate().map_err(Error::Usage)?;
    Ok(s)
}

/// The limit curve file: the flag, else the job file's.
pub fn limit_path(args: &JudgeArgs, job: &Job) -> Result<PathBuf> {
    args.limit
        .clone()
        .or_else(|| job.limit.clone())
        .ok_or_else(|| {
            Error::Usage(
                "no limit curve: give --limit LIMIT.toml or `limit` in the job file".into(),
            )
        })
}

/// The column map: the job file's `[columns]` under `--column`.
pub fn column_map(args: &LengthArgs, job: &Job) -> ColumnMap {
    let mut map = ColumnMap::default();
    let origin = args.job.as_deref().map_or_else(
        || "the job file's [columns]".to_string(),
        |p| format!("{} [columns]", p.display()),
    );
    map.extend(job.columns.clone(), &origin);
    map.extend(args.columns.clone(), "--column");
    map.header_row = args
        .header_row
        .or(job.header_row.map(std::num::NonZeroU64::get));
    map
}

/// Everything a measurement file is judged with, resolved from flags over the job file.
#[derive(Debug, Clone)]
pub struct Prepared {
    /// The job.
    pub job: Job,
    /// The lengths.
    pub lengths: Lengths,
    /// The settings.
    pub settings: Settings,
    /// The curve.
    pub curve: LimitCurve,
    /// The column map.
    pub map: ColumnMap,
    /// The curve file read.
    pub curve_path: PathBuf,
    /// The job file read, if any.
    pub job_path: Option<PathBuf>,
    /// The part's outline read from the job's `outline` file, if it names one.
    pub outline: Option<PartOutline>,
}

impl Prepared {
    /// Resolve the job, lengths, settings, curve and column map.
    pub fn resolve(lengths: &LengthArgs, judge: &JudgeArgs) -> Result<Self> {
        let job = load_job(lengths)?;
        let l = resolve_lengths(lengths, &job)?;
        let settings = resolve_settings(judge, &job, l.unit)?;
        let curve_path = limit_path(judge, &job)?;
        let curve = LimitCurve::load(&curve_path)?;
        let map = column_map(lengths, &job);
        let outline = job_outline(&job)?;
        Ok(Prepared {
            job,
            lengths: l,
            settings,
            curve,
            map,
            curve_path,
            job_path: lengths.job.clone(),
            outline,
        })
    }

    /// Give `a` the job's outline (before [`Analysis::finish`], which traces one otherwise),
    /// when the map is drawn in the x-y plane the outline file is written in.
    pub fn place_outline(&self, a: &mut Analysis) {
        a.outline = self
            .outline
            .clone()
            .filter(|_| a.summary.view.plane == MapPlane::Xy);
    }
}

/// The part's outline file named by the job, read before any work (so that a bad one stops
/// the run before an output is made).
pub fn job_outline(job: &Job) -> Result<Option<PartOutline>> {
    job.outline.as_deref().map(part_outline::read).transpose()
}

/// Refuse an analysis in which nothing could be judged: `what` says what failed, `of` names
/// the rejected things; the first rejection is quoted.
pub fn require_points(a: Analysis, input: &Path, what: &str, of: &str) -> Result<Analysis> {
    if a.total() == 0 {
        let first = a
            .rejected()
            .first()
            .map(|r| format!("; first: {r}"))
            .unwrap_or_default();
        return Err(Error::Usage(format!(
            "{}: {what} ({} {of} rejected{first})",
            input.display(),
            a.rejected_total()
        )));
    }
    Ok(a)
}
