//! The recovery study of `limit from-parts`: synthetic circles from a known curve
//! (Keeler-Brazier, steel 0.80 mm, n 0.20) at 50, 80 and 90 % safe circles, reading noise
//! 1.5 %, 300 circles, ten seeds each; the written (conservative) line and the 50 % line are
//! compared with the known curve at plane strain, for the class-balanced fit and for the
//! earlier unweighted one. See docs/methods.md.
//!
//! Run: `cargo bench --bench parts_recovery`.

use neckline_core::limit::from_parts::study;
use neckline_core::limit::from_parts::FitSettings;
use std::time::Instant;

const CIRCLES: usize = 300;
const SEEDS: u64 = 10;

fn main() {
    println!(
        "recovery at plane strain, fitted minus known, pp engineering major strain \
         ({CIRCLES} circles, {SEEDS} seeds, reading noise {} %)",
        100.0 * study::READING_NOISE
    );
    println!(
        "{:<11} {:>6}  {:>26}  {:>26}  {:>9}",
        "fit", "safe", "written line: mean (range)", "50 % line: mean (range)", "written<=0"
    );
    let t = Instant::now();
    for (name, balanced) in [("unweighted", false), ("balanced", true)] {
        let settings = FitSettings {
            balanced,
            ..FitSettings::default()
        };
        for share in study::SHARES {
            let runs: Vec<study::Deviation> = (0..SEEDS)
                .map(|seed| study::run(CIRCLES, share, seed, &settings).expect("a fit"))
                .collect();
            let written: Vec<f64> = runs.iter().map(|d| d.conservative).collect();
            let median: Vec<f64> = runs.iter().map(|d| d.median).collect();
            let (wm, wl, wh) = study::spread(&written);
            let (mm, ml, mh) = study::spread(&median);
            let below = written.iter().filter(|d| **d <= 0.0).count();
            println!(
                "{name:<11} {:>5.0}%  {wm:>+8.1} ({wl:>+6.1} to {wh:>+5.1})  \
                 {mm:>+8.1} ({ml:>+6.1} to {mh:>+5.1})  {below:>6}/{SEEDS}",
                100.0 * share
            );
        }
    }
    println!("({} fits in {:.2?})", 6 * SEEDS, t.elapsed());
}
