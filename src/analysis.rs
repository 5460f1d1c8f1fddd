//! One analysis: measurements turned into strains and judged. This is the one result that every
//! output (CSV, JSON, terminal, plots, report) is written from, so they never disagree.

use crate::assess::{judge_reading, Judgement, Settings, Zone};
use crate::error::Location;
use crate::job::Job;
use crate::kinematics::StrainState;
use crate::limit::LimitCurve;
use crate::measure::{Measurement, MeasurementSet, RejectedRow};
use crate::units::LengthUnit;
use std::path::PathBuf;

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
    /// The initial diameter used.
    pub d0: f64,
    /// The strains.
    pub strain: StrainState,
    /// Computed thickness, when t0 is known.
    pub thickness: Option<f64>,
    /// The judgement against the curve.
    pub judgement: Judgement,
    /// Element values when the location was computed from grid nodes (`None` for a circle).
    pub grid: Option<Box<crate::grid::GridExtras>>,
}

impl PointResult {
    /// Measured minus computed thickness, percent of the computed one: a cross-check of the
    /// reading (or of d0, t0) where a thickness was measured and t0 is known.
    pub fn thickness_diff_pct(&self) -> Option<f64> {
        let computed = self.thickness?;
        Some(100.0 * (self.input.thickness? - computed) / computed)
    }

    /// The zone.
    pub fn zone(&self) -> Zone {
        self.judgement.zone
    }
}

/// A whole analysed file.
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
    /// Judged locations, in file order.
    pub points: Vec<PointResult>,
    /// Rows that were not accepted, with reasons.
    pub rejected: Vec<RejectedRow>,
    /// Things the user should know (clamps, ignored columns).
    pub warnings: Vec<String>,
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

/// A location computed from nodes, ready to be judged.
#[derive(Debug, Clone, PartialEq)]
pub struct StateInput {
    /// The location as if measured (for grid elements: id, line, axes `λ·d0` of the equivalent
    /// circle, centre x, y).
    pub input: Measurement,
    /// The initial circle diameter (for grid elements: `d0 = √(4A/π)` of the blank area).
    pub d0: f64,
    /// The strains.
    pub strain: StrainState,
    /// A grid element's extra values.
    pub grid: Option<Box<crate::grid::GridExtras>>,
}

/// Judge every accepted row of `set`. A row with no d0 (none in the row, none given) is rejected.
pub fn analyse(
    set: MeasurementSet,
    job: Job,
    lengths: Lengths,
    curve: LimitCurve,
    settings: Settings,
) -> Analysis {
    // Strains are computed and judged row by row, so no list of intermediate states is held.
    let mut unusable = Vec::new();
    let (file, l) = (set.source.clone(), lengths);
    let states = set.points.into_iter().filter_map(|m| {
        circle_state(m, &file, &l)
            .map_err(|r| unusable.push(r))
            .ok()
    });
    let mut a = analyse_states(
        set.source,
        states,
        set.rejected,
        &set.ignored_columns,
        job,
        lengths,
        curve,
        settings,
    );
    a.rejected.extend(unusable);
    a.rejected.sort_by_key(|r| r.location.line);
    a
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

/// Plausible range of a measured axis over d0 (engineering strain −80 % to +400 %): outside it
/// the reading, d0 or the unit is wrong, not the sheet.
pub const STRETCH_RANGE: (f64, f64) = (0.2, 5.0);

/// The strains of one measured circle, or why the row cannot give them.
fn circle_state(
    m: Measurement,
    file: &std::path::Path,
    lengths: &Lengths,
) -> Result<StateInput, RejectedRow> {
    let reject = |reason: String| RejectedRow {
        location: Location::file(file).at_line(m.line),
        id: Some(m.id.clone()),
        reason,
    };
    let d0 = m.d0.or(lengths.d0).ok_or_else(|| {
        reject("no initial circle diameter: give a d0 column, --d0 or d0 in the job file".into())
    })?;
    for (value, column) in [(m.major, "major"), (m.minor, "minor")] {
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
    let strain = StrainState::from_circle(d0, m.major, m.minor).ok_or_else(|| {
        reject(format!(
            "axes {} and {} with d0 {d0} give no strain",
            m.major, m.minor
        ))
    })?;
    Ok(StateInput {
        input: m,
        d0,
        strain,
        grid: None,
    })
}

/// Judge locations whose strains are already known (computed from grid nodes): the sibling of
/// [`analyse`] for inputs that are not measured circles. `rejected` lists what could not be
/// computed; `ignored_columns` are reported as a warning.
#[allow(clippy::too_many_arguments)]
pub fn analyse_states(
    source: PathBuf,
    states: impl IntoIterator<Item = StateInput>,
    rejected: Vec<RejectedRow>,
    ignored_columns: &[String],
    job: Job,
    lengths: Lengths,
    curve: LimitCurve,
    settings: Settings,
) -> Analysis {
    let states = states.into_iter();
    let mut points = Vec::with_capacity(states.size_hint().1.unwrap_or(0));
    points.extend(states.map(|s| PointResult {
        judgement: judge_reading(&s.strain, s.d0, &curve, &settings),
        thickness: lengths.t0.map(|t0| s.strain.thickness(t0)),
        input: s.input,
        d0: s.d0,
        strain: s.strain,
        grid: s.grid,
    }));
    let mut warnings = curve.warnings.clone();
    warnings.extend(thickness_mismatch(&curve, &lengths));
    if !ignored_columns.is_empty() {
        warnings.push(format!("ignored columns: {}", ignored_columns.join(", ")));
    }
    Analysis {
        input: source,
        job,
        lengths,
        curve,
        settings,
        points,
        rejected,
        warnings,
    }
}

/// The thickness cross-check over a whole file.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ThicknessCheck<'a> {
    /// Locations with a measured thickness (and a computed one).
    pub measured: usize,
    /// The location whose measured thickness differs most from the computed one.
    pub largest: &'a PointResult,
    /// That difference, percent of the computed thickness.
    pub largest_diff_pct: f64,
}

impl Analysis {
    /// Compare measured with computed thickness; `None` when no location has both.
    pub fn thickness_check(&self) -> Option<ThicknessCheck<'_>> {
        let with: Vec<(&PointResult, f64)> = self
            .points
            .iter()
            .filter_map(|p| p.thickness_diff_pct().map(|d| (p, d)))
            .collect();
        let (largest, d) = with
            .iter()
            .copied()
            .max_by(|a, b| a.1.abs().total_cmp(&b.1.abs()))?;
        Some(ThicknessCheck {
            measured: with.len(),
            largest,
            largest_diff_pct: d,
        })
    }

    /// Number of points in each zone, worst zone first.
    pub fn counts(&self) -> Vec<(Zone, usize)> {
        Zone::ALL
            .into_iter()
            .map(|z| (z, self.points.iter().filter(|p| p.zone() == z).count()))
            .collect()
    }

    /// Number of points in `zone`.
    pub fn count(&self, zone: Zone) -> usize {
        self.points.iter().filter(|p| p.zone() == zone).count()
    }

    /// Points whose zone could change within the reading error, in file order.
    pub fn borderline(&self) -> Vec<&PointResult> {
        self.points
            .iter()
            .filter(|p| p.judgement.borderline)
            .collect()
    }

    /// The `n` worst judged points: failed before marginal before the rest (a point failed by
    /// thinning can keep a vertical margin), then smallest vertical margin first.
    pub fn worst(&self, n: usize) -> Vec<&PointResult> {
        let mut judged: Vec<&PointResult> = self
            .points
            .iter()
            .filter(|p| p.judgement.margin_pct.is_some())
            .collect();
        let rank = |p: &PointResult| match p.zone() {
            Zone::Failed => 0,
            Zone::Marginal => 1,
            _ => 2,
        };
        judged.sort_by(|a, b| {
            let (ma, mb) = (a.judgement.margin_pct, b.judgement.margin_pct);
            rank(a).cmp(&rank(b)).then(
                ma.unwrap_or(f64::INFINITY)
                    .total_cmp(&mb.unwrap_or(f64::INFINITY)),
            )
        });
        judged.truncate(n);
        judged
    }

    /// The overall verdict.
    pub fn verdict(&self) -> Verdict {
        if self.count(Zone::Failed) > 0 {
            Verdict::Fail
        } else if self.count(Zone::Marginal) > 0 {
            Verdict::Marginal
        } else if self.count(Zone::Uncovered) > 0 || !self.rejected.is_empty() {
            Verdict::Incomplete
        } else {
            Verdict::Pass
        }
    }

    /// Whether `--fail-on zone` should make the run exit 1: any point in `zone` or a worse one
    /// (failed is worse than marginal). Uncovered points and rejected rows always count: they
    /// cannot be shown safe.
    pub fn trips(&self, zone: Zone) -> bool {
        !self.rejected.is_empty()
            || self
                .points
                .iter()
                .any(|p| p.zone() <= zone || p.zone() == Zone::Uncovered)
    }
}
