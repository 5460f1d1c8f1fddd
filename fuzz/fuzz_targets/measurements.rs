//! Measurement files read into memory (`read_measurements_from`), then each accepted row
//! turned into strains.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::point::state_of;
use neckline_core::units::Lengths;
use neckline_core::measure::{read_measurements_from, ColumnMap};
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    let file = Path::new("m.csv");
    if let Ok(set) = read_measurements_from(data, file, &ColumnMap::default()) {
        let lengths = Lengths {
            unit: Default::default(),
            d0: Some(2.5),
            t0: Some(1.0),
        };
        for m in set.points {
            let _ = state_of(m, file, &lengths);
        }
    }
});
