//! Grid element files, against a fixed set of four nodes.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::grid::read::{elements_from_table, nodes_from_table};
use neckline_core::table::read_table_from;
use std::path::Path;

const NODES: &[u8] = b"id,X,Y,x,y\nA,0,0,0,0\nB,1,0,1.1,0\nC,1,1,1.1,1\nD,0,1,0,1\n";

fuzz_target!(|data: &[u8]| {
    let nodes = read_table_from(NODES, Path::new("n.csv"), "nodes").unwrap();
    let set = nodes_from_table(nodes).unwrap();
    if let Ok(t) = read_table_from(data, Path::new("e.csv"), "elements") {
        let _ = elements_from_table(&t, &set);
    }
});
