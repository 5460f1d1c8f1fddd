//! Lengths and their units. Strains are ratios of lengths in one unit, so the unit matters only
//! where a length is shown or compared with a length given elsewhere (d0, t0, thickness).

use serde::{Deserialize, Serialize};
use std::fmt;
use std::str::FromStr;

/// Millimetres per inch (exact by definition, NIST SP 811).
pub const MM_PER_INCH: f64 = 25.4;

/// The length unit of a measurement file and of the lengths given with it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
pub enum LengthUnit {
    /// Millimetres.
    #[default]
    #[serde(rename = "mm")]
    Mm,
    /// Inches.
    #[serde(rename = "in")]
    In,
}

impl LengthUnit {
    /// Millimetres in one of this unit.
    pub fn mm(self) -> f64 {
        match self {
            LengthUnit::Mm => 1.0,
            LengthUnit::In => MM_PER_INCH,
        }
    }
    /// The unit in words, plural: "millimetres", "inches".
    pub fn plural(self) -> &'static str {
        match self {
            LengthUnit::Mm => "millimetres",
            LengthUnit::In => "inches",
        }
    }
    /// Short name as written in files and flags.
    pub fn name(self) -> &'static str {
        match self {
            LengthUnit::Mm => "mm",
            LengthUnit::In => "in",
        }
    }
}

impl fmt::Display for LengthUnit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for LengthUnit {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim().to_ascii_lowercase().as_str() {
            "mm" | "millimetre" | "millimeter" => Ok(LengthUnit::Mm),
            "in" | "inch" | "inches" => Ok(LengthUnit::In),
            other => Err(format!(
                "unknown length unit `{other}`: expected `mm` or `in`"
            )),
        }
    }
}

/// A length that knows its unit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Length {
    /// The number, in `unit`.
    pub value: f64,
    /// The unit of `value`.
    pub unit: LengthUnit,
}

impl Length {
    /// A length of `value` in `unit`.
    pub fn new(value: f64, unit: LengthUnit) -> Self {
        Length { value, unit }
    }
    /// The same length in `unit`.
    pub fn in_unit(self, unit: LengthUnit) -> f64 {
        self.value * self.unit.mm() / unit.mm()
    }
    /// The same length in millimetres.
    pub fn mm(self) -> f64 {
        self.in_unit(LengthUnit::Mm)
    }
}

impl fmt::Display for Length {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} {}", self.value, self.unit)
    }
}

/// Lengths that apply to every row unless a row says otherwise.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Lengths {
    /// Unit of all lengths in the measurement file.
    pub unit: LengthUnit,
    /// Initial circle diameter (a per-row `d0` overrides it).
    pub d0: Option<f64>,
    /// Initial sheet thickness.
    pub t0: Option<f64>,
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // 0.100 in = 2.54 mm (the inch is 25.4 mm exactly, NIST SP 811).
    #[test]
    fn inch_grid_circle_in_mm() {
        assert_abs_diff_eq!(Length::new(0.1, LengthUnit::In).mm(), 2.54, epsilon = 1e-12);
        assert_abs_diff_eq!(
            Length::new(25.4, LengthUnit::Mm).in_unit(LengthUnit::In),
            1.0
        );
    }

    #[test]
    fn unit_names_parse() {
        assert_eq!("MM".parse::<LengthUnit>(), Ok(LengthUnit::Mm));
        assert_eq!("in".parse::<LengthUnit>(), Ok(LengthUnit::In));
        assert!("cm"
            .parse::<LengthUnit>()
            .unwrap_err()
            .contains("expected `mm` or `in`"));
    }
}
