//! Marciniak-Kuczynski (M-K) forming-limit prediction: plane stress, Hill 1948 anisotropic yield
//! with r0, r45, r90, Swift hardening `σ̄ = K (ε0 + ε̄)ⁿ`, and a groove of initial thickness ratio
//! `f0` at initial angle `ψ0` (Marciniak & Kuczynski 1967, Int. J. Mech. Sci. 9, 609-620; the
//! inclined groove and the minimum over its angle as in Hutchinson & Neale 1978, "Sheet necking
//! II", Mechanics of Sheet Metal Forming, Plenum).
//!
//! For each straight strain path `β = ε2/ε1` from −1/2 to 1 the groove is stepped until its
//! effective strain increment exceeds [`MkSettings::ratio`] times the bulk's; the limit is the
//! bulk's strain then, minimised over `ψ0` (a coarse scan over 0..90°, then a fine scan around the
//! best coarse angle). See [`groove`] for the equations of one run and [`hill48`] for the yield
//! function. An M-K curve is a prediction, never a replacement for a tested curve.

pub mod groove;
pub mod hill48;

use groove::{Bulk, Model, RunEnd, RunSettings};
use hill48::Hill48;
use std::fmt;

/// Material data of an M-K analysis.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MkMaterial {
    /// Strain-hardening exponent n.
    pub n: f64,
    /// Strength coefficient K, MPa (recorded; it cancels from the rate-independent limit).
    pub k: f64,
    /// Swift pre-strain ε0.
    pub eps0: f64,
    /// Lankford r-value along the rolling direction.
    pub r0: f64,
    /// Lankford r-value at 45° to the rolling direction.
    pub r45: f64,
    /// Lankford r-value across the rolling direction.
    pub r90: f64,
    /// Initial thickness ratio groove/bulk, f0 < 1.
    pub f0: f64,
}

/// Numerical settings of an M-K curve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MkSettings {
    /// Groove effective-strain increment per step (the convergence study in `benches/mk.rs`
    /// justifies the default).
    pub step: f64,
    /// Localisation when the groove's effective strain increment exceeds this many times the
    /// bulk's (default 10).
    pub ratio: f64,
    /// Number of strain paths from β = −1/2 to β = 1 (default 31).
    pub paths: usize,
    /// Coarse scan step of the initial groove angle, degrees (default 5).
    pub psi_coarse_deg: f64,
    /// Fine scan step around the best coarse angle, degrees (default 0.5; at most 1).
    pub psi_fine_deg: f64,
    /// Give up on a path when the bulk major true strain passes this (default 2).
    pub max_strain: f64,
    /// Newton tolerance on the unknowns, relative to the step (default 1e-9).
    pub tol: f64,
    /// Newton iterations allowed per step (default 30).
    pub max_iter: usize,
}

impl Default for MkSettings {
    fn default() -> Self {
        MkSettings {
            step: 0.002,
            ratio: 10.0,
            paths: 31,
            psi_coarse_deg: 5.0,
            psi_fine_deg: 0.5,
            max_strain: 2.0,
            tol: 1e-9,
            max_iter: 30,
        }
    }
}

/// Check that `v` lies in `lo..=hi`; the message names the quantity and the range.
fn in_range(what: &str, v: f64, lo: f64, hi: f64) -> Result<(), MkError> {
    if v.is_finite() && v >= lo && v <= hi {
        Ok(())
    } else {
        Err(MkError::Setting(format!(
            "{what} = {v} is outside the allowed range {lo} ..= {hi}"
        )))
    }
}

impl MkMaterial {
    /// Check every input against its physical range.
    pub fn validate(&self) -> Result<(), MkError> {
        in_range("n", self.n, 0.01, 0.6)?;
        in_range("K (MPa)", self.k, 1.0, 10_000.0)?;
        in_range("eps0", self.eps0, 0.0, 0.1)?;
        in_range("r0", self.r0, 0.1, 5.0)?;
        in_range("r45", self.r45, 0.1, 5.0)?;
        in_range("r90", self.r90, 0.1, 5.0)?;
        in_range("f0", self.f0, 0.9, 0.9999)
    }

    fn model(&self) -> Model {
        Model {
            yield_fn: Hill48::from_r(self.r0, self.r45, self.r90),
            n: self.n,
            eps0: self.eps0,
            f0: self.f0,
        }
    }
}

impl MkSettings {
    /// Check every setting against its allowed range.
    pub fn validate(&self) -> Result<(), MkError> {
        in_range("step", self.step, 1e-5, 0.05)?;
        in_range("ratio", self.ratio, 2.0, 1000.0)?;
        in_range(
            "paths",
            self.paths as f64,
            crate::limit::necking::MIN_PATHS as f64,
            301.0,
        )?;
        in_range("psi coarse step (deg)", self.psi_coarse_deg, 1.0, 15.0)?;
        in_range("psi fine step (deg)", self.psi_fine_deg, 0.01, 1.0)?;
        in_range("max strain", self.max_strain, 0.1, 5.0)?;
        in_range("Newton tolerance", self.tol, 1e-14, 1e-4)?;
        in_range("Newton iterations", self.max_iter as f64, 3.0, 1000.0)
    }
}

/// What can stop an M-K analysis.
#[derive(Debug, Clone, PartialEq)]
pub enum MkError {
    /// An input or setting is out of range.
    Setting(String),
    /// Newton's method did not converge on a step.
    NoConvergence {
        /// Strain ratio of the path.
        beta: f64,
        /// Initial groove angle, degrees.
        psi0_deg: f64,
        /// The step that failed, and where.
        detail: groove::NoConvergence,
    },
    /// No groove angle localised before the bulk reached the strain cap.
    NoLocalisation {
        /// Strain ratio of the path.
        beta: f64,
        /// The cap on the bulk's major true strain.
        max_strain: f64,
    },
}

impl fmt::Display for MkError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            MkError::Setting(m) => f.write_str(m),
            MkError::NoConvergence {
                beta,
                psi0_deg,
                detail,
            } => {
                let what = detail.residual.map_or_else(
                    || "the step budget ran out".to_string(),
                    |r| format!("Newton's method did not converge (residual {r:.2e})"),
                );
                write!(
                    f,
                    "M-K: {what} on step {} (path beta = {beta:.4}, initial groove angle \
                     {psi0_deg:.2} deg, bulk major true strain {:.4}); no curve written: try a \
                     smaller step",
                    detail.step, detail.major
                )
            }
            MkError::NoLocalisation { beta, max_strain } => write!(
                f,
                "M-K: no groove localised on path beta = {beta:.4} before the bulk major true \
                 strain reached {max_strain}; no curve written: lower f0 or raise the strain cap"
            ),
        }
    }
}

impl std::error::Error for MkError {}

/// The limit of one strain path.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PathLimit {
    /// Strain ratio β = ε2/ε1.
    pub beta: f64,
    /// Limit major true strain ε1.
    pub major: f64,
    /// Initial groove-normal angle that gave the minimum, degrees from the major direction.
    pub psi0_deg: f64,
    /// The groove-normal angle at localisation, degrees.
    pub psi_deg: f64,
    /// Groove runs made for this path.
    pub runs: usize,
}

impl PathLimit {
    /// Limit minor true strain ε2 = β ε1.
    pub fn minor(&self) -> f64 {
        self.beta * self.major
    }
}

/// The M-K limit for one initial groove angle `psi0_deg`; `Ok(None)` if the bulk passed `bound`
/// first.
pub fn limit_at_angle(
    mat: &MkMaterial,
    s: &MkSettings,
    beta: f64,
    psi0_deg: f64,
    bound: f64,
) -> Result<Option<(f64, f64)>, MkError> {
    let md = mat.model();
    let bulk = Bulk::new(&md.yield_fn, beta);
    run_one(&md, &bulk, s, psi0_deg, bound)
}

fn run_one(
    md: &Model,
    bulk: &Bulk,
    s: &MkSettings,
    psi0_deg: f64,
    bound: f64,
) -> Result<Option<(f64, f64)>, MkError> {
    let rs = RunSettings {
        step: s.step,
        ratio: s.ratio,
        bound,
        tol: s.tol,
        max_iter: s.max_iter,
    };
    match groove::run(md, bulk, psi0_deg.to_radians(), &rs) {
        Ok(RunEnd::Localised { major, psi, .. }) => Ok(Some((major, psi.to_degrees()))),
        Ok(RunEnd::Beyond) => Ok(None),
        Err(detail) => Err(MkError::NoConvergence {
            beta: bulk.rho,
            psi0_deg,
            detail,
        }),
    }
}

/// The M-K limit of path `beta`, minimised over the initial groove angle: a coarse scan over
/// 0..=90° (ψ and −ψ are equivalent for an orthotropic sheet loaded along its axes), then a fine
/// scan within one coarse step of the best angle. A run stops as soon as its bulk strain passes
/// the best limit so far, since it cannot lower the minimum.
pub fn path_limit(mat: &MkMaterial, s: &MkSettings, beta: f64) -> Result<PathLimit, MkError> {
    mat.validate()?;
    s.validate()?;
    let md = mat.model();
    let bulk = Bulk::new(&md.yield_fn, beta);
    let mut best: Option<PathLimit> = None;
    let mut runs = 0;
    let mut try_angle = |psi0: f64, best: &mut Option<PathLimit>| -> Result<(), MkError> {
        let bound = best.map_or(s.max_strain, |b| b.major);
        runs += 1;
        if let Some((major, psi)) = run_one(&md, &bulk, s, psi0, bound)? {
            if best.is_none_or(|b| major < b.major) {
                *best = Some(PathLimit {
                    beta,
                    major,
                    psi0_deg: psi0,
                    psi_deg: psi,
                    runs: 0,
                });
            }
        }
        Ok(())
    };
    let coarse = (90.0 / s.psi_coarse_deg).ceil() as usize;
    for i in 0..=coarse {
        try_angle((i as f64 * s.psi_coarse_deg).min(90.0), &mut best)?;
    }
    let centre = best
        .ok_or(MkError::NoLocalisation {
            beta,
            max_strain: s.max_strain,
        })?
        .psi0_deg;
    let fine = (s.psi_coarse_deg / s.psi_fine_deg).round() as i64;
    for i in -fine + 1..fine {
        let psi0 = centre + i as f64 * s.psi_fine_deg;
        if i != 0 && (0.0..=90.0).contains(&psi0) {
            try_angle(psi0, &mut best)?;
        }
    }
    let mut out = best.ok_or(MkError::NoLocalisation {
        beta,
        max_strain: s.max_strain,
    })?;
    out.runs = runs;
    Ok(out)
}

/// The full M-K curve: one [`PathLimit`] per strain ratio from −1/2 to 1 (`s.paths` of them).
pub fn curve(mat: &MkMaterial, s: &MkSettings) -> Result<Vec<PathLimit>, MkError> {
    crate::limit::necking::strain_ratios(s.paths)
        .into_iter()
        .map(|beta| path_limit(mat, s, beta))
        .collect()
}

#[cfg(test)]
mod tests;
