//! A regular grid's nodes file read a few grid rows at a time.
//!
//! The cells of grid row `k` need only the nodes of rows `k` and `k + 1`. When a file's rows
//! come in order of grid row (as measuring systems write them), a row is complete as soon as a
//! later one starts, so its cells can be judged and its nodes let go: memory holds two grid
//! rows and a batch of the file, whatever the grid's size. [`rows_in_order`] tells such a file
//! (reading it once more, only its `row, col` fields); any other is read whole
//! ([`super::read::read_nodes`]). Both give the same cells, rejected rows and lines: each
//! finished row goes through the same checks ([`NodeReader`]), and the cells are those of
//! [`Cells`] on the rows held.

use super::mesh::{Element, Node};
use super::read::{grid_number, Cells, NodeReader, NodeRow, NodeSet, Place, NODES_WHAT};
use crate::error::{Error, Location, Result};
use crate::measure::RejectedRow;
use crate::table::{stream_table, Table, TableStream};
use std::collections::BTreeMap;
use std::io::BufRead;
use std::path::Path;

/// Whether the nodes file at `path` can be read by grid rows ([`GridRows`]): it has `row, col`
/// and no `id` (with ids, a key repeated anywhere in the file is refused, which needs every
/// key), it can be read again (a regular file: not standard input, a pipe or a device), it
/// reads as a table, and the grid row of each row whose place reads is at least that of every
/// row before it.
pub fn rows_in_order(path: &Path) -> bool {
    if path.as_os_str() == "-" || !std::fs::metadata(path).is_ok_and(|m| m.is_file()) {
        return false;
    }
    let Ok(stream) = stream_table(path, NODES_WHAT) else {
        return false;
    };
    let Ok(reader) = NodeReader::new(&stream.table) else {
        return false;
    };
    if !reader.places_only() {
        return false;
    }
    let Some(col) = reader.row_column() else {
        return false;
    };
    let mut top = i64::MIN;
    let mut ordered = true;
    // A row whose place does not read is rejected without a place and holds no grid row.
    let read = stream.for_each_field(
        col,
        |raw| raw.and_then(grid_number),
        |rows| {
            for row in rows.into_iter().flatten() {
                ordered &= row >= top;
                top = top.max(row);
            }
            Ok(())
        },
    );
    read.is_ok() && ordered
}

/// A nodes file being read by grid rows (see the module notes).
pub struct GridRows<R: std::io::Read> {
    stream: TableStream<R>,
    reader: NodeReader,
    head: NodeSet,
}

/// Open the nodes file at `path` to read it by grid rows, its header read; the file must have
/// `row, col` and no `id` ([`rows_in_order`] tells).
pub fn grid_rows(path: &Path) -> Result<GridRows<impl BufRead + Send>> {
    let stream = stream_table(path, NODES_WHAT)?;
    let reader = NodeReader::new(&stream.table)?;
    if !reader.places_only() {
        return Err(Error::Usage(format!(
            "{}: only a file with `row, col` and no `id` is read by grid rows",
            path.display()
        )));
    }
    let head = reader.empty_set(&stream.table);
    Ok(GridRows {
        stream,
        reader,
        head,
    })
}

impl<R: BufRead + Send> GridRows<R> {
    /// The file as its header tells it: no nodes yet.
    pub fn head(&self) -> &NodeSet {
        &self.head
    }

    /// Read every row, giving `each` the cells of a few grid rows at a time (about `want`, in
    /// order of `(row, col)`), the nodes held that they name, and the cells rejected among them.
    /// Gives back the file's head with every node row rejected, in order of line.
    pub fn for_each_cells(
        self,
        want: usize,
        mut each: impl FnMut(&NodeSet, &[Element], Vec<RejectedRow>) -> Result<()>,
    ) -> Result<NodeSet> {
        let GridRows {
            stream,
            reader,
            head,
        } = self;
        let mut w = Window {
            reader: &reader,
            head,
            pending: Vec::new(),
            top: None,
            finished: Vec::new(),
            finished_rejected: BTreeMap::new(),
            next_cell_row: None,
        };
        let t = stream.for_each_batch(
            |t, line, r| reader.parse(t, line, r),
            |t, rows| {
                for row in rows {
                    w.read(t, row)?;
                }
                let Some(top) = w.top else { return Ok(()) };
                w.finish_below(t, Some(top));
                w.judge_up_to(t, Some(top - 2), want, &mut each)
            },
        )?;
        w.finish_below(&t, None);
        w.judge_up_to(&t, None, want, &mut each)?;
        let mut head = w.head;
        head.rejected.sort_by_key(|r| r.location.line);
        Ok(head)
    }
}

/// The rows held: rows of the last grid row read (which may go on), the nodes of finished
/// rows not yet needed by every cell, and where the next cells start.
struct Window<'a> {
    reader: &'a NodeReader,
    /// The file's head, gathering every rejected node row.
    head: NodeSet,
    /// Rows read whose grid row is not known to be complete, in file order.
    pending: Vec<NodeRow>,
    /// The highest grid row read.
    top: Option<i64>,
    /// Accepted nodes of complete grid rows, sorted by place, one a place.
    finished: Vec<((i64, i64), Node)>,
    /// Places of rejected rows of complete grid rows, with their lines.
    finished_rejected: BTreeMap<(i64, i64), u64>,
    /// The first grid row whose cells are not yet judged (`None`: none judged).
    next_cell_row: Option<i64>,
}

fn row_of(r: &NodeRow) -> Option<i64> {
    match r {
        NodeRow::Node(p, _) | NodeRow::Rejected(p, _, _) => p.map(|p| p.0),
    }
}

fn line_of(r: &NodeRow) -> u64 {
    match r {
        NodeRow::Node(_, n) => n.line,
        NodeRow::Rejected(_, line, _) => *line,
    }
}

impl Window<'_> {
    /// Take one row in file order: a row without a place is rejected at once; a row of a
    /// grid row below the highest read means the file changed since [`rows_in_order`] read it.
    fn read(&mut self, t: &Table, row: NodeRow) -> Result<()> {
        let Some(r) = row_of(&row) else {
            if let NodeRow::Rejected(_, _, e) = row {
                self.head.rejected.push(e);
            }
            return Ok(());
        };
        if let Some(top) = self.top.filter(|&top| r < top) {
            return Err(Error::input(
                Location::file(&t.source).at_line(line_of(&row)),
                format!(
                    "grid row {r} comes after row {top}: the file changed while it was read \
                     (its rows were in order of grid row when first read)"
                ),
            ));
        }
        self.top = Some(r);
        self.pending.push(row);
        Ok(())
    }

    /// Check the pending rows of grid rows below `top` (all when `None`), which are complete:
    /// repeated places and rejected rows as [`NodeReader`] finds them in a whole file.
    fn finish_below(&mut self, t: &Table, top: Option<i64>) {
        let n = match top {
            Some(top) => self
                .pending
                .partition_point(|r| row_of(r).is_some_and(|r| r < top)),
            None => self.pending.len(),
        };
        if n == 0 {
            return;
        }
        let mut rows = self.reader.empty_set(t);
        let mut places = Vec::new();
        for row in self.pending.drain(..n) {
            self.reader.take(t, row, &mut rows, &mut places);
        }
        self.reader.finish(t, &mut rows, places);
        self.head.rejected.append(&mut rows.rejected);
        self.finished_rejected.append(&mut rows.rejected_places);
        self.finished
            .extend(rows.grid.iter().map(|(p, i)| (p, rows.nodes.node(i))));
    }

    /// Judge the cells of grid rows up to `hi` (all when `None`) not yet judged, from the
    /// finished rows, then let go of the nodes no later cell needs.
    fn judge_up_to(
        &mut self,
        t: &Table,
        hi: Option<i64>,
        want: usize,
        each: &mut impl FnMut(&NodeSet, &[Element], Vec<RejectedRow>) -> Result<()>,
    ) -> Result<()> {
        if hi.is_some() && hi < self.next_cell_row {
            return Ok(());
        }
        let mut held = self.reader.empty_set(t);
        let mut places = Vec::with_capacity(self.finished.len());
        for (p, node) in &self.finished {
            places.push(Place::new(*p, held.nodes.push(node, false)));
        }
        held.rejected_places = self.finished_rejected.clone();
        self.reader.finish(t, &mut held, places);
        let mut cells = Cells::new(&held).within(self.next_cell_row, hi);
        while let Some((elements, rejected)) = cells.next_cells(want) {
            each(&held, &elements, rejected)?;
        }
        if let Some(hi) = hi {
            // Node rows up to `hi` serve no cell above `hi`.
            self.finished.retain(|(p, _)| p.0 > hi);
            self.finished_rejected = self.finished_rejected.split_off(&(hi + 1, i64::MIN));
            self.next_cell_row = Some(hi + 1);
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::grid::read::{grid_cells, read_nodes};
    use proptest::prelude::*;
    use std::io::Write;

    /// A cell as judged needs: its id, line and corners' positions.
    type Seen = (String, u64, Vec<[f64; 4]>);

    fn seen(set: &NodeSet, e: &Element) -> Seen {
        let corners = e
            .nodes
            .iter()
            .map(|&i| {
                let (r, d) = (set.nodes.reference(i), set.nodes.deformed(i));
                [r.x, r.y, d.x, d.y]
            })
            .collect();
        (e.id.clone(), e.line, corners)
    }

    fn file(text: &str) -> tempfile::NamedTempFile {
        let mut f = tempfile::NamedTempFile::new().unwrap();
        f.write_all(text.as_bytes()).unwrap();
        f
    }

    /// The whole-file reader's cells and rejected rows (node rows, then cells, each in order).
    fn whole(path: &Path) -> (Vec<Seen>, Vec<String>) {
        let set = read_nodes(path).unwrap();
        let (cells, rejected) = grid_cells(&set);
        let seen_cells = cells.iter().map(|e| seen(&set, e)).collect();
        let mut said: Vec<String> = set.rejected.iter().map(|r| r.to_string()).collect();
        said.extend(rejected.iter().map(|r| r.to_string()));
        (seen_cells, said)
    }

    /// The same by grid rows, and the most nodes held at once.
    fn by_rows(path: &Path, want: usize) -> (Vec<Seen>, Vec<String>, usize) {
        let (mut cells, mut cell_rejected, mut most) = (Vec::new(), Vec::new(), 0);
        let head = grid_rows(path)
            .unwrap()
            .for_each_cells(want, |set, elements, rejected| {
                most = most.max(set.nodes.len());
                cells.extend(elements.iter().map(|e| seen(set, e)));
                cell_rejected.extend(rejected.iter().map(|r| r.to_string()));
                Ok(())
            })
            .unwrap();
        let mut said: Vec<String> = head.rejected.iter().map(|r| r.to_string()).collect();
        said.extend(cell_rejected);
        (cells, said, most)
    }

    /// One node row of a grid file: its place, and what is written for it.
    #[derive(Debug, Clone)]
    enum Put {
        Node(i64, i64),
        BadX(i64, i64),
        BadRow(i64),
        Blank,
    }

    fn text_of(puts: &[Put]) -> String {
        let mut s = String::from("row,col,X,Y,x,y\n");
        for (k, p) in puts.iter().enumerate() {
            let stretch = 1.0 + (k % 7) as f64 * 0.01;
            match *p {
                Put::Node(r, c) => s.push_str(&format!(
                    "{r},{c},{},{},{},{}\n",
                    c as f64,
                    r as f64,
                    c as f64 * stretch,
                    r as f64
                )),
                Put::BadX(r, c) => s.push_str(&format!("{r},{c},{c},{r},abc,{r}\n")),
                Put::BadRow(c) => s.push_str(&format!("x,{c},0,0,0,0\n")),
                Put::Blank => s.push('\n'),
            }
        }
        s
    }

    /// Rows in order of grid row, with gaps, holes, repeated places, bad rows and blank lines.
    fn ordered_puts() -> impl Strategy<Value = Vec<Put>> {
        prop::collection::vec(
            (0i64..3, prop::collection::vec((0i64..8, 0u8..20), 0..10)),
            1..40,
        )
        .prop_map(|rows| {
            let mut puts = Vec::new();
            let mut r = 0;
            for (step, cols) in rows {
                r += step;
                for (c, kind) in cols {
                    puts.push(match kind {
                        0 => Put::BadX(r, c),
                        1 => Put::BadRow(c),
                        2 => Put::Blank,
                        _ => Put::Node(r, c),
                    });
                }
            }
            puts
        })
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(64))]

        /// Reference: the whole-file reader gives the same cells (ids, lines, corners, order)
        /// and the same rejected rows and cells, whatever the batch of cells asked for.
        #[test]
        fn by_rows_is_the_whole_file(puts in ordered_puts(), want in 1usize..50) {
            let text = text_of(&puts);
            let f = file(&text);
            prop_assume!(read_nodes(f.path()).is_ok());
            prop_assert!(rows_in_order(f.path()), "{text}");
            let (cells, said) = whole(f.path());
            let (rows_cells, rows_said, _) = by_rows(f.path(), want);
            prop_assert_eq!(cells, rows_cells, "{}", text);
            prop_assert_eq!(said, rows_said, "{}", text);
        }
    }

    #[test]
    fn a_large_grid_is_not_held_whole() {
        // 400 grid rows of 5 nodes; the test build reads the file in 1 KiB chunks.
        let puts: Vec<Put> = (0..400)
            .flat_map(|r| (0..5).map(move |c| Put::Node(r, c)))
            .collect();
        let f = file(&text_of(&puts));
        let (cells, said) = whole(f.path());
        let (rows_cells, rows_said, most) = by_rows(f.path(), 64);
        assert_eq!(cells.len(), 399 * 4);
        assert_eq!((cells, said), (rows_cells, rows_said));
        assert!(most < 500, "held {most} of 2000 nodes at once");
    }

    #[test]
    fn only_files_in_grid_row_order_without_ids_are_read_by_rows() {
        let ordered = file("row,col,X,Y,x,y\n0,0,0,0,0,0\n0,1,1,0,1,0\n1,0,0,1,0,1\n1,1,1,1,1,1\n");
        assert!(rows_in_order(ordered.path()));
        // Columns out of order within a row are fine; a row going back is not.
        let back = file("row,col,X,Y,x,y\n1,0,0,1,0,1\n0,0,0,0,0,0\n");
        assert!(!rows_in_order(back.path()));
        let keyed = file("id,row,col,X,Y,x,y\na,0,0,0,0,0,0\n");
        assert!(!rows_in_order(keyed.path()));
        assert!(!rows_in_order(Path::new("-")));
        // A pipe is read once: asking would take its rows (and opening it would wait).
        let dir = tempfile::tempdir().unwrap();
        let fifo = dir.path().join("nodes.csv");
        let made = std::process::Command::new("mkfifo").arg(&fifo).status();
        if made.is_ok_and(|s| s.success()) {
            assert!(!rows_in_order(&fifo));
        }
        assert!(!rows_in_order(Path::new("/nonexistent/nodes.csv")));
    }

    #[test]
    fn a_file_that_changed_since_it_was_checked_is_refused_at_its_line() {
        // As if the file were rewritten out of order after `rows_in_order` read it.
        let back = file("row,col,X,Y,x,y\n1,0,0,1,0,1\n1,1,1,1,1,1\n0,0,0,0,0,0\n");
        let err = grid_rows(back.path())
            .unwrap()
            .for_each_cells(8, |_, _, _| Ok(()))
            .unwrap_err()
            .to_string();
        assert!(
            err.contains(":4") && err.contains("grid row 0 comes after row 1"),
            "{err}"
        );
    }
}
