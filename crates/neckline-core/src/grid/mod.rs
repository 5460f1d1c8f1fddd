//! Strains from grid nodes: the positions of a grid's nodes in the flat blank and on the formed
//! part give each element's deformation gradient, hence its strains, rotation and normal.
//!
//! [`deformation`]: the kinematics of one gradient (F, C, B, E, Almansi, polar decomposition);
//! [`mesh`]: triangles and quads (quads at their centre, and why); [`read`]: the node and
//! element files; [`rows`]: a regular grid's file read a few grid rows at a time; [`uncertainty`]: how a reading error on the nodes moves the strains. One layer
//! up, `stream::elements::evaluate` turns a mesh into locations judged like measured circles.

pub mod deformation;
pub mod mesh;
pub mod read;
pub mod rows;
pub mod uncertainty;

use mesh::Element;

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

/// How an element is named in messages: a regular grid's cell by its place (`grid cell
/// r0c0`), an elements file's element by its id (`element `T3``).
pub fn element_name(e: &Element, regular_grid: bool) -> String {
    if regular_grid {
        format!("grid cell {}", e.id)
    } else {
        format!("element `{}`", e.id)
    }
}
