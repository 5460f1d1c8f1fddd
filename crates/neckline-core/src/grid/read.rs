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

use super::mesh::{Element, Mesh, Node};
use crate::error::{Error, Location, Result};
use crate::measure::RejectedRow;
use crate::table::{read_table, Table};
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
    pub nodes: Vec<Node>,
    /// `(row, col)` → index into `nodes`, when the file has `row, col`.
    pub grid: BTreeMap<(i64, i64), usize>,
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

/// Largest grid row or column number (a grid of a billion rows is not a circle grid; the bound
/// also keeps `row + 1` from overflowing).
pub const MAX_GRID_INDEX: i64 = 1_000_000_000;

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

/// Read a nodes file (see the module notes).
pub fn read_nodes(path: &Path) -> Result<NodeSet> {
    nodes_from_table(read_table(path, "row, col (or id), X, Y, x, y[, z]")?)
}

/// Interpret a table as a nodes file.
pub fn nodes_from_table(t: Table) -> Result<NodeSet> {
    let mut cols: BTreeMap<NodeColumn, usize> = BTreeMap::new();
    let mut ignored = Vec::new();
    for (i, name) in t.header.iter().enumerate() {
        match node_role(name) {
            Some(role) if cols.insert(role, i).is_some() => {
                return Err(t.header_error(
                    Some(i),
                    format!("column `{name}` has the same role as an earlier column ({role:?})"),
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
    let mut set = NodeSet {
        source: t.source.clone(),
        nodes: Vec::new(),
        grid: BTreeMap::new(),
        has_grid,
        has_id,
        three_d: cols.contains_key(&NodeColumn::Z),
        header_line: t.header_line,
        rejected: Vec::new(),
        rejected_places: BTreeMap::new(),
        ignored_columns: ignored,
    };
    let mut keys = HashMap::new();
    for (line, r) in &t.rows {
        let place = if has_grid {
            let p = integer(&t, *line, r, cols[&NodeColumn::Row])
                .and_then(|row| integer(&t, *line, r, cols[&NodeColumn::Col]).map(|c| (row, c)));
            match p {
                Ok(p) => Some(p),
                Err(e) => {
                    set.rejected.push(e);
                    continue;
                }
            }
        } else {
            None
        };
        match read_node(&t, *line, r, &cols, place) {
            Ok(node) => {
                if let Some(first) = keys.insert(node.key.clone(), *line) {
                    let col = cols
                        .get(&NodeColumn::Id)
                        .or(cols.get(&NodeColumn::Row))
                        .copied();
                    set.rejected.push(t.reject(
                        *line,
                        col,
                        Some(node.key.clone()),
                        format!(
                            "node `{}` appears twice (first on line {first}): keys must be unique",
                            node.key
                        ),
                    ));
                    keys.insert(node.key, first);
                    continue;
                }
                if let Some(p) = place {
                    set.grid.insert(p, set.nodes.len());
                }
                set.nodes.push(node);
            }
            Err(mut e) => {
                if let Some(p) = place {
                    set.rejected_places.insert(p, *line);
                    e.id = Some(format!("r{}c{}", p.0, p.1));
                }
                if let Some(id) = cols.get(&NodeColumn::Id).and_then(|&c| r.get(c)) {
                    e.id = Some(id.trim().to_string())
                        .filter(|t| !t.is_empty())
                        .or(e.id);
                }
                set.rejected.push(e);
            }
        }
    }
    Ok(set)
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
        (None, Some((row, col))) => format!("r{row}c{col}"),
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

/// The cells of a regular grid: the cell `r{row}c{col}` has the corners `(row, col)`,
/// `(row, col+1)`, `(row+1, col+1)`, `(row+1, col)`, in order around it. A cell with all four
/// read is evaluated; a cell with three or four corners in the file but one missing or
/// rejected is rejected with that reason; a cell with fewer lies outside the grid's edge.
pub fn grid_cells(set: &NodeSet) -> (Vec<Element>, Vec<RejectedRow>) {
    let corners = |(r, c): (i64, i64)| [(r, c), (r, c + 1), (r + 1, c + 1), (r + 1, c)];
    let mut candidates: std::collections::BTreeSet<(i64, i64)> = Default::default();
    for &(r, c) in set.grid.keys().chain(set.rejected_places.keys()) {
        for dr in [-1, 0] {
            for dc in [-1, 0] {
                candidates.insert((r + dr, c + dc));
            }
        }
    }
    let (mut cells, mut rejected) = (Vec::new(), Vec::new());
    for cell in candidates {
        let found: Vec<Option<usize>> = corners(cell)
            .iter()
            .map(|p| set.grid.get(p).copied())
            .collect();
        if found.iter().all(Option::is_none) {
            continue; // every corner rejected: the node rows already say why
        }
        let id = format!("r{}c{}", cell.0, cell.1);
        let line = found
            .iter()
            .flatten()
            .map(|&i| set.nodes[i].line)
            .min()
            .unwrap_or(0);
        let missing: Vec<String> = corners(cell)
            .iter()
            .zip(&found)
            .filter(|(_, f)| f.is_none())
            .map(|(p, _)| match set.rejected_places.get(p) {
                Some(l) => format!("r{}c{} (rejected, line {l})", p.0, p.1),
                None => format!("r{}c{}", p.0, p.1),
            })
            .collect();
        let known = corners(cell)
            .iter()
            .filter(|p| set.grid.contains_key(p) || set.rejected_places.contains_key(p))
            .count();
        if missing.is_empty() {
            cells.push(Element {
                id,
                line,
                nodes: found.into_iter().flatten().collect(),
            });
        } else if known >= 3 {
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
    (cells, rejected)
}

/// Read an elements file against the nodes read: rows `id, n1, n2, n3[, n4]`.
pub fn read_elements(path: &Path, nodes: &NodeSet) -> Result<(Vec<Element>, Vec<RejectedRow>)> {
    elements_from_table(&read_table(path, "id, n1, n2, n3[, n4]")?, nodes)
}

/// Interpret a table as an elements file.
pub fn elements_from_table(t: &Table, nodes: &NodeSet) -> Result<(Vec<Element>, Vec<RejectedRow>)> {
    let lower: Vec<String> = t.header.iter().map(|h| h.to_ascii_lowercase()).collect();
    let find = |n: &str| lower.iter().position(|c| c == n);
    let mut cols = Vec::new();
    for name in ["id", "n1", "n2", "n3"] {
        cols.push(find(name).ok_or_else(|| t.header_error(None, format!(
            "missing column `{name}`: an elements file needs id, n1, n2, n3 and optionally n4; found: {}",
            t.header.join(", ")
        )))?);
    }
    let n4 = find("n4");
    let index: HashMap<&str, usize> = nodes
        .nodes
        .iter()
        .enumerate()
        .map(|(i, n)| (n.key.as_str(), i))
        .collect();
    let rejected_keys: HashMap<String, u64> = nodes
        .rejected
        .iter()
        .filter_map(|r| Some((r.id.clone()?, r.location.line?)))
        .collect();
    let (mut elements, mut rejected) = (Vec::new(), Vec::new());
    let mut ids = HashMap::new();
    for (line, r) in &t.rows {
        match read_element(t, *line, r, &cols, n4, &index, &rejected_keys, nodes) {
            Ok(e) => {
                if let Some(first) = ids.insert(e.id.clone(), *line) {
                    rejected.push(t.reject(*line, Some(cols[0]), Some(e.id.clone()), format!(
                        "element `{}` appears twice (first on line {first}): ids must be unique", e.id
                    )));
                    ids.insert(e.id, first);
                } else {
                    elements.push(e);
                }
            }
            Err(e) => rejected.push(e),
        }
    }
    Ok((elements, rejected))
}

#[allow(clippy::too_many_arguments)]
fn read_element(
    t: &Table,
    line: u64,
    r: &csv::StringRecord,
    cols: &[usize],
    n4: Option<usize>,
    index: &HashMap<&str, usize>,
    rejected_keys: &HashMap<String, u64>,
    nodes: &NodeSet,
) -> std::result::Result<Element, RejectedRow> {
    t.check_len(line, r)?;
    let id = t.text(line, r, cols[0])?;
    let mut node_cols = cols[1..].to_vec();
    if let Some(c) = n4 {
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
        let why = match rejected_keys.get(&key) {
            Some(l) => format!(
                "node `{key}` was rejected (line {l} of {})",
                nodes.source.display()
            ),
            None => format!("node `{key}` is not in {}", nodes.source.display()),
        };
        idx.push(
            *index
                .get(key.as_str())
                .ok_or_else(|| t.reject(line, Some(c), Some(id.clone()), why))?,
        );
    }
    Ok(Element {
        id,
        line,
        nodes: idx,
    })
}

/// A mesh as read, with what was rejected on the way, node rows and elements apart (so that
/// messages can count each in its own words).
#[derive(Debug, Clone)]
pub struct MeshRead {
    /// The accepted nodes and elements.
    pub mesh: Mesh,
    /// Rejected rows of the nodes file.
    pub node_rows: Vec<RejectedRow>,
    /// Rejected elements: rows of the elements file, or grid cells missing a corner.
    pub elements: Vec<RejectedRow>,
    /// Header columns of the nodes file that were not recognised (ignored).
    pub ignored: Vec<String>,
}

/// Read the nodes and, if given, the elements, into a mesh plus every rejected row.
pub fn read_mesh(nodes: &Path, elements: Option<&Path>) -> Result<MeshRead> {
    let set = read_nodes(nodes)?;
    let (elems, rejected) = match elements {
        Some(p) => read_elements(p, &set)?,
        None if set.has_grid => grid_cells(&set),
        None => {
            return Err(Error::input(
                Location::file(nodes).at_line(set.header_line),
                "the nodes file has `id` but no `row, col`: give --elements ELEMENTS.csv (id, n1, n2, n3[, n4])",
            ))
        }
    };
    Ok(MeshRead {
        mesh: Mesh {
            nodes: set.nodes,
            elements: elems,
            three_d: set.three_d,
        },
        node_rows: set.rejected,
        elements: rejected,
        ignored: set.ignored_columns,
    })
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
        assert!((set.nodes[0].reference.x - 1.5).abs() < 1e-12);
        assert!((set.nodes[0].deformed.z - 0.25).abs() < 1e-12);
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
