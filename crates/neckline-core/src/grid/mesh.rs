//! Elements of a node grid: linear triangles, and quads evaluated at their centre.
//!
//! **Quads.** A cell of a regular grid (or a 4-node element) is evaluated as a bilinear
//! quadrilateral at its centre (ξ = η = 0), not split into two triangles. With the corner nodes
//! 1..4 in order around the cell and shape functions `N = (1 ± ξ)(1 ± η)/4`:
//!
//! `∂x/∂ξ = (−x1 + x2 + x3 − x4)/4`, `∂x/∂η = (−x1 − x2 + x3 + x4)/4`, likewise for `X`, and
//! `F = [∂x/∂ξ ∂x/∂η] [∂X/∂ξ ∂X/∂η]⁻¹` (Zienkiewicz & Taylor, *The Finite Element Method*,
//! vol. 1, isoparametric elements).
//!
//! Why: the centre gradient uses the four nodes symmetrically, so the result does not depend on
//! which diagonal a split would take (a split along one diagonal gives a different strain from a
//! split along the other whenever the deformation is not homogeneous); it is exact for any
//! homogeneous deformation; it gives one value per grid square, as a press-shop reader would;
//! and for a parallelogram cell it equals the mean of the four corner-triangle gradients (tested).
//! Its blind spot is the "hourglass" pattern (opposite corners moving alike), which does not
//! change the centre gradient; a node misread shows up in the four cells around it instead.
//!
//! Degenerate elements are refused with a reason ([`Degenerate`]): a quad must be convex in the
//! blank, and in 2-D none of its four corner triangles may turn over after forming.

use super::deformation::{
    check_2d, check_3d, twice_signed_area, Degenerate, ElementKinematics, DEGENERATE_TOL,
};
use nalgebra::{Matrix2, Matrix3x2, Vector2, Vector3};

/// Natural-coordinate derivatives of a bilinear quad's position at its centre:
/// `[∂p/∂ξ, ∂p/∂η]` from the corner positions `p1..p4` in order around the quad.
pub fn quad_centre_tangents<const D: usize>(
    p: &[nalgebra::SVector<f64, D>; 4],
) -> [nalgebra::SVector<f64, D>; 2] {
    [
        (-p[0] + p[1] + p[2] - p[3]) / 4.0,
        (-p[0] - p[1] + p[2] + p[3]) / 4.0,
    ]
}

/// Twice the signed areas of the four corner triangles `(p[i−1], p[i], p[i+1])` of a quad.
pub fn corner_areas(p: &[Vector2<f64>; 4]) -> [f64; 4] {
    std::array::from_fn(|i| twice_signed_area(p[(i + 3) % 4], p[i], p[(i + 1) % 4]))
}

/// The reference Jacobian `[∂X/∂ξ ∂X/∂η]` of a quad, checked: finite, convex (all corner
/// triangles of one sign) and of usable area (scale-free, as for triangles).
pub fn quad_reference_jacobian(reference: &[Vector2<f64>; 4]) -> Result<Matrix2<f64>, Degenerate> {
    if reference.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let [a, b] = quad_centre_tangents(reference);
    let j = Matrix2::from_columns(&[a, b]);
    let longest = (0..4)
        .map(|i| (reference[(i + 1) % 4] - reference[i]).norm_squared())
        .fold(0.0, f64::max);
    // 4 det J is the parallelogram area of the centre tangents; compare with the longest edge².
    let ratio = if longest > 0.0 {
        4.0 * j.determinant().abs() / longest
    } else {
        0.0
    };
    if ratio < DEGENERATE_TOL {
        return Err(Degenerate::ReferenceCollapsed { shape_ratio: ratio });
    }
    let areas = corner_areas(reference);
    let sign = j.determinant().signum();
    if areas.iter().any(|&a| a * sign <= 0.0) {
        return Err(Degenerate::ReferenceNotConvex);
    }
    Ok(j)
}

/// Centre gradient of a bilinear quad on a flat part (2×2), see the module notes. Refused when
/// a corner triangle turns over or the centre gradient collapses.
pub fn quad_gradient_2d(
    reference: &[Vector2<f64>; 4],
    deformed: &[Vector2<f64>; 4],
) -> Result<Matrix2<f64>, Degenerate> {
    let j_ref = quad_reference_jacobian(reference)?;
    if deformed.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let [a, b] = quad_centre_tangents(deformed);
    let inv = j_ref
        .try_inverse()
        .ok_or(Degenerate::ReferenceCollapsed { shape_ratio: 0.0 })?;
    let f = check_2d(Matrix2::from_columns(&[a, b]) * inv)?;
    let (r, d) = (corner_areas(reference), corner_areas(deformed));
    let worst = (0..4).map(|i| d[i] / r[i]).fold(f64::INFINITY, f64::min);
    if worst.abs() < DEGENERATE_TOL {
        return Err(Degenerate::Collapsed { area_ratio: worst });
    }
    if worst < 0.0 {
        return Err(Degenerate::Inverted { area_ratio: worst });
    }
    Ok(f)
}

/// Centre gradient of a bilinear quad on a curved part (3×2), see the module notes.
pub fn quad_gradient_3d(
    reference: &[Vector2<f64>; 4],
    deformed: &[Vector3<f64>; 4],
) -> Result<Matrix3x2<f64>, Degenerate> {
    let j_ref = quad_reference_jacobian(reference)?;
    if deformed.iter().any(|p| !p.iter().all(|v| v.is_finite())) {
        return Err(Degenerate::NotFinite);
    }
    let [a, b] = quad_centre_tangents(deformed);
    let inv = j_ref
        .try_inverse()
        .ok_or(Degenerate::ReferenceCollapsed { shape_ratio: 0.0 })?;
    check_3d(Matrix3x2::from_columns(&[a, b]) * inv)
}

/// One node: its key (the `id`, or `r{row}c{col}`), where it was read, and its positions.
#[derive(Debug, Clone, PartialEq)]
pub struct Node {
    /// The node's key.
    pub key: String,
    /// 1-based line in the nodes file.
    pub line: u64,
    /// Position in the flat blank `(X, Y)`.
    pub reference: Vector2<f64>,
    /// Position on the formed part `(x, y, z)`; `z = 0` for a 2-D file.
    pub deformed: Vector3<f64>,
}

/// A triangle or a quad, by indices into the node list.
#[derive(Debug, Clone, PartialEq)]
pub struct Element {
    /// The element's id.
    pub id: String,
    /// The file and 1-based line that define it (the elements file, or the nodes file line of
    /// a grid cell's first node).
    pub line: u64,
    /// 3 or 4 node indices, in order around the element.
    pub nodes: Vec<usize>,
}

/// The nodes of a grid as columns: positions in the blank and on the part, lines, and the
/// keys of a file with an `id` column stored end to end with a hash index (a regular grid's
/// nodes are found by their place, [`super::read::Places`], and store no key). 36 bytes a
/// node on a flat part (44 on a curved one), plus the key and its index when keyed.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Nodes {
    reference: Vec<[f64; 2]>,
    deformed: Vec<[f64; 2]>,
    /// Heights on the formed part; empty while every height read is +0 (`has_z` false).
    z: Vec<f64>,
    has_z: bool,
    /// Lines in the nodes file; [`FAR`] for a line past it, found in `far_lines`.
    lines: Vec<u32>,
    /// `(node, line)` of the nodes on lines past [`FAR`], in order of node.
    far_lines: Vec<(usize, u64)>,
    keys: Keys,
}

/// Lines from here on are kept aside ([`Nodes::line`]): no file of circle-grid nodes comes
/// near four billion lines, and a line is 4 bytes a node instead of 8.
const FAR: u32 = u32::MAX;

/// Node keys end to end, and an index from a key's hash to its node.
#[derive(Debug, Clone, Default, PartialEq)]
struct Keys {
    text: String,
    ends: Vec<usize>,
    by_hash: std::collections::HashMap<u64, u32>,
    /// Nodes whose key shares its hash with an earlier one (searched one by one).
    collided: Vec<u32>,
}

fn key_hash(key: &str) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::hash::DefaultHasher::new();
    key.hash(&mut h);
    h.finish()
}

impl Nodes {
    /// Number of nodes.
    pub fn len(&self) -> usize {
        self.lines.len()
    }

    /// Whether there is none.
    pub fn is_empty(&self) -> bool {
        self.lines.is_empty()
    }

    /// Add a node, its key kept (and indexed) when `keyed`; its index.
    pub fn push(&mut self, node: &Node, keyed: bool) -> usize {
        let i = self.len();
        self.reference.push([node.reference.x, node.reference.y]);
        self.deformed.push([node.deformed.x, node.deformed.y]);
        if node.deformed.z.to_bits() != 0 && !self.has_z {
            self.z.resize(i, 0.0);
            self.has_z = true;
        }
        if self.has_z {
            self.z.push(node.deformed.z);
        }
        match u32::try_from(node.line) {
            Ok(l) if l < FAR => self.lines.push(l),
            _ => {
                self.lines.push(FAR);
                self.far_lines.push((i, node.line));
            }
        }
        if keyed {
            let k = &mut self.keys;
            k.text.push_str(&node.key);
            k.ends.push(k.text.len());
            let slot = k.ends.len() as u32 - 1;
            match k.by_hash.entry(key_hash(&node.key)) {
                std::collections::hash_map::Entry::Vacant(v) => {
                    v.insert(slot);
                }
                // The first node with that hash stays in the index, a later one aside.
                std::collections::hash_map::Entry::Occupied(_) => k.collided.push(slot),
            }
        }
        i
    }

    fn key_of_slot(&self, s: u32) -> &str {
        let k = &self.keys;
        let start = if s == 0 { 0 } else { k.ends[s as usize - 1] };
        &k.text[start..k.ends[s as usize]]
    }

    /// The key of node `i`, when nodes are keyed.
    pub fn key(&self, i: usize) -> Option<&str> {
        (i < self.keys.ends.len()).then(|| self.key_of_slot(i as u32))
    }

    /// The node with `key` (keyed nodes only).
    pub fn find(&self, key: &str) -> Option<usize> {
        let k = &self.keys;
        let first = *k.by_hash.get(&key_hash(key))?;
        if self.key_of_slot(first) == key {
            return Some(first as usize);
        }
        k.collided
            .iter()
            .find(|&&s| self.key_of_slot(s) == key)
            .map(|&s| s as usize)
    }

    /// Position of node `i` in the flat blank `(X, Y)`.
    pub fn reference(&self, i: usize) -> Vector2<f64> {
        Vector2::from(self.reference[i])
    }

    /// Position of node `i` on the formed part `(x, y, z)`.
    pub fn deformed(&self, i: usize) -> Vector3<f64> {
        let [x, y] = self.deformed[i];
        Vector3::new(x, y, self.z.get(i).copied().unwrap_or(0.0))
    }

    /// Node `i` whole (its key empty when nodes are not keyed).
    pub fn node(&self, i: usize) -> Node {
        Node {
            key: self.key(i).unwrap_or_default().to_string(),
            line: self.line(i),
            reference: self.reference(i),
            deformed: self.deformed(i),
        }
    }

    /// The 1-based line of node `i` in the nodes file.
    pub fn line(&self, i: usize) -> u64 {
        match self.lines[i] {
            FAR => {
                let k = self.far_lines.partition_point(|&(n, _)| n < i);
                self.far_lines[k].1
            }
            l => u64::from(l),
        }
    }

    /// Keep the nodes whose `keep` is true (unkeyed nodes only); the new index of each kept.
    pub fn retain(&mut self, keep: &[bool]) -> Vec<Option<usize>> {
        debug_assert!(self.keys.ends.is_empty());
        let mut to = Vec::with_capacity(keep.len());
        let mut far = Vec::new();
        let mut n = 0;
        for (i, &k) in keep.iter().enumerate() {
            to.push(k.then_some(n));
            if k {
                self.reference[n] = self.reference[i];
                self.deformed[n] = self.deformed[i];
                if self.lines[i] == FAR {
                    far.push((n, self.line(i)));
                }
                self.lines[n] = self.lines[i];
                if self.has_z {
                    self.z[n] = self.z[i];
                }
                n += 1;
            }
        }
        self.reference.truncate(n);
        self.deformed.truncate(n);
        self.lines.truncate(n);
        self.far_lines = far;
        if self.has_z {
            self.z.truncate(n);
        }
        to
    }

    /// Evaluate one element: its gradient, kinematics and centres (`three_d`: the part is
    /// curved, its heights used).
    pub fn evaluate(&self, e: &Element, three_d: bool) -> Result<ElementResult, Degenerate> {
        let reference: Vec<Vector2<f64>> = e.nodes.iter().map(|&i| self.reference(i)).collect();
        let deformed: Vec<Vector3<f64>> = e.nodes.iter().map(|&i| self.deformed(i)).collect();
        let kinematics = match (e.nodes.len(), three_d) {
            (3, false) => ElementKinematics::from_2d(super::deformation::triangle_gradient_2d(
                &arr(&reference),
                &arr(&xy(&deformed)),
            )?)?,
            (3, true) => ElementKinematics::from_3d(super::deformation::triangle_gradient_3d(
                &arr(&reference),
                &arr(&deformed),
            )?)?,
            (_, false) => ElementKinematics::from_2d(quad_gradient_2d(
                &arr(&reference),
                &arr(&xy(&deformed)),
            )?)?,
            (_, true) => {
                ElementKinematics::from_3d(quad_gradient_3d(&arr(&reference), &arr(&deformed))?)?
            }
        };
        Ok(ElementResult {
            kinematics,
            centre: mean(&deformed),
            reference_centre: mean(&reference),
            reference_area: polygon_area(&reference),
        })
    }
}

impl FromIterator<Node> for Nodes {
    fn from_iter<I: IntoIterator<Item = Node>>(iter: I) -> Self {
        let mut nodes = Nodes::default();
        for n in iter {
            nodes.push(&n, true);
        }
        nodes
    }
}

/// Nodes and elements, 2-D or 3-D.
#[derive(Debug, Clone, PartialEq)]
pub struct Mesh {
    /// All accepted nodes.
    pub nodes: Nodes,
    /// The elements to evaluate.
    pub elements: Vec<Element>,
    /// Whether the deformed positions have a `z` (curved part).
    pub three_d: bool,
}

/// The result for one element that could be evaluated.
#[derive(Debug, Clone, PartialEq)]
pub struct ElementResult {
    /// Kinematics of its gradient.
    pub kinematics: ElementKinematics,
    /// Centre on the formed part (mean of the deformed nodes).
    pub centre: Vector3<f64>,
    /// Centre in the blank (mean of the reference nodes).
    pub reference_centre: Vector2<f64>,
    /// Area in the blank.
    pub reference_area: f64,
}

impl ElementResult {
    /// Diameter of the circle with the element's blank area, `d0 = √(4A/π)`: the circle that,
    /// deformed by the element's gradient, becomes an ellipse with axes `λ1 d0`, `λ2 d0`.
    pub fn equivalent_d0(&self) -> f64 {
        (4.0 * self.reference_area / std::f64::consts::PI).sqrt()
    }
}

fn mean<const D: usize>(p: &[nalgebra::SVector<f64, D>]) -> nalgebra::SVector<f64, D> {
    p.iter().sum::<nalgebra::SVector<f64, D>>() / p.len() as f64
}

/// Area of a simple polygon by the shoelace formula.
fn polygon_area(p: &[Vector2<f64>]) -> f64 {
    let n = p.len();
    (0..n)
        .map(|i| p[i].x * p[(i + 1) % n].y - p[(i + 1) % n].x * p[i].y)
        .sum::<f64>()
        .abs()
        / 2.0
}

impl Mesh {
    /// Evaluate one element: its gradient, kinematics and centres.
    pub fn evaluate(&self, e: &Element) -> Result<ElementResult, Degenerate> {
        self.nodes.evaluate(e, self.three_d)
    }
}

fn xy(p: &[Vector3<f64>]) -> Vec<Vector2<f64>> {
    p.iter().map(|v| v.xy()).collect()
}

fn arr<T: Copy, const N: usize>(v: &[T]) -> [T; N] {
    std::array::from_fn(|i| v[i])
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // A node moved onto its neighbour leaves a corner triangle of zero area: that cell has
    // collapsed, it has not turned over.
    #[test]
    fn node_on_its_neighbour_is_collapsed_not_inverted() {
        let mut moved = square();
        moved[1] = moved[0];
        match quad_gradient_2d(&square(), &moved) {
            Err(Degenerate::Collapsed { .. }) => {}
            other => panic!("expected Collapsed, got {other:?}"),
        }
    }

    fn square() -> [Vector2<f64>; 4] {
        [
            Vector2::new(0.0, 0.0),
            Vector2::new(5.0, 0.0),
            Vector2::new(5.0, 5.0),
            Vector2::new(0.0, 5.0),
        ]
    }

    // A homogeneous deformation is reproduced exactly by the centre gradient (isoparametric
    // elements represent linear fields exactly: Zienkiewicz & Taylor, vol. 1, completeness).
    #[test]
    fn homogeneous_quad_is_exact() {
        let f = Matrix2::new(1.2, 0.1, -0.05, 0.9);
        let x = square().map(|p| f * p + Vector2::new(3.0, -1.0));
        assert_abs_diff_eq!(quad_gradient_2d(&square(), &x).unwrap(), f, epsilon = 1e-12);
    }

    #[test]
    fn bad_quads_have_reasons() {
        let mut dart = square();
        dart[2] = Vector2::new(1.0, 1.0); // re-entrant corner
        assert_eq!(
            quad_gradient_2d(&dart, &dart),
            Err(Degenerate::ReferenceNotConvex)
        );
        let mut folded = square();
        folded[2] = Vector2::new(-1.0, -1.0); // one corner pulled through the opposite one
        assert!(matches!(
            quad_gradient_2d(&square(), &folded),
            Err(Degenerate::Inverted { .. }) | Err(Degenerate::Collapsed { .. })
        ));
        let mut kinked = square();
        kinked[1] = Vector2::new(2.0, 3.5); // corner 2 crosses the diagonal: corner triangle flips
        assert!(matches!(
            quad_gradient_2d(&square(), &kinked),
            Err(Degenerate::Inverted { .. })
        ));
        let point = [Vector2::new(1.0, 1.0); 4];
        assert!(matches!(
            quad_gradient_2d(&point, &square()),
            Err(Degenerate::ReferenceCollapsed { .. })
        ));
    }

    // Equivalent diameter: a 5 mm square cell has the area of a circle of √(100/π) = 5.6419 mm.
    #[test]
    fn equivalent_diameter_of_a_cell() {
        let nodes = square()
            .iter()
            .enumerate()
            .map(|(i, p)| Node {
                key: i.to_string(),
                line: 2 + i as u64,
                reference: *p,
                deformed: Vector3::new(p.x, p.y, 0.0),
            })
            .collect();
        let mesh = Mesh {
            nodes,
            elements: vec![],
            three_d: false,
        };
        let e = Element {
            id: "q".into(),
            line: 2,
            nodes: vec![0, 1, 2, 3],
        };
        let r = mesh.evaluate(&e).unwrap();
        assert_abs_diff_eq!(
            r.equivalent_d0(),
            (100.0 / std::f64::consts::PI).sqrt(),
            epsilon = 1e-12
        );
        assert_abs_diff_eq!(r.reference_centre, Vector2::new(2.5, 2.5), epsilon = 1e-12);
    }

    #[test]
    fn lines_past_four_billion_are_kept_whole_through_a_retain() {
        let node = |line: u64| Node {
            key: String::new(),
            line,
            reference: Vector2::new(line as f64, 0.0),
            deformed: Vector3::new(0.0, 0.0, 0.0),
        };
        let lines = [
            2,
            4_294_967_294,
            4_294_967_295,
            5_000_000_000,
            9_000_000_001,
        ];
        let mut nodes = Nodes::default();
        for &l in &lines {
            nodes.push(&node(l), false);
        }
        let read: Vec<u64> = (0..nodes.len()).map(|i| nodes.line(i)).collect();
        assert_eq!(read, lines);
        let to = nodes.retain(&[true, false, true, false, true]);
        assert_eq!(to, [Some(0), None, Some(1), None, Some(2)]);
        let kept: Vec<u64> = (0..nodes.len()).map(|i| nodes.line(i)).collect();
        assert_eq!(kept, [2, 4_294_967_295, 9_000_000_001]);
        assert_eq!(nodes.reference(2).x.to_bits(), 9_000_000_001f64.to_bits());
    }
}
