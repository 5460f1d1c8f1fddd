//! Hill 1948 quadratic anisotropic yield function in plane stress, full in-plane form.
//!
//! With x the rolling direction, y the transverse direction and the normalisation G + H = 1 (so
//! that the effective stress equals the uniaxial yield stress along x):
//!
//! `σ̄² = (G + H) σxx² − 2H σxx σyy + (F + H) σyy² + 2N σxy²`
//!
//! `G = 1/(1 + r0)`, `H = r0/(1 + r0)`, `F = H/r90`, `N = (r0 + r90)(1 + 2 r45) / (2 r90 (1 + r0))`
//! (Hill 1948, Proc. R. Soc. Lond. A 193, 281-297; the r-value relations as in Hill's "The
//! Mathematical Theory of Plasticity", 1950). With r0 = r45 = r90 = 1 this is von Mises.
//!
//! Stresses are `[σxx, σyy, σxy]`; strain increments are `[dεxx, dεyy, dγxy]` with the engineering
//! shear `dγxy = 2 dεxy`, the work conjugate of `σxy`. Then `σ̄² = σᵀPσ`, the associated flow rule
//! is `dε = dε̄ Pσ/σ̄`, and plastic work equivalence gives `dε̄² = dεᵀP⁻¹dε`.

/// A 3-vector `[xx, yy, xy]`.
pub type Vec3 = [f64; 3];
/// A 3×3 matrix, rows first.
pub type Mat3 = [[f64; 3]; 3];

/// Hill 1948 coefficients (normalised G + H = 1).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Hill48 {
    /// F.
    pub f: f64,
    /// G.
    pub g: f64,
    /// H.
    pub h: f64,
    /// N.
    pub n: f64,
}

impl Hill48 {
    /// Coefficients from the Lankford r-values at 0°, 45° and 90° to the rolling direction
    /// (formulas in the module doc). The r-values must be positive.
    pub fn from_r(r0: f64, r45: f64, r90: f64) -> Self {
        let g = 1.0 / (1.0 + r0);
        let h = r0 / (1.0 + r0);
        Hill48 {
            f: h / r90,
            g,
            h,
            n: (r0 + r90) * (1.0 + 2.0 * r45) / (2.0 * r90 * (1.0 + r0)),
        }
    }

    /// The isotropic case, von Mises: r0 = r45 = r90 = 1.
    pub fn von_mises() -> Self {
        Self::from_r(1.0, 1.0, 1.0)
    }

    /// The matrix P of `σ̄² = σᵀPσ`.
    pub fn p(&self) -> Mat3 {
        let Hill48 { f, g, h, n } = *self;
        [[g + h, -h, 0.0], [-h, f + h, 0.0], [0.0, 0.0, 2.0 * n]]
    }

    /// `P⁻¹`, which maps a strain increment to the stress direction: `σ/σ̄ = P⁻¹dε / dε̄`.
    pub fn p_inv(&self) -> Mat3 {
        let Hill48 { f, g, h, n } = *self;
        let det = (g + h) * (f + h) - h * h; // = FG + GH + HF
        [
            [(f + h) / det, h / det, 0.0],
            [h / det, (g + h) / det, 0.0],
            [0.0, 0.0, 1.0 / (2.0 * n)],
        ]
    }

    /// Effective stress `σ̄ = √(σᵀPσ)`.
    pub fn effective_stress(&self, s: Vec3) -> f64 {
        quad(&self.p(), s).sqrt()
    }

    /// Work-conjugate effective strain increment `dε̄ = √(dεᵀP⁻¹dε)` (`dε = [dεxx, dεyy, dγxy]`).
    pub fn effective_strain(&self, d: Vec3) -> f64 {
        quad(&self.p_inv(), d).sqrt()
    }

    /// Flow direction `∂σ̄/∂σ = Pσ/σ̄`: the strain increment per unit effective strain.
    pub fn flow(&self, s: Vec3) -> Vec3 {
        let se = self.effective_stress(s);
        mat_vec(&self.p(), s).map(|x| x / se)
    }

    /// Stress per unit effective stress that drives the strain increment `d`: `P⁻¹d / dε̄`.
    pub fn stress_direction(&self, d: Vec3) -> Vec3 {
        let de = self.effective_strain(d);
        mat_vec(&self.p_inv(), d).map(|x| x / de)
    }

    /// Lankford r-value in uniaxial tension at `theta` radians to the rolling direction:
    /// width strain over thickness strain of the flow under `σ = (cos²θ, sin²θ, sinθ cosθ)`.
    pub fn r_value(&self, theta: f64) -> f64 {
        let (s, c) = theta.sin_cos();
        let d = self.flow([c * c, s * s, s * c]);
        let width = d[0] * s * s + d[1] * c * c - d[2] * s * c;
        width / -(d[0] + d[1])
    }
}

/// `M v`.
pub fn mat_vec(m: &Mat3, v: Vec3) -> Vec3 {
    [0, 1, 2].map(|i| m[i][0] * v[0] + m[i][1] * v[1] + m[i][2] * v[2])
}

/// `vᵀ M v`.
pub fn quad(m: &Mat3, v: Vec3) -> f64 {
    let mv = mat_vec(m, v);
    v[0] * mv[0] + v[1] * mv[1] + v[2] * mv[2]
}

/// In-plane stress `[σxx, σyy, σxy]` of principal stresses `s1`, `s2` whose first axis is at
/// `theta` radians to x (Mohr's circle, any mechanics of materials text).
pub fn stress_from_principal(s1: f64, s2: f64, theta: f64) -> Vec3 {
    let (s, c) = theta.sin_cos();
    [
        s1 * c * c + s2 * s * s,
        s1 * s * s + s2 * c * c,
        (s1 - s2) * s * c,
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;
    use proptest::prelude::*;

    // The r-values put in come back out of the flow rule (Lankford's definition: width strain over
    // thickness strain in uniaxial tension), at 0°, 45° and 90°.
    #[test]
    fn r_values_are_reproduced() {
        for (r0, r45, r90) in [(1.0, 1.0, 1.0), (1.8, 1.3, 2.3), (0.6, 0.5, 0.7)] {
            let y = Hill48::from_r(r0, r45, r90);
            assert_abs_diff_eq!(y.r_value(0.0), r0, epsilon = 1e-12);
            assert_abs_diff_eq!(y.r_value(std::f64::consts::FRAC_PI_4), r45, epsilon = 1e-12);
            assert_abs_diff_eq!(y.r_value(std::f64::consts::FRAC_PI_2), r90, epsilon = 1e-12);
        }
    }

    // Normal anisotropy r: the equibiaxial yield stress is √((1 + r)/2) times the uniaxial one
    // (Hill 1948; e.g. Hosford & Caddell, Metal Forming, chapter on anisotropy).
    #[test]
    fn equibiaxial_yield_under_normal_anisotropy() {
        for r in [0.5, 1.0, 2.0] {
            let y = Hill48::from_r(r, r, r);
            let sb = 1.0 / y.effective_stress([1.0, 1.0, 0.0]);
            assert_abs_diff_eq!(sb, ((1.0 + r) / 2.0).sqrt(), epsilon = 1e-12);
        }
    }

    // Flow rule and effective strain are consistent: σ·dε = σ̄ dε̄ (plastic work equivalence).
    #[test]
    fn plastic_work_equivalence() {
        let y = Hill48::from_r(1.7, 1.2, 2.1);
        let s = [0.8, 0.3, -0.25];
        let d = y.flow(s);
        let work = s[0] * d[0] + s[1] * d[1] + s[2] * d[2];
        assert_abs_diff_eq!(
            work,
            y.effective_stress(s) * y.effective_strain(d),
            epsilon = 1e-12
        );
        let back = y.stress_direction(d);
        let se = y.effective_stress(s);
        for i in 0..3 {
            assert_abs_diff_eq!(back[i], s[i] / se, epsilon = 1e-12);
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(128))]

        // Isotropic Hill 1948 is von Mises in every frame: for principal stresses s1, s2 rotated by
        // any angle, σ̄ = √(s1² − s1 s2 + s2²) (von Mises 1913, principal form), and the effective
        // strain of principal increments d1, d2 is (2/√3)√(d1² + d1 d2 + d2²).
        #[test]
        fn isotropic_hill_is_von_mises_in_every_frame(
            s1 in -500.0..500.0f64, s2 in -500.0..500.0f64,
            d1 in -1.0..1.0f64, d2 in -1.0..1.0f64, theta in 0.0..std::f64::consts::PI,
        ) {
            let y = Hill48::von_mises();
            let vm = (s1 * s1 - s1 * s2 + s2 * s2).sqrt();
            let hill = y.effective_stress(stress_from_principal(s1, s2, theta));
            prop_assert!((hill - vm).abs() <= 1e-9 * (1.0 + vm));
            // A strain tensor rotates like a stress with the engineering shear doubled.
            let e = stress_from_principal(d1, d2, theta);
            let de = y.effective_strain([e[0], e[1], 2.0 * e[2]]);
            let vm_e = 2.0 / 3f64.sqrt() * (d1 * d1 + d1 * d2 + d2 * d2).sqrt();
            prop_assert!((de - vm_e).abs() <= 1e-9 * (1.0 + vm_e));
        }
    }
}
