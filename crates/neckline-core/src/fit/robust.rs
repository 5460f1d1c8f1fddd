//! Ellipses fitted with outliers set aside, and each fit judged.
//!
//! **Outliers** ([`fit_robust`]). A least-squares fit follows every point, so one stray point or
//! a second outline under the same id drags it far off. When some point lies farther than
//! [`INLIER_TOL`] of the fitted size from the fit, the fit is redone by RANSAC (Fischler &
//! Bolles 1981, Commun. ACM 24(6)): 300 fits to 6 points drawn with a fixed seed (if half the
//! points are good, the chance that no draw is all-good is (1 − 2⁻⁶)³⁰⁰ < 1 %), each scored by
//! its squared Sampson distances capped at [`INLIER_TOL`] of the points' size (MSAC); the best is
//! refitted to its agreeing points, and the agreeing set re-taken, until it settles.
//!
//! **Quality** ([`Quality`]): a fit is `suspect` when
//! - more than [`MAX_DISCARDED`] (20 %) of the points were set aside: more than one point in five
//!   off the ellipse is not a stray reading but a second outline or a wrong id;
//! - its RMS residual exceeds [`MAX_RESIDUAL`] (1 %) of the mean diameter: the reading error of a
//!   good circle reading is about 1 % strain (0.025 mm on 2.5 mm, common practice), so an outline
//!   scattered by more than that is not one clean ellipse at reading precision;
//! - its points cover less than [`MIN_COVERAGE_DEG`] (180°) of the outline (the largest gap
//!   between neighbouring points, in the ellipse's parametric angle, is over half a turn): the
//!   axes of a short arc are poorly determined and biased (Fitzgibbon et al. 1999, sec. 5), a
//!   90° arc with reading noise being off by several % strain.
//!
//! The thresholds are set so that a clean reading of a whole outline passes and each failure
//! named above is caught; [`INLIER_TOL`] (3 %) is three times [`MAX_RESIDUAL`], so no point a good
//! fit would scatter is set aside.

use super::{fit_ellipse, EllipseFit, FitError, MIN_POINTS};
use nalgebra::Vector2;

/// A point farther from the ellipse than this fraction of its mean diameter (Sampson distance)
/// is set aside as an outlier.
pub const INLIER_TOL: f64 = 0.03;
/// A fit with more than this fraction of its points set aside is suspect.
pub const MAX_DISCARDED: f64 = 0.2;
/// A fit whose RMS residual exceeds this fraction of its mean diameter is suspect.
pub const MAX_RESIDUAL: f64 = 0.01;
/// A fit whose points cover less of the outline than this (degrees) is suspect.
pub const MIN_COVERAGE_DEG: f64 = 180.0;
/// RANSAC draws.
const DRAWS: usize = 300;
/// Points scored per RANSAC draw at most (an even subsample of longer outlines).
const SCORED: usize = 2000;

/// Whether a fit can be trusted as it is.
#[derive(Debug, Clone, PartialEq)]
pub enum Quality {
    /// None of the checks in the module notes fired.
    Good,
    /// At least one did: the reasons, in words.
    Suspect(Vec<String>),
}

impl std::fmt::Display for Quality {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Quality::Good => f.write_str("good"),
            Quality::Suspect(r) => write!(f, "suspect: {}", r.join("; ")),
        }
    }
}

/// An ellipse fitted with outliers set aside, and its quality.
#[derive(Debug, Clone, PartialEq)]
pub struct RobustFit {
    /// The fit to the points kept (`fit.points` of them).
    pub fit: EllipseFit,
    /// Indices of the points set aside, in input order.
    pub discarded: Vec<usize>,
    /// How much of the outline the kept points cover, degrees of parametric angle.
    pub coverage_deg: f64,
    /// The verdict of the checks in the module notes.
    pub quality: Quality,
}

/// Sampson distance of `p` from the fitted ellipse, in the points' unit: in the ellipse's own
/// frame `Q = u²/a² + v²/b² − 1`, `|Q| / |∇Q|`.
pub fn sampson_distance(f: &EllipseFit, p: Vector2<f64>) -> f64 {
    let (u, v) = ellipse_frame(f, p);
    let (a2, b2) = ((f.major / 2.0).powi(2), (f.minor / 2.0).powi(2));
    let q = u * u / a2 + v * v / b2 - 1.0;
    let g = (2.0 * u / a2).hypot(2.0 * v / b2);
    if g > 0.0 {
        q.abs() / g
    } else {
        f64::INFINITY
    }
}

/// `p` in the ellipse's frame: along its major and its minor axis from its centre.
fn ellipse_frame(f: &EllipseFit, p: Vector2<f64>) -> (f64, f64) {
    let (s, c) = f.angle_deg.to_radians().sin_cos();
    let d = p - f.centre;
    (c * d.x + s * d.y, -s * d.x + c * d.y)
}

/// Degrees of the outline covered by `points`: 360° less the largest gap between neighbours in
/// the parametric angle `t = atan2(v/b, u/a)` of the ellipse `f`.
pub fn coverage_deg(f: &EllipseFit, points: &[Vector2<f64>]) -> f64 {
    let mut t: Vec<f64> = points
        .iter()
        .map(|&p| {
            let (u, v) = ellipse_frame(f, p);
            (v / f.minor).atan2(u / f.major).to_degrees()
        })
        .collect();
    if t.len() < 2 {
        return 0.0;
    }
    t.sort_by(f64::total_cmp);
    let wrap = t[0] + 360.0 - t[t.len() - 1];
    let gap = t.windows(2).map(|w| w[1] - w[0]).fold(wrap, f64::max);
    360.0 - gap
}

/// Fit with outliers set aside and judge the fit (see the module notes).
///
/// Twelve points on a 3.25 × 2.40 mm ellipse turned 30°, and one stray reading: the direct fit
/// is exact for points on an ellipse (Fitzgibbon, Pilu & Fisher 1999), and the stray point is
/// set aside. On a 2.5 mm circle the axes give 30 % and −4 % engineering strain (e = d/d0 − 1,
/// any continuum mechanics text).
///
/// ```
/// use nalgebra::Vector2;
/// use neckline_core::fit::{fit_robust, Quality};
///
/// let (a, b, theta) = (3.25 / 2.0, 2.40 / 2.0, 30f64.to_radians());
/// let mut points: Vec<Vector2<f64>> = (0..12)
///     .map(|i| {
///         let t = i as f64 * std::f64::consts::TAU / 12.0;
///         let (u, v) = (a * t.cos(), b * t.sin());
///         Vector2::new(10.0 + u * theta.cos() - v * theta.sin(), 5.0 + u * theta.sin() + v * theta.cos())
///     })
///     .collect();
/// points.push(Vector2::new(12.5, 6.5)); // a stray reading
///
/// let r = fit_robust(&points).unwrap();
/// assert_eq!(r.discarded, [12]);
/// assert!((r.fit.major - 3.25).abs() < 1e-9 && (r.fit.minor - 2.40).abs() < 1e-9);
/// assert!((r.fit.angle_deg - 30.0).abs() < 1e-6);
/// assert_eq!(r.quality, Quality::Good);
/// let d0 = 2.5;
/// assert!((100.0 * (r.fit.major / d0 - 1.0) - 30.0).abs() < 1e-6);
/// assert!((100.0 * (r.fit.minor / d0 - 1.0) + 4.0).abs() < 1e-6);
/// ```
pub fn fit_robust(points: &[Vector2<f64>]) -> Result<RobustFit, FitError> {
    let all = fit_ellipse(points);
    let keep = match &all {
        Err(FitError::TooFewPoints(_) | FitError::NotFinite | FitError::Collinear) => {
            return Err(all.unwrap_err())
        }
        Ok(f) if inliers(f, points).len() == points.len() => (0..points.len()).collect(),
        _ if points.len() <= MIN_POINTS => (0..points.len()).collect(),
        _ => match ransac(points) {
            Some(k) => refine(points, k),
            None => (0..points.len()).collect(),
        },
    };
    let kept: Vec<Vector2<f64>> = keep.iter().map(|&i| points[i]).collect();
    let fit = if keep.len() == points.len() {
        all?
    } else {
        fit_ellipse(&kept)?
    };
    let discarded: Vec<usize> = (0..points.len()).filter(|i| !keep.contains(i)).collect();
    let coverage = coverage_deg(&fit, &kept);
    let quality = judge_fit(&fit, discarded.len(), points.len(), coverage);
    Ok(RobustFit {
        fit,
        discarded,
        coverage_deg: coverage,
        quality,
    })
}

/// The checks of the module notes.
fn judge_fit(f: &EllipseFit, discarded: usize, total: usize, coverage: f64) -> Quality {
    let mut why = Vec::new();
    if discarded as f64 > MAX_DISCARDED * total as f64 {
        why.push(format!(
            "{discarded} of {total} points lie off the ellipse (two outlines under one id?)"
        ));
    }
    let size = (f.major + f.minor) / 2.0;
    if f.rms_residual > MAX_RESIDUAL * size {
        why.push(format!(
            "residual {:.2} % of the size (more than {} %)",
            100.0 * f.rms_residual / size,
            100.0 * MAX_RESIDUAL
        ));
    }
    if coverage < MIN_COVERAGE_DEG {
        why.push(format!(
            "points cover only {coverage:.0}° of the outline (less than half)"
        ));
    }
    if why.is_empty() {
        Quality::Good
    } else {
        Quality::Suspect(why)
    }
}

/// Indices of the points within [`INLIER_TOL`] of the fit's mean diameter.
fn inliers(f: &EllipseFit, points: &[Vector2<f64>]) -> Vec<usize> {
    let tol = INLIER_TOL * (f.major + f.minor) / 2.0;
    (0..points.len())
        .filter(|&i| sampson_distance(f, points[i]) <= tol)
        .collect()
}

/// Refit to the agreeing points and re-take them until the set settles (at most 10 rounds).
fn refine(points: &[Vector2<f64>], mut keep: Vec<usize>) -> Vec<usize> {
    for _ in 0..10 {
        let kept: Vec<Vector2<f64>> = keep.iter().map(|&i| points[i]).collect();
        let Ok(f) = fit_ellipse(&kept) else { break };
        let next = inliers(&f, points);
        if next.len() < MIN_POINTS || next == keep {
            break;
        }
        keep = next;
    }
    keep
}

/// The agreeing set of the best of [`DRAWS`] fits to 6 points drawn with a fixed seed. Each is
/// scored on at most [`SCORED`] points by `Σ min(d², τ²)` (MSAC: Torr & Zisserman 2000, Comput.
/// Vis. Image Underst. 78), `d` the Sampson distance and `τ` [`INLIER_TOL`] of the points' robust
/// size, the same for every draw, so that a loose fit does not win by a wide band. `None` when the
/// best agrees with fewer than [`MIN_POINTS`] points.
fn ransac(points: &[Vector2<f64>]) -> Option<Vec<usize>> {
    let n = points.len();
    if n <= MIN_POINTS {
        return None;
    }
    let step = n.div_ceil(SCORED).max(1);
    let scored: Vec<Vector2<f64>> = points.iter().step_by(step).copied().collect();
    let size = robust_size(points);
    let tol2 = (INLIER_TOL * size).powi(2);
    let mut rng = SplitMix64(0x6e65_636b_6c69_6e65);
    let mut best: Option<(f64, EllipseFit)> = None;
    for _ in 0..DRAWS {
        let mut pick: Vec<usize> = Vec::with_capacity(MIN_POINTS);
        while pick.len() < MIN_POINTS {
            let i = (rng.next() % n as u64) as usize;
            if !pick.contains(&i) {
                pick.push(i);
            }
        }
        let sample: Vec<Vector2<f64>> = pick.iter().map(|&i| points[i]).collect();
        let Ok(f) = fit_ellipse(&sample) else {
            continue;
        };
        if !(f.major.is_finite() && f.major + f.minor <= 4.0 * size) {
            continue;
        }
        let cost: f64 = scored
            .iter()
            .map(|&p| sampson_distance(&f, p).powi(2).min(tol2))
            .sum();
        if best.as_ref().is_none_or(|(c, _)| cost < *c) {
            best = Some((cost, f));
        }
    }
    let (_, f) = best?;
    let keep = inliers(&f, points);
    (keep.len() >= MIN_POINTS).then_some(keep)
}

/// Twice the median distance of the points from their coordinate-wise median: about the
/// diameter of one outline, and not dragged by a few far points.
fn robust_size(points: &[Vector2<f64>]) -> f64 {
    let median = |mut v: Vec<f64>| {
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    let c = Vector2::new(
        median(points.iter().map(|p| p.x).collect()),
        median(points.iter().map(|p| p.y).collect()),
    );
    2.0 * median(points.iter().map(|p| (p - c).norm()).collect())
}

/// SplitMix64 (Steele, Lea & Flood 2014): a small seeded generator, so that a fit is the same
/// on every run.
struct SplitMix64(u64);

impl SplitMix64 {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::fit::ellipse_points;
    use approx::assert_abs_diff_eq;

    fn even(n: usize) -> impl Iterator<Item = f64> {
        (0..n).map(move |i| i as f64 * std::f64::consts::TAU / n as f64)
    }

    #[test]
    fn one_stray_point_is_set_aside() {
        let mut p = ellipse_points(2.8, 2.8, 0.0, Vector2::new(5.0, 5.0), even(16));
        p.push(Vector2::new(5.0 + 2.3, 5.0));
        let plain = fit_ellipse(&p).unwrap();
        assert!((plain.major - 2.8).abs() > 0.1, "{plain:?}");
        let r = fit_robust(&p).unwrap();
        assert_eq!(r.discarded, vec![16]);
        assert_abs_diff_eq!(r.fit.major, 2.8, epsilon = 1e-9);
        assert_abs_diff_eq!(r.fit.minor, 2.8, epsilon = 1e-9);
        assert_eq!(r.fit.points, 16);
        assert_eq!(r.quality, Quality::Good);
    }

    #[test]
    fn two_outlines_under_one_id_are_suspect() {
        let mut p = ellipse_points(2.5, 2.5, 0.0, Vector2::new(0.0, 0.0), even(12));
        p.extend(ellipse_points(
            2.9,
            2.7,
            20.0,
            Vector2::new(4.0, 0.5),
            even(12),
        ));
        let r = fit_robust(&p).unwrap();
        assert!(
            (r.fit.major - 2.5).abs() < 1e-6 || (r.fit.major - 2.9).abs() < 1e-6,
            "{r:?}"
        );
        assert_eq!(r.discarded.len(), 12);
        assert!(
            r.quality
                .to_string()
                .starts_with("suspect: 12 of 24 points"),
            "{r:?}"
        );
    }

    #[test]
    fn a_short_arc_is_suspect() {
        let t = (0..12).map(|i| f64::from(i) / 11.0 * std::f64::consts::FRAC_PI_2);
        let mut p = ellipse_points(2.8, 2.6, 0.0, Vector2::zeros(), t);
        for (i, q) in p.iter_mut().enumerate() {
            *q += Vector2::new(0.01 * (5.1 * i as f64).sin(), 0.01 * (2.3 * i as f64).cos());
        }
        let r = fit_robust(&p).unwrap();
        assert!(r.coverage_deg < 100.0, "{r:?}");
        assert!(r.quality.to_string().contains("cover only"), "{r:?}");
        // A whole outline with the same noise is good.
        let mut whole = ellipse_points(2.8, 2.6, 0.0, Vector2::zeros(), even(12));
        for (i, q) in whole.iter_mut().enumerate() {
            *q += Vector2::new(0.01 * (5.1 * i as f64).sin(), 0.01 * (2.3 * i as f64).cos());
        }
        let r = fit_robust(&whole).unwrap();
        assert_eq!(r.quality, Quality::Good, "{r:?}");
        assert!(r.coverage_deg > 300.0, "{r:?}");
    }

    #[test]
    fn a_scattered_outline_is_suspect() {
        let mut p = ellipse_points(2.8, 2.8, 0.0, Vector2::zeros(), even(24));
        for (i, q) in p.iter_mut().enumerate() {
            let r = if i % 2 == 0 { 1.025 } else { 0.975 };
            *q *= r;
        }
        let r = fit_robust(&p).unwrap();
        assert!(r.quality.to_string().contains("residual"), "{r:?}");
    }
}
