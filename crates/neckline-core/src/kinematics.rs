//! Strains of one location from its two principal in-plane stretches.
//!
//! A circle of diameter `d0` becomes an ellipse with axes `d1 ≥ d2`; the principal stretches are
//! `λ1 = d1/d0`, `λ2 = d2/d0`. Everything else here follows from them and from plastic
//! incompressibility (`λ1 λ2 λ3 = 1`). Formulas: any continuum mechanics or sheet-forming text,
//! e.g. Marciniak, Duncan & Hu, *Mechanics of Sheet Metal Forming* (2002), ch. 1-2.

use crate::strain::{AlmansiStrain, EngStrain, GreenStrain, Stretch, TrueStrain};

/// A pair of principal values, `major ≥ minor` for in-plane strains.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Principal<T> {
    /// The larger in-plane principal value (ε1).
    pub major: T,
    /// The smaller in-plane principal value (ε2).
    pub minor: T,
}

impl<T: Copy> Principal<T> {
    /// Apply `f` to both values.
    pub fn map<U>(self, f: impl Fn(T) -> U) -> Principal<U> {
        Principal {
            major: f(self.major),
            minor: f(self.minor),
        }
    }
}

/// Thickness strain by plastic incompressibility: `ε3 = −(ε1 + ε2)` (true strains).
pub fn thickness_strain(major: TrueStrain, minor: TrueStrain) -> TrueStrain {
    TrueStrain(-(major.0 + minor.0))
}

/// Current thickness `t = t0 exp(ε3) = t0 / (λ1 λ2)`.
pub fn thickness(t0: f64, eps3: TrueStrain) -> f64 {
    t0 * eps3.0.exp()
}

/// Thinning as a fraction of the initial thickness: `1 − t/t0 = 1 − exp(ε3)`.
pub fn thinning(eps3: TrueStrain) -> f64 {
    1.0 - eps3.0.exp()
}

/// Strain ratio `β = ε2 / ε1` (true strains); `None` at zero major strain where it is undefined.
pub fn strain_ratio(major: TrueStrain, minor: TrueStrain) -> Option<f64> {
    (major.0.abs() > 1e-12).then(|| minor.0 / major.0)
}

/// Von Mises effective strain for a proportional path, plane stress, incompressible:
/// `ε_eff = (2/√3) √(ε1² + ε1 ε2 + ε2²)` (Hill, *The Mathematical Theory of Plasticity*, 1950).
pub fn effective_strain(major: TrueStrain, minor: TrueStrain) -> TrueStrain {
    let (a, b) = (major.0, minor.0);
    TrueStrain(2.0 / 3f64.sqrt() * (a * a + a * b + b * b).sqrt())
}

/// All strain measures of one location, derived from its principal stretches.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StrainState {
    /// Principal stretches, ordered so that `major ≥ minor`.
    pub stretch: Principal<Stretch>,
    /// Engineering strains `λ − 1`.
    pub eng: Principal<EngStrain>,
    /// True strains `ln λ`.
    pub true_strain: Principal<TrueStrain>,
    /// Green-Lagrange strains `(λ² − 1)/2`.
    pub green: Principal<GreenStrain>,
    /// Almansi strains `(1 − λ⁻²)/2`.
    pub almansi: Principal<AlmansiStrain>,
    /// Thickness strain `ε3 = −(ε1 + ε2)`.
    pub thickness_strain: TrueStrain,
    /// Thinning `1 − t/t0` as a fraction (negative when the sheet thickened).
    pub thinning: f64,
    /// Strain ratio `β = ε2/ε1`, `None` when the location is unstrained.
    pub beta: Option<f64>,
    /// Von Mises effective strain.
    pub effective: TrueStrain,
}

impl StrainState {
    /// Strains from two principal stretches, in either order (they are sorted here).
    ///
    /// A 2.5 mm circle read as a 3.25 × 2.40 mm ellipse: λ = 1.30 and 0.96. Check values from
    /// the textbook formulas (any continuum mechanics text; e.g. Marciniak, Duncan & Hu 2002):
    ///
    /// ```
    /// use neckline_core::kinematics::StrainState;
    /// use neckline_core::strain::Stretch;
    ///
    /// let s = StrainState::from_stretches(Stretch::new(0.96).unwrap(), Stretch::new(1.30).unwrap());
    /// let near = |a: f64, b: f64| (a - b).abs() < 5e-6;
    /// assert!(near(s.eng.major.value(), 0.30) && near(s.eng.minor.value(), -0.04)); // λ − 1
    /// assert!(near(s.true_strain.major.value(), 0.26236)); // ln 1.30
    /// assert!(near(s.true_strain.minor.value(), -0.04082)); // ln 0.96
    /// assert!(near(s.thickness_strain.value(), -0.22154)); // ε3 = −(ε1 + ε2)
    /// assert!(near(s.thickness(1.0), 0.80128)); // t/t0 = 1/(λ1 λ2)
    /// assert!(near(s.almansi.major.value(), 0.20414)); // (1 − λ⁻²)/2
    /// // Von Mises effective strain (Hill 1950): (2/√3) √(ε1² + ε1 ε2 + ε2²).
    /// let (e1, e2) = (1.30f64.ln(), 0.96f64.ln());
    /// let eff = 2.0 / 3f64.sqrt() * (e1 * e1 + e1 * e2 + e2 * e2).sqrt();
    /// assert!(near(s.effective.value(), eff));
    /// ```
    pub fn from_stretches(a: Stretch, b: Stretch) -> Self {
        let (l1, l2) = if a.value() >= b.value() {
            (a, b)
        } else {
            (b, a)
        };
        let stretch = Principal {
            major: l1,
            minor: l2,
        };
        let true_strain = stretch.map(TrueStrain::from);
        let eps3 = thickness_strain(true_strain.major, true_strain.minor);
        StrainState {
            stretch,
            eng: stretch.map(EngStrain::from),
            true_strain,
            green: stretch.map(GreenStrain::from),
            almansi: stretch.map(AlmansiStrain::from),
            thickness_strain: eps3,
            thinning: thinning(eps3),
            beta: strain_ratio(true_strain.major, true_strain.minor),
            effective: effective_strain(true_strain.major, true_strain.minor),
        }
    }

    /// Strains of a circle of diameter `d0` measured as an ellipse with axes `d1`, `d2`
    /// (same length unit). `None` if any length is not finite and positive.
    pub fn from_circle(d0: f64, d1: f64, d2: f64) -> Option<Self> {
        if !(d0.is_finite() && d0 > 0.0) {
            return None;
        }
        Some(Self::from_stretches(
            Stretch::from_lengths(d1, d0)?,
            Stretch::from_lengths(d2, d0)?,
        ))
    }

    /// Current thickness for an initial thickness `t0` (same unit as `t0`).
    pub fn thickness(&self, t0: f64) -> f64 {
        thickness(t0, self.thickness_strain)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // Check values computed from the textbook formulas (project field notes, section 2):
    // d0 = 2.5, d1 = 3.25, d2 = 2.40 mm.
    #[test]
    fn circle_check_values() {
        let s = StrainState::from_circle(2.5, 3.25, 2.40).unwrap();
        assert_abs_diff_eq!(s.stretch.major.value(), 1.30, epsilon = 1e-12);
        assert_abs_diff_eq!(s.stretch.minor.value(), 0.96, epsilon = 1e-12);
        assert_abs_diff_eq!(s.eng.major.percent(), 30.0, epsilon = 1e-9);
        assert_abs_diff_eq!(s.eng.minor.percent(), -4.0, epsilon = 1e-9);
        assert_abs_diff_eq!(s.true_strain.major.value(), 0.26236, epsilon = 1e-5);
        assert_abs_diff_eq!(s.true_strain.minor.value(), -0.04082, epsilon = 1e-5);
        assert_abs_diff_eq!(s.thickness_strain.value(), -0.22154, epsilon = 1e-5);
        assert_abs_diff_eq!(s.thickness(1.0), 0.80128, epsilon = 1e-5);
        assert_abs_diff_eq!(s.green.major.value(), 0.3450, epsilon = 1e-4);
        assert_abs_diff_eq!(s.green.minor.value(), -0.0392, epsilon = 1e-4);
        assert_abs_diff_eq!(s.almansi.major.value(), 0.20414, epsilon = 1e-5);
        assert_abs_diff_eq!(s.almansi.minor.value(), -0.04254, epsilon = 1e-5);
        // t = t0 / (λ1 λ2): incompressibility written with stretches.
        assert_abs_diff_eq!(s.thickness(0.8), 0.8 / (1.30 * 0.96), epsilon = 1e-12);
    }

    // Effective strain of uniaxial tension (β = −1/2) equals the major strain; of equibiaxial
    // stretching it is 2ε1 (von Mises, plane stress: Hill 1950).
    #[test]
    fn effective_strain_reference_paths() {
        let e = effective_strain(TrueStrain(0.2), TrueStrain(-0.1));
        assert_abs_diff_eq!(e.value(), 0.2, epsilon = 1e-12);
        let e = effective_strain(TrueStrain(0.2), TrueStrain(0.2));
        assert_abs_diff_eq!(e.value(), 0.4, epsilon = 1e-12);
        // Plane strain: 2/√3 ε1.
        let e = effective_strain(TrueStrain(0.3), TrueStrain(0.0));
        assert_abs_diff_eq!(e.value(), 0.3 * 2.0 / 3f64.sqrt(), epsilon = 1e-12);
    }

    #[test]
    fn unstrained_circle_has_no_beta() {
        let s = StrainState::from_circle(2.5, 2.5, 2.5).unwrap();
        assert!(s.beta.is_none());
        assert_abs_diff_eq!(s.thinning, 0.0, epsilon = 1e-15);
    }

    #[test]
    fn bad_lengths_are_refused() {
        assert!(StrainState::from_circle(0.0, 3.0, 2.0).is_none());
        assert!(StrainState::from_circle(2.5, -1.0, 2.0).is_none());
        assert!(StrainState::from_circle(2.5, f64::NAN, 2.0).is_none());
    }
}
