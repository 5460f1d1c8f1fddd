//! Job file TOML.
#![no_main]
use libfuzzer_sys::fuzz_target;
use neckline_core::job::Job;
use std::path::Path;

fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        let _ = Job::parse(text, Path::new("job.toml"));
    }
});
