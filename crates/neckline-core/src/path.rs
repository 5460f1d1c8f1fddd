//! Bent strain paths: a location measured after each forming stage, judged by the polar
//! effective plastic strain criterion (PEPS: Stoughton & Yoon 2012, Int. J. Solids Struct. 49),
//! a path-independent approximation beside the strain curve, which holds for straight paths only.
//!
//! Assumptions (stated in the README too): each stage's strains are totals from the original
//! circle; between two stages the path is straight (increments in true strain); the principal
//! axes do not turn (a turn of more than [`TURN_LIMIT_DEG`] between stages is flagged when the
//! major axis direction was measured); effective strain by von Mises, plane stress,
//! incompressible (Hill 1950).

use crate::assess::Zone;
use crate::kinematics::effective_strain;
use crate::limit::LimitCurve;
use crate::strain::TrueStrain;

/// An increment smaller than this effective strain (0.1 %) does not set the path's direction.
pub const MIN_INCREMENT: f64 = 0.001;
/// A turn of the major axis between stages beyond which the fixed-axes assumption fails, degrees.
pub const TURN_LIMIT_DEG: f64 = 20.0;

/// The path criterion's judgement of one location.
#[derive(Debug, Clone, PartialEq)]
pub struct PathJudgement {
    /// True strains `[ε2, ε1]` after each stage, in stage order.
    pub stages: Vec<[f64; 2]>,
    /// Accumulated effective strain ε̄ = Σ (2/√3) √(Δε1² + Δε1 Δε2 + Δε2²).
    pub effective: f64,
    /// Direction of the last increment larger than [`MIN_INCREMENT`], atan2(Δε1, Δε2) in
    /// degrees (90 = plane strain, 45 = equibiaxial); `None` for an unstrained location.
    pub angle_deg: Option<f64>,
    /// The limit ε̄*: the effective strain of the curve's point on the straight path in that
    /// direction; `None` when that path leaves the curve's range.
    pub limit: Option<f64>,
    /// The same for the safety band.
    pub band: Option<f64>,
    /// 100 ε̄ / ε̄*.
    pub use_pct: Option<f64>,
    /// Angle between the first and the last increment, degrees.
    pub bend_deg: Option<f64>,
    /// The zone by this criterion.
    pub zone: Zone,
    /// The zone by the strain curve alone, at the last stage.
    pub strain_zone: Zone,
    /// The major axis turned by more than [`TURN_LIMIT_DEG`] between two stages.
    pub turned: bool,
}

/// Effective strain of one straight increment `d = [Δε2, Δε1]` (von Mises, plane stress).
pub fn increment_effective(d: [f64; 2]) -> f64 {
    effective_strain(TrueStrain(d[1]), TrueStrain(d[0])).value()
}

fn angle(d: [f64; 2]) -> f64 {
    d[1].atan2(d[0]).to_degrees()
}

/// Judge the path through `stages` (true strains `[ε2, ε1]` after each stage, in order)
/// against `curve` with a safety band of `band_pct` percentage points of engineering major
/// strain. `strain_zone` is the strain curve's zone at the last stage: where the path criterion
/// finds no risk, it keeps that zone's finer reading (thickening, low stretch, safe).
/// `axes_deg` are the measured major-axis directions per stage, when known.
///
/// The worked example (the criterion as published, Stoughton & Yoon 2012; the numbers follow
/// from the 0.80 mm Keeler-Brazier curve, FLC0 32.96 %): equibiaxial to true strains (0.10,
/// 0.10), then plane strain to (0.10, 0.25). Accumulated ε̄ = 0.2000 + 0.1732 = 0.3732; the last
/// increment is plane strain, where the curve is ε1 = ln 1.3296 = 0.2849, ε̄* = 0.3290; use
/// 113.5 %: failed, although the strain curve alone finds a margin of 10.86 pp (safe).
///
/// ```
/// use neckline_core::assess::Zone;
/// use neckline_core::limit::LimitCurve;
/// use neckline_core::path::judge_path;
/// use std::path::Path;
///
/// let curve = LimitCurve::parse(
///     "name = \"kb\"\nsource = \"Keeler & Brazier 1977\"\nstrain = \"engineering\"\n\
///      [keeler_brazier]\nn = 0.20\nthickness_mm = 0.8\n",
///     Path::new("kb.toml"),
/// )?;
/// // Stages as true strains [ε2, ε1].
/// let j = judge_path(&[[0.10, 0.10], [0.10, 0.25]], &curve, 10.0, Zone::Safe, &[]);
/// assert!((j.effective - 0.3732).abs() < 1e-4);
/// assert!((j.angle_deg.unwrap() - 90.0).abs() < 1e-9); // plane strain
/// assert!((j.limit.unwrap() - 0.3290).abs() < 1e-4);
/// assert!((j.use_pct.unwrap() - 113.5).abs() < 0.1);
/// assert_eq!(j.zone, Zone::Failed);
/// assert!(j.hidden()); // a risk the strain curve does not show
/// # Ok::<(), neckline_core::Error>(())
/// ```
pub fn judge_path(
    stages: &[[f64; 2]],
    curve: &LimitCurve,
    band_pct: f64,
    strain_zone: Zone,
    axes_deg: &[Option<f64>],
) -> PathJudgement {
    let mut prev = [0.0, 0.0];
    let mut effective = 0.0;
    let mut first: Option<[f64; 2]> = None;
    let mut last: Option<[f64; 2]> = None;
    for s in stages {
        let d = [s[0] - prev[0], s[1] - prev[1]];
        let e = increment_effective(d);
        effective += e;
        if e > MIN_INCREMENT {
            first.get_or_insert(d);
            last = Some(d);
        }
        prev = *s;
    }
    let limit = last
        .and_then(|d| curve.point_on_ray(d))
        .map(increment_effective);
    let band = last
        .and_then(|d| curve.band_point_on_ray(band_pct, d))
        .map(increment_effective);
    let use_pct = limit.map(|l| 100.0 * effective / l);
    let zone = match (last, limit) {
        (None, _) => strain_zone,
        (Some(_), None) => Zone::Uncovered,
        (Some(_), Some(l)) if effective >= l => Zone::Failed,
        _ if band.is_some_and(|b| effective >= b) => Zone::Marginal,
        _ if matches!(strain_zone, Zone::Failed | Zone::Marginal | Zone::Uncovered) => Zone::Safe,
        _ => strain_zone,
    };
    let bend_deg = match (first, last) {
        (Some(a), Some(b)) => {
            let t = (angle(b) - angle(a)).abs();
            Some(if t > 180.0 { 360.0 - t } else { t })
        }
        _ => None,
    };
    let turned = axes_deg.windows(2).any(|w| match (w[0], w[1]) {
        // Axis directions are lines: 170° and −10° are the same direction.
        (Some(a), Some(b)) => {
            let t = (a - b).rem_euclid(180.0);
            t.min(180.0 - t) > TURN_LIMIT_DEG
        }
        _ => false,
    });
    PathJudgement {
        stages: stages.to_vec(),
        effective,
        angle_deg: last.map(angle),
        limit,
        band,
        use_pct,
        bend_deg,
        zone,
        strain_zone,
        turned,
    }
}

impl PathJudgement {
    /// Whether the strain curve calls the location safe (or marginal) where the path criterion
    /// finds it at risk (or failed): a risk hidden by the strain curve.
    pub fn hidden(&self) -> bool {
        matches!(self.zone, Zone::Failed | Zone::Marginal) && self.zone < self.strain_zone
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::path::Path;

    fn kb080() -> LimitCurve {
        let root = Path::new(env!("CARGO_MANIFEST_DIR"));
        LimitCurve::load(&root.join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml")).unwrap()
    }

    // The worked example (the criterion as published, Stoughton & Yoon 2012; the numbers follow
    // from the 0.80 mm Keeler-Brazier curve of limits/): equibiaxial to true strains
    // (0.10, 0.10), then plane strain to (0.25, 0.10). ε̄ = 0.2000 + 0.1732 = 0.3732; the last
    // increment is plane strain; the curve there is FLC0 = 32.96 % eng, ε1 = ln 1.3296 = 0.2849,
    // ε̄* = 0.3290; use 113.5 %: failed, while the strain curve gives a margin of 10.86 pp.
    #[test]
    fn worked_example_fails_by_path() {
        let c = kb080();
        let p = judge_path(&[[0.10, 0.10], [0.10, 0.25]], &c, 10.0, Zone::Safe, &[]);
        assert!((p.effective - 0.3732).abs() < 1e-4, "{}", p.effective);
        assert!((p.angle_deg.unwrap() - 90.0).abs() < 1e-9);
        assert!((p.limit.unwrap() - 0.3290).abs() < 1e-4, "{:?}", p.limit);
        assert!((p.use_pct.unwrap() - 113.5).abs() < 0.1, "{:?}", p.use_pct);
        assert_eq!(p.zone, Zone::Failed);
        assert!((p.bend_deg.unwrap() - 45.0).abs() < 1e-9);
        // The strain curve alone: margin 10.86 pp, safe.
        let s = crate::kinematics::StrainState::from_stretches(
            TrueStrain(0.25).stretch(),
            TrueStrain(0.10).stretch(),
        );
        let j = crate::assess::judge(&s, &c, &crate::assess::Settings::default());
        assert!(
            (j.margin_pct.unwrap() - 10.86).abs() < 0.01,
            "{:?}",
            j.margin_pct
        );
        assert_eq!(j.zone, Zone::Safe);
    }

    #[test]
    fn axes_turning_past_the_limit_are_flagged() {
        let c = kb080();
        let s = [[0.0, 0.05], [0.0, 0.10]];
        assert!(judge_path(&s, &c, 10.0, Zone::Safe, &[Some(10.0), Some(35.0)]).turned);
        assert!(!judge_path(&s, &c, 10.0, Zone::Safe, &[Some(10.0), Some(25.0)]).turned);
        // 175° and −3° are 8° apart as directions.
        assert!(!judge_path(&s, &c, 10.0, Zone::Safe, &[Some(175.0), Some(-3.0)]).turned);
    }

    #[test]
    fn unstrained_and_out_of_range_paths() {
        let c = kb080();
        let p = judge_path(&[[0.0, 0.0]], &c, 10.0, Zone::LowStretch, &[]);
        assert_eq!((p.zone, p.limit), (Zone::LowStretch, None));
        // Pure compression in both directions: the ray never meets the curve.
        let p = judge_path(&[[-0.05, -0.02]], &c, 10.0, Zone::Thickening, &[]);
        assert_eq!(p.zone, Zone::Uncovered);
    }
}

#[cfg(test)]
mod props {
    use super::*;
    use proptest::prelude::*;
    use std::path::Path;

    proptest! {
        // On a straight path, in any number of stages, the path criterion reduces to the limit
        // use along the path (Stoughton & Yoon 2012: the mapped curve is the strain curve seen
        // from the origin; effective strain is proportional along a ray).
        #[test]
        fn straight_path_in_two_stages_equals_limit_use(
            beta in -0.5f64..1.0,
            first in 0.05f64..0.95,
            major in 0.02f64..0.6,
        ) {
            let c = LimitCurve::load(
                &Path::new(env!("CARGO_MANIFEST_DIR"))
                    .join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml"),
            )
            .unwrap();
            let end = [beta * major, major];
            let mid = [first * end[0], first * end[1]];
            let p = judge_path(&[mid, end], &c, 10.0, Zone::Safe, &[]);
            let s = crate::kinematics::StrainState::from_stretches(
                TrueStrain(end[1]).stretch(),
                TrueStrain(end[0]).stretch(),
            );
            match (p.use_pct, c.limit_use_pct(&s)) {
                (Some(a), Some(b)) => prop_assert!((a - b).abs() < 1e-6 * b.max(1.0), "{a} vs {b}"),
                (a, b) => prop_assert!(a.is_none() && b.is_none(), "{a:?} vs {b:?}"),
            }
            prop_assert!(p.bend_deg.unwrap() < 1e-6);
        }
    }
}
