//! Strains from grid nodes: the positions of a grid's nodes in the flat blank and on the formed
//! part give each element's deformation gradient, hence its strains, rotation and normal.
//!
//! [`deformation`]: the kinematics of one gradient (F, C, B, E, Almansi, polar decomposition);
//! [`mesh`]: triangles and quads (quads at their centre, and why); [`read`]: the node and
//! element files. [`evaluate`] turns a mesh into strain states that
//! [`crate::analysis::Context`] judges like measured circles.

pub mod deformation;
pub mod mesh;
pub mod read;
pub mod uncertainty;

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
    /// How the stretches move with each deformed node, for the margin's uncertainty under a
    /// reading error ([`uncertainty`]).
    pub sensitivity: Option<uncertainty::StretchSensitivity>,
}

pub use crate::analysis::StateInput;

/// The location of one element: strains from its principal stretches, the equivalent circle's
/// axes as `major`/`minor`, the deformed centre as `x, y`.
pub fn state_input(e: &Element, r: &ElementResult, three_d: bool) -> Option<StateInput> {
    let k = &r.kinematics;
    let [l1, l2] = k.stretches.values;
    let strain = StrainState::from_stretches(Stretch::new(l1)?, Stretch::new(l2)?);
    let d0 = r.equivalent_d0();
    let mut input = Measurement::axes(&e.id, e.line, l1 * d0, l2 * d0, Some(d0));
    input.x = Some(r.centre.x);
    input.y = Some(r.centre.y);
    let grid = GridExtras {
        nodes: e.nodes.len(),
        major_angle_deg: k.major_angle_deg(),
        rotation_deg: k.rotation_deg(),
        normal: k.normal.map(|n| [n.x, n.y, n.z]),
        z: three_d.then_some(r.centre.z),
        reference_centre: [r.reference_centre.x, r.reference_centre.y],
        sensitivity: None,
    };
    Some(StateInput {
        input,
        d0: Some(d0),
        strain,
        grid: Some(Box::new(grid)),
    })
}

/// How an element is named in messages: a regular grid's cell by its place (`grid cell
/// r0c0`), an elements file's element by its id (`element `T3``).
pub fn element_name(e: &Element, regular_grid: bool) -> String {
    if regular_grid {
        format!("grid cell {}", e.id)
    } else {
        format!("element `{}`", e.id)
    }
}

/// Replace the circle rule's margin uncertainty of a grid element by the node-error one
/// ([`uncertainty::margin_uncertainty_pct`]), with `settings.reading_error` on every deformed node
/// coordinate, and set the borderline flag from it.
pub fn node_reading_uncertainty(
    p: &mut crate::analysis::PointResult,
    curve: &crate::limit::LimitCurve,
    settings: &crate::assess::Settings,
) {
    let Some(dd) = settings.reading_error else {
        return;
    };
    let (Some(sens), Some(m)) = (
        p.grid.as_ref().and_then(|g| g.sensitivity),
        p.judgement.margin_pct,
    ) else {
        return;
    };
    let u = uncertainty::margin_uncertainty_pct(&sens, curve, p.strain.eng.minor.value(), dd);
    p.judgement.uncertainty_pct = Some(u);
    p.judgement.borderline = crate::assess::is_borderline(m, u, settings);
}

/// Evaluate every element of `mesh`: a judged-ready location, or a rejected row naming the
/// element (its id in the message itself, not only in the id field) and why (collapsed,
/// inverted, not convex...). `source` is the file that defined the elements (the elements file,
/// or the nodes file for a regular grid, `regular_grid`).
pub fn evaluate(
    mesh: &Mesh,
    source: &Path,
    regular_grid: bool,
) -> (Vec<StateInput>, Vec<RejectedRow>) {
    let (mut ok, mut rejected) = (Vec::new(), Vec::new());
    for e in &mesh.elements {
        let name = element_name(e, regular_grid);
        let reject = |reason: String| RejectedRow {
            location: Location::file(source).at_line(e.line),
            id: Some(e.id.clone()),
            reason,
        };
        match mesh.evaluate(e) {
            Ok(r) => match state_input(e, &r, mesh.three_d) {
                Some(mut s) => {
                    if let Some(g) = s.grid.as_mut() {
                        g.sensitivity = uncertainty::sensitivity(mesh, e);
                    }
                    ok.push(s)
                }
                None => rejected.push(reject(format!(
                    "{name} not evaluated: its stretches are not positive"
                ))),
            },
            Err(d) => rejected.push(reject(format!("{name} not evaluated: {d}"))),
        }
    }
    (ok, rejected)
}
