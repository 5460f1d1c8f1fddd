//! The recovery study of the press-shop fit: synthetic circles from a known curve at a chosen
//! share of safe circles, fitted, and the fitted lines compared with the known curve at plane
//! strain. Used by the unit tests and by `benches/parts_recovery.rs`.
//!
//! The evidence: true minor strain uniform over [−30, +15] %; the circle's actual distance from
//! the known curve `u` uniform over a window [`WINDOW`] wide placed so that a share `p` of it is
//! below the curve (`[−p·W, (1 − p)·W]`); the part is necked there when `u > 0` and split when
//! `u > 4 %`; the circle is then read with a normal reading error of [`READING_NOISE`] on both
//! strains. The known curve is Keeler-Brazier for steel, n = 0.20, 0.80 mm (Keeler & Brazier
//! 1977, NADDRG form, formula from memory as in `limits/`), FLC0 = 32.96 % engineering.

use super::{fit, FitSettings, PartCircle};
use crate::condition::Condition;
use crate::limit::LimitCurve;
use crate::strain::TrueStrain;
use std::path::Path;

/// Width of the window of actual distances from the curve, true major strain: 18 %.
pub const WINDOW: f64 = 0.18;
/// Standard deviation of the reading error, true strain: 1.5 % (a tape reads to ±1-2 %, from
/// memory).
pub const READING_NOISE: f64 = 0.015;
/// The shares of safe circles the study covers.
pub const SHARES: [f64; 3] = [0.5, 0.8, 0.9];

/// A small deterministic generator (xorshift64*, Vigna 2016, *An experimental exploration of
/// Marsaglia's xorshift generators, scrambled*, ACM TOMS 42), so a run is the same on every
/// machine.
#[derive(Debug, Clone)]
pub struct Rng(pub u64);

impl Rng {
    /// A seed made non-zero (xorshift stays at zero for ever).
    pub fn new(seed: u64) -> Self {
        Rng(seed ^ 0x9E37_79B9_7F4A_7C15)
    }
    /// Uniform on [0, 1).
    pub fn uniform(&mut self) -> f64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        (self.0.wrapping_mul(0x2545_F491_4F6C_DD1D) >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Uniform on [a, b).
    pub fn between(&mut self, a: f64, b: f64) -> f64 {
        a + (b - a) * self.uniform()
    }
    /// Standard normal (Box & Muller 1958).
    pub fn normal(&mut self) -> f64 {
        let u = self.uniform().max(1e-300);
        let v = self.uniform();
        (-2.0 * u.ln()).sqrt() * (std::f64::consts::TAU * v).cos()
    }
}

/// The known curve as true major strain at true minor strain.
pub fn known_curve() -> impl Fn(f64) -> f64 {
    let c = LimitCurve::parse(
        "name = \"kb\"\nsource = \"study\"\nstrain = \"engineering\"\n\
         [keeler_brazier]\nn = 0.20\nthickness_mm = 0.8\n",
        Path::new("study.toml"),
    )
    .expect("a valid Keeler-Brazier table");
    move |x| {
        c.limit_major_eng(TrueStrain(x))
            .and_then(|e| e.to_true())
            .map_or(f64::NAN, |t| t.value())
    }
}

/// `n` circles at safe share `share` from the known curve `truth`, seeded.
pub fn evidence(n: usize, share: f64, seed: u64, truth: &dyn Fn(f64) -> f64) -> Vec<PartCircle> {
    let mut rng = Rng::new(seed);
    (0..n)
        .map(|i| {
            let x = rng.between(-0.30, 0.15);
            let u = rng.between(-share * WINDOW, (1.0 - share) * WINDOW);
            let condition = if u > 0.04 {
                Condition::Split
            } else if u > 0.0 {
                Condition::Necked
            } else {
                Condition::Safe
            };
            PartCircle {
                id: format!("s{i}"),
                minor: x + READING_NOISE * rng.normal(),
                major: truth(x) + u + READING_NOISE * rng.normal(),
                condition,
            }
        })
        .collect()
}

/// One run's deviations from the known curve at plane strain, percentage points of
/// engineering major strain (fitted minus known).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Deviation {
    /// The written (conservative) line.
    pub conservative: f64,
    /// The 50 % line.
    pub median: f64,
}

/// Fit one run and compare at plane strain.
pub fn run(n: usize, share: f64, seed: u64, settings: &FitSettings) -> Result<Deviation, String> {
    let truth = known_curve();
    let f = fit(&evidence(n, share, seed, &truth), settings)?;
    let eng = |t: f64| 100.0 * t.exp_m1();
    let known = eng(truth(0.0));
    Ok(Deviation {
        conservative: eng(f.conservative_at(0.0)) - known,
        median: eng(f.major_at(0.0)) - known,
    })
}

/// Mean, smallest and largest of a sample.
pub fn spread(v: &[f64]) -> (f64, f64, f64) {
    let mean = v.iter().sum::<f64>() / v.len().max(1) as f64;
    let lo = v.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = v.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    (mean, lo, hi)
}
