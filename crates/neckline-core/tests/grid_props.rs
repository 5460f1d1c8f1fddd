//! Property tests of the grid kinematics and the ellipse fit against independent references:
//! nalgebra's SVD (F = W Σ Vᵀ: stretches are the singular values, R = W Vᵀ), rigid-motion
//! invariance of strain (any continuum mechanics text, e.g. Holzapfel 2000, sec. 2.5), and the
//! image of a circle under a linear map (an ellipse with semi-axes r σ1, r σ2 along W's columns).

use approx::assert_abs_diff_eq;
use nalgebra::{Matrix2, Rotation3, Vector2, Vector3};
use neckline_core::fit::{ellipse_points, fit_ellipse};
use neckline_core::grid::deformation::{
    axis_angle_deg, left_cauchy_green, principal_axes, right_cauchy_green, spd_sqrt,
    triangle_gradient_2d, triangle_gradient_3d, ElementKinematics,
};
use neckline_core::grid::mesh::{quad_gradient_2d, Element, Mesh, Node};
use proptest::prelude::*;

/// A deformation gradient with stretches between 0.6 and 1.8 and any orientation:
/// F = R(α) diag(s1, s2) R(β) (det > 0).
fn gradient() -> impl Strategy<Value = Matrix2<f64>> {
    (0.6f64..1.8, 0.6f64..1.8, -3.2f64..3.2, -3.2f64..3.2).prop_map(|(s1, s2, a, b)| {
        let r = |t: f64| Matrix2::new(t.cos(), -t.sin(), t.sin(), t.cos());
        r(a) * Matrix2::new(s1, 0.0, 0.0, s2) * r(b)
    })
}

/// A well-shaped reference triangle (counter-clockwise, angles not too small).
fn triangle() -> impl Strategy<Value = [Vector2<f64>; 3]> {
    (
        -50.0f64..50.0,
        -50.0f64..50.0,
        1.0f64..6.0,
        0.3f64..1.2,
        -3.2f64..3.2,
    )
        .prop_map(|(x, y, size, shape, turn)| {
            let (s, c) = turn.sin_cos();
            let rot = |p: Vector2<f64>| Vector2::new(c * p.x - s * p.y, s * p.x + c * p.y);
            let o = Vector2::new(x, y);
            [
                o,
                o + rot(Vector2::new(size, 0.0)),
                o + rot(Vector2::new(0.4 * size, shape * size)),
            ]
        })
}

fn rotation3() -> impl Strategy<Value = Rotation3<f64>> {
    (-3.2f64..3.2, -1.5f64..1.5, -3.2f64..3.2)
        .prop_map(|(a, b, c)| Rotation3::from_euler_angles(a, b, c))
}

fn kin_2d(r: &[Vector2<f64>; 3], x: &[Vector2<f64>; 3]) -> ElementKinematics {
    ElementKinematics::from_2d(triangle_gradient_2d(r, x).unwrap()).unwrap()
}

fn angle_diff(a: f64, b: f64) -> f64 {
    let d = (a - b).rem_euclid(180.0);
    d.min(180.0 - d)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    // A rigid rotation and translation of the deformed nodes in the plane leaves every strain
    // and the principal directions in the blank unchanged; only the rotation angle changes.
    #[test]
    fn rigid_motion_2d_leaves_strain(f in gradient(), tri in triangle(), th in -3.1f64..3.1,
                                     tx in -100.0f64..100.0, ty in -100.0f64..100.0) {
        let x = tri.map(|p| f * p);
        let q = Matrix2::new(th.cos(), -th.sin(), th.sin(), th.cos());
        let moved = x.map(|p| q * p + Vector2::new(tx, ty));
        let (a, b) = (kin_2d(&tri, &x), kin_2d(&tri, &moved));
        assert_abs_diff_eq!(a.stretches.values[0], b.stretches.values[0], epsilon = 1e-9);
        assert_abs_diff_eq!(a.stretches.values[1], b.stretches.values[1], epsilon = 1e-9);
        assert_abs_diff_eq!(a.green, b.green, epsilon = 1e-9);
        let (ea, eb) = (principal_axes(&a.almansi).values, principal_axes(&b.almansi).values);
        assert_abs_diff_eq!(ea[0], eb[0], epsilon = 1e-9);
        assert_abs_diff_eq!(ea[1], eb[1], epsilon = 1e-9);
        if let (Some(da), Some(db)) = (a.major_angle_deg(), b.major_angle_deg()) {
            if a.stretches.values[0] - a.stretches.values[1] > 1e-3 {
                prop_assert!(angle_diff(da, db) < 1e-5);
            }
        }
        let turn = (b.rotation_deg().unwrap() - a.rotation_deg().unwrap() - th.to_degrees())
            .rem_euclid(360.0);
        prop_assert!(turn.min(360.0 - turn) < 1e-6, "rotation changed by {turn}");
    }

    // The same in 3-D: a flat deformation, then any rigid rotation and translation in space,
    // gives the 2-D stretches, and the normal is the rotated +Z.
    #[test]
    fn rigid_motion_3d_leaves_strain(f in gradient(), tri in triangle(), q in rotation3(),
                                     t in prop::array::uniform3(-100.0f64..100.0)) {
        let flat = tri.map(|p| f * p);
        let x = flat.map(|p| q * Vector3::new(p.x, p.y, 0.0) + Vector3::from(t));
        let a = kin_2d(&tri, &flat);
        let b = ElementKinematics::from_3d(triangle_gradient_3d(&tri, &x).unwrap()).unwrap();
        assert_abs_diff_eq!(a.stretches.values[0], b.stretches.values[0], epsilon = 1e-9);
        assert_abs_diff_eq!(a.stretches.values[1], b.stretches.values[1], epsilon = 1e-9);
        assert_abs_diff_eq!(a.c, b.c, epsilon = 1e-9);
        assert_abs_diff_eq!(b.normal.unwrap(), q * Vector3::z(), epsilon = 1e-9);
    }

    // Polar decomposition: R orthogonal with det +1, U symmetric positive definite, F = R U,
    // and V R = R U with V computed on its own as √B (B = F Fᵀ), not as R U Rᵀ.
    #[test]
    fn polar_decomposition(f in gradient()) {
        let k = ElementKinematics::from_2d(f).unwrap();
        let p = k.polar;
        assert_abs_diff_eq!(p.r.transpose() * p.r, Matrix2::identity(), epsilon = 1e-10);
        assert_abs_diff_eq!(p.r.determinant(), 1.0, epsilon = 1e-10);
        assert_abs_diff_eq!(p.u, p.u.transpose(), epsilon = 1e-12);
        prop_assert!(principal_axes(&p.u).values[1] > 0.0);
        assert_abs_diff_eq!(p.r * p.u, f, epsilon = 1e-10);
        let v = spd_sqrt(&left_cauchy_green(&f));
        assert_abs_diff_eq!(v * p.r, p.r * p.u, epsilon = 1e-10);
        // nalgebra's SVD gives R = W Vᵀ independently.
        let svd = f.svd(true, true);
        assert_abs_diff_eq!(svd.u.unwrap() * svd.v_t.unwrap(), p.r, epsilon = 1e-9);
    }

    // eig(C) are the squared singular values of F (nalgebra's SVD as the reference), and the
    // major direction in the blank is the first right singular vector.
    #[test]
    fn eigenvalues_of_c_are_squared_singular_values(f in gradient()) {
        let c = principal_axes(&right_cauchy_green(&f));
        let svd = f.svd(true, true);
        let s = svd.singular_values;
        let (s1, s2) = (s.max(), s.min());
        assert_abs_diff_eq!(c.values[0], s1 * s1, epsilon = 1e-10);
        assert_abs_diff_eq!(c.values[1], s2 * s2, epsilon = 1e-10);
        if s1 - s2 > 1e-3 {
            let vt = svd.v_t.unwrap();
            let v1 = vt.row(s.imax()).transpose();
            prop_assert!(angle_diff(axis_angle_deg(&c.directions[0]), axis_angle_deg(&v1)) < 1e-6);
        }
    }

    // A homogeneous deformation x = F X + c of a whole grid (reference nodes jittered, so cells
    // are irregular quads, plus triangles) gives the same strain in every element.
    #[test]
    fn homogeneous_stretch_same_in_every_element(f in gradient(), q in rotation3(),
                                                 jitter in prop::collection::vec(-0.8f64..0.8, 50)) {
        let n = 5usize;
        let mut nodes = Vec::new();
        for r in 0..n {
            for c in 0..n {
                let k = r * n + c;
                let x0 = Vector2::new(5.0 * c as f64 + jitter[2 * k % 50], 5.0 * r as f64 + jitter[(2 * k + 1) % 50]);
                let x = f * x0;
                nodes.push(Node { key: format!("r{r}c{c}"), line: k as u64 + 2,
                                  reference: x0, deformed: q * Vector3::new(x.x, x.y, 0.0) });
            }
        }
        let mut elements = Vec::new();
        for r in 0..n - 1 {
            for c in 0..n - 1 {
                let i = r * n + c;
                elements.push(Element { id: format!("q{i}"), line: 0, nodes: vec![i, i + 1, i + n + 1, i + n] });
                elements.push(Element { id: format!("t{i}"), line: 0, nodes: vec![i, i + 1, i + n] });
            }
        }
        let mesh = Mesh { nodes: nodes.into_iter().collect(), elements, three_d: true };
        let svd = f.svd(false, false).singular_values;
        for e in &mesh.elements {
            let k = mesh.evaluate(e).unwrap().kinematics;
            assert_abs_diff_eq!(k.stretches.values[0], svd.max(), epsilon = 1e-9);
            assert_abs_diff_eq!(k.stretches.values[1], svd.min(), epsilon = 1e-9);
        }
    }

    // For a parallelogram cell the quad's centre gradient equals the mean of its four corner
    // triangles' gradients, whatever the (non-homogeneous) node motion.
    #[test]
    fn quad_centre_is_mean_of_corner_triangles(f in gradient(),
                                               d in prop::collection::vec(-0.3f64..0.3, 8),
                                               shear in -0.5f64..0.5) {
        let r = [Vector2::new(0.0, 0.0), Vector2::new(4.0, 0.0),
                 Vector2::new(4.0 + 4.0 * shear, 3.0), Vector2::new(4.0 * shear, 3.0)];
        let x: [Vector2<f64>; 4] = std::array::from_fn(|i| f * r[i] + Vector2::new(d[2 * i], d[2 * i + 1]));
        let fq = quad_gradient_2d(&r, &x).unwrap();
        let mut mean = Matrix2::zeros();
        for i in 0..4 {
            let (a, b, c) = (i, (i + 1) % 4, (i + 3) % 4);
            mean += triangle_gradient_2d(&[r[a], r[b], r[c]], &[x[a], x[b], x[c]]).unwrap() / 4.0;
        }
        assert_abs_diff_eq!(fq, mean, epsilon = 1e-10);
    }

    // A circle of diameter d0 mapped by F is an ellipse with axes d0 σ1, d0 σ2 (σ from nalgebra's
    // SVD), its major axis along the first left singular vector; the fit must find them.
    #[test]
    fn mapped_circle_fits_to_singular_values(f in gradient(), d0 in 1.0f64..6.0,
                                             cx in -500.0f64..500.0, cy in -500.0f64..500.0,
                                             n in 6usize..40) {
        let circle = ellipse_points(d0, d0, 0.0, Vector2::zeros(),
                                    (0..n).map(|i| i as f64 * std::f64::consts::TAU / n as f64 + 0.1));
        let pts: Vec<_> = circle.iter().map(|p| f * p + Vector2::new(cx, cy)).collect();
        let e = fit_ellipse(&pts).unwrap();
        let svd = f.svd(true, false);
        let s = svd.singular_values;
        assert_abs_diff_eq!(e.major, d0 * s.max(), epsilon = 1e-7 * d0);
        assert_abs_diff_eq!(e.minor, d0 * s.min(), epsilon = 1e-7 * d0);
        assert_abs_diff_eq!(e.centre, Vector2::new(cx, cy), epsilon = 1e-7);
        if s.max() - s.min() > 1e-2 {
            let w1 = svd.u.unwrap().column(s.imax()).into_owned();
            prop_assert!(angle_diff(e.angle_deg, axis_angle_deg(&w1)) < 1e-4);
        }
    }
}
