//! How a reading error on the node positions carries into an element's strains and margin.
//!
//! **Setting.** Each coordinate of each deformed node (`x, y`, and `z` on a curved part) may be
//! off by up to `δ` (`--reading-error`); the blank positions `X, Y` are taken as the nominal
//! grid, without error. The margin is `m = 100 (L(e2) − e1)` percentage points, with
//! `e_i = λ_i − 1` the engineering strains and `L` the curve's engineering major strain at the
//! engineering minor strain.
//!
//! **Derivation (first order).** An element's gradient is linear in its deformed nodes,
//! `F = Σ_a x_a ⊗ ∇N_a`, with `∇N_a` the gradients of the shape functions in the blank:
//! for a triangle the rows of `[X2 − X1, X3 − X1]⁻¹` for nodes 2 and 3 and minus their sum for
//! node 1; for a quad at its centre `∇N_a = J⁻ᵀ (ξ_a, η_a)/4`, `(ξ_a, η_a)` the corner's natural
//! coordinates (±1, ±1) and `J = [∂X/∂ξ ∂X/∂η]` (see [`super::mesh`]). So `δF = Σ_a δx_a ⊗ ∇N_a`.
//! The principal stretches are `λ_i² = v_iᵀ C v_i` with `C = FᵀF` and `v_i` its unit
//! eigenvectors; for distinct eigenvalues `δ(λ_i²) = v_iᵀ δC v_i` (first-order perturbation of
//! a symmetric eigenvalue), and `δC = δFᵀF + FᵀδF`, so
//! `δλ_i = (F v_i)ᵀ δF v_i / λ_i = n_i · δF v_i`, with `n_i = F v_i / λ_i` the unit principal
//! direction on the formed part. Hence
//!
//! `δλ_i = Σ_a (∇N_a · v_i) (n_i · δx_a)`,
//!
//! and, with `s = dL/de2` the curve's slope at the point,
//!
//! `δm = 100 Σ_a k_a · δx_a`, `k_a = s (∇N_a · v2) n2 − (∇N_a · v1) n1`.
//!
//! The largest change over every sign pattern of the coordinate errors (each `±δ`) is
//!
//! `u = 100 δ Σ_a ‖k_a‖₁` (sum of the absolute components),
//!
//! taken at both one-sided slopes of the curve (it may bend at the point) and the larger kept.
//! For a square cell of pitch `h` read along an axis, `Σ_a |∇N_a · v| = 2/h`: the centre
//! gradient picks up `2δ/h`, more than the `δ/d0 = 0.886 δ/h` of a circle of the cell's area,
//! because all four corners feed it.
//!
//! **Limits.** First order: the neglected terms are of the order of `(δ/h)²`. Where the two
//! stretches are (nearly) equal the principal directions are not defined and the bound is not
//! guaranteed; such an element is far from any limit curve in practice (equibiaxial at zero
//! strain difference).

use super::mesh::{quad_reference_jacobian, Element, Mesh, Nodes};
use crate::limit::LimitCurve;
use crate::strain::EngStrain;
use nalgebra::{Matrix2, Matrix3x2, SymmetricEigen, Vector2, Vector3};

/// How the two principal stretches move with each deformed node: `major[a]` is `∂λ1/∂x_a`
/// (a vector in the part's `x, y, z`), `minor[a]` is `∂λ2/∂x_a`; nodes beyond `nodes` are zero.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StretchSensitivity {
    /// Number of nodes (3 or 4).
    pub nodes: usize,
    /// `∂λ1/∂x_a` per node.
    pub major: [[f64; 3]; 4],
    /// `∂λ2/∂x_a` per node.
    pub minor: [[f64; 3]; 4],
}

/// The blank gradients `∇N_a` of the element's shape functions where its strain is evaluated
/// (anywhere for a triangle, the centre for a quad); `None` for a degenerate element.
pub fn shape_gradients(reference: &[Vector2<f64>]) -> Option<Vec<Vector2<f64>>> {
    match reference.len() {
        3 => {
            let d =
                Matrix2::from_columns(&[reference[1] - reference[0], reference[2] - reference[0]]);
            let inv = d.try_inverse()?;
            let (g2, g3): (Vector2<f64>, Vector2<f64>) =
                (inv.row(0).transpose(), inv.row(1).transpose());
            Some(vec![-(g2 + g3), g2, g3])
        }
        4 => {
            let r: [Vector2<f64>; 4] = std::array::from_fn(|i| reference[i]);
            let j_inv_t = quad_reference_jacobian(&r).ok()?.try_inverse()?.transpose();
            let natural = [(-1.0, -1.0), (1.0, -1.0), (1.0, 1.0), (-1.0, 1.0)];
            Some(
                natural
                    .iter()
                    .map(|&(xi, eta)| j_inv_t * Vector2::new(xi / 4.0, eta / 4.0))
                    .collect(),
            )
        }
        _ => None,
    }
}

/// `∂λ_i/∂x_a = (∇N_a · v_i) n_i` for every node of `e` (see the module notes).
pub fn sensitivity(mesh: &Mesh, e: &Element) -> Option<StretchSensitivity> {
    sensitivity_of(&mesh.nodes, e)
}

/// [`sensitivity`] from the nodes alone.
pub fn sensitivity_of(nodes: &Nodes, e: &Element) -> Option<StretchSensitivity> {
    let reference: Vec<Vector2<f64>> = e.nodes.iter().map(|&i| nodes.reference(i)).collect();
    let deformed: Vec<Vector3<f64>> = e.nodes.iter().map(|&i| nodes.deformed(i)).collect();
    let grads = shape_gradients(&reference)?;
    let f: Matrix3x2<f64> = deformed
        .iter()
        .zip(&grads)
        .map(|(x, g)| x * g.transpose())
        .sum();
    let eig = SymmetricEigen::new(f.transpose() * f);
    let (i1, i2) = if eig.eigenvalues[0] >= eig.eigenvalues[1] {
        (0, 1)
    } else {
        (1, 0)
    };
    let mut out = StretchSensitivity {
        nodes: grads.len(),
        major: [[0.0; 3]; 4],
        minor: [[0.0; 3]; 4],
    };
    for (i, slot) in [(i1, &mut out.major), (i2, &mut out.minor)] {
        let v: Vector2<f64> = eig.eigenvectors.column(i).into_owned();
        let lambda = eig.eigenvalues[i].max(0.0).sqrt();
        if lambda.is_nan() || lambda <= 0.0 {
            return None;
        }
        let n = f * v / lambda;
        for (a, g) in grads.iter().enumerate() {
            let d = n * g.dot(&v);
            slot[a] = [d.x, d.y, d.z];
        }
    }
    Some(out)
}

/// The curve's slopes `dL/de2` (engineering over engineering) just left and just right of the
/// engineering minor strain `e2` (one-sided differences over 1e-4, 0.01 % strain); a side
/// beyond the curve's end is left out.
pub fn curve_slopes(curve: &LimitCurve, e2: f64) -> Vec<f64> {
    const H: f64 = 1e-4;
    let at = |e: f64| {
        EngStrain(e)
            .to_true()
            .and_then(|t| curve.limit_major_eng(t))
            .map(|l| l.value())
    };
    let Some(here) = at(e2) else {
        return Vec::new();
    };
    [
        at(e2 - H).map(|l| (here - l) / H),
        at(e2 + H).map(|l| (l - here) / H),
    ]
    .into_iter()
    .flatten()
    .collect()
}

/// Uncertainty of the margin, percentage points, from a reading error `dd` on every deformed
/// node coordinate: `u = 100 δ Σ_a ‖s ∂λ2/∂x_a − ∂λ1/∂x_a‖₁`, the larger over the one-sided
/// slopes `s` of the curve at the element's engineering minor strain `e2` (module notes).
pub fn margin_uncertainty_pct(
    sens: &StretchSensitivity,
    curve: &LimitCurve,
    e2: f64,
    dd: f64,
) -> f64 {
    let mut slopes = curve_slopes(curve, e2);
    if slopes.is_empty() {
        slopes.push(0.0);
    }
    slopes
        .iter()
        .map(|&s| {
            (0..sens.nodes)
                .map(|a| {
                    (0..3)
                        .map(|c| (s * sens.minor[a][c] - sens.major[a][c]).abs())
                        .sum::<f64>()
                })
                .sum::<f64>()
        })
        .fold(0.0, f64::max)
        * 100.0
        * dd
}

#[cfg(test)]
mod tests {
    use super::super::mesh::Node;
    use super::*;
    use crate::assess::{judge, Settings};
    use crate::kinematics::StrainState;
    use crate::strain::Stretch;

    /// The steel curve of limits/ (Keeler-Brazier, 0.80 mm, n 0.20): its right side rises
    /// 0.6 per unit of minor strain (common practice for that curve's shape).
    fn steel() -> LimitCurve {
        let path = concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/../../limits/steel-0.80mm-n0.20-keeler-brazier.toml"
        );
        LimitCurve::load(std::path::Path::new(path)).unwrap()
    }

    /// A 2.5 mm cell (or the triangle of its first three corners) deformed by `f`, nodes moved
    /// by `err` (one `[dx, dy]` per node).
    fn mesh(f: Matrix2<f64>, corners: usize, err: &[[f64; 2]]) -> (Mesh, Element) {
        let square = [(0.0, 0.0), (2.5, 0.0), (2.5, 2.5), (0.0, 2.5)];
        let nodes = square[..corners]
            .iter()
            .enumerate()
            .map(|(i, &(x, y))| {
                let r = Vector2::new(x, y);
                let d = f * r + Vector2::new(err[i][0], err[i][1]);
                Node {
                    key: i.to_string(),
                    line: i as u64 + 2,
                    reference: r,
                    deformed: Vector3::new(d.x, d.y, 0.0),
                }
            })
            .collect();
        let e = Element {
            id: "e".into(),
            line: 2,
            nodes: (0..corners).collect(),
        };
        (
            Mesh {
                nodes,
                elements: vec![e.clone()],
                three_d: false,
            },
            e,
        )
    }

    /// The margin of the element, judged as `grid` judges it.
    fn margin(m: &Mesh, e: &Element, curve: &LimitCurve) -> f64 {
        let r = m.evaluate(e).unwrap();
        let [l1, l2] = r.kinematics.stretches.values;
        let s = StrainState::from_stretches(Stretch::new(l1).unwrap(), Stretch::new(l2).unwrap());
        judge(&s, curve, &Settings::default()).margin_pct.unwrap()
    }

    /// A small, seeded generator (SplitMix64, Steele, Lea & Flood 2014) for the Monte Carlo
    /// test: uniform in [−1, 1].
    struct SplitMix(u64);
    impl SplitMix {
        fn next(&mut self) -> f64 {
            self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
            let mut z = self.0;
            z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
            z ^= z >> 31;
            (z >> 11) as f64 / (1u64 << 53) as f64 * 2.0 - 1.0
        }
    }

    // The derived bound against brute force, for a quad and a triangle: F = [[1.25, 0.05],
    // [0.02, 1.02]] on a 2.5 mm cell, δ = 0.01 mm on each deformed coordinate. (1) Every sign
    // pattern of the corners (2^8 for the quad, 2^6 for the triangle), re-evaluated through the
    // element code and the judgement: the largest margin change equals u to within 2 % (the
    // bound is reached, to first order), and none exceeds it by more than 2 %. (2) A seeded
    // Monte Carlo run of 2000 uniform errors in [−δ, δ]: none exceeds u (+2 %). (3) u is more than
    // the circle rule 100 δ/d0 (1 + |s|) with d0 of the cell's area, which underestimates it.
    #[test]
    fn node_error_bound_against_sign_patterns_and_monte_carlo() {
        let curve = steel();
        let f = Matrix2::new(1.25, 0.05, 0.02, 1.02);
        let dd = 0.01;
        for corners in [4usize, 3] {
            let (m0, e) = mesh(f, corners, &[[0.0; 2]; 4]);
            let base = margin(&m0, &e, &curve);
            let sens = sensitivity(&m0, &e).unwrap();
            let r = m0.evaluate(&e).unwrap();
            let e2 = r.kinematics.stretches.values[1] - 1.0;
            let u = margin_uncertainty_pct(&sens, &curve, e2, dd);
            let coords = 2 * corners;
            let mut worst: f64 = 0.0;
            for pattern in 0..(1u32 << coords) {
                let err: Vec<[f64; 2]> = (0..corners)
                    .map(|a| {
                        let sign = |k: usize| if pattern >> k & 1 == 1 { dd } else { -dd };
                        [sign(2 * a), sign(2 * a + 1)]
                    })
                    .collect();
                let (m, e) = mesh(f, corners, &err);
                worst = worst.max((margin(&m, &e, &curve) - base).abs());
            }
            assert!(
                (worst - u).abs() < 0.02 * u,
                "{corners} nodes: worst sign pattern {worst}, bound {u}"
            );
            let mut rng = SplitMix(0x5eed + corners as u64);
            let mut largest: f64 = 0.0;
            for _ in 0..2000 {
                let err: Vec<[f64; 2]> = (0..corners)
                    .map(|_| [dd * rng.next(), dd * rng.next()])
                    .collect();
                let (m, e) = mesh(f, corners, &err);
                largest = largest.max((margin(&m, &e, &curve) - base).abs());
            }
            assert!(
                largest <= 1.02 * u,
                "{corners} nodes: Monte Carlo {largest} > {u}"
            );
            assert!(
                largest > 0.5 * u,
                "{corners} nodes: Monte Carlo {largest}, bound {u}"
            );
            let d0 = r.equivalent_d0();
            let slope = curve_slopes(&curve, e2)
                .iter()
                .fold(0.0f64, |a, s| a.max(s.abs()));
            let circle_rule = 100.0 * dd / d0 * (1.0 + slope);
            assert!(
                u > 1.5 * circle_rule,
                "{corners} nodes: {u} vs {circle_rule}"
            );
        }
    }

    // A square cell of pitch h read along x (F = I): Σ_a |∇N_a · e_x| = 4 · 1/(2h) = 2/h, so
    // δλ1 can reach 2δ/h (module notes); on a flat curve (s = 0) u = 100 · 2δ/h exactly.
    #[test]
    fn square_cell_on_a_flat_curve() {
        let flat = LimitCurve::parse(
            "name = \"flat\"\nsource = \"test\"\nstrain = \"engineering\"\npoints = [[-30, 30], [30, 30]]\n",
            std::path::Path::new("flat.toml"),
        )
        .unwrap();
        let (m, e) = mesh(Matrix2::new(1.2, 0.0, 0.0, 1.0), 4, &[[0.0; 2]; 4]);
        let u = margin_uncertainty_pct(&sensitivity(&m, &e).unwrap(), &flat, 0.0, 0.01);
        assert!((u - 100.0 * 2.0 * 0.01 / 2.5).abs() < 1e-9, "{u}");
    }
}
