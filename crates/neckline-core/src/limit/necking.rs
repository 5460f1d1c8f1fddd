//! Analytic necking limits of a power-law material (`σ = K εⁿ`) on straight strain paths, in true
//! strain. `beta = ε2 / ε1` is the strain ratio of the path.
//!
//! | limit | side | formula | source |
//! |---|---|---|---|
//! | Considère | uniaxial | ε_u = n | Considère 1885 |
//! | Hill localized neck | β ≤ 0 | ε1 = n / (1 + β) | Hill 1952, J. Mech. Phys. Solids 1 |
//! | Swift diffuse neck | any β | ε1 = 2n(1+β+β²) / ((1+β)(2β²−β+2)) | Swift 1952, J. Mech. Phys. Solids 1 |
//! | Støren-Rice | 0 ≤ β ≤ 1 | ε1 = (3β² + n(2+β)²) / (2(2+β)(1+β+β²)) | Støren & Rice 1975, J. Mech. Phys. Solids 23 (formula from memory) |
//!
//! These are limits of ideal, imperfection-free sheet: real sheet fails earlier. Swift's and
//! Hill's formulas assume von Mises (isotropic) flow on the right side; Hill's left-side result
//! holds for any smooth yield function loaded proportionally along its axes.

use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// Considère's uniform (diffuse-necking) strain in uniaxial tension for Swift hardening
/// `σ = K (ε0 + ε)ⁿ`: the load `σ·A ∝ (ε0 + ε)ⁿ e^(−ε)` peaks at `ε_u = n − ε0`; for the pure
/// power law (`ε0 = 0`) `ε_u = n` (Considère 1885). Returns 0 when `ε0 ≥ n` (no stable stretch).
pub fn considere_uniform_strain(n: f64, eps0: f64) -> f64 {
    (n - eps0).max(0.0)
}

/// Hill 1952 localized neck along the zero-extension direction, left side (`β ≤ 0`):
/// `ε1 = n / (1 + β)`, i.e. `ε1 + ε2 = n` (Hill 1952, J. Mech. Phys. Solids 1, 19-30).
pub fn hill_major(n: f64, beta: f64) -> f64 {
    n / (1.0 + beta)
}

/// Swift 1952 diffuse neck under von Mises flow, any `β` in (−1, 1]:
/// `ε1 = 2n(1 + β + β²) / ((1 + β)(2β² − β + 2))` (Swift 1952, J. Mech. Phys. Solids 1, 1-18).
pub fn swift_major(n: f64, beta: f64) -> f64 {
    let b = beta;
    2.0 * n * (1.0 + b + b * b) / ((1.0 + b) * (2.0 * b * b - b + 2.0))
}

/// Støren-Rice 1975 localized neck by a vertex on the yield surface, right side (`0 ≤ β ≤ 1`):
/// `ε1 = (3β² + n(2 + β)²) / (2(2 + β)(1 + β + β²))` (Støren & Rice 1975, J. Mech. Phys.
/// Solids 23, 421-441; the formula is recalled from memory, it gives `n` at `β = 0`).
pub fn storen_rice_major(n: f64, beta: f64) -> f64 {
    let b = beta;
    (3.0 * b * b + n * (2.0 + b).powi(2)) / (2.0 * (2.0 + b) * (1.0 + b + b * b))
}

/// Which model draws the right-hand side (`β > 0`) of an analytic necking curve.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum RightSide {
    /// Swift 1952 diffuse necking.
    #[default]
    Swift,
    /// Støren-Rice 1975 localized necking.
    StorenRice,
}

impl RightSide {
    /// Major limit strain for `beta > 0` under this model.
    pub fn major(self, n: f64, beta: f64) -> f64 {
        match self {
            RightSide::Swift => swift_major(n, beta),
            RightSide::StorenRice => storen_rice_major(n, beta),
        }
    }
    /// Name as written on the command line and in curve files.
    pub fn name(self) -> &'static str {
        match self {
            RightSide::Swift => "swift",
            RightSide::StorenRice => "storen-rice",
        }
    }
    /// The model and its publication, for a curve's `source`.
    pub fn citation(self) -> &'static str {
        match self {
            RightSide::Swift => "Swift 1952 diffuse neck (J. Mech. Phys. Solids 1)",
            RightSide::StorenRice => "Storen-Rice 1975 localized neck (J. Mech. Phys. Solids 23)",
        }
    }
}

impl fmt::Display for RightSide {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for RightSide {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "swift" => Ok(RightSide::Swift),
            "storen-rice" | "stoeren-rice" | "storen_rice" => Ok(RightSide::StorenRice),
            other => Err(format!(
                "unknown right-side model `{other}`: expected `swift` or `storen-rice`"
            )),
        }
    }
}

/// The fewest strain ratios a curve is built from: both ends and plane strain.
pub const MIN_PATHS: usize = 3;

/// `count` strain ratios from −1/2 (uniaxial tension) to 1 (equibiaxial) that always include
/// both ends and plane strain (β = 0), where a curve usually has its lowest point: left of 0
/// they are evenly spaced over [−1/2, 0], right of it over [0, 1], with the intervals shared in
/// proportion to the two lengths (1/3 and 2/3 of them, rounded; at least one each). When
/// `count − 1` is a multiple of 3 this is the plain even spacing. Leaving out β = 0 reads the
/// plane-strain limit off a chord across the minimum, on the non-conservative side.
/// `count` below [`MIN_PATHS`] is taken as [`MIN_PATHS`].
pub fn strain_ratios(count: usize) -> Vec<f64> {
    let intervals = count.max(MIN_PATHS) - 1;
    let left = ((intervals as f64 / 3.0).round() as usize).clamp(1, intervals - 1);
    let right = intervals - left;
    let mut out: Vec<f64> = (0..left)
        .map(|i| -0.5 + 0.5 * i as f64 / left as f64)
        .collect();
    out.extend((0..=right).map(|i| i as f64 / right as f64));
    out
}

/// Check `n` for the analytic curves; `Err` gives the allowed range.
pub fn validate_n(n: f64) -> Result<(), String> {
    if n.is_finite() && (0.01..=0.6).contains(&n) {
        Ok(())
    } else {
        Err(format!(
            "n = {n} is outside 0.01 <= n <= 0.6 (strain-hardening exponent)"
        ))
    }
}

/// The analytic curve as `[ε2, ε1]` points in true strain (fractions), one per strain ratio in
/// `betas`: Hill 1952 for `β ≤ 0`, the `right` model for `β > 0`.
pub fn curve_points(n: f64, right: RightSide, betas: &[f64]) -> Vec<[f64; 2]> {
    betas
        .iter()
        .map(|&b| {
            let major = if b <= 0.0 {
                hill_major(n, b)
            } else {
                right.major(n, b)
            };
            [b * major, major]
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // Hill 1952 (J. Mech. Phys. Solids 1): on the left side the localized neck has ε1 + ε2 = n.
    #[test]
    fn hill_left_side_has_eps1_plus_eps2_equal_n() {
        for n in [0.1, 0.2, 0.35] {
            for p in curve_points(n, RightSide::Swift, &strain_ratios(31))
                .iter()
                .filter(|p| p[0] <= 0.0)
            {
                assert_abs_diff_eq!(p[0] + p[1], n, epsilon = 1e-12);
            }
        }
    }

    // Plane strain and both ends are always among the strain ratios, whatever the count
    // (β = 0 is where Hill 1952 gives ε1 = n; skipping it overstates FLC0).
    #[test]
    fn strain_ratios_hold_plane_strain_and_both_ends() {
        for count in MIN_PATHS..=301 {
            let b = strain_ratios(count);
            assert_eq!(b.len(), count);
            assert_abs_diff_eq!(b[0], -0.5, epsilon = 0.0);
            assert_abs_diff_eq!(b[count - 1], 1.0, epsilon = 0.0);
            assert!(b.iter().any(|x| x.abs() < 1e-15), "{count}: {b:?}");
            assert!(b.windows(2).all(|w| w[1] > w[0]), "{count}: {b:?}");
        }
        // 31 keeps the even spacing of 0.05.
        for (i, b) in strain_ratios(31).iter().enumerate() {
            assert_abs_diff_eq!(*b, -0.5 + 0.05 * i as f64, epsilon = 1e-12);
        }
    }

    // Swift 1952: the diffuse-neck limit equals n at plane strain and at equibiaxial stretch.
    #[test]
    fn swift_equals_n_at_plane_strain_and_equibiaxial() {
        for n in [0.1, 0.22, 0.4] {
            assert_abs_diff_eq!(swift_major(n, 0.0), n, epsilon = 1e-12);
            assert_abs_diff_eq!(swift_major(n, 1.0), n, epsilon = 1e-12);
            // Between the two the Swift curve rises above n (Swift 1952, figure of ε1 vs β).
            assert!(swift_major(n, 0.5) > n);
        }
    }

    // Støren & Rice 1975 meet Hill 1952 at plane strain (ε1 = n), and the right side rises.
    #[test]
    fn storen_rice_meets_hill_at_plane_strain() {
        assert_abs_diff_eq!(
            storen_rice_major(0.2, 0.0),
            hill_major(0.2, 0.0),
            epsilon = 1e-12
        );
        assert!(storen_rice_major(0.2, 1.0) > storen_rice_major(0.2, 0.0));
    }

    // Considère 1885: the uniaxial load K εⁿ e^(−ε) peaks at ε = n. The peak is found here by a
    // golden-section search on the load itself, independent of the closed form.
    #[test]
    fn considere_by_maximising_the_load() {
        for (n, eps0) in [(0.2, 0.0), (0.35, 0.0), (0.25, 0.01)] {
            let load = |e: f64| -((eps0 + e).powf(n) * (-e).exp());
            let (mut a, mut b) = (1e-6, 2.0);
            let g = (5f64.sqrt() - 1.0) / 2.0;
            for _ in 0..100 {
                let (c, d) = (b - g * (b - a), a + g * (b - a));
                if load(c) < load(d) {
                    b = d;
                } else {
                    a = c;
                }
            }
            assert_abs_diff_eq!(
                considere_uniform_strain(n, eps0),
                (a + b) / 2.0,
                epsilon = 1e-6
            );
        }
    }

    #[test]
    fn ratios_span_uniaxial_to_equibiaxial() {
        let b = strain_ratios(31);
        assert_eq!(b.len(), 31);
        assert_abs_diff_eq!(b[0], -0.5);
        assert_abs_diff_eq!(b[10], 0.0, epsilon = 1e-12);
        assert_abs_diff_eq!(b[30], 1.0);
        assert!("storen-rice".parse::<RightSide>().is_ok());
        assert!("vertex".parse::<RightSide>().unwrap_err().contains("swift"));
        assert!(validate_n(0.7).unwrap_err().contains("0.6"));
    }
}
