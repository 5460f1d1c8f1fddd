//! Bent strain paths: a location measured after each forming stage, judged by the polar
//! effective plastic strain criterion (PEPS: Stoughton & Yoon 2012, Int. J. Solids Struct. 49),
//! a path-independent approximation beside the strain curve, which holds for straight paths only.
//!
//! Assumptions (stated in docs/methods.md too): each stage's strains are totals from the
//! original circle; between two stages the path is straight (increments in true strain);
//! effective strain by von Mises, plane stress, incompressible (Hill 1950).
//!
//! Reading noise: every reading is good to its reading error (true strain, per principal
//! strain; [`DEFAULT_NOISE`] when none is given). A stage whose change from the last kept stage
//! is within the two readings' errors is no change; the path runs through the kept stages and
//! ends at the final reading (the last increment is the chord from the last kept stage before
//! it to the final reading). A path whose kept stages all lie within their noise of the straight
//! line from the origin to the final reading is straight: the strain curve alone judges it.
//!
//! Axes: with the major-axis direction of every stage (`angle_deg`), each stage's strains are
//! turned into the part's fixed frame (a strain tensor), increments are taken as tensors and
//! their principal values give the increment's effective strain and direction. Without it the
//! axes are taken as fixed, and an increment that stretches more across the recorded major axis
//! than along it is named (the axes may have turned).

use crate::assess::Zone;
use crate::kinematics::effective_strain;
use crate::limit::LimitCurve;
use crate::strain::TrueStrain;

/// An increment smaller than this effective strain (0.1 %) does not set the path's direction
/// when the readings carry no error (a floor against round-off only).
pub const MIN_INCREMENT: f64 = 0.001;
/// The reading error assumed for each principal strain when none is given: 1 % strain, about
/// what a tape reading of a 2.5 mm circle is good to (0.025 mm; tape ±1-2 %, common practice).
pub const DEFAULT_NOISE: f64 = 0.01;
/// A turn of the major axis between stages beyond which the fixed-axes assumption fails, degrees.
pub const TURN_LIMIT_DEG: f64 = 20.0;
/// The note for an increment that only turned axes explain.
pub const AXES_NOTE: &str = "principal axes may have turned: give angle_deg";

/// The path criterion's judgement of one location.
#[derive(Debug, Clone, PartialEq)]
pub struct PathJudgement {
    /// True strains `[ε2, ε1]` after each stage, in stage order.
    pub stages: Vec<[f64; 2]>,
    /// Accumulated effective strain ε̄ = Σ (2/√3) √(Δε1² + Δε1 Δε2 + Δε2²) over the increments
    /// between the kept stages (the origin first, the final reading last).
    pub effective: f64,
    /// Direction of the last increment, atan2(Δε1, Δε2) in degrees (90 = plane strain, 45 =
    /// equibiaxial); `None` for a location unstrained within its noise.
    pub angle_deg: Option<f64>,
    /// The limit ε̄*: the effective strain of the curve's point on the straight path in that
    /// direction; `None` when that path leaves the curve's range.
    pub limit: Option<f64>,
    /// The same for the safety band.
    pub band: Option<f64>,
    /// 100 ε̄ / ε̄*.
    pub use_pct: Option<f64>,
    /// Uncertainty of `use_pct` from the reading errors, percentage points (when given).
    pub use_uncertainty_pct: Option<f64>,
    /// Whether the zone by this criterion could change within that uncertainty.
    pub borderline: bool,
    /// Angle between the first and the last increment, degrees.
    pub bend_deg: Option<f64>,
    /// The path is straight within its noise: the strain curve alone judges it.
    pub straight: bool,
    /// The zone by this criterion.
    pub zone: Zone,
    /// The zone by the strain curve alone, at the last stage.
    pub strain_zone: Zone,
    /// The major axis turned by more than [`TURN_LIMIT_DEG`] between two stages.
    pub turned: bool,
    /// Unloading or springback beyond the noise, and increments only turned axes explain.
    pub notes: Vec<String>,
}

/// Effective strain of one straight increment `d = [Δε2, Δε1]` (von Mises, plane stress).
pub fn increment_effective(d: [f64; 2]) -> f64 {
    effective_strain(TrueStrain(d[1]), TrueStrain(d[0])).value()
}

fn angle(d: [f64; 2]) -> f64 {
    d[1].atan2(d[0]).to_degrees()
}

/// A plane strain tensor `[xx, yy, xy]`.
type Tensor = [f64; 3];

/// The tensor of principal strains `[ε2, ε1]` whose major axis lies `axis_deg` from +x:
/// `xx = ε1 cos²θ + ε2 sin²θ`, `yy = ε1 sin²θ + ε2 cos²θ`, `xy = (ε1 − ε2) sinθ cosθ`
/// (rotation of a second-order tensor, any continuum mechanics text). Without a direction the
/// major axis is x.
pub fn strain_tensor(s: [f64; 2], axis_deg: Option<f64>) -> [f64; 3] {
    let (sn, c) = axis_deg.unwrap_or(0.0).to_radians().sin_cos();
    [
        s[1] * c * c + s[0] * sn * sn,
        s[1] * sn * sn + s[0] * c * c,
        (s[1] - s[0]) * sn * c,
    ]
}

/// Principal values `[minor, major]` of a plane tensor: `m ∓ r`, `m = (xx + yy)/2`,
/// `r = √(((xx − yy)/2)² + xy²)` (Mohr's circle).
pub fn principal_values(t: [f64; 3]) -> [f64; 2] {
    let m = 0.5 * (t[0] + t[1]);
    let r = (0.5 * (t[0] - t[1])).hypot(t[2]);
    [m - r, m + r]
}

/// The largest principal value in size (the tensor's spectral norm).
fn size(t: Tensor) -> f64 {
    (0.5 * (t[0] + t[1])).abs() + (0.5 * (t[0] - t[1])).hypot(t[2])
}

fn sub(a: Tensor, b: Tensor) -> Tensor {
    [a[0] - b[0], a[1] - b[1], a[2] - b[2]]
}

fn dot(a: Tensor, b: Tensor) -> f64 {
    a[0] * b[0] + a[1] * b[1] + 2.0 * a[2] * b[2]
}

/// An increment as `[Δε2, Δε1]`: in fixed material axes its principal values; with the axes as
/// read, the change of minor and major themselves.
fn increment(d: Tensor, fixed: bool) -> [f64; 2] {
    if fixed {
        principal_values(d)
    } else {
        [d[1], d[0]]
    }
}

/// Effective strain, last increment and first increment along kept stage tensors.
fn walk(verts: &[Tensor], fixed: bool) -> (f64, Option<[f64; 2]>, Option<[f64; 2]>) {
    let mut prev = [0.0; 3];
    let mut effective = 0.0;
    let (mut first, mut last) = (None, None);
    for v in verts {
        let d = increment(sub(*v, prev), fixed);
        effective += increment_effective(d);
        first.get_or_insert(d);
        last = Some(d);
        prev = *v;
    }
    (effective, first, last)
}

/// Judge the path through `stages` (true strains `[ε2, ε1]` after each stage, in order)
/// against `curve` with a safety band of `band_pct` percentage points of engineering major
/// strain, each reading good to [`DEFAULT_NOISE`]. `strain_zone` is the strain curve's zone at
/// the last stage: where the path criterion finds no risk, it keeps that zone's finer reading
/// (thickening, low stretch, safe). `axes_deg` are the measured major-axis directions per
/// stage, when known.
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
    judge_path_noisy(stages, curve, band_pct, strain_zone, axes_deg, None)
}

/// [`judge_path`] with each stage's reading error `[δε2, δε1]` (true strain, fractions), when
/// known: the path verdict then carries its uncertainty, the worst case to first order,
/// `u = Σ_k Σ_i |∂use/∂ε_{k,i}| δε_{k,i}` over the kept stages (each derivative the larger
/// one-sided difference over ±δε), and is borderline when its use is within `u` of 100 % or of the band.
pub fn judge_path_noisy(
    stages: &[[f64; 2]],
    curve: &LimitCurve,
    band_pct: f64,
    strain_zone: Zone,
    axes_deg: &[Option<f64>],
    errors: Option<&[[f64; 2]]>,
) -> PathJudgement {
    let n = stages.len();
    let fixed = n > 0 && axes_deg.len() == n && axes_deg.iter().all(Option::is_some);
    let axis = |k: usize| if fixed { axes_deg[k] } else { None };
    let t: Vec<Tensor> = (0..n).map(|k| strain_tensor(stages[k], axis(k))).collect();
    let err: Vec<[f64; 2]> = match errors {
        Some(e) if e.len() == n => e.to_vec(),
        _ => vec![[DEFAULT_NOISE; 2]; n],
    };
    let delta = |k: usize| err[k][0].max(err[k][1]);
    // The kept stages: each differs from the last kept one by more than the two readings'
    // errors (the origin is exact); the final reading ends the path.
    let mut keep: Vec<usize> = Vec::new();
    for k in 0..n {
        let (a, da) = keep.last().map_or(([0.0; 3], 0.0), |&v| (t[v], delta(v)));
        let threshold = (da + delta(k)).max(MIN_INCREMENT);
        if size(sub(t[k], a)) > threshold {
            keep.push(k);
        }
    }
    if let Some(v) = keep.last_mut() {
        *v = n - 1;
    }
    let verts: Vec<Tensor> = keep.iter().map(|&k| t[k]).collect();
    let (effective, first, last) = walk(&verts, fixed);
    let judge = |verts: &[Tensor]| {
        let (effective, _, last) = walk(verts, fixed);
        let limit = last
            .and_then(|d| curve.point_on_ray(d))
            .map(increment_effective);
        (effective, limit.map(|l| 100.0 * effective / l))
    };
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
    // Straight: every kept stage before the last lies within its noise of the line from the
    // origin through the final reading, on the outward side.
    let straight = match keep.split_last() {
        None => true,
        Some((&f, rest)) => rest.iter().all(|&k| {
            let s = dot(t[k], t[f]) / dot(t[f], t[f]).max(f64::MIN_POSITIVE);
            let off = sub(t[k], [s * t[f][0], s * t[f][1], s * t[f][2]]);
            s >= 0.0 && size(off) <= delta(k) + delta(f)
        }),
    };
    let use_uncertainty_pct = match (errors, use_pct) {
        (Some(_), Some(_)) => {
            let mut u = 0.0;
            for (vi, &k) in keep.iter().enumerate() {
                for i in 0..2 {
                    let h = err[k][i];
                    if h <= 0.0 {
                        continue;
                    }
                    let moved = |sign: f64| {
                        let mut s = stages[k];
                        s[i] += sign * h;
                        let mut v = verts.clone();
                        v[vi] = strain_tensor(s, axis(k));
                        judge(&v).1
                    };
                    // The larger one-sided change: the curve may bend (plane strain) or end
                    // within ±δ, where a central difference would understate the change.
                    u += match (moved(1.0), moved(-1.0), use_pct) {
                        (Some(up), Some(down), Some(at)) => (up - at).abs().max((down - at).abs()),
                        (Some(one), None, Some(at)) | (None, Some(one), Some(at)) => {
                            (one - at).abs()
                        }
                        _ => 0.0,
                    };
                }
            }
            Some(u)
        }
        _ => None,
    };
    let borderline = match (use_pct, use_uncertainty_pct, limit) {
        (Some(p), Some(u), Some(l)) => {
            (p - 100.0).abs() < u || band.is_some_and(|b| (p - 100.0 * b / l).abs() < u)
        }
        _ => false,
    };
    let mut notes = Vec::new();
    let mut prev: Option<usize> = None;
    for &k in &keep {
        let (a1, da) = prev.map_or((0.0, 0.0), |p| (stages[p][1], delta(p)));
        let fell = a1 - stages[k][1];
        if prev.is_some() && fell > da + delta(k) {
            notes.push(format!(
                "major strain fell {:.1} pp by stage {}: unloading or springback",
                100.0 * fell,
                k + 1
            ));
        }
        let d = increment(sub(t[k], prev.map_or([0.0; 3], |p| t[p])), fixed);
        if !fixed && d[0] > d[1] + da + delta(k) && !notes.iter().any(|n| n == AXES_NOTE) {
            notes.push(AXES_NOTE.to_string());
        }
        prev = Some(k);
    }
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
        use_uncertainty_pct,
        borderline,
        bend_deg,
        straight,
        zone,
        strain_zone,
        turned,
        notes,
    }
}

/// The zone of a location judged `strain_zone` by the strain curve when the path criterion
/// found `j`: the path's zone where it judges (a bent path with a direction) and ranks worse by
/// [`combined_rank`], else `None` (the strain curve's zone stands).
pub fn combined_zone(strain_zone: Zone, j: &PathJudgement) -> Option<Zone> {
    (j.judges() && combined_rank(j.zone) < combined_rank(strain_zone)).then_some(j.zone)
}

/// Rank of a zone where the strain curve and the path criterion both judge, worst first:
/// failed, uncovered, marginal, thickening, low-stretch, safe. A location either criterion
/// cannot judge is not shown safe by the other, as the exit status treats uncovered.
pub fn combined_rank(z: Zone) -> u8 {
    match z {
        Zone::Failed => 0,
        Zone::Uncovered => 1,
        Zone::Marginal => 2,
        Zone::Thickening => 3,
        Zone::LowStretch => 4,
        Zone::Safe => 5,
    }
}

impl PathJudgement {
    /// Whether the strain curve calls the location safe (or marginal) where the path criterion
    /// finds it at risk (or failed): a risk hidden by the strain curve.
    pub fn hidden(&self) -> bool {
        self.judges()
            && matches!(self.zone, Zone::Failed | Zone::Marginal)
            && self.zone < self.strain_zone
    }

    /// Whether this criterion takes part in the location's zone: a bent path with a
    /// direction (a straight one is the strain curve's alone).
    pub fn judges(&self) -> bool {
        !self.straight && self.angle_deg.is_some()
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

#[cfg(test)]
mod noise_props {
    use super::*;
    use proptest::prelude::*;
    use std::path::Path;

    fn kb080() -> LimitCurve {
        LimitCurve::load(
            &Path::new(env!("CARGO_MANIFEST_DIR"))
                .join("../../limits/steel-0.80mm-n0.20-keeler-brazier.toml"),
        )
        .unwrap()
    }

    fn zone_strategy() -> impl Strategy<Value = Zone> {
        prop::sample::select(Zone::ALL.to_vec())
    }

    proptest! {
        // A straight path, in any number of stages and with reading noise below the threshold
        // on each, is the strain curve's to judge: the combined zone is the strain zone
        // (Stoughton & Yoon 2012: on a straight path the criterion adds nothing to the curve).
        #[test]
        fn a_straight_path_in_any_number_of_stages_keeps_the_strain_zone(
            beta in -0.5f64..1.0,
            major in 0.02f64..0.6,
            mut steps in prop::collection::vec(0.05f64..1.0, 1..7),
            noise in prop::collection::vec((-0.45f64..0.45, -0.45f64..0.45), 7),
            strain_zone in zone_strategy(),
        ) {
            steps.sort_by(f64::total_cmp);
            let n = steps.len();
            let stages: Vec<[f64; 2]> = steps
                .iter()
                .enumerate()
                .map(|(k, f)| {
                    // The final reading exact; the others off the line by under half the
                    // reading error (0.45 %, below the 1 % noise floor).
                    let (a, b) = if k + 1 == n { (0.0, 0.0) } else { noise[k] };
                    let f = if k + 1 == n { 1.0 } else { *f };
                    [f * beta * major + a / 100.0, f * major + b / 100.0]
                })
                .collect();
            let j = judge_path(&stages, &kb080(), 10.0, strain_zone, &[]);
            prop_assert!(j.straight, "{j:?}");
            prop_assert_eq!(combined_zone(strain_zone, &j), None);
        }

        // Reading noise within each reading's error changes the path's limit use by no more
        // than the uncertainty stated for it (the worst case to first order; a margin of 10 %
        // of it and 0.05 % of use for the second-order terms).
        #[test]
        fn noise_within_the_reading_error_stays_within_the_stated_uncertainty(
            first in (0.0f64..0.30, 0.05f64..0.30),
            turn in (-0.10f64..0.10, 0.08f64..0.20),
            error in 0.002f64..0.01,
            noise in prop::collection::vec(-1.0f64..1.0, 4),
        ) {
            let (m2, m1) = first;
            let s1 = [m2.min(m1), m1];
            let s2 = [s1[0] + turn.0, s1[1] + turn.1];
            prop_assume!(s2[0] <= s2[1]);
            let errors = [[error; 2]; 2];
            let c = kb080();
            let base = judge_path_noisy(&[s1, s2], &c, 10.0, Zone::Safe, &[], Some(&errors));
            // Both stages kept (each increment well past the two readings' errors).
            prop_assume!(base.use_pct.is_some() && base.effective > 0.0);
            // Directions well inside the curve's range (its ends are at θ = 64° and 123°), so
            // that the noise cannot carry the path off the curve.
            prop_assume!(base.angle_deg.is_some_and(|a| (75.0..=112.0).contains(&a)));
            let moved = [
                [s1[0] + noise[0] * error, s1[1] + noise[1] * error],
                [s2[0] + noise[2] * error, s2[1] + noise[3] * error],
            ];
            let j = judge_path_noisy(&moved, &c, 10.0, Zone::Safe, &[], Some(&errors));
            if let (Some(a), Some(b), Some(u)) = (base.use_pct, j.use_pct, base.use_uncertainty_pct) {
                prop_assert!((a - b).abs() <= 1.1 * u + 0.05, "{a} -> {b}, u {u}");
            }
        }
    }
}
