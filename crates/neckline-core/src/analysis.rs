//! One analysis: measurements turned into strains, judged, and summarised. The [`Analysis`] is
//! the one result that every output (JSON, terminal, plots, report) is written from, so they
//! never disagree; points.csv is written row by row from the same judged locations as they
//! stream past (see [`crate::stream`]).

use crate::assess::{judge_reading, Judgement, Settings, Zone};
use crate::error::Location;
use crate::job::Job;
use crate::kinematics::StrainState;
use crate::limit::LimitCurve;
use crate::measure::{Measurement, Reading, RejectedRow, STRETCH_RANGE};
use crate::strain::Stretch;
use crate::summary::{Summary, ThicknessCheck, View};
use crate::units::LengthUnit;
use std::path::{Path, PathBuf};

/// The caution carried by every output.
pub const CAUTION: &str = "Caution: neckline is an aid to judgement. The user's own forming-limit \
data, local codes and licensed engineering practice govern every decision on parts and tools.";

/// Lengths that apply to every row unless a row says otherwise.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lengths {
    /// Unit of all lengths in the measurement file.
    pub unit: LengthUnit,
    /// Initial circle diameter (a per-row `d0` overrides it).
    pub d0: Option<f64>,
    /// Initial sheet thickness.
    pub t0: Option<f64>,
}

/// One judged location.
#[derive(Debug, Clone, PartialEq)]
pub struct PointResult {
    /// The measurement as read.
    pub input: Measurement,
    /// The initial diameter used (`None` when strains were given).
    pub d0: Option<f64>,
    /// The strains.
    pub strain: StrainState,
    /// Computed thickness, when t0 is known.
    pub thickness: Option<f64>,
    /// The judgement against the curve.
    pub judgement: Judgement,
    /// Element values when the location was computed from grid nodes (`None` for a circle).
    pub grid: Option<Box<crate::grid::GridExtras>>,
    /// The path criterion's judgement, for a location measured after several stages.
    pub path: Option<Box<crate::path::PathJudgement>>,
}

impl PointResult {
    /// Measured minus computed thickness, percent of the computed one: a cross-check of the
    /// reading (or of d0, t0) where a thickness was measured and t0 is known.
    pub fn thickness_diff_pct(&self) -> Option<f64> {
        let computed = self.thickness?;
        Some(100.0 * (self.input.thickness? - computed) / computed)
    }

    /// Measured minus computed thinning, percentage points: the same cross-check where the
    /// measuring system reports the thickness reduction (computed `1 − exp(ε3)` by
    /// incompressibility).
    pub fn thinning_diff_pp(&self) -> Option<f64> {
        Some(100.0 * (self.input.thinning? - self.strain.thinning))
    }

    /// The zone.
    pub fn zone(&self) -> Zone {
        self.judgement.zone
    }
}

/// A location ready to be judged: its strains are known.
#[derive(Debug, Clone, PartialEq)]
pub struct StateInput {
    /// The location as read (for grid elements: id, line, axes `λ·d0` of the equivalent
    /// circle, centre x, y).
    pub input: Measurement,
    /// The initial circle diameter (for grid elements: `d0 = √(4A/π)` of the blank area);
    /// `None` when strains were given.
    pub d0: Option<f64>,
    /// The strains.
    pub strain: StrainState,
    /// A grid element's extra values.
    pub grid: Option<Box<crate::grid::GridExtras>>,
}

/// What every location of one file is judged with.
#[derive(Debug, Clone)]
pub struct Context {
    /// The curve.
    pub curve: LimitCurve,
    /// The settings.
    pub settings: Settings,
    /// The lengths.
    pub lengths: Lengths,
    /// Whether the file gives strains (the reading error is then in percentage points).
    pub strain_input: bool,
}

impl Context {
    /// The strain error of one reading as a fraction: `δd/d0` for axes (common practice:
    /// 0.025 mm on a 2.5 mm circle is 1 % strain), the reading error itself (percentage
    /// points) for strains given directly.
    pub fn strain_error(&self, d0: Option<f64>) -> Option<f64> {
        let r = self.settings.reading_error?;
        match d0 {
            Some(d0) => Some(r / d0),
            None => Some(r / 100.0),
        }
    }

    /// Judge one location.
    pub fn judge(&self, s: StateInput) -> PointResult {
        let mut p = self.judge_parts(s.input, s.d0, s.strain);
        p.grid = s.grid;
        if p.grid.is_some() {
            // Grid elements: the reading error is on the node coordinates, not on axes.
            crate::grid::node_reading_uncertainty(&mut p, &self.curve, &self.settings);
        }
        p
    }

    /// Judge a measured location from its parts (no grid values).
    pub fn judge_parts(
        &self,
        input: Measurement,
        d0: Option<f64>,
        strain: StrainState,
    ) -> PointResult {
        PointResult {
            judgement: judge_reading(&strain, self.strain_error(d0), &self.curve, &self.settings),
            thickness: self.lengths.t0.map(|t0| strain.thickness(t0)),
            input,
            d0,
            strain,
            grid: None,
            path: None,
        }
    }
}

/// The strains of one measured location, or why the row cannot give them.
pub fn state_of(m: Measurement, file: &Path, lengths: &Lengths) -> Result<StateInput, RejectedRow> {
    let (d0, strain) = strain_of(&m, file, lengths)?;
    Ok(StateInput {
        input: m,
        d0,
        strain,
        grid: None,
    })
}

/// The d0 used (none for strains given directly) and the strains of one measured location, or
/// why the row cannot give them.
pub fn strain_of(
    m: &Measurement,
    file: &Path,
    lengths: &Lengths,
) -> Result<(Option<f64>, StrainState), RejectedRow> {
    let (major, minor, row_d0) = match m.reading {
        Reading::Strains(t) => {
            let strain = StrainState::from_stretches(t.major.stretch(), t.minor.stretch());
            return Ok((None, strain));
        }
        Reading::Axes { major, minor, d0 } => (major, minor, d0),
    };
    let reject = |reason: String| RejectedRow {
        location: Location::file(file).at_line(m.line),
        id: Some(m.id.clone()),
        reason,
    };
    let d0 = row_d0.or(lengths.d0).ok_or_else(|| {
        reject("no initial circle diameter: give a d0 column, --d0 or d0 in the job file".into())
    })?;
    for (value, column) in [(major, "major"), (minor, "minor")] {
        let ratio = value / d0;
        if !(STRETCH_RANGE.0..=STRETCH_RANGE.1).contains(&ratio) {
            let mut r = reject(format!(
                "{column} {value} is {ratio:.3} times d0 {d0}: outside the plausible {} to {} \
                 (wrong d0, unit or column?)",
                STRETCH_RANGE.0, STRETCH_RANGE.1
            ));
            r.location.column_name = Some(column.into());
            return Err(r);
        }
    }
    match (
        Stretch::from_lengths(major, d0),
        Stretch::from_lengths(minor, d0),
    ) {
        (Some(a), Some(b)) => Ok((Some(d0), StrainState::from_stretches(a, b))),
        _ => Err(reject(format!(
            "axes {major} and {minor} with d0 {d0} give no strain"
        ))),
    }
}

/// A whole analysed file: its settings and the summary of its judged locations.
#[derive(Debug, Clone)]
pub struct Analysis {
    /// The measurement file.
    pub input: PathBuf,
    /// Job description.
    pub job: Job,
    /// The lengths used.
    pub lengths: Lengths,
    /// The curve judged against.
    pub curve: LimitCurve,
    /// The settings used.
    pub settings: Settings,
    /// Whether the file gave strains rather than axes.
    pub strain_input: bool,
    /// The judged locations, summarised.
    pub summary: Summary,
    /// The forming stages in order, for a file whose locations were measured after several.
    pub stages: Vec<String>,
    /// Things the user should know (clamps, ignored columns).
    pub warnings: Vec<String>,
    /// The input files and their SHA-256, where the command recorded them.
    pub files: Vec<crate::digest::FileDigest>,
}

/// The overall verdict of an analysis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// At least one failed location.
    Fail,
    /// No failure, at least one marginal location.
    Marginal,
    /// No failure or marginal location, but some locations could not be judged (outside the
    /// curve's range, or rows rejected).
    Incomplete,
    /// Every location judged and none failed or marginal.
    Pass,
}

impl Verdict {
    /// Name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Verdict::Fail => "fail",
            Verdict::Marginal => "marginal",
            Verdict::Incomplete => "incomplete",
            Verdict::Pass => "pass",
        }
    }
}

/// A warning when the curve was made for a sheet more than 10 % thicker or thinner than t0:
/// forming limits rise with thickness (Keeler-Brazier: +14.13 t), so a curve for other sheet
/// judges the part wrongly.
fn thickness_mismatch(curve: &LimitCurve, lengths: &Lengths) -> Option<String> {
    let curve_t = curve.thickness_mm?;
    let t0 = crate::units::Length::new(lengths.t0?, lengths.unit).mm();
    ((curve_t - t0).abs() > 0.1 * t0).then(|| {
        format!(
            "the limit curve is for {curve_t} mm sheet, but t0 is {t0:.3} mm: \
             use a curve for this thickness"
        )
    })
}

impl Analysis {
    /// An analysis with nothing judged yet: fold locations into `summary`.
    pub fn new(input: PathBuf, job: Job, ctx: Context, view: View, notes: &[String]) -> Self {
        let mut warnings = ctx.curve.warnings.clone();
        warnings.extend(thickness_mismatch(&ctx.curve, &ctx.lengths));
        warnings.extend(notes.iter().cloned());
        Analysis {
            input,
            job,
            lengths: ctx.lengths,
            curve: ctx.curve,
            settings: ctx.settings,
            strain_input: ctx.strain_input,
            summary: Summary::new(view),
            stages: Vec::new(),
            warnings,
            files: Vec::new(),
        }
    }

    /// Judge `states` (with `rejected` rows) into a new analysis, in memory: for inputs that
    /// are not streamed (grid nodes, tests).
    pub fn of_states(
        input: PathBuf,
        job: Job,
        ctx: Context,
        view: View,
        states: impl IntoIterator<Item = StateInput>,
        rejected: Vec<RejectedRow>,
        notes: &[String],
    ) -> (Self, Vec<PointResult>) {
        let mut a = Analysis::new(input, job, ctx.clone(), view, notes);
        let mut all = Vec::new();
        for s in states {
            let p = ctx.judge(s);
            all.push(p.clone());
            a.summary.fold(p);
        }
        for r in rejected {
            a.summary.rejected.push(r);
        }
        a.finish();
        (a, all)
    }

    /// Add the warnings that need the whole file (strain columns that disagree).
    pub fn finish(&mut self) {
        self.summary.flush();
        let d = &self.summary.disagree;
        if d.total > 0 {
            self.warnings.push(format!(
                "engineering and true strain disagree beyond rounding (0.01 pp) in {} row{}, \
                 first at {}: true strain was used",
                d.total,
                if d.total == 1 { "" } else { "s" },
                d.items.first().map_or("", String::as_str)
            ));
        }
    }

    /// Locations judged.
    pub fn total(&self) -> usize {
        self.summary.total
    }

    /// Locations kept for drawing: all of them when the file is small (see
    /// [`Summary::complete`]).
    pub fn points(&self) -> &[PointResult] {
        &self.summary.kept
    }

    /// Rejected rows (the first ones; [`Analysis::rejected_total`] counts them all).
    pub fn rejected(&self) -> &[RejectedRow] {
        &self.summary.rejected.items
    }

    /// How many rows were rejected.
    pub fn rejected_total(&self) -> usize {
        self.summary.rejected.total
    }

    /// Measured against computed thickness; `None` when no location has both.
    pub fn thickness_check(&self) -> Option<&ThicknessCheck> {
        self.summary.thickness.as_ref()
    }

    /// Number of points in each zone, worst zone first.
    pub fn counts(&self) -> Vec<(Zone, usize)> {
        Zone::ALL
            .into_iter()
            .map(|z| (z, self.summary.count(z)))
            .collect()
    }

    /// Number of points in `zone`.
    pub fn count(&self, zone: Zone) -> usize {
        self.summary.count(zone)
    }

    /// Ids of the locations whose zone could change within the reading error, in file order
    /// (the first ones), and how many there are.
    pub fn borderline(&self) -> (&[String], usize) {
        (
            &self.summary.borderline.items,
            self.summary.borderline.total,
        )
    }

    /// The `n` worst judged points (at most [`crate::summary::WORST_KEPT`]): failed before
    /// marginal before the rest, then smallest vertical margin first.
    pub fn worst(&self, n: usize) -> Vec<&PointResult> {
        self.summary.worst.iter().take(n).collect()
    }

    /// The overall verdict.
    pub fn verdict(&self) -> Verdict {
        if self.count(Zone::Failed) > 0 {
            Verdict::Fail
        } else if self.count(Zone::Marginal) > 0 {
            Verdict::Marginal
        } else if self.count(Zone::Uncovered) > 0 || self.rejected_total() > 0 {
            Verdict::Incomplete
        } else {
            Verdict::Pass
        }
    }

    /// Whether `--fail-on zone` should make the run exit 1: any point in `zone` or a worse one
    /// (failed is worse than marginal). Uncovered points and rejected rows always count: they
    /// cannot be shown safe.
    pub fn trips(&self, zone: Zone) -> bool {
        self.rejected_total() > 0
            || self.count(Zone::Uncovered) > 0
            || Zone::ALL
                .into_iter()
                .filter(|z| *z <= zone)
                .any(|z| self.count(z) > 0)
    }
}
