//! points.csv as `compare` reads it.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::compare::read::read_results_from;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    let _ = read_results_from(data, Path::new("p.csv"));
});
