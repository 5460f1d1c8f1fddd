//! One location judged against one curve: the [`StateInput`] (strains known) that every kind of
//! input gives, the [`Context`] a file is judged with, and the [`PointResult`] that the summary,
//! points.csv and the pictures are made from.
//!
//! Where the states come from: [`state_of`] for one measured circle or strain row,
//! `stream::elements::evaluate` (a layer up) for the elements of a grid,
//! [`staged::judge_staged`] for a location measured after several forming stages (judged
//! along its path too).

pub mod staged;

use crate::assess::{judge_reading_of, Judgement, Settings, Zone};
use crate::error::Location;
use crate::grid::GridExtras;
use crate::kinematics::StrainState;
use crate::limit::LimitCurve;
use crate::measure::{Measurement, Reading, RejectedRow, STRETCH_RANGE};
use crate::path::PathJudgement;
use crate::strain::Stretch;
use crate::units::Lengths;
use std::path::Path;

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
    pub grid: Option<Box<GridExtras>>,
    /// The path criterion's judgement, for a location measured after several stages.
    pub path: Option<Box<PathJudgement>>,
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
    pub grid: Option<Box<GridExtras>>,
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
    /// Whether those strains are true strains (the reading error is then in percentage points
    /// of true strain).
    pub true_input: bool,
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

    /// The engineering strain errors `[δe2, δe1]` (fractions) of one reading, each converted
    /// once from the input's own measure: axes `δe = δd/d0` (from `e = d/d0 − 1`); engineering
    /// strains their reading error; true strains `δe = (1 + e) δε` (from `e = exp ε − 1`).
    pub fn eng_strain_errors(&self, d0: Option<f64>, strain: &StrainState) -> Option<[f64; 2]> {
        let de = self.strain_error(d0)?;
        Some(if d0.is_none() && self.true_input {
            [
                (1.0 + strain.eng.minor.value()) * de,
                (1.0 + strain.eng.major.value()) * de,
            ]
        } else {
            [de, de]
        })
    }

    /// The true strain errors `[δε2, δε1]` of one reading: `δε = δe/(1 + e)` (from
    /// `ε = ln(1 + e)`), the reading error itself for true strains given directly.
    pub fn true_strain_errors(&self, d0: Option<f64>, strain: &StrainState) -> Option<[f64; 2]> {
        let [d2, d1] = self.eng_strain_errors(d0, strain)?;
        Some([
            d2 / (1.0 + strain.eng.minor.value()),
            d1 / (1.0 + strain.eng.major.value()),
        ])
    }

    /// Judge one location.
    pub fn judge(&self, s: StateInput) -> PointResult {
        let mut p = self.judge_parts(s.input, s.d0, s.strain);
        p.grid = s.grid;
        if p.grid.is_some() {
            // Grid elements: the reading error is on the node coordinates, not on axes.
            node_reading_uncertainty(&mut p, &self.curve, &self.settings);
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
            judgement: judge_reading_of(
                &strain,
                self.eng_strain_errors(d0, &strain),
                &self.curve,
                &self.settings,
            ),
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
///
/// ```
/// use neckline_core::measure::Measurement;
/// use neckline_core::point::state_of;
/// use neckline_core::units::Lengths;
/// use std::path::Path;
///
/// let lengths = Lengths { unit: Default::default(), d0: Some(2.5), t0: None };
/// // A 2.5 mm circle read as a 3.25 × 2.40 mm ellipse: e = d/d0 − 1 = 30 % and −4 %
/// // (any continuum mechanics text).
/// let m = Measurement::axes("A1", 2, 3.25, 2.40, None);
/// let s = state_of(m, Path::new("part.csv"), &lengths).unwrap();
/// assert!((s.strain.eng.major.percent() - 30.0).abs() < 1e-9);
/// assert!((s.strain.eng.minor.percent() + 4.0).abs() < 1e-9);
///
/// // Without any d0 the row is rejected, naming the file and line.
/// let none = Lengths { d0: None, ..lengths };
/// let m = Measurement::axes("A2", 3, 3.25, 2.40, None);
/// let r = state_of(m, Path::new("part.csv"), &none).unwrap_err();
/// assert!(r.to_string().starts_with("part.csv:3"), "{r}");
/// ```
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
/// Replace the circle rule's margin uncertainty of a grid element by the node-error one
/// ([`crate::grid::uncertainty::margin_uncertainty_pct`]), with `settings.reading_error` on every deformed node
/// coordinate, and set the borderline flag from it.
pub fn node_reading_uncertainty(
    p: &mut PointResult,
    curve: &crate::limit::LimitCurve,
    settings: &crate::assess::Settings,
) {
    let Some(dd) = settings.reading_error else {
        return;
    };
    let (Some(sens), Some(m)) = (
        p.grid.as_ref().and_then(|g| g.sensitivity),
        p.judgement.margin_pct,
    ) else {
        return;
    };
    let u = crate::grid::uncertainty::margin_uncertainty_pct(
        &sens,
        curve,
        p.strain.eng.minor.value(),
        dd,
    );
    p.judgement.uncertainty_pct = Some(u);
    p.judgement.borderline = crate::assess::is_borderline(m, u, settings);
}
