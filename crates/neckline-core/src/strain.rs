//! Strain measures as distinct types, so that engineering and true strain cannot be mixed up.
//!
//! Every measure is stored as a plain fraction (0.30 = 30 %). Conversions go through the
//! principal stretch `λ = d / d0`, the one quantity all measures share:
//!
//! | measure          | from the stretch λ        | source                              |
//! |------------------|---------------------------|-------------------------------------|
//! | engineering      | e = λ − 1                 | any continuum mechanics text        |
//! | true (log)       | ε = ln λ                  | any continuum mechanics text        |
//! | Green-Lagrange   | E = (λ² − 1) / 2          | any continuum mechanics text        |
//! | Almansi          | a = (1 − λ⁻²) / 2         | any continuum mechanics text        |
//!
//! ```
//! use neckline_core::strain::{AlmansiStrain, EngStrain, GreenStrain, Stretch, TrueStrain};
//!
//! // A 2.5 mm circle stretched to 3.25 mm: λ = 1.30 (check values from the formulas above).
//! let l = Stretch::from_lengths(3.25, 2.5).unwrap();
//! assert!((EngStrain::from(l).percent() - 30.0).abs() < 1e-9);
//! assert!((TrueStrain::from(l).value() - 0.26236).abs() < 5e-6);
//! assert!((GreenStrain::from(l).value() - 0.3450).abs() < 5e-5);
//! assert!((AlmansiStrain::from(l).value() - 0.20414).abs() < 5e-6);
//! ```

use serde::{Deserialize, Serialize};
use std::fmt;

/// A principal stretch ratio `λ = d / d0` (deformed length over initial length), always > 0.
#[derive(Debug, Clone, Copy, PartialEq, PartialOrd)]
pub struct Stretch(f64);

impl Stretch {
    /// Build a stretch; `None` unless the ratio is finite and strictly positive.
    pub fn new(ratio: f64) -> Option<Self> {
        (ratio.is_finite() && ratio > 0.0).then_some(Stretch(ratio))
    }

    /// The stretch of a length `deformed` that was `initial` before forming: `λ = d / d0`.
    pub fn from_lengths(deformed: f64, initial: f64) -> Option<Self> {
        Self::new(deformed / initial)
    }

    /// The ratio λ itself.
    pub fn value(self) -> f64 {
        self.0
    }
}

macro_rules! strain_type {
    ($(#[$doc:meta])* $name:ident, $label:expr) => {
        $(#[$doc])*
        #[derive(Debug, Clone, Copy, PartialEq, PartialOrd, Default, Serialize, Deserialize)]
        #[serde(transparent)]
        pub struct $name(pub f64);

        impl $name {
            /// The strain as a fraction (0.30 = 30 %).
            pub fn value(self) -> f64 {
                self.0
            }
            /// The strain in percent (30.0 = 30 %).
            pub fn percent(self) -> f64 {
                self.0 * 100.0
            }
            /// Build from a value in percent.
            pub fn from_percent(pct: f64) -> Self {
                $name(pct / 100.0)
            }
        }

        impl fmt::Display for $name {
            fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
                write!(f, "{:.2} % {}", self.percent(), $label)
            }
        }
    };
}

strain_type!(
    /// Engineering (nominal) strain `e = λ − 1`, the measure of ISO 12004-1 press-shop diagrams.
    EngStrain,
    "eng."
);
strain_type!(
    /// True (logarithmic) strain `ε = ln λ`; additive along a path, the measure of plasticity.
    TrueStrain,
    "true"
);
strain_type!(
    /// Green-Lagrange strain `E = (λ² − 1)/2`, referred to the undeformed blank.
    GreenStrain,
    "Green"
);
strain_type!(
    /// Almansi (Euler-Almansi) strain `a = (1 − λ⁻²)/2`, referred to the formed part.
    AlmansiStrain,
    "Almansi"
);

impl From<Stretch> for EngStrain {
    /// `e = λ − 1`.
    fn from(l: Stretch) -> Self {
        EngStrain(l.0 - 1.0)
    }
}

impl From<Stretch> for TrueStrain {
    /// `ε = ln λ`.
    fn from(l: Stretch) -> Self {
        TrueStrain(l.0.ln())
    }
}

impl From<Stretch> for GreenStrain {
    /// `E = (λ² − 1)/2`.
    fn from(l: Stretch) -> Self {
        GreenStrain((l.0 * l.0 - 1.0) / 2.0)
    }
}

impl From<Stretch> for AlmansiStrain {
    /// `a = (1 − λ⁻²)/2`.
    fn from(l: Stretch) -> Self {
        AlmansiStrain((1.0 - 1.0 / (l.0 * l.0)) / 2.0)
    }
}

impl EngStrain {
    /// The stretch `λ = 1 + e`; `None` when e ≤ −1 (a length cannot vanish).
    pub fn stretch(self) -> Option<Stretch> {
        Stretch::new(1.0 + self.0)
    }
    /// `ε = ln(1 + e)`; `None` when e ≤ −1.
    ///
    /// ```
    /// use neckline_core::strain::EngStrain;
    ///
    /// // A 20 % stretch is ln 1.2 = 0.18232 true strain (any continuum mechanics text).
    /// let t = EngStrain(0.20).to_true().unwrap();
    /// assert!((t.value() - 1.2f64.ln()).abs() < 1e-12);
    /// assert!((t.value() - 0.18232).abs() < 5e-6);
    /// // And back: e = exp ε − 1.
    /// assert!((t.to_eng().value() - 0.20).abs() < 1e-12);
    /// // A length cannot vanish: −100 % engineering strain has no true strain.
    /// assert!(EngStrain(-1.0).to_true().is_none());
    /// ```
    pub fn to_true(self) -> Option<TrueStrain> {
        self.stretch().map(TrueStrain::from)
    }
}

impl TrueStrain {
    /// The stretch `λ = exp ε`.
    pub fn stretch(self) -> Stretch {
        Stretch(self.0.exp())
    }
    /// `e = exp ε − 1`.
    pub fn to_eng(self) -> EngStrain {
        EngStrain::from(self.stretch())
    }
}

/// Which measure a table of strains is written in (a limit curve file, a plot axis).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum StrainMeasure {
    /// Engineering strain `e = λ − 1` (the default of press-shop diagrams).
    #[default]
    Engineering,
    /// True (log) strain `ε = ln λ`.
    True,
}

impl StrainMeasure {
    /// Convert a value in this measure to true strain (`None` if it is not a possible strain).
    pub fn to_true(self, v: f64) -> Option<TrueStrain> {
        match self {
            StrainMeasure::Engineering => EngStrain(v).to_true(),
            StrainMeasure::True => v.is_finite().then_some(TrueStrain(v)),
        }
    }
    /// Express a true strain in this measure.
    pub fn from_true(self, t: TrueStrain) -> f64 {
        match self {
            StrainMeasure::Engineering => t.to_eng().value(),
            StrainMeasure::True => t.value(),
        }
    }
    /// Lower-case name as written in files.
    pub fn name(self) -> &'static str {
        match self {
            StrainMeasure::Engineering => "engineering",
            StrainMeasure::True => "true",
        }
    }
}

impl fmt::Display for StrainMeasure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}
