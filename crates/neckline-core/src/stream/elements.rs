//! The elements of a grid as locations to judge: each element's strains from its principal
//! stretches ([`crate::grid`] computes them from the nodes), the equivalent circle's axes, and
//! the margin's uncertainty from the reading error on the nodes.

use crate::error::Location;
use crate::grid::mesh::{Element, ElementResult, Mesh, Nodes};
use crate::grid::{element_name, uncertainty, GridExtras};
use crate::kinematics::StrainState;
use crate::measure::{Measurement, RejectedRow};
use crate::output::points_csv::Layout;
use crate::point::{Context, StateInput};
use crate::strain::Stretch;
use crate::summary::{Summary, Template};
use rayon::prelude::*;
use std::path::Path;

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

/// Evaluate one element into a judged-ready location, or a rejected row naming the element
/// (its id in the message itself, not only in the id field) and why (collapsed, inverted, not
/// convex...). `source` is the file that defined the elements (the elements file, or the nodes
/// file for a regular grid, `regular_grid`). `sensitivity`: also how the stretches move with
/// each node, which only a reading error on the nodes needs.
pub fn evaluate_one(
    nodes: &Nodes,
    three_d: bool,
    e: &Element,
    source: &Path,
    regular_grid: bool,
    sensitivity: bool,
) -> Result<StateInput, RejectedRow> {
    let reject = |reason: String| RejectedRow {
        location: Location::file(source).at_line(e.line),
        id: Some(e.id.clone()),
        reason,
    };
    let name = || element_name(e, regular_grid);
    match nodes.evaluate(e, three_d) {
        Ok(r) => match state_input(e, &r, three_d) {
            Some(mut s) => {
                if let Some(g) = s.grid.as_mut().filter(|_| sensitivity) {
                    g.sensitivity = uncertainty::sensitivity_of(nodes, e);
                }
                Ok(s)
            }
            None => Err(reject(format!(
                "{} not evaluated: its stretches are not positive",
                name()
            ))),
        },
        Err(d) => Err(reject(format!("{} not evaluated: {d}", name()))),
    }
}

/// Evaluate every element of `mesh` ([`evaluate_one`]).
pub fn evaluate(
    mesh: &Mesh,
    source: &Path,
    regular_grid: bool,
) -> (Vec<StateInput>, Vec<RejectedRow>) {
    let (mut ok, mut rejected) = (Vec::new(), Vec::new());
    for e in &mesh.elements {
        match evaluate_one(&mesh.nodes, mesh.three_d, e, source, regular_grid, true) {
            Ok(s) => ok.push(s),
            Err(r) => rejected.push(r),
        }
    }
    (ok, rejected)
}

/// How the elements of a grid are judged and written, a batch at a time.
pub struct ElementJudge<'a> {
    /// The nodes.
    pub nodes: &'a Nodes,
    /// Whether the part is curved (the nodes have heights).
    pub three_d: bool,
    /// The file that defined the elements.
    pub source: &'a Path,
    /// Whether they are the cells of a regular grid.
    pub regular_grid: bool,
    /// What every element is judged with.
    pub ctx: &'a Context,
    /// The points.csv columns.
    pub layout: &'a Layout,
    /// Whether rows are formatted for a points table.
    pub write: bool,
}

/// One piece of a batch judged: its points.csv rows, partial summary, and elements rejected.
pub struct JudgedPiece {
    /// The points.csv rows.
    pub text: Vec<u8>,
    /// The partial summary.
    pub summary: Summary,
    /// Elements that could not be evaluated, in order.
    pub rejected: Vec<RejectedRow>,
}

/// Elements judged per piece (on one core each).
const PIECE: usize = 2048;

/// Judge `elements` on every core, in pieces, as `check`'s stream judges chunks: each piece
/// into its text and a partial summary (`like` its template), returned in order for the
/// caller to write and merge.
pub fn judge_elements(
    j: &ElementJudge<'_>,
    elements: &[Element],
    like: &Template,
) -> Vec<JudgedPiece> {
    elements
        .par_chunks(PIECE)
        .map(|piece| {
            let sensitivity = j.ctx.settings.reading_error.is_some();
            let mut out = JudgedPiece {
                text: Vec::with_capacity(if j.write { piece.len() * 256 } else { 0 }),
                summary: like.part(),
                rejected: Vec::new(),
            };
            for e in piece {
                match evaluate_one(j.nodes, j.three_d, e, j.source, j.regular_grid, sensitivity) {
                    Ok(s) => {
                        let p = j.ctx.judge(s);
                        if j.write {
                            j.layout.push_row(&mut out.text, &p);
                        }
                        out.summary.fold(p);
                    }
                    Err(r) => out.rejected.push(r),
                }
            }
            out
        })
        .collect()
}
