//! Strains from grid nodes: the positions of a grid's nodes in the flat blank and on the formed
//! part give each element's deformation gradient, hence its strains, rotation and normal.
//!
//! [`deformation`]: the kinematics of one gradient (F, C, B, E, Almansi, polar decomposition);
//! [`mesh`]: triangles and quads (quads at their centre, and why); [`read`]: the node and
//! element files. [`evaluate`] turns a mesh into strain states that
//! [`crate::analysis::analyse_states`] judges like measured circles.

pub mod deformation;
pub mod mesh;
pub mod read;

use crate::error::Location;
use crate::kinematics::StrainState;
use crate::measure::{Measurement, RejectedRow};
use crate::strain::Stretch;
use mesh::{Element, ElementResult, Mesh};
use std::path::Path;

/// What an element adds to a judged location beyond its strains (written as extra columns).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GridExtras {
    /// Number of nodes of the element (3 or 4).
    pub nodes: usize,
    /// Major principal direction in the blank, degrees from +X in (−90°, 90°]; `None` when the
    /// stretches are equal.
    pub major_angle_deg: Option<f64>,
    /// In-plane rigid rotation of the material (polar decomposition), degrees, 2-D only.
    pub rotation_deg: Option<f64>,
    /// Unit normal of the formed surface, 3-D only.
    pub normal: Option<[f64; 3]>,
    /// Centre height on the formed part, 3-D only.
    pub z: Option<f64>,
    /// Centre in the blank.
    pub reference_centre: [f64; 2],
}

pub use crate::analysis::StateInput;

/// The location of one element: strains from its principal stretches, the equivalent circle's
/// axes as `major`/`minor`, the deformed centre as `x, y`.
pub fn state_input(e: &Element, r: &ElementResult, three_d: bool) -> Option<StateInput> {
    let k = &r.kinematics;
    let [l1, l2] = k.stretches.values;
    let strain = StrainState::from_stretches(Stretch::new(l1)?, Stretch::new(l2)?);
    let d0 = r.equivalent_d0();
    let input = Measurement {
        id: e.id.clone(),
        line: e.line,
        major: l1 * d0,
        minor: l2 * d0,
        d0: Some(d0),
        x: Some(r.centre.x),
        y: Some(r.centre.y),
        stage: None,
        thickness: None,
        note: None,
        condition: None,
    };
    let grid = GridExtras {
        nodes: e.nodes.len(),
        major_angle_deg: k.major_angle_deg(),
        rotation_deg: k.rotation_deg(),
        normal: k.normal.map(|n| [n.x, n.y, n.z]),
        z: three_d.then_some(r.centre.z),
        reference_centre: [r.reference_centre.x, r.reference_centre.y],
    };
    Some(StateInput {
        input,
        d0,
        strain,
        grid: Some(Box::new(grid)),
    })
}

/// Evaluate every element of `mesh`: a judged-ready location, or a rejected row naming the
/// element and why (collapsed, inverted, not convex...). `source` is the file that defined the
/// elements (the elements file, or the nodes file for a regular grid).
pub fn evaluate(mesh: &Mesh, source: &Path) -> (Vec<StateInput>, Vec<RejectedRow>) {
    let (mut ok, mut rejected) = (Vec::new(), Vec::new());
    for e in &mesh.elements {
        let reject = |reason: String| RejectedRow {
            location: Location::file(source).at_line(e.line),
            id: Some(e.id.clone()),
            reason,
        };
        match mesh.evaluate(e) {
            Ok(r) => match state_input(e, &r, mesh.three_d) {
                Some(s) => ok.push(s),
                None => rejected.push(reject("the element's stretches are not positive".into())),
            },
            Err(d) => rejected.push(reject(format!("element not evaluated: {d}"))),
        }
    }
    (ok, rejected)
}
