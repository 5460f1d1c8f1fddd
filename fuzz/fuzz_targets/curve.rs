//! Limit curve TOML, and a query of a curve that parses.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::limit::LimitCurve;
use neckline_core::strain::TrueStrain;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    if let Ok(c) = LimitCurve::parse(text, Path::new("c.toml")) {
        for m in [-0.5, -0.1, 0.0, 0.1, 0.5] {
            let _ = c.limit_major_eng(TrueStrain(m));
        }
    }
});
