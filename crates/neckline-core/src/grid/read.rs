//! Reading node and element files (CSV, the same two dialects as measurement files).
//!
//! **Nodes**: a header row, then one row per node. Either `row, col` (the node's place in a
//! regular grid: cells between neighbouring rows and columns are the elements) or `id` (with an
//! elements file); reference position `X, Y` in the flat blank (also `x0, y0`); deformed position
//! `x, y` and optional `z` on the formed part. `X`/`Y` and `x`/`y` are told apart by case; every
//! other name is case-insensitive.
//!
//! **Elements** (irregular meshes): `id, n1, n2, n3[, n4]`, node keys in order around the
//! element (an empty `n4` makes a triangle). Node keys are the nodes file's `id`, or
//! `r{row}c{col}` when it has only `row, col`.
//!
//! A bad row (wrong field count, a value that is not a finite number, an unknown or repeated
//! key) is rejected with its file, line and column, never dropped in silence; a grid cell or
//! element that needs a rejected or missing node is rejected with that reason.
//!
//! Both files are read in chunks on every core ([`crate::table::TableStream`]); the nodes are
//! kept as columns ([`Nodes`]), a regular grid's places as a sorted list ([`Places`]), and the
//! elements are handed on a batch at a time ([`Cells`], [`ElementReader`]), never all held.

use super::mesh::{Element, Node, Nodes};
use crate::error::{Error, Location, Result};
use crate::measure::RejectedRow;
use crate::table::{stream_table, Table};
use nalgebra::{Vector2, Vector3};
use std::collections::{BTreeMap, HashMap};
use std::path::{Path, PathBuf};

/// The roles a nodes-file column can have.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum NodeColumn {
    Id,
    Row,
    Col,
    RefX,
    RefY,
    X,
    Y,
    Z,
}

fn node_role(name: &str) -> Option<NodeColumn> {
    match name {
        "X" => return Some(NodeColumn::RefX),
        "Y" => return Some(NodeColumn::RefY),
        "x" => return Some(NodeColumn::X),
        "y" => return Some(NodeColumn::Y),
        "z" => return Some(NodeColumn::Z),
        _ => {}
    }
    match name.to_ascii_lowercase().as_str() {
        "id" | "node" => Some(NodeColumn::Id),
        "row" => Some(NodeColumn::Row),
        "col" | "column" => Some(NodeColumn::Col),
        "x0" | "ref_x" => Some(NodeColumn::RefX),
        "y0" | "ref_y" => Some(NodeColumn::RefY),
        _ => None,
    }
}

/// The nodes file as read: accepted nodes, rejected rows, grid places and ignored columns.
#[derive(Debug, Clone)]
pub struct NodeSet {
    /// The file as named.
    pub source: PathBuf,
    /// Accepted nodes in file order.
    pub nodes: Nodes,
    /// `(row, col)` → index into `nodes`, when the file has `row, col`.
    pub grid: Places,
    /// Whether the file has `row, col` columns.
    pub has_grid: bool,
    /// Whether the file has an `id` column.
    pub has_id: bool,
    /// Whether the file has a `z` column.
    pub three_d: bool,
    /// Line of the header.
    pub header_line: u64,
    /// Rows not accepted, with reasons.
    pub rejected: Vec<RejectedRow>,
    /// Grid places `(row, col)` of rejected rows whose place could be read.
    pub rejected_places: BTreeMap<(i64, i64), u64>,
    /// Header columns not recognised (ignored).
    pub ignored_columns: Vec<String>,
}

/// A node's place in a regular grid and its index among the nodes (12 bytes: grid numbers are
/// within ±[`MAX_GRID_INDEX`], well inside `i32`).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub(crate) struct Place {
    row: i32,
    col: i32,
    node: u32,
}

impl Place {
    /// Node `node` at `(row, col)`, read within ±[`MAX_GRID_INDEX`].
    pub(crate) fn new(at: (i64, i64), node: usize) -> Place {
        Place {
            row: at.0 as i32,
            col: at.1 as i32,
            node: node as u32,
        }
    }

    fn at(&self) -> (i64, i64) {
        (i64::from(self.row), i64::from(self.col))
    }
}

/// The places `(row, col)` of a regular grid's nodes, sorted, each with its node (12 bytes a
/// node; found by bisection).
#[derive(Debug, Clone, Default)]
pub struct Places {
    at: Vec<Place>,
}

impl Places {
    /// The node at place `p`.
    pub fn get(&self, p: &(i64, i64)) -> Option<usize> {
        let key = (i32::try_from(p.0).ok()?, i32::try_from(p.1).ok()?);
        self.at
            .binary_search_by_key(&key, |q| (q.row, q.col))
            .ok()
            .map(|k| self.at[k].node as usize)
    }

    /// Whether a node is at `p`.
    pub fn contains_key(&self, p: &(i64, i64)) -> bool {
        self.get(p).is_some()
    }

    /// Number of places.
    pub fn len(&self) -> usize {
        self.at.len()
    }

    /// Whether there is none.
    pub fn is_empty(&self) -> bool {
        self.at.is_empty()
    }

    /// Every place and its node, in order of `(row, col)`.
    pub fn iter(&self) -> impl Iterator<Item = ((i64, i64), usize)> + '_ {
        self.at.iter().map(|p| (p.at(), p.node as usize))
    }

    /// The columns on grid row `row`, in order.
    fn row_cols(&self, row: i64) -> impl Iterator<Item = i64> + '_ {
        let a = self.at.partition_point(|p| i64::from(p.row) < row);
        let b = self.at.partition_point(|p| i64::from(p.row) <= row);
        self.at[a..b].iter().map(|p| i64::from(p.col))
    }

    /// The grid rows with a node, in order, once each.
    fn rows(&self) -> impl Iterator<Item = i64> + '_ {
        let mut last = None;
        self.at.iter().filter_map(move |p| {
            let new = last != Some(p.row);
            last = Some(p.row);
            new.then_some(i64::from(p.row))
        })
    }
}

impl NodeSet {
    /// The node with key `key`: its `id`, or `r{row}c{col}` in a file with only `row, col`.
    pub fn find(&self, key: &str) -> Option<usize> {
        if self.has_id {
            return self.nodes.find(key);
        }
        let (r, c) = key.strip_prefix('r')?.split_once('c')?;
        let p = (r.parse::<i64>().ok()?, c.parse::<i64>().ok()?);
        // Only the key as the file's place writes it (`r01c2` is not `r1c2`).
        (format!("r{}c{}", p.0, p.1) == key)
            .then(|| self.grid.get(&p))
            .flatten()
    }
}

/// Largest grid row or column number (a grid of a billion rows is not a circle grid; the bound
/// also keeps `row + 1` from overflowing).
pub const MAX_GRID_INDEX: i64 = 1_000_000_000;

/// A grid row or column number as a nodes row is read (trimmed, a whole number within
/// ±[`MAX_GRID_INDEX`]), `None` when it does not read.
pub fn grid_number(raw: &str) -> Option<i64> {
    raw.trim()
        .parse::<i64>()
        .ok()
        .filter(|v| (-MAX_GRID_INDEX..=MAX_GRID_INDEX).contains(v))
}

fn integer(
    t: &Table,
    line: u64,
    r: &csv::StringRecord,
    col: usize,
) -> std::result::Result<i64, RejectedRow> {
    let raw = r.get(col).unwrap_or("").trim();
    match raw.parse::<i64>() {
        Ok(v) if (-MAX_GRID_INDEX..=MAX_GRID_INDEX).contains(&v) => Ok(v),
        Ok(v) => Err(t.reject(
            line,
            Some(col),
            None,
            format!("grid row or column {v} is beyond ±{MAX_GRID_INDEX}"),
        )),
        Err(_) => Err(t.reject(
            line,
            Some(col),
            None,
            format!(
                "expected a whole number (grid row or column), found `{}`",
                crate::error::clip(raw)
            ),
        )),
    }
}

/// Read a nodes file (see the module notes), in chunks on every core.
pub fn read_nodes(path: &Path) -> Result<NodeSet> {
    let stream = stream_table(path, NODES_WHAT)?;
    let reader = NodeReader::new(&stream.table)?;
    let mut set = reader.empty_set(&stream.table);
    let mut places = Vec::new();
    let t = stream.for_each_batch(
        |t, line, r| reader.parse(t, line, r),
        |t, rows| {
            for row in rows {
                reader.take(t, row, &mut set, &mut places);
            }
            Ok(())
        },
    )?;
    reader.finish(&t, &mut set, places);
    Ok(set)
}

pub(crate) const NODES_WHAT: &str = "row, col (or id), X, Y, x, y[, z]";

/// Interpret a table read whole as a nodes file.
pub fn nodes_from_table(t: Table) -> Result<NodeSet> {
    let reader = NodeReader::new(&t)?;
    let mut set = reader.empty_set(&t);
    let mut places = Vec::new();
    for (line, r) in &t.rows {
        let row = reader.parse(&t, *line, r);
        reader.take(&t, row, &mut set, &mut places);
    }
    reader.finish(&t, &mut set, places);
    Ok(set)
}

/// One nodes-file row as parsed on a worker.
pub enum NodeRow {
    /// A node, at its place in the grid when the file has `row, col`.
    Node(Option<(i64, i64)>, Node),
    /// A rejected row, its place when that could be read.
    Rejected(Option<(i64, i64)>, u64, RejectedRow),
}

/// The columns of a nodes file, from its header.
pub struct NodeReader {
    cols: BTreeMap<NodeColumn, usize>,
    ignored: Vec<String>,
    has_grid: bool,
    has_id: bool,
}

impl NodeReader {
    /// The columns of the nodes table `t`, or why its header is not one of a nodes file.
    pub fn new(t: &Table) -> Result<NodeReader> {
        let mut cols: BTreeMap<NodeColumn, usize> = BTreeMap::new();
        let mut ignored = Vec::new();
        for (i, name) in t.header.iter().enumerate() {
            match node_role(name) {
                Some(role) if cols.insert(role, i).is_some() => {
                    return Err(t.header_error(
                        Some(i),
                        format!(
                            "column `{name}` has the same role as an earlier column ({role:?})"
                        ),
                    ));
                }
                Some(_) => {}
                None => ignored.push(name.clone()),
            }
        }
        let has_grid = cols.contains_key(&NodeColumn::Row) && cols.contains_key(&NodeColumn::Col);
        let has_id = cols.contains_key(&NodeColumn::Id);
        if !has_grid && !has_id {
            return Err(t.header_error(
                None,
                format!(
                    "a nodes file needs `row, col` (regular grid) or `id` (with --elements); found: {}",
                    t.header.join(", ")
                ),
            ));
        }
        for (role, name) in [
            (NodeColumn::RefX, "X"),
            (NodeColumn::RefY, "Y"),
            (NodeColumn::X, "x"),
            (NodeColumn::Y, "y"),
        ] {
            if !cols.contains_key(&role) {
                return Err(t.header_error(
                    None,
                    format!(
                    "missing column `{name}`: a nodes file needs X, Y (blank, upper case) and x, y \
                     (formed part, lower case), z optional; found: {}",
                    t.header.join(", ")
                ),
                ));
            }
        }
        Ok(NodeReader {
            cols,
            ignored,
            has_grid,
            has_id,
        })
    }

    pub(crate) fn empty_set(&self, t: &Table) -> NodeSet {
        NodeSet {
            source: t.source.clone(),
            nodes: Nodes::default(),
            grid: Places::default(),
            has_grid: self.has_grid,
            has_id: self.has_id,
            three_d: self.cols.contains_key(&NodeColumn::Z),
            header_line: t.header_line,
            rejected: Vec::new(),
            rejected_places: BTreeMap::new(),
            ignored_columns: self.ignored.clone(),
        }
    }

    /// Whether the file has `row, col` and no `id`: a regular grid whose nodes are found by
    /// their place alone.
    pub fn places_only(&self) -> bool {
        self.has_grid && !self.has_id
    }

    /// The column of the grid row, when the file has one.
    pub fn row_column(&self) -> Option<usize> {
        self.cols.get(&NodeColumn::Row).copied()
    }

    /// One row, alone.
    pub fn parse(&self, t: &Table, line: u64, r: &csv::StringRecord) -> NodeRow {
        let cols = &self.cols;
        let place = if self.has_grid {
            let p = integer(t, line, r, cols[&NodeColumn::Row])
                .and_then(|row| integer(t, line, r, cols[&NodeColumn::Col]).map(|c| (row, c)));
            match p {
                Ok(p) => Some(p),
                Err(e) => return NodeRow::Rejected(None, line, e),
            }
        } else {
            None
        };
        match read_node(t, line, r, cols, place) {
            Ok(node) => NodeRow::Node(place, node),
            Err(mut e) => {
                if let Some(p) = place {
                    e.id = Some(format!("r{}c{}", p.0, p.1));
                }
                if let Some(id) = cols.get(&NodeColumn::Id).and_then(|&c| r.get(c)) {
                    e.id = Some(id.trim().to_string())
                        .filter(|t| !t.is_empty())
                        .or(e.id);
                }
                NodeRow::Rejected(place, line, e)
            }
        }
    }

    /// Take one row in file order: a repeated id is rejected here (a repeated place of a file
    /// without ids in [`Self::finish`], where the places are sorted).
    pub(crate) fn take(&self, t: &Table, row: NodeRow, set: &mut NodeSet, places: &mut Vec<Place>) {
        match row {
            NodeRow::Rejected(place, line, e) => {
                if let Some(p) = place {
                    set.rejected_places.insert(p, line);
                }
                set.rejected.push(e);
            }
            NodeRow::Node(place, node) => {
                if self.has_id {
                    if let Some(i) = set.nodes.find(&node.key) {
                        let first = set.nodes.line(i);
                        set.rejected
                            .push(duplicate(t, &self.cols, &node.key, node.line, first));
                        return;
                    }
                }
                let i = set.nodes.push(&node, self.has_id);
                if let Some(p) = place {
                    places.push(Place::new(p, i));
                }
            }
        }
    }

    /// Sort the places: of nodes at one place, the last read stands in a file with ids (its
    /// id tells them apart), and the first in a file without (the others are rejected as
    /// repeated keys). Rejected rows in file order.
    pub(crate) fn finish(&self, t: &Table, set: &mut NodeSet, mut places: Vec<Place>) {
        // In order of place, then of node (file order): compacted where it lies.
        places.sort_unstable();
        let mut keep = vec![true; set.nodes.len()];
        let mut repeats = false;
        let mut kept = 0;
        for k in 0..places.len() {
            let p = places[k];
            let next_same = places.get(k + 1).is_some_and(|q| q.at() == p.at());
            let first_of = k == 0 || places[k - 1].at() != p.at();
            if self.has_id {
                if !next_same {
                    places[kept] = p;
                    kept += 1;
                }
            } else if first_of {
                places[kept] = p;
                kept += 1;
            } else {
                let first = set.nodes.line(places[kept - 1].node as usize);
                let line = set.nodes.line(p.node as usize);
                let key = format!("r{}c{}", p.row, p.col);
                set.rejected
                    .push(duplicate(t, &self.cols, &key, line, first));
                keep[p.node as usize] = false;
                repeats = true;
            }
        }
        places.truncate(kept);
        if repeats {
            let to = set.nodes.retain(&keep);
            for p in &mut places {
                p.node = to[p.node as usize].expect("a kept node") as u32;
            }
        }
        set.grid = Places { at: places };
        set.rejected.sort_by_key(|r| r.location.line);
    }
}

fn duplicate(
    t: &Table,
    cols: &BTreeMap<NodeColumn, usize>,
    key: &str,
    line: u64,
    first: u64,
) -> RejectedRow {
    let col = cols
        .get(&NodeColumn::Id)
        .or(cols.get(&NodeColumn::Row))
        .copied();
    t.reject(
        line,
        col,
        Some(key.to_string()),
        format!("node `{key}` appears twice (first on line {first}): keys must be unique"),
    )
}

fn read_node(
    t: &Table,
    line: u64,
    r: &csv::StringRecord,
    cols: &BTreeMap<NodeColumn, usize>,
    place: Option<(i64, i64)>,
) -> std::result::Result<Node, RejectedRow> {
    t.check_len(line, r)?;
    let key = match (cols.get(&NodeColumn::Id), place) {
        (Some(&c), _) => t.text(line, r, c)?,
        // A regular grid's node is found by its place: it keeps no key.
        (None, Some(_)) => String::new(),
        (None, None) => unreachable!("the header check requires row, col or id"),
    };
    let num = |role: NodeColumn| t.number(line, r, cols[&role]);
    let z = match cols.get(&NodeColumn::Z) {
        Some(_) => num(NodeColumn::Z)?,
        None => 0.0,
    };
    Ok(Node {
        key,
        line,
        reference: Vector2::new(num(NodeColumn::RefX)?, num(NodeColumn::RefY)?),
        deformed: Vector3::new(num(NodeColumn::X)?, num(NodeColumn::Y)?, z),
    })
}

/// The cells of a regular grid, a few grid rows at a time, in order of (row, col): the cell
/// `r{row}c{col}` has the corners `(row, col)`, `(row, col+1)`, `(row+1, col+1)`,
/// `(row+1, col)`, in order around it. A cell with all four read is evaluated; a cell with
/// three or four corners in the file but one missing or rejected is rejected with that
/// reason; a cell with fewer lies outside the grid's edge.
pub struct Cells<'a> {
    set: &'a NodeSet,
    /// The grid rows that may hold a cell, sorted.
    rows: Vec<i64>,
    next: usize,
}

impl<'a> Cells<'a> {
    /// The cells of `set`'s grid.
    pub fn new(set: &'a NodeSet) -> Self {
        let mut rows: Vec<i64> = Vec::new();
        let mut add = |r: i64| {
            for cell_row in [r - 1, r] {
                if rows.last() != Some(&cell_row) {
                    rows.push(cell_row);
                }
            }
        };
        for r in set.grid.rows() {
            add(r);
        }
        for &(r, _) in set.rejected_places.keys() {
            add(r);
        }
        rows.sort_unstable();
        rows.dedup();
        Cells { set, rows, next: 0 }
    }

    /// Only the cells of grid rows `lo..=hi` (either end open when `None`).
    pub fn within(mut self, lo: Option<i64>, hi: Option<i64>) -> Self {
        self.rows
            .retain(|&r| lo.is_none_or(|lo| r >= lo) && hi.is_none_or(|hi| r <= hi));
        self
    }

    /// The cells of the next grid rows, at least `want` of them unless the grid ends, and the
    /// cells rejected among them; `None` after the last row. Rows are cut into cells a few at
    /// a time on every core.
    pub fn next_cells(&mut self, want: usize) -> Option<(Vec<Element>, Vec<RejectedRow>)> {
        use rayon::prelude::*;
        if self.next >= self.rows.len() {
            return None;
        }
        let (mut cells, mut rejected) = (Vec::new(), Vec::new());
        let group = 4 * rayon::current_num_threads().max(1);
        while self.next < self.rows.len() && cells.len() + rejected.len() < want {
            let rows = &self.rows[self.next..(self.next + group).min(self.rows.len())];
            self.next += rows.len();
            let cut: Vec<(Vec<Element>, Vec<RejectedRow>)> = rows
                .par_iter()
                .map(|&row| {
                    let (mut c, mut r) = (Vec::new(), Vec::new());
                    self.row_cells(row, &mut c, &mut r);
                    (c, r)
                })
                .collect();
            for (c, r) in cut {
                cells.extend(c);
                rejected.extend(r);
            }
        }
        Some((cells, rejected))
    }

    fn row_cells(&self, row: i64, cells: &mut Vec<Element>, rejected: &mut Vec<RejectedRow>) {
        let set = self.set;
        let mut cols: Vec<i64> = Vec::new();
        for r in [row, row + 1] {
            let rejected_cols = set
                .rejected_places
                .range((r, i64::MIN)..=(r, i64::MAX))
                .map(|(p, _)| p.1);
            for c in set.grid.row_cols(r).chain(rejected_cols) {
                cols.extend([c - 1, c]);
            }
        }
        cols.sort_unstable();
        cols.dedup();
        for col in cols {
            cell((row, col), set, cells, rejected);
        }
    }
}

/// The cell at `(row, col)`: evaluated, rejected, or outside the grid (see [`Cells`]).
fn cell(at: (i64, i64), set: &NodeSet, cells: &mut Vec<Element>, rejected: &mut Vec<RejectedRow>) {
    let (r, c) = at;
    let corners = [(r, c), (r, c + 1), (r + 1, c + 1), (r + 1, c)];
    let found: [Option<usize>; 4] = corners.map(|p| set.grid.get(&p));
    if found.iter().all(Option::is_none) {
        return; // every corner rejected: the node rows already say why
    }
    let id = format!("r{r}c{c}");
    let line = found
        .iter()
        .flatten()
        .map(|&i| set.nodes.line(i))
        .min()
        .unwrap_or(0);
    if let [Some(a), Some(b), Some(c), Some(d)] = found {
        cells.push(Element {
            id,
            line,
            nodes: vec![a, b, c, d],
        });
        return;
    }
    let missing: Vec<String> = corners
        .iter()
        .zip(&found)
        .filter(|(_, f)| f.is_none())
        .map(|(p, _)| match set.rejected_places.get(p) {
            Some(l) => format!("r{}c{} (rejected, line {l})", p.0, p.1),
            None => format!("r{}c{}", p.0, p.1),
        })
        .collect();
    let known = corners
        .iter()
        .zip(&found)
        .filter(|(p, f)| f.is_some() || set.rejected_places.contains_key(p))
        .count();
    if known >= 3 {
        rejected.push(RejectedRow {
            location: Location::file(&set.source).at_line(line),
            reason: format!(
                "grid cell {id} not evaluated: its corner node {} is missing",
                missing.join(", ")
            ),
            id: Some(id),
        });
    }
    // Fewer than three known corners: the cell lies outside the grid's edge.
}

/// Every cell of a regular grid at once, and the cells rejected (see [`Cells`]).
pub fn grid_cells(set: &NodeSet) -> (Vec<Element>, Vec<RejectedRow>) {
    let (mut cells, mut rejected) = (Vec::new(), Vec::new());
    let mut all = Cells::new(set);
    while let Some((c, r)) = all.next_cells(usize::MAX) {
        cells.extend(c);
        rejected.extend(r);
    }
    (cells, rejected)
}

/// The columns of an elements file (`id, n1, n2, n3[, n4]`) and the nodes it names: each row
/// read alone ([`Self::parse`], on any thread), then its id checked in file order
/// ([`UniqueIds`]).
pub struct ElementReader<'a> {
    cols: Vec<usize>,
    n4: Option<usize>,
    nodes: &'a NodeSet,
    rejected_keys: HashMap<String, u64>,
}

impl<'a> ElementReader<'a> {
    /// The columns of the elements table `t`, or why its header is not one of an elements file.
    pub fn new(t: &Table, nodes: &'a NodeSet) -> Result<Self> {
        let lower: Vec<String> = t.header.iter().map(|h| h.to_ascii_lowercase()).collect();
        let find = |n: &str| lower.iter().position(|c| c == n);
        let mut cols = Vec::new();
        for name in ["id", "n1", "n2", "n3"] {
            cols.push(find(name).ok_or_else(|| t.header_error(None, format!(
                "missing column `{name}`: an elements file needs id, n1, n2, n3 and optionally n4; found: {}",
                t.header.join(", ")
            )))?);
        }
        let rejected_keys = nodes
            .rejected
            .iter()
            .filter_map(|r| Some((r.id.clone()?, r.location.line?)))
            .collect();
        Ok(ElementReader {
            cols,
            n4: find("n4"),
            nodes,
            rejected_keys,
        })
    }

    /// One row, alone: an element, or the row rejected with its line and column.
    pub fn parse(
        &self,
        t: &Table,
        line: u64,
        r: &csv::StringRecord,
    ) -> std::result::Result<Element, RejectedRow> {
        t.check_len(line, r)?;
        let id = t.text(line, r, self.cols[0])?;
        let mut node_cols = self.cols[1..].to_vec();
        if let Some(c) = self.n4 {
            if r.get(c).is_some_and(|v| !v.trim().is_empty()) {
                node_cols.push(c);
            }
        }
        let mut idx = Vec::new();
        for c in node_cols {
            let key = t.text(line, r, c).map_err(|mut e| {
                e.id = Some(id.clone());
                e
            })?;
            let source = self.nodes.source.display();
            let why = match self.rejected_keys.get(&key) {
                Some(l) => format!("node `{key}` was rejected (line {l} of {source})"),
                None => format!("node `{key}` is not in {source}"),
            };
            idx.push(
                self.nodes
                    .find(&key)
                    .ok_or_else(|| t.reject(line, Some(c), Some(id.clone()), why))?,
            );
        }
        Ok(Element {
            id,
            line,
            nodes: idx,
        })
    }

    /// The column of the id (0-based).
    pub fn id_column(&self) -> usize {
        self.cols[0]
    }
}

/// The element ids seen, by their 64-bit hash, with the line of each (about 20 bytes an
/// element; two different ids share a hash with probability about n²/2⁶⁵, 3·10⁻⁸ at a
/// million, as [`crate::stream`]'s ids).
#[derive(Default)]
pub struct UniqueIds(HashMap<u64, u64>);

impl UniqueIds {
    /// The element, or its row rejected when its id was seen before (on an earlier line).
    pub fn check(
        &mut self,
        t: &Table,
        id_column: usize,
        e: Element,
    ) -> std::result::Result<Element, RejectedRow> {
        use std::hash::{Hash, Hasher};
        let mut h = std::hash::DefaultHasher::new();
        e.id.hash(&mut h);
        match self.0.entry(h.finish()) {
            std::collections::hash_map::Entry::Vacant(v) => {
                v.insert(e.line);
                Ok(e)
            }
            std::collections::hash_map::Entry::Occupied(o) => Err(t.reject(
                e.line,
                Some(id_column),
                Some(e.id.clone()),
                format!(
                    "element `{}` appears twice (first on line {}): ids must be unique",
                    e.id,
                    o.get()
                ),
            )),
        }
    }
}

/// Interpret a table read whole as an elements file: the elements and the rows rejected.
pub fn elements_from_table(t: &Table, nodes: &NodeSet) -> Result<(Vec<Element>, Vec<RejectedRow>)> {
    let reader = ElementReader::new(t, nodes)?;
    let mut ids = UniqueIds::default();
    let (mut elements, mut rejected) = (Vec::new(), Vec::new());
    for (line, r) in &t.rows {
        match reader
            .parse(t, *line, r)
            .and_then(|e| ids.check(t, reader.id_column(), e))
        {
            Ok(e) => elements.push(e),
            Err(e) => rejected.push(e),
        }
    }
    Ok((elements, rejected))
}

/// What an elements file is expected to hold (for the message of an empty file).
pub const ELEMENTS_WHAT: &str = "id, n1, n2, n3[, n4]";

/// The nodes file has `id` but no `row, col` and no elements file was given.
pub fn needs_elements(set: &NodeSet) -> Error {
    Error::input(
        Location::file(&set.source).at_line(set.header_line),
        "the nodes file has `id` but no `row, col`: give --elements ELEMENTS.csv (id, n1, n2, n3[, n4])",
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::table::read_table_from;

    fn table(text: &str, name: &str) -> Table {
        read_table_from(text.as_bytes(), Path::new(name), "test").unwrap()
    }

    fn nodes(text: &str) -> Result<NodeSet> {
        nodes_from_table(table(text, "n.csv"))
    }

    /// A 3 × 3 grid of nodes, unit pitch, stretched 10 % in x; `skip` leaves a node out and
    /// `bad` writes `abc` for its x.
    fn grid_text(skip: Option<(i64, i64)>, bad: Option<(i64, i64)>) -> String {
        let mut s = String::from("# a comment line\nrow,col,X,Y,x,y\n");
        for r in 0..3 {
            for c in 0..3 {
                if skip == Some((r, c)) {
                    continue;
                }
                let x = if bad == Some((r, c)) {
                    "abc".to_string()
                } else {
                    format!("{}", 1.1 * c as f64)
                };
                s += &format!("{r},{c},{c},{r},{x},{r}\n");
            }
        }
        s
    }

    #[test]
    fn regular_grid_gives_its_cells() {
        let set = nodes(&grid_text(None, None)).unwrap();
        assert_eq!(set.nodes.len(), 9);
        let (cells, rejected) = grid_cells(&set);
        assert!(rejected.is_empty(), "{rejected:?}");
        let ids: Vec<&str> = cells.iter().map(|c| c.id.as_str()).collect();
        assert_eq!(ids, ["r0c0", "r0c1", "r1c0", "r1c1"]);
        assert_eq!(cells[0].line, 3);
    }

    #[test]
    fn missing_node_rejects_the_four_cells_around_it() {
        let set = nodes(&grid_text(Some((1, 1)), None)).unwrap();
        let (cells, rejected) = grid_cells(&set);
        assert!(cells.is_empty());
        assert_eq!(rejected.len(), 4);
        assert!(
            rejected
                .iter()
                .all(|r| r.reason.contains("corner node r1c1 is missing")),
            "{rejected:?}"
        );
    }

    #[test]
    fn bad_node_is_rejected_with_line_and_column_and_its_cells_say_why() {
        let set = nodes(&grid_text(None, Some((0, 0)))).unwrap();
        assert_eq!(set.rejected.len(), 1);
        let r = set.rejected[0].to_string();
        assert!(
            r.starts_with("n.csv:3:5 (column `x`)") && r.contains("`abc`"),
            "{r}"
        );
        let (cells, rejected) = grid_cells(&set);
        assert_eq!(cells.len(), 3);
        assert_eq!(rejected.len(), 1);
        assert!(
            rejected[0].reason.contains("r0c0 (rejected, line 3)"),
            "{rejected:?}"
        );
    }

    #[test]
    fn header_problems_reject_the_file() {
        // `x0` is an accepted name for the blank position X.
        assert!(nodes("row,col,x0,Y,x,y\n0,0,0,0,0,0\n").is_ok());
        let e = nodes("row,col,X,x,y\n0,0,0,0,0\n").unwrap_err().to_string();
        assert!(
            e.contains("n.csv:1") && e.contains("missing column `Y`"),
            "{e}"
        );
        let e = nodes("name,X,Y,x,y\nA,0,0,0,0\n").unwrap_err().to_string();
        assert!(e.contains("needs `row, col`"), "{e}");
        let e = nodes("id,X,x0,Y,x,y\nA,0,0,0,0,0\n")
            .unwrap_err()
            .to_string();
        assert!(
            e.contains("n.csv:1:3 (column `x0`)") && e.contains("same role"),
            "{e}"
        );
    }

    #[test]
    fn semicolon_dialect_and_decimal_comma() {
        let set = nodes("id;X;Y;x;y;z\nA;1,5;2;1,6;2,1;0,25\n").unwrap();
        assert!(set.three_d);
        assert!((set.nodes.reference(0).x - 1.5).abs() < 1e-12);
        assert!((set.nodes.deformed(0).z - 0.25).abs() < 1e-12);
    }

    #[test]
    fn duplicate_node_is_rejected() {
        let set = nodes("id,X,Y,x,y\nA,0,0,0,0\nA,1,0,1,0\n").unwrap();
        assert_eq!(set.nodes.len(), 1);
        assert!(
            set.rejected[0].to_string().contains("n.csv:3:1")
                && set.rejected[0].reason.contains("appears twice")
        );
    }

    // A file without ids: a repeated place is a repeated key (`r0c0`), rejected at the later
    // line; the first node stands and the grid around it is whole.
    #[test]
    fn repeated_place_is_rejected_and_the_first_node_stands() {
        let set = nodes(
            "row,col,X,Y,x,y\n0,0,0,0,0,0\n0,1,1,0,1.1,0\n0,0,5,5,5,5\n1,0,0,1,0,1\n1,1,1,1,1.1,1\n",
        )
        .unwrap();
        assert_eq!(set.nodes.len(), 4);
        assert_eq!(set.rejected.len(), 1);
        let r = set.rejected[0].to_string();
        assert!(
            r.starts_with("n.csv:4:1 (column `row`)")
                && r.contains("node `r0c0` appears twice (first on line 2)"),
            "{r}"
        );
        let (cells, rejected) = grid_cells(&set);
        assert!(rejected.is_empty(), "{rejected:?}");
        assert_eq!(cells.len(), 1);
        let first = set.nodes.reference(cells[0].nodes[0]);
        assert!(first.norm() < 1e-12, "the node of line 2 at r0c0: {first}");
        assert_eq!(set.find("r1c1"), Some(cells[0].nodes[2]));
        assert_eq!(set.find("r01c1"), None);
    }

    #[test]
    fn elements_refer_to_nodes() {
        let set = nodes("id,X,Y,x,y\nA,0,0,0,0\nB,1,0,1,0\nC,0,1,0,1\nD,1,1,abc,1\n").unwrap();
        let t = table(
            "id,n1,n2,n3,n4\nT1,A,B,C,\nT2,A,B,Z,\nT3,A,B,D,\nT1,A,C,B,\n",
            "e.csv",
        );
        let (elements, rejected) = elements_from_table(&t, &set).unwrap();
        assert_eq!(elements.len(), 1);
        assert_eq!(elements[0].nodes, vec![0, 1, 2]);
        let msgs: Vec<String> = rejected.iter().map(ToString::to_string).collect();
        assert!(
            msgs[0].starts_with("e.csv:3:4 (column `n3`)")
                && msgs[0].contains("`Z` is not in n.csv"),
            "{msgs:?}"
        );
        assert!(msgs[1].contains("`D` was rejected (line 5"), "{msgs:?}");
        assert!(
            msgs[2].contains("e.csv:5:1") && msgs[2].contains("appears twice"),
            "{msgs:?}"
        );
    }
}
