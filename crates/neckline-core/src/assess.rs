//! Judging each location against the forming-limit curve.
//!
//! Zones, checked in this order (the first that applies wins), each with the [`Reason`] that
//! put the location there:
//! 1. `failed`, reason `curve`: on or above the curve (margin ≤ 0, within round-off);
//! 2. `failed`, reason `thinning`: thinning at or past the set maximum, whatever the curve's
//!    range (thinning needs no curve);
//! 3. `failed`, reason `crossed`: the minor strain is outside the curve's range, but the
//!    straight path from the origin through the location crosses the curve and the location is
//!    at 100 % or more of its limit use: that path has already crossed the curve;
//! 4. `uncovered`, reason `no-curve`: the minor strain is outside the curve's range: no verdict,
//!    never safe;
//! 5. `marginal`, reason `band`: inside the safety band below the curve (default 10 percentage
//!    points of engineering major strain, common practice for steel);
//! 6. `thickening`, reason `thickening`: the sheet got thicker by at least the threshold
//!    (default 2 % of t0, a judgement of ours, see [`DEFAULT_THICKENING_PCT`]): wrinkle tendency;
//! 7. `low-stretch`, reason `low-stretch`: engineering major strain below the threshold
//!    (default 2 %, common practice);
//! 8. `safe`, reason `none`.

use crate::kinematics::StrainState;
use crate::limit::LimitCurve;
use crate::strain::EngStrain;
use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// Where a location stands. Declared from worst to best.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Zone {
    /// On or above the limit curve, or thinned to or past the maximum.
    Failed,
    /// Inside the safety band below the curve.
    Marginal,
    /// Minor strain outside the curve's range: no verdict possible.
    Uncovered,
    /// Thickness grew (`ε1 + ε2 < 0`): wrinkle tendency.
    Thickening,
    /// Major strain below the under-stretch threshold.
    LowStretch,
    /// None of the above.
    Safe,
}

impl Zone {
    /// All zones, worst first.
    pub const ALL: [Zone; 6] = [
        Zone::Failed,
        Zone::Marginal,
        Zone::Uncovered,
        Zone::Thickening,
        Zone::LowStretch,
        Zone::Safe,
    ];

    /// Name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Zone::Failed => "failed",
            Zone::Marginal => "marginal",
            Zone::Uncovered => "uncovered",
            Zone::Thickening => "thickening",
            Zone::LowStretch => "low-stretch",
            Zone::Safe => "safe",
        }
    }
}

impl fmt::Display for Zone {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Zone {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        Zone::ALL
            .into_iter()
            .find(|z| z.name() == s)
            .ok_or_else(|| format!("unknown zone `{s}`: expected one of failed, marginal, uncovered, thickening, low-stretch, safe"))
    }
}

/// Why a location is in its zone: the rule of [`zone_of`] that applied.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum Reason {
    /// On or above the limit curve.
    Curve,
    /// Thinned to or past the set maximum.
    Thinning,
    /// Inside the safety band below the curve.
    Band,
    /// Thicker than the thickening threshold.
    Thickening,
    /// Major strain below the under-stretch threshold.
    LowStretch,
    /// Minor strain outside the curve's range.
    NoCurve,
    /// Minor strain outside the curve's range, but at 100 % or more of the limit along the
    /// straight path from the origin, which crosses the curve.
    Crossed,
    /// At risk or past the limit along its multi-stage path (polar effective plastic strain)
    /// while the strain curve is content.
    Path,
    /// No rule applied: safe.
    None,
}

impl Reason {
    /// Every reason, in the order of the rules.
    pub const ALL: [Reason; 9] = [
        Reason::Curve,
        Reason::Thinning,
        Reason::Crossed,
        Reason::NoCurve,
        Reason::Band,
        Reason::Path,
        Reason::Thickening,
        Reason::LowStretch,
        Reason::None,
    ];

    /// Name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            Reason::Curve => "curve",
            Reason::Thinning => "thinning",
            Reason::Band => "band",
            Reason::Thickening => "thickening",
            Reason::LowStretch => "low-stretch",
            Reason::NoCurve => "no-curve",
            Reason::Crossed => "crossed",
            Reason::Path => "path",
            Reason::None => "none",
        }
    }
}

impl fmt::Display for Reason {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Default thickening threshold, percent of t0: a judgement of ours. A reading error of 1 %
/// strain per axis (0.025 mm on a 2.5 mm circle, common practice) gives the thickness strain
/// `ε3 = −(ε1 + ε2)` an error of about √2 · 1 % ≈ 1.4 %; 2 % lies beyond it, so an undeformed
/// or barely compressed circle is not called thickening by reading noise alone.
pub const DEFAULT_THICKENING_PCT: f64 = 2.0;

/// Round-off allowed in comparisons at zero (margin on the curve, thickness change), percentage
/// points: 1e-7 pp is 1e-9 of strain, far above the round-off of a strain computed from two
/// lengths (about 1e-16 per operation) and far below any printed digit (0.001 pp).
pub const ROUND_OFF_PP: f64 = 1e-7;

/// The judgement settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Settings {
    /// Safety band below the curve, percentage points of engineering major strain.
    pub margin_pct: f64,
    /// Under-stretch threshold, percent engineering major strain.
    pub low_stretch_pct: f64,
    /// Maximum thinning, percent of the initial thickness; `None` = not checked.
    pub max_thinning_pct: Option<f64>,
    /// Thickening threshold: the thickness increase, percent of t0, at which a location is
    /// called thickening.
    #[serde(default = "default_thickening")]
    pub thickening_pct: f64,
    /// Reading error of one axis, in the measurement's length unit (e.g. 0.02 mm), or in
    /// percentage points of strain for a file that gives strains; `None` = no borderline flag.
    #[serde(default)]
    pub reading_error: Option<f64>,
}

fn default_thickening() -> f64 {
    DEFAULT_THICKENING_PCT
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            margin_pct: 10.0,
            low_stretch_pct: 2.0,
            max_thinning_pct: None,
            thickening_pct: DEFAULT_THICKENING_PCT,
            reading_error: None,
        }
    }
}

impl Settings {
    /// Check ranges; `Err` names the setting and the allowed range.
    pub fn validate(&self) -> Result<(), String> {
        if !(self.margin_pct.is_finite() && (0.0..=50.0).contains(&self.margin_pct)) {
            return Err(format!(
                "margin {} is outside 0..=50 percentage points",
                self.margin_pct
            ));
        }
        if !(self.low_stretch_pct.is_finite() && (0.0..=50.0).contains(&self.low_stretch_pct)) {
            return Err(format!(
                "low-stretch {} is outside 0..=50 %",
                self.low_stretch_pct
            ));
        }
        if !(self.thickening_pct.is_finite() && (0.0..=50.0).contains(&self.thickening_pct)) {
            return Err(format!(
                "thickening {} is outside 0..=50 %",
                self.thickening_pct
            ));
        }
        if let Some(r) = self.reading_error {
            if !(r.is_finite() && r > 0.0) {
                return Err(format!("reading-error {r} must be a positive length"));
            }
        }
        if let Some(t) = self.max_thinning_pct {
            if !(t.is_finite() && t > 0.0 && t < 100.0) {
                return Err(format!("max-thinning {t} is outside 0 < x < 100 %"));
            }
        }
        Ok(())
    }
}

/// The judgement of one location.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Judgement {
    /// The curve's engineering major strain at the point's minor strain.
    pub limit_major: Option<EngStrain>,
    /// Vertical margin: limit minus the point's engineering major strain, percentage points.
    pub margin_pct: Option<f64>,
    /// Limit use along the point's own strain path, percent (100 = on the curve).
    pub limit_use_pct: Option<f64>,
    /// The zone.
    pub zone: Zone,
    /// Why the location is in its zone.
    pub reason: Reason,
    /// Uncertainty of the vertical margin from the reading error, percentage points.
    pub uncertainty_pct: Option<f64>,
    /// Whether the zone could change within that uncertainty (the margin is that close to 0 or
    /// to the band edge).
    pub borderline: bool,
}

/// Judge one location's strains against `curve` with `settings`.
///
/// The worked example of the path criterion (Stoughton & Yoon 2012; the numbers follow from
/// the 0.80 mm Keeler-Brazier curve): true strains ε1 = 0.25, ε2 = 0.10 are 28.40 % and 10.52 %
/// engineering; the curve there is 32.96 + 0.6 × 10.52 = 39.27 %, so the vertical margin is
/// 10.86 pp, just outside the 10-point band (common practice for steel): safe.
///
/// ```
/// use neckline_core::assess::{judge, Settings, Zone};
/// use neckline_core::kinematics::StrainState;
/// use neckline_core::limit::LimitCurve;
/// use neckline_core::strain::TrueStrain;
/// use std::path::Path;
///
/// let curve = LimitCurve::parse(
///     "name = \"kb\"\nsource = \"Keeler & Brazier 1977\"\nstrain = \"engineering\"\n\
///      [keeler_brazier]\nn = 0.20\nthickness_mm = 0.8\n",
///     Path::new("kb.toml"),
/// )?;
/// let state = StrainState::from_stretches(TrueStrain(0.25).stretch(), TrueStrain(0.10).stretch());
/// let j = judge(&state, &curve, &Settings::default());
/// assert!((j.limit_major.unwrap().percent() - 39.27).abs() < 0.01);
/// assert!((j.margin_pct.unwrap() - 10.86).abs() < 0.01);
/// assert_eq!(j.zone, Zone::Safe);
/// # Ok::<(), neckline_core::Error>(())
/// ```
pub fn judge(state: &StrainState, curve: &LimitCurve, settings: &Settings) -> Judgement {
    let limit_major = curve.limit_major_eng_of(state.true_strain.minor, state.eng.minor);
    let margin_pct = limit_major.map(|l| l.percent() - state.eng.major.percent());
    // Wherever the straight path from the origin crosses the curve, also outside the curve's
    // minor range.
    let limit_use_pct = curve.limit_use_pct(state);
    let (zone, reason) = zone_of_with_use(state, margin_pct, limit_use_pct, settings);
    Judgement {
        limit_major,
        margin_pct,
        limit_use_pct,
        zone,
        reason,
        uncertainty_pct: None,
        borderline: false,
    }
}

/// Uncertainty of the vertical margin, percentage points, from a strain error `de` (a fraction)
/// on each principal strain: on the major strain directly, plus the same error on the minor
/// strain times the curve's local slope, since the limit is read at the minor strain:
/// `u = 100 de (1 + |de1_lim/de2|)` (first-order error propagation). For measured axes
/// `de = δd/d0` (from `e = d/d0 − 1`; 0.025 mm on a 2.5 mm circle is 1 % strain, common
/// practice); for engineering strains given directly it is their own reading error; for true
/// strains see [`margin_uncertainty_pct_of`].
pub fn margin_uncertainty_pct(state: &StrainState, curve: &LimitCurve, de: f64) -> f64 {
    margin_uncertainty_pct_of(state, curve, [de, de])
}

/// [`margin_uncertainty_pct`] with its own engineering strain error on each principal strain,
/// `de = [δe2, δe1]` (fractions): `u = 100 (δe1 + |de1_lim/de2| δe2)`, the slope taken over
/// ±δe2 on both sides. True strains read to ±δε have `δe = (1 + e) δε` (from `e = exp ε − 1`,
/// de/dε = exp ε = 1 + e), so the two errors differ.
pub fn margin_uncertainty_pct_of(state: &StrainState, curve: &LimitCurve, de: [f64; 2]) -> f64 {
    let e2 = state.eng.minor.value();
    let at = |e: f64| {
        crate::strain::EngStrain(e)
            .to_true()
            .and_then(|t| curve.limit_major_eng(t))
            .map(|l| l.value())
    };
    let here = at(e2);
    let slope = |side: f64| match (here, at(e2 + side * de[0])) {
        (Some(a), Some(b)) => ((b - a) / de[0]).abs(),
        _ => 0.0,
    };
    100.0 * (de[1] + de[0] * slope(1.0).max(slope(-1.0)))
}

/// [`judge`], plus the borderline flag when a strain error `de` (a fraction) is given: a point
/// is borderline when its margin is within the uncertainty of 0 (the curve) or of the band
/// edge.
pub fn judge_reading(
    state: &StrainState,
    de: Option<f64>,
    curve: &LimitCurve,
    settings: &Settings,
) -> Judgement {
    judge_reading_of(state, de.map(|d| [d, d]), curve, settings)
}

/// [`judge_reading`] with an engineering strain error per principal strain, `[δe2, δe1]`.
pub fn judge_reading_of(
    state: &StrainState,
    de: Option<[f64; 2]>,
    curve: &LimitCurve,
    settings: &Settings,
) -> Judgement {
    let mut j = judge(state, curve, settings);
    if let (Some(de), Some(m)) = (de, j.margin_pct) {
        let u = margin_uncertainty_pct_of(state, curve, de);
        j.uncertainty_pct = Some(u);
        j.borderline = is_borderline(m, u, settings);
    }
    j
}

/// Whether a margin `m` lies within its uncertainty `u` of 0 (the curve) or of the band edge.
pub fn is_borderline(m: f64, u: f64, settings: &Settings) -> bool {
    m.abs() < u || (m - settings.margin_pct).abs() < u
}

/// The thickness increase, percent of t0: `t/t0 − 1 = exp(−(ε1 + ε2)) − 1` (plastic
/// incompressibility); negative when the sheet thinned.
pub fn thickening_pct(state: &StrainState) -> f64 {
    -state.thinning * 100.0
}

/// The zone and its reason from the vertical margin (`None` = minor strain outside the curve's
/// range) and the point's strains; the rules in the module's order.
pub fn zone_of(
    state: &StrainState,
    margin_pct: Option<f64>,
    settings: &Settings,
) -> (Zone, Reason) {
    zone_of_with_use(state, margin_pct, None, settings)
}

/// [`zone_of`] with the limit use along the straight path from the origin (`None` where that
/// path does not meet the curve): outside the curve's minor range, a location at 100 % or more
/// is failed with the reason `crossed` (its straight path has already crossed the curve).
pub fn zone_of_with_use(
    state: &StrainState,
    margin_pct: Option<f64>,
    limit_use_pct: Option<f64>,
    settings: &Settings,
) -> (Zone, Reason) {
    let thinned_out = settings
        .max_thinning_pct
        .is_some_and(|m| state.thinning * 100.0 >= m - ROUND_OFF_PP);
    let crossed = limit_use_pct.is_some_and(|u| u >= 100.0 - ROUND_OFF_PP);
    match margin_pct {
        Some(m) if m <= ROUND_OFF_PP => return (Zone::Failed, Reason::Curve),
        _ if thinned_out => return (Zone::Failed, Reason::Thinning),
        None if crossed => return (Zone::Failed, Reason::Crossed),
        None => return (Zone::Uncovered, Reason::NoCurve),
        Some(m) if m < settings.margin_pct - ROUND_OFF_PP => return (Zone::Marginal, Reason::Band),
        Some(_) => {}
    }
    let thicker = thickening_pct(state);
    if thicker >= settings.thickening_pct.max(0.0) - ROUND_OFF_PP && thicker > ROUND_OFF_PP {
        (Zone::Thickening, Reason::Thickening)
    } else if state.eng.major.percent() < settings.low_stretch_pct - ROUND_OFF_PP {
        (Zone::LowStretch, Reason::LowStretch)
    } else {
        (Zone::Safe, Reason::None)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::Path;

    fn curve() -> LimitCurve {
        LimitCurve::parse(
            "name = \"flat\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-30, 30], [30, 30]]\n",
            Path::new("c.toml"),
        )
        .unwrap()
    }

    fn at(major_pct: f64, minor_pct: f64) -> StrainState {
        StrainState::from_circle(100.0, 100.0 + major_pct, 100.0 + minor_pct).unwrap()
    }

    #[test]
    fn zones_in_order() {
        let s = Settings {
            max_thinning_pct: Some(25.0),
            ..Settings::default()
        };
        let c = curve();
        let z = |ma, mi| judge(&at(ma, mi), &c, &s).zone;
        assert_eq!(z(10.0, -40.0), Zone::Uncovered); // thinning −(1/(1.1·0.6) − 1) < 0
        assert_eq!(z(30.0, 0.0), Zone::Failed); // on the curve counts as failed
        assert_eq!(z(40.0, 35.0), Zone::Failed); // thinning 47 %, minor outside the curve
        assert_eq!(z(28.0, 20.0), Zone::Failed); // thinning 1 - 1/(1.28·1.2) = 34.9 %
        assert_eq!(z(25.0, 0.0), Zone::Marginal);
        assert_eq!(z(10.0, -15.0), Zone::Thickening);
        assert_eq!(z(1.0, 0.5), Zone::LowStretch);
        assert_eq!(z(10.0, 5.0), Zone::Safe);
    }

    // Every rule gives its reason. Thinning 1 − t/t0 = 1 − 1/(λ1 λ2) by constant volume (any
    // continuum mechanics text; FIELD notes §2).
    #[test]
    fn each_zone_has_its_reason() {
        let s = Settings {
            max_thinning_pct: Some(25.0),
            ..Settings::default()
        };
        let c = curve();
        let r = |ma, mi| {
            let j = judge(&at(ma, mi), &c, &s);
            (j.zone, j.reason)
        };
        assert_eq!(r(31.0, 0.0), (Zone::Failed, Reason::Curve));
        // 1 − 1/(1.28 · 1.20) = 34.9 % thinning, 2 pp below the curve.
        assert_eq!(r(28.0, 20.0), (Zone::Failed, Reason::Thinning));
        assert_eq!(r(10.0, -40.0), (Zone::Uncovered, Reason::NoCurve));
        assert_eq!(r(25.0, 0.0), (Zone::Marginal, Reason::Band));
        assert_eq!(r(10.0, -15.0), (Zone::Thickening, Reason::Thickening));
        assert_eq!(r(1.0, 0.5), (Zone::LowStretch, Reason::LowStretch));
        assert_eq!(r(10.0, 5.0), (Zone::Safe, Reason::None));
    }

    // Thinning needs no curve: past the maximum is failed even where the minor strain is outside
    // the curve's range. (1.40)(1.35) = 1.89 -> thinning 1 − 1/1.89 = 47.1 % (constant volume).
    #[test]
    fn thinning_fails_beyond_the_curves_range() {
        let s = Settings {
            max_thinning_pct: Some(25.0),
            ..Settings::default()
        };
        let j = judge(&at(40.0, 35.0), &curve(), &s);
        assert_eq!(j.margin_pct, None);
        assert_eq!((j.zone, j.reason), (Zone::Failed, Reason::Thinning));
        // Without a thinning limit it is judged along its straight path: true (ln 1.35, ln 1.40)
        // = (0.300, 0.336) meets the flat curve (true major ln 1.30 = 0.262) at a use of
        // 0.336/0.262 = 128 %, inside the curve's minor range: it has crossed the curve.
        let j = judge(&at(40.0, 35.0), &curve(), &Settings::default());
        assert_eq!((j.zone, j.reason), (Zone::Failed, Reason::Crossed));
        assert!((j.limit_use_pct.unwrap() - 100.0 * 1.4f64.ln() / 1.3f64.ln()).abs() < 0.01);
        // A location off the curve's range whose path passes beyond its ends: no verdict.
        let j = judge(&at(10.0, -40.0), &curve(), &Settings::default());
        assert_eq!((j.zone, j.reason), (Zone::Uncovered, Reason::NoCurve));
    }

    // Thickness increase t/t0 − 1 = 1/(λ1 λ2) − 1 (constant volume). (1.10)(0.90) = 0.99 ->
    // 1.01 % thicker: below the default 2 % threshold; (1.10)(0.88) = 0.968 -> 3.31 % thicker.
    #[test]
    fn thickening_threshold_and_round_off_at_zero() {
        let c = curve();
        let d = Settings::default();
        assert!((thickening_pct(&at(10.0, -10.0)) - (1.0 / 0.99 - 1.0) * 100.0).abs() < 1e-9);
        assert_eq!(judge(&at(10.0, -10.0), &c, &d).zone, Zone::Safe);
        assert_eq!(judge(&at(10.0, -12.0), &c, &d).zone, Zone::Thickening);
        let loose = Settings {
            thickening_pct: 1.0,
            ..d
        };
        assert_eq!(judge(&at(10.0, -10.0), &c, &loose).zone, Zone::Thickening);
        // At a threshold of 0, an undeformed circle read through round-off (a stretch of
        // 1 − 1e-15) is not thicker: the comparison at zero allows round-off.
        let zero = Settings {
            thickening_pct: 0.0,
            low_stretch_pct: 0.0,
            ..d
        };
        let undeformed = StrainState::from_circle(2.5, 2.5, 2.5 * (1.0 - 1e-15)).unwrap();
        assert_eq!(judge(&undeformed, &c, &zero).zone, Zone::Safe);
        // ... while a real 0.5 % thickening is thickening at that threshold, not by default.
        let thick = at(0.5, -1.0); // 1/(1.005 · 0.99) − 1 = 0.50 %
        assert_eq!(judge(&thick, &c, &zero).zone, Zone::Thickening);
        assert_eq!(judge(&thick, &c, &d).zone, Zone::LowStretch);
    }

    #[test]
    fn margin_is_vertical_distance() {
        let j = judge(&at(12.0, 3.0), &curve(), &Settings::default());
        assert!((j.margin_pct.unwrap() - 18.0).abs() < 1e-9);
    }

    // δe ≈ δd/d0: 0.025 mm on a 2.5 mm circle is 1 % strain (common practice). On a flat curve
    // (slope 0) the margin uncertainty is exactly that.
    #[test]
    fn reading_error_flags_points_near_a_boundary() {
        let s = Settings {
            reading_error: Some(0.025),
            ..Settings::default()
        };
        let c = curve();
        let near = StrainState::from_circle(2.5, 2.5 * 1.295, 2.5).unwrap(); // margin 0.5 pp
        let j = judge_reading(&near, Some(0.01), &c, &s);
        assert!((j.uncertainty_pct.unwrap() - 1.0).abs() < 1e-9);
        assert!(j.borderline);
        let clear = StrainState::from_circle(2.5, 2.5 * 1.15, 2.5).unwrap(); // margin 15 pp
        assert!(!judge_reading(&clear, Some(0.01), &c, &s).borderline);
        let band_edge = StrainState::from_circle(2.5, 2.5 * 1.196, 2.5).unwrap(); // margin 10.4
        assert!(judge_reading(&band_edge, Some(0.01), &c, &s).borderline);
    }

    #[test]
    fn zone_names_round_trip() {
        for z in Zone::ALL {
            assert_eq!(z.name().parse::<Zone>(), Ok(z));
        }
    }
}
