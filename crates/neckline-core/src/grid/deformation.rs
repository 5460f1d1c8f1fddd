//! The deformation of one element from its node positions before and after forming.
//!
//! Plain functions on nalgebra types. Reference positions `X` lie in the flat blank (2-D);
//! deformed positions `x` are 2-D (a flat part, or a plan view) or 3-D (the formed, curved part).
//! Formulas: any continuum mechanics text, e.g. Holzapfel, *Nonlinear Solid Mechanics* (2000),
//! ch. 2; Bonet & Wood, *Nonlinear Continuum Mechanics for FEA* (2008), ch. 3-4.
//!
//! On a curved part the 3×2 gradient `F` maps the blank's plane onto the part's tangent plane.
//! Every tensor below is written in an orthonormal in-plane frame `Q = [t1 t2]` of that tangent
//! plane (`t1` along the image of the blank's X axis, `t2 = n × t1`), so that `F = Q F̂` with a
//! 2×2 `F̂ = Qᵀ F`. Then `C = Fᵀ F = F̂ᵀ F̂` exactly, and `B`, `V`, Almansi are 2×2 in that frame.

use nalgebra::{Matrix2, Matrix3x2, SymmetricEigen, Vector2, Vector3};

/// Relative size below which an area or a determinant counts as zero.
pub const DEGENERATE_TOL: f64 = 1e-9;

/// Why an element has no deformation gradient.
#[derive(Debug, Clone, PartialEq)]
pub enum Degenerate {
    /// A node position is not a finite number.
    NotFinite,
    /// The reference element has (nearly) zero area: nodes coincident or in a line.
    ReferenceCollapsed {
        /// `2 × area / (longest edge)²`, 0 for a line.
        shape_ratio: f64,
    },
    /// The reference quad is not convex (or its nodes are not in order around it).
    ReferenceNotConvex,
    /// The deformed element has (nearly) zero area: `det F ≈ 0`.
    Collapsed {
        /// The area ratio `det F` (2-D) or `|F e1 × F e2|` (3-D).
        area_ratio: f64,
    },
    /// The deformed element is turned over in the plane: `det F < 0` (2-D only).
    Inverted {
        /// The area ratio `det F`, negative.
        area_ratio: f64,
    },
}

impl std::fmt::Display for Degenerate {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Degenerate::NotFinite => write!(f, "a node position is not a finite number"),
            Degenerate::ReferenceCollapsed { shape_ratio } => write!(
                f,
                "the element has (nearly) zero area in the blank (shape ratio {shape_ratio:.2e}): \
                 nodes coincident or in a line"
            ),
            Degenerate::ReferenceNotConvex => write!(
                f,
                "the quad is not convex in the blank: nodes not in order around it?"
            ),
            Degenerate::Collapsed { area_ratio } => write!(
                f,
                "the element collapsed after forming (area ratio {area_ratio:.2e}): \
                 deformed nodes coincident or in a line"
            ),
            Degenerate::Inverted { area_ratio } => write!(
                f,
                "the element is turned over after forming (area ratio {area_ratio:.3}): \
                 deformed nodes in reverse order, a misread node?"
            ),
        }
    }
}

/// Twice the signed area of the triangle `a, b, c`: `(b − a) × (c − a)`.
pub fn twice_signed_area(a: Vector2<f64>, b: Vector2<f64>, c: Vector2<f64>) -> f64 {
    let (u, v) = (b - a, c - a);
    u.x * v.y - u.y * v.x
}

/// The reference edge matrix `[X2 − X1, X3 − X1]`, checked for a usable (non-zero) area.
/// The check is scale-free: `|det| / (longest edge)² ≥` [`DEGENERATE_TOL`].
pub fn reference_edges(x: &[Vector2<f64>; 3]) -> Result<Matrix2<f64>, Degenerate> {
    if x.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let d = Matrix2::from_columns(&[x[1] - x[0], x[2] - x[0]]);
    let longest = [x[1] - x[0], x[2] - x[0], x[2] - x[1]]
        .iter()
        .map(|e| e.norm_squared())
        .fold(0.0, f64::max);
    let ratio = if longest > 0.0 {
        d.determinant().abs() / longest
    } else {
        0.0
    };
    if ratio < DEGENERATE_TOL {
        return Err(Degenerate::ReferenceCollapsed { shape_ratio: ratio });
    }
    Ok(d)
}

/// Deformation gradient of a linear triangle on a flat part:
/// `F = [x2 − x1, x3 − x1] [X2 − X1, X3 − X1]⁻¹` (2×2). Errors when either triangle has no area
/// or the triangle is turned over (`det F < 0`).
///
/// From nodes to strains. Check values (calc) from the textbook formulas (e.g. Holzapfel 2000,
/// ch. 2): the triangle (0,0), (2,0), (0,2) deformed by `F = [[1.25, 0.15], [0.05, 0.95]]` has
/// `C = Fᵀ F = [[1.565, 0.235], [0.235, 0.925]]`, principal stretches √eig C = 1.281413 and
/// 0.920858, major direction 18.15° in the blank, true strains 0.247964 and −0.082449.
///
/// ```
/// use nalgebra::{Matrix2, Vector2};
/// use neckline_core::grid::deformation::{triangle_gradient_2d, ElementKinematics};
/// use neckline_core::kinematics::StrainState;
/// use neckline_core::strain::Stretch;
///
/// let blank = [Vector2::new(0.0, 0.0), Vector2::new(2.0, 0.0), Vector2::new(0.0, 2.0)];
/// let f_true = Matrix2::new(1.25, 0.15, 0.05, 0.95);
/// let part = blank.map(|p| f_true * p);
///
/// let f = triangle_gradient_2d(&blank, &part).unwrap();
/// assert!((f - f_true).norm() < 1e-12);
/// let k = ElementKinematics::from_2d(f).unwrap();
/// assert!((k.c - Matrix2::new(1.565, 0.235, 0.235, 0.925)).norm() < 1e-12);
/// let [l1, l2] = k.stretches.values;
/// assert!((l1 - 1.281413).abs() < 1e-6 && (l2 - 0.920858).abs() < 1e-6);
/// assert!((k.major_angle_deg().unwrap() - 18.15).abs() < 0.005);
///
/// let s = StrainState::from_stretches(Stretch::new(l1).unwrap(), Stretch::new(l2).unwrap());
/// assert!((s.true_strain.major.value() - 0.247964).abs() < 1e-6);
/// assert!((s.true_strain.minor.value() + 0.082449).abs() < 1e-6);
/// ```
pub fn triangle_gradient_2d(
    reference: &[Vector2<f64>; 3],
    deformed: &[Vector2<f64>; 3],
) -> Result<Matrix2<f64>, Degenerate> {
    let d_ref = reference_edges(reference)?;
    if deformed.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let d_def = Matrix2::from_columns(&[deformed[1] - deformed[0], deformed[2] - deformed[0]]);
    let inv = d_ref
        .try_inverse()
        .ok_or(Degenerate::ReferenceCollapsed { shape_ratio: 0.0 })?;
    check_2d(d_def * inv)
}

/// Deformation gradient of a linear triangle on a curved part:
/// `F = [x2 − x1, x3 − x1] [X2 − X1, X3 − X1]⁻¹` (3×2: blank plane → tangent plane).
pub fn triangle_gradient_3d(
    reference: &[Vector2<f64>; 3],
    deformed: &[Vector3<f64>; 3],
) -> Result<Matrix3x2<f64>, Degenerate> {
    let d_ref = reference_edges(reference)?;
    if deformed.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let d_def = Matrix3x2::from_columns(&[deformed[1] - deformed[0], deformed[2] - deformed[0]]);
    let inv = d_ref
        .try_inverse()
        .ok_or(Degenerate::ReferenceCollapsed { shape_ratio: 0.0 })?;
    check_3d(d_def * inv)
}

/// Refuse a 2-D gradient that collapses (`|det F| <` [`DEGENERATE_TOL`]) or inverts (`det F < 0`).
pub fn check_2d(f: Matrix2<f64>) -> Result<Matrix2<f64>, Degenerate> {
    let j = f.determinant();
    if !j.is_finite() {
        return Err(Degenerate::NotFinite);
    }
    if j.abs() < DEGENERATE_TOL {
        return Err(Degenerate::Collapsed { area_ratio: j });
    }
    if j < 0.0 {
        return Err(Degenerate::Inverted { area_ratio: j });
    }
    Ok(f)
}

/// Refuse a 3-D gradient whose area ratio `|F e1 × F e2|` is below [`DEGENERATE_TOL`].
pub fn check_3d(f: Matrix3x2<f64>) -> Result<Matrix3x2<f64>, Degenerate> {
    let j = area_ratio_3d(&f);
    if !j.is_finite() {
        return Err(Degenerate::NotFinite);
    }
    if j < DEGENERATE_TOL {
        return Err(Degenerate::Collapsed { area_ratio: j });
    }
    Ok(f)
}

/// Area ratio (deformed over reference) of a 3×2 gradient: `J = |F e1 × F e2|`.
pub fn area_ratio_3d(f: &Matrix3x2<f64>) -> f64 {
    f.column(0).cross(&f.column(1)).norm()
}

/// Unit normal of the deformed surface: `n = F e1 × F e2 / |F e1 × F e2|`, the image of the
/// blank's +Z side (it does not depend on the order in which the nodes are listed).
pub fn surface_normal(f: &Matrix3x2<f64>) -> Vector3<f64> {
    f.column(0).cross(&f.column(1)).normalize()
}

/// Orthonormal in-plane frame `Q = [t1 t2]` of the deformed tangent plane:
/// `t1 = F e1 / |F e1|`, `t2 = n × t1`.
pub fn tangent_frame(f: &Matrix3x2<f64>) -> Matrix3x2<f64> {
    let t1 = f.column(0).normalize();
    let t2 = surface_normal(f).cross(&t1);
    Matrix3x2::from_columns(&[t1, t2])
}

/// The 2×2 in-plane gradient `F̂ = Qᵀ F` in the tangent frame `Q` of [`tangent_frame`]; then
/// `F = Q F̂`, and `F̂` has a positive determinant equal to the area ratio.
pub fn in_plane_gradient(f: &Matrix3x2<f64>) -> Matrix2<f64> {
    tangent_frame(f).transpose() * f
}

/// Displacement gradient `H = ∂u/∂X = F − I` (2-D).
pub fn displacement_gradient(f: &Matrix2<f64>) -> Matrix2<f64> {
    f - Matrix2::identity()
}

/// Right Cauchy-Green tensor `C = Fᵀ F` (Lagrangian, in the blank's frame). Works for 2×2 and,
/// through [`right_cauchy_green_3d`], 3×2 gradients.
pub fn right_cauchy_green(f: &Matrix2<f64>) -> Matrix2<f64> {
    f.transpose() * f
}

/// Right Cauchy-Green tensor of a 3×2 gradient: `C = Fᵀ F` (2×2).
pub fn right_cauchy_green_3d(f: &Matrix3x2<f64>) -> Matrix2<f64> {
    f.transpose() * f
}

/// Left Cauchy-Green tensor `B = F Fᵀ` (Eulerian, in the deformed frame).
pub fn left_cauchy_green(f: &Matrix2<f64>) -> Matrix2<f64> {
    f * f.transpose()
}

/// Green-Lagrange strain tensor `E = (C − I)/2`.
pub fn green_lagrange(c: &Matrix2<f64>) -> Matrix2<f64> {
    (c - Matrix2::identity()) / 2.0
}

/// Euler-Almansi strain tensor `e = (I − B⁻¹)/2`; `None` if `B` is singular.
pub fn almansi(b: &Matrix2<f64>) -> Option<Matrix2<f64>> {
    b.try_inverse().map(|bi| (Matrix2::identity() - bi) / 2.0)
}

/// Principal values and directions of a symmetric 2×2 tensor, larger value first.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PrincipalAxes {
    /// Eigenvalues, `values[0] ≥ values[1]`.
    pub values: [f64; 2],
    /// Unit eigenvectors, matching `values`.
    pub directions: [Vector2<f64>; 2],
}

/// Eigen-decomposition of a symmetric 2×2 tensor (nalgebra's `SymmetricEigen`), sorted so that
/// the larger eigenvalue comes first.
pub fn principal_axes(s: &Matrix2<f64>) -> PrincipalAxes {
    let eig = SymmetricEigen::new(*s);
    let (i, j) = if eig.eigenvalues[0] >= eig.eigenvalues[1] {
        (0, 1)
    } else {
        (1, 0)
    };
    PrincipalAxes {
        values: [eig.eigenvalues[i], eig.eigenvalues[j]],
        directions: [
            eig.eigenvectors.column(i).into_owned(),
            eig.eigenvectors.column(j).into_owned(),
        ],
    }
}

/// Principal stretches `λi = √(eig C)` (major first) and their directions in the blank's frame
/// (the eigenvectors of `C`).
pub fn principal_stretches(c: &Matrix2<f64>) -> PrincipalAxes {
    let p = principal_axes(c);
    PrincipalAxes {
        values: p.values.map(|v| v.max(0.0).sqrt()),
        directions: p.directions,
    }
}

/// Angle of a direction from the +X axis, in degrees, folded into (−90°, 90°] (a principal
/// direction has no sign).
pub fn axis_angle_deg(d: &Vector2<f64>) -> f64 {
    let a = d.y.atan2(d.x).to_degrees();
    if a > 90.0 {
        a - 180.0
    } else if a <= -90.0 {
        a + 180.0
    } else {
        a
    }
}

/// Square root of a symmetric positive definite 2×2 tensor, `√S = Σ √μi nᵢ nᵢᵀ`.
pub fn spd_sqrt(s: &Matrix2<f64>) -> Matrix2<f64> {
    let p = principal_axes(s);
    (0..2).fold(Matrix2::zeros(), |acc, i| {
        let n = p.directions[i];
        acc + n * n.transpose() * p.values[i].max(0.0).sqrt()
    })
}

/// The polar decomposition `F = R U = V R` of a 2×2 gradient with `det F > 0`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Polar {
    /// Rotation, `Rᵀ R = I`, `det R = +1`.
    pub r: Matrix2<f64>,
    /// Right stretch tensor `U = √C` (symmetric positive definite).
    pub u: Matrix2<f64>,
    /// Left stretch tensor `V = R U Rᵀ = √B`.
    pub v: Matrix2<f64>,
}

/// Polar decomposition: `U = √(Fᵀ F)`, `R = F U⁻¹`, `V = R U Rᵀ`; `None` if `F` is singular.
pub fn polar(f: &Matrix2<f64>) -> Option<Polar> {
    let u = spd_sqrt(&right_cauchy_green(f));
    let r = f * u.try_inverse()?;
    let v = r * u * r.transpose();
    Some(Polar { r, u, v })
}

/// The in-plane rotation angle of `R = [[cos θ, −sin θ], [sin θ, cos θ]]`: `θ = atan2(R21, R11)`,
/// degrees, counter-clockwise positive.
pub fn rotation_angle_deg(r: &Matrix2<f64>) -> f64 {
    r[(1, 0)].atan2(r[(0, 0)]).to_degrees()
}

/// The 3×2 rotation of a curved-part gradient, `R = Q R̂` with `R̂` the polar rotation of the
/// in-plane gradient: its columns are orthonormal and `F = R U`.
pub fn polar_3d(f: &Matrix3x2<f64>) -> Option<(Matrix3x2<f64>, Matrix2<f64>)> {
    let p = polar(&in_plane_gradient(f))?;
    Some((tangent_frame(f) * p.r, p.u))
}

/// Everything derived from one element's gradient.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementKinematics {
    /// The 2×2 in-plane gradient (the gradient itself in 2-D; `F̂ = Qᵀ F` in 3-D).
    pub f: Matrix2<f64>,
    /// `C = Fᵀ F`.
    pub c: Matrix2<f64>,
    /// Principal stretches (major first) and their directions in the blank's frame.
    pub stretches: PrincipalAxes,
    /// Green-Lagrange tensor `(C − I)/2`, blank's frame.
    pub green: Matrix2<f64>,
    /// `B = F Fᵀ` in the deformed (or tangent) frame.
    pub b: Matrix2<f64>,
    /// Almansi tensor `(I − B⁻¹)/2`, deformed (or tangent) frame.
    pub almansi: Matrix2<f64>,
    /// Polar decomposition of the in-plane gradient.
    pub polar: Polar,
    /// Deformed surface normal (3-D only).
    pub normal: Option<Vector3<f64>>,
}

impl ElementKinematics {
    /// From a checked 2-D gradient (`det F > 0`, see [`check_2d`]).
    pub fn from_2d(f: Matrix2<f64>) -> Result<Self, Degenerate> {
        let f = check_2d(f)?;
        Self::from_in_plane(f, None)
    }

    /// From a checked 3×2 gradient (see [`check_3d`]).
    pub fn from_3d(f: Matrix3x2<f64>) -> Result<Self, Degenerate> {
        let f = check_3d(f)?;
        Self::from_in_plane(in_plane_gradient(&f), Some(surface_normal(&f)))
    }

    fn from_in_plane(f: Matrix2<f64>, normal: Option<Vector3<f64>>) -> Result<Self, Degenerate> {
        let c = right_cauchy_green(&f);
        let b = left_cauchy_green(&f);
        let area_ratio = f.determinant();
        let polar = polar(&f).ok_or(Degenerate::Collapsed { area_ratio })?;
        let almansi = almansi(&b).ok_or(Degenerate::Collapsed { area_ratio })?;
        Ok(ElementKinematics {
            f,
            c,
            stretches: principal_stretches(&c),
            green: green_lagrange(&c),
            b,
            almansi,
            polar,
            normal,
        })
    }

    /// Angle of the major principal direction in the blank, degrees from +X in (−90°, 90°];
    /// `None` when the two stretches are equal (to 1e-9 relative) and every direction is principal.
    pub fn major_angle_deg(&self) -> Option<f64> {
        let [l1, l2] = self.stretches.values;
        (l1 - l2 > 1e-9 * l1).then(|| axis_angle_deg(&self.stretches.directions[0]))
    }

    /// In-plane rigid rotation of the material, degrees (2-D only: in 3-D the tangent frame is a
    /// convention, so the normal is reported instead).
    pub fn rotation_deg(&self) -> Option<f64> {
        self.normal
            .is_none()
            .then(|| rotation_angle_deg(&self.polar.r))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::kinematics::StrainState;
    use crate::strain::Stretch;
    use approx::assert_abs_diff_eq;
    use nalgebra::{Matrix3, Rotation3};

    type FieldTriangle = (
        [Vector2<f64>; 3],
        [Vector3<f64>; 3],
        Matrix3<f64>,
        Matrix2<f64>,
    );

    fn field_triangle() -> FieldTriangle {
        let f2 = Matrix2::new(1.25, 0.15, 0.05, 0.95);
        let q = Rotation3::from_axis_angle(&Vector3::z_axis(), 20f64.to_radians())
            * Rotation3::from_axis_angle(&Vector3::x_axis(), 30f64.to_radians());
        let q = *q.matrix();
        let reference = [
            Vector2::new(0.0, 0.0),
            Vector2::new(2.0, 0.0),
            Vector2::new(0.0, 2.0),
        ];
        let deformed = reference.map(|p| {
            let v = f2 * p;
            q * Vector3::new(v.x, v.y, 0.0)
        });
        (reference, deformed, q, f2)
    }

    // Check values (calc) from the textbook formulas, project field notes section 3: triangle
    // (0,0),(2,0),(0,2), in-plane F = [[1.25,0.15],[0.05,0.95]], then rotated 30° about x and 20°
    // about z. The rotation and normal are checked against nalgebra's SVD (R = W Vᵀ for
    // F = W Σ Vᵀ) and against the closed form n = Rz(20°) Rx(30°) e_z.
    #[test]
    fn field_notes_3d_triangle() {
        let (reference, deformed, q, f2) = field_triangle();
        let f = triangle_gradient_3d(&reference, &deformed).unwrap();
        let c = right_cauchy_green_3d(&f);
        assert_abs_diff_eq!(c, Matrix2::new(1.565, 0.235, 0.235, 0.925), epsilon = 1e-12);
        let k = ElementKinematics::from_3d(f).unwrap();
        assert_abs_diff_eq!(k.stretches.values[0], 1.281413, epsilon = 1e-6);
        assert_abs_diff_eq!(k.stretches.values[1], 0.920858, epsilon = 1e-6);
        assert_abs_diff_eq!(k.major_angle_deg().unwrap(), 18.15, epsilon = 0.005);
        let green = principal_axes(&k.green).values;
        assert_abs_diff_eq!(green[0], 0.32101, epsilon = 1e-5);
        assert_abs_diff_eq!(green[1], -0.07601, epsilon = 1e-5);
        let alm = principal_axes(&k.almansi).values;
        assert_abs_diff_eq!(alm[0], 0.195497, epsilon = 1e-6);
        assert_abs_diff_eq!(alm[1], -0.089637, epsilon = 1e-6);
        let s = StrainState::from_stretches(
            Stretch::new(k.stretches.values[0]).unwrap(),
            Stretch::new(k.stretches.values[1]).unwrap(),
        );
        assert_abs_diff_eq!(s.true_strain.major.value(), 0.247964, epsilon = 1e-6);
        assert_abs_diff_eq!(s.true_strain.minor.value(), -0.082449, epsilon = 1e-6);
        assert_abs_diff_eq!(s.thickness_strain.value(), -0.165514, epsilon = 1e-6);
        assert_abs_diff_eq!(s.almansi.major.value(), 0.195497, epsilon = 1e-6);
        // Rotation: F = R U with R = Q[:, 0..2] R2, R2 = W Vᵀ from the SVD of the in-plane F.
        let svd = f2.svd(true, true);
        let r2 = svd.u.unwrap() * svd.v_t.unwrap();
        let expected_r = q.fixed_view::<3, 2>(0, 0) * r2;
        let (r3, u) = polar_3d(&f).unwrap();
        assert_abs_diff_eq!(r3, expected_r, epsilon = 1e-12);
        assert_abs_diff_eq!(r3 * u, f, epsilon = 1e-12);
        let n = k.normal.unwrap();
        let (s20, c20) = 20f64.to_radians().sin_cos();
        let expected_n = Vector3::new(0.5 * s20, -0.5 * c20, 30f64.to_radians().cos());
        assert_abs_diff_eq!(n, expected_n, epsilon = 1e-12);
        assert!(k.rotation_deg().is_none());
    }

    // The same in-plane F without the 3-D rotation: the in-plane rotation angle equals the
    // angle of nalgebra's SVD rotation W Vᵀ.
    #[test]
    fn in_plane_rotation_matches_svd() {
        let (_, _, _, f2) = field_triangle();
        let k = ElementKinematics::from_2d(f2).unwrap();
        let svd = f2.svd(true, true);
        let r = svd.u.unwrap() * svd.v_t.unwrap();
        assert_abs_diff_eq!(k.polar.r, r, epsilon = 1e-12);
        assert_abs_diff_eq!(
            k.rotation_deg().unwrap(),
            r[(1, 0)].atan2(r[(0, 0)]).to_degrees(),
            epsilon = 1e-10
        );
        assert_abs_diff_eq!(
            displacement_gradient(&f2),
            Matrix2::new(0.25, 0.15, 0.05, -0.05),
            epsilon = 1e-15
        );
    }

    #[test]
    fn degenerate_triangles_have_reasons() {
        let r = [
            Vector2::new(0.0, 0.0),
            Vector2::new(2.0, 0.0),
            Vector2::new(0.0, 2.0),
        ];
        let line = [
            Vector2::new(0.0, 0.0),
            Vector2::new(1.0, 1.0),
            Vector2::new(2.0, 2.0),
        ];
        assert!(matches!(
            triangle_gradient_2d(&line, &r),
            Err(Degenerate::ReferenceCollapsed { .. })
        ));
        assert!(matches!(
            triangle_gradient_2d(&r, &line),
            Err(Degenerate::Collapsed { .. })
        ));
        let flipped = [r[0], r[2], r[1]];
        let e = triangle_gradient_2d(&r, &flipped).unwrap_err();
        assert!(matches!(e, Degenerate::Inverted { .. }));
        assert!(e.to_string().contains("turned over"), "{e}");
        let nan = [r[0], Vector2::new(f64::NAN, 0.0), r[2]];
        assert_eq!(triangle_gradient_2d(&r, &nan), Err(Degenerate::NotFinite));
        let flat3 = line.map(|p| Vector3::new(p.x, p.y, 5.0));
        assert!(matches!(
            triangle_gradient_3d(&r, &flat3),
            Err(Degenerate::Collapsed { .. })
        ));
    }

    #[test]
    fn equal_stretches_have_no_direction() {
        let k = ElementKinematics::from_2d(Matrix2::identity() * 1.1).unwrap();
        assert!(k.major_angle_deg().is_none());
    }
}
