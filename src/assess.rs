//! Judging each location against the forming-limit curve.
//!
//! Zones, checked in this order (the first that applies wins):
//! 1. `uncovered`: the point's minor strain is outside the curve's range: no verdict, never safe;
//! 2. `failed`: on or above the curve, or thinning at or past the set maximum;
//! 3. `marginal`: inside the safety band below the curve (default 10 percentage points of
//!    engineering major strain, common practice for steel);
//! 4. `thickening`: `ε1 + ε2 < 0`, the sheet got thicker (wrinkle tendency, common practice);
//! 5. `low-stretch`: engineering major strain below the threshold (default 2 %, common practice);
//! 6. `safe`.

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

/// The judgement settings.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct Settings {
    /// Safety band below the curve, percentage points of engineering major strain.
    pub margin_pct: f64,
    /// Under-stretch threshold, percent engineering major strain.
    pub low_stretch_pct: f64,
    /// Maximum thinning, percent of the initial thickness; `None` = not checked.
    pub max_thinning_pct: Option<f64>,
    /// Reading error of one axis, in the measurement's length unit (e.g. 0.02 mm), or in
    /// percentage points of strain for a file that gives strains; `None` = no borderline flag.
    #[serde(default)]
    pub reading_error: Option<f64>,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            margin_pct: 10.0,
            low_stretch_pct: 2.0,
            max_thinning_pct: None,
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
    /// Uncertainty of the vertical margin from the reading error, percentage points.
    pub uncertainty_pct: Option<f64>,
    /// Whether the zone could change within that uncertainty (the margin is that close to 0 or
    /// to the band edge).
    pub borderline: bool,
}

/// Judge one location's strains against `curve` with `settings`.
pub fn judge(state: &StrainState, curve: &LimitCurve, settings: &Settings) -> Judgement {
    let limit_major = curve.limit_major_eng(state.true_strain.minor);
    let margin_pct = limit_major.map(|l| l.percent() - state.eng.major.percent());
    let limit_use_pct = limit_major.and(curve.limit_use_pct(state));
    let zone = zone_of(state, margin_pct, settings);
    Judgement {
        limit_major,
        margin_pct,
        limit_use_pct,
        zone,
        uncertainty_pct: None,
        borderline: false,
    }
}

/// Uncertainty of the vertical margin, percentage points, from a strain error `de` (a fraction)
/// on each principal strain: on the major strain directly, plus the same error on the minor
/// strain times the curve's local slope, since the limit is read at the minor strain:
/// `u = 100 de (1 + |de1_lim/de2|)` (first-order error propagation). For measured axes
/// `de = δd/d0` (from `e = d/d0 − 1`; 0.025 mm on a 2.5 mm circle is 1 % strain, common
/// practice); for strains given directly it is their own reading error.
pub fn margin_uncertainty_pct(state: &StrainState, curve: &LimitCurve, de: f64) -> f64 {
    let e2 = state.eng.minor.value();
    let at = |e: f64| {
        crate::strain::EngStrain(e)
            .to_true()
            .and_then(|t| curve.limit_major_eng(t))
            .map(|l| l.value())
    };
    let here = at(e2);
    let slope = |side: f64| match (here, at(e2 + side * de)) {
        (Some(a), Some(b)) => ((b - a) / de).abs(),
        _ => 0.0,
    };
    100.0 * de * (1.0 + slope(1.0).max(slope(-1.0)))
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
    let mut j = judge(state, curve, settings);
    if let (Some(de), Some(m)) = (de, j.margin_pct) {
        let u = margin_uncertainty_pct(state, curve, de);
        j.uncertainty_pct = Some(u);
        j.borderline = is_borderline(m, u, settings);
    }
    j
}

/// Whether a margin `m` lies within its uncertainty `u` of 0 (the curve) or of the band edge.
pub fn is_borderline(m: f64, u: f64, settings: &Settings) -> bool {
    m.abs() < u || (m - settings.margin_pct).abs() < u
}

/// The zone from the vertical margin (`None` = uncovered) and the point's strains.
pub fn zone_of(state: &StrainState, margin_pct: Option<f64>, settings: &Settings) -> Zone {
    let Some(margin) = margin_pct else {
        return Zone::Uncovered;
    };
    let thinned_out = settings
        .max_thinning_pct
        .is_some_and(|m| state.thinning * 100.0 >= m);
    if margin <= 0.0 || thinned_out {
        Zone::Failed
    } else if margin < settings.margin_pct {
        Zone::Marginal
    } else if state.true_strain.major.value() + state.true_strain.minor.value() < 0.0 {
        Zone::Thickening
    } else if state.eng.major.percent() < settings.low_stretch_pct {
        Zone::LowStretch
    } else {
        Zone::Safe
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::Path;

    fn curve() -> LimitCurve {
        LimitCurve::parse(
            "name = \"flat\"\nsource = \"test\"\npoints = [[-30, 30], [30, 30]]\n",
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
        assert_eq!(z(10.0, -40.0), Zone::Uncovered);
        assert_eq!(z(30.0, 0.0), Zone::Failed); // on the curve counts as failed
        assert_eq!(z(28.0, 20.0), Zone::Failed); // thinning 1 - 1/(1.28·1.2) = 34.9 %
        assert_eq!(z(25.0, 0.0), Zone::Marginal);
        assert_eq!(z(10.0, -15.0), Zone::Thickening);
        assert_eq!(z(1.0, 0.5), Zone::LowStretch);
        assert_eq!(z(10.0, 5.0), Zone::Safe);
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
