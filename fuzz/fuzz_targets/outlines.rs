//! Outline point files for `fit`: the table reader, the grouping and the robust fit.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::table::read_table_from;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    if let Ok(t) = read_table_from(data, Path::new("o.csv"), "outlines") {
        if let Ok((list, _)) = neckline_core::fit::outlines::outlines(&t) {
            for o in list {
                let _ = neckline_core::fit::fit_robust(&o.points);
            }
        }
    }
});
