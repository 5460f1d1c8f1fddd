//! The Keeler-Brazier empirical forming-limit curve for low-carbon and drawing steels.
//!
//! FLC0 (engineering major strain at plane strain, percent) = (23.3 + 14.13 t) n / 0.21 with t the
//! sheet thickness in mm (Keeler & Brazier 1977, as adopted by the North American Deep Drawing
//! Research Group; recalled from the literature, "from memory" until checked against the paper).
//! In inches the same line reads (23.3 + 359 t) n / 0.21 (14.13 × 25.4 = 358.9).
//!
//! Shape as commonly drawn (common practice): left of plane strain, constant thickness strain in
//! true strain, `ε1 = ln(1 + FLC0) − ε2`; right of it, `e1 = FLC0 + 0.6 e2` in engineering strain
//! up to `e2 = 20 %`. For steels only: not aluminium, not advanced high-strength grades.

use crate::strain::{EngStrain, TrueStrain};
use serde::{Deserialize, Serialize};

/// FLC0 in percent engineering strain for strain-hardening exponent `n` and thickness `t_mm`.
pub fn flc0_pct(n: f64, t_mm: f64) -> f64 {
    (23.3 + 14.13 * t_mm) * n / 0.21
}

/// FLC0 in percent engineering strain with the thickness in inches: (23.3 + 359 t) n / 0.21.
pub fn flc0_pct_inch(n: f64, t_in: f64) -> f64 {
    (23.3 + 359.0 * t_in) * n / 0.21
}

/// Inputs of the Keeler-Brazier curve, with the clamps applied to them (settings, common practice).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct KeelerBrazier {
    /// Strain-hardening exponent n from the tensile test.
    pub n: f64,
    /// Sheet thickness in mm.
    pub thickness_mm: f64,
    /// n above this is clamped to it, with a warning (default 0.21, common practice).
    #[serde(default = "default_n_max")]
    pub n_max: f64,
    /// Thickness above this is clamped to it, with a warning (default 3 mm, common practice).
    #[serde(default = "default_t_max")]
    pub thickness_max_mm: f64,
    /// Most negative minor strain drawn, percent engineering (default −40).
    #[serde(default = "default_left")]
    pub minor_min_pct: f64,
    /// Largest minor strain drawn, percent engineering (default 20).
    #[serde(default = "default_right")]
    pub minor_max_pct: f64,
}

fn default_n_max() -> f64 {
    0.21
}
fn default_t_max() -> f64 {
    3.0
}
fn default_left() -> f64 {
    -40.0
}
fn default_right() -> f64 {
    20.0
}

/// Slope of the right-hand side, engineering strain (common practice).
pub const RIGHT_SLOPE: f64 = 0.6;

impl KeelerBrazier {
    /// The curve for `n` and `thickness_mm` with the default clamps and range.
    pub fn new(n: f64, thickness_mm: f64) -> Self {
        KeelerBrazier {
            n,
            thickness_mm,
            n_max: default_n_max(),
            thickness_max_mm: default_t_max(),
            minor_min_pct: default_left(),
            minor_max_pct: default_right(),
        }
    }

    /// Check the inputs; `Err` names the bad one and the allowed range.
    pub fn validate(&self) -> Result<(), String> {
        if !(self.n.is_finite() && self.n > 0.0 && self.n < 1.0) {
            return Err(format!("n = {} is outside 0 < n < 1", self.n));
        }
        if !(self.thickness_mm.is_finite() && self.thickness_mm > 0.0 && self.thickness_mm <= 25.0)
        {
            return Err(format!(
                "thickness {} mm is outside 0 < t <= 25 mm",
                self.thickness_mm
            ));
        }
        if !(self.minor_min_pct < 0.0 && self.minor_min_pct > -60.0) {
            return Err(format!(
                "minor_min_pct {} is outside -60 < x < 0",
                self.minor_min_pct
            ));
        }
        if !(self.minor_max_pct > 0.0 && self.minor_max_pct <= 60.0) {
            return Err(format!(
                "minor_max_pct {} is outside 0 < x <= 60",
                self.minor_max_pct
            ));
        }
        Ok(())
    }

    /// The clamped (n, t) and a warning for each clamp that acted.
    pub fn clamped(&self) -> (f64, f64, Vec<String>) {
        let mut warnings = Vec::new();
        let mut n = self.n;
        let mut t = self.thickness_mm;
        if n > self.n_max {
            warnings.push(format!(
                "Keeler-Brazier: n = {n} clamped to {} (the empirical curve was fitted to n up to \
                 that value)",
                self.n_max
            ));
            n = self.n_max;
        }
        if t > self.thickness_max_mm {
            warnings.push(format!(
                "Keeler-Brazier: thickness {t} mm clamped to {} mm (the empirical curve was fitted \
                 to sheet up to that thickness)",
                self.thickness_max_mm
            ));
            t = self.thickness_max_mm;
        }
        (n, t, warnings)
    }

    /// FLC0 in percent engineering strain after clamping.
    pub fn flc0(&self) -> f64 {
        let (n, t, _) = self.clamped();
        flc0_pct(n, t)
    }

    /// Curve points `[minor, major]` in percent engineering strain, minor increasing: the left side
    /// every 2 % of minor strain, plane strain, and the end of the straight right side.
    pub fn points_pct(&self) -> Vec<[f64; 2]> {
        let flc0 = self.flc0();
        let eps1_0 = EngStrain::from_percent(flc0)
            .to_true()
            .map_or(0.0, |t| t.value());
        let steps = (-self.minor_min_pct / 2.0).ceil() as usize;
        let mut pts: Vec<[f64; 2]> = (0..steps)
            .map(|i| {
                let e2 = self.minor_min_pct + 2.0 * i as f64;
                let eps2 = EngStrain::from_percent(e2)
                    .to_true()
                    .map_or(0.0, |t| t.value());
                let e1 = TrueStrain(eps1_0 - eps2).to_eng().percent();
                [e2, e1]
            })
            .collect();
        pts.push([0.0, flc0]);
        pts.push([self.minor_max_pct, flc0 + RIGHT_SLOPE * self.minor_max_pct]);
        pts
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    // Check values computed from the Keeler-Brazier formula (project field notes, section 5).
    #[test]
    fn flc0_check_values() {
        assert_abs_diff_eq!(flc0_pct(0.20, 0.8), 32.96, epsilon = 0.01);
        assert_abs_diff_eq!(flc0_pct(0.21, 1.0), 37.43, epsilon = 0.01);
        assert_abs_diff_eq!(flc0_pct(0.18, 1.5), 38.14, epsilon = 0.01);
    }

    // The inch form uses 359 for 14.13 × 25.4 = 358.9: the two agree to 0.1 % of FLC0.
    #[test]
    fn inch_and_mm_forms_agree() {
        for t_mm in [0.5, 0.8, 1.2, 2.0, 3.0] {
            let mm = flc0_pct(0.2, t_mm);
            let inch = flc0_pct_inch(0.2, t_mm / 25.4);
            assert!((mm - inch).abs() / mm < 1e-3, "{t_mm}: {mm} vs {inch}");
        }
    }

    // The inch form reproduces the same check values (project field notes, section 5) with the
    // thickness converted at 25.4 mm per inch (exact, NIST SP 811).
    #[test]
    fn inch_form_reproduces_check_values() {
        for (n, t_mm, flc0) in [(0.20, 0.8, 32.96), (0.21, 1.0, 37.43), (0.18, 1.5, 38.14)] {
            assert_abs_diff_eq!(flc0_pct_inch(n, t_mm / 25.4), flc0, epsilon = 0.02);
        }
    }

    #[test]
    fn clamps_warn_and_act() {
        let kb = KeelerBrazier::new(0.25, 4.0);
        let (n, t, w) = kb.clamped();
        assert_abs_diff_eq!(n, 0.21);
        assert_abs_diff_eq!(t, 3.0);
        assert_eq!(w.len(), 2);
        assert_abs_diff_eq!(kb.flc0(), flc0_pct(0.21, 3.0));
    }

    // Left side: constant thickness strain, ε1 + ε2 = ln(1 + FLC0) at every point (common practice).
    #[test]
    fn left_side_has_constant_thickness_strain() {
        let kb = KeelerBrazier::new(0.2, 0.8);
        let eps3_0 = (1.0 + kb.flc0() / 100.0).ln();
        for p in kb.points_pct().iter().filter(|p| p[0] <= 0.0) {
            let sum = (1.0 + p[0] / 100.0).ln() + (1.0 + p[1] / 100.0).ln();
            assert_abs_diff_eq!(sum, eps3_0, epsilon = 1e-12);
        }
        let last = kb.points_pct().last().copied().unwrap();
        assert_abs_diff_eq!(last[1], kb.flc0() + 0.6 * 20.0, epsilon = 1e-12);
    }
}
