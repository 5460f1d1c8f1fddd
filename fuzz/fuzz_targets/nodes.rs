//! Grid node files: the table reader, the node checks and the cells of a row/col grid.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::grid::read::{grid_cells, nodes_from_table};
use neckline_core::table::read_table_from;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    if let Ok(t) = read_table_from(data, Path::new("n.csv"), "nodes") {
        if let Ok(set) = nodes_from_table(t) {
            let _ = grid_cells(&set);
        }
    }
});
