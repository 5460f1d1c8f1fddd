//! `limit keeler-brazier`, `limit necking` and `limit mk`: a material model's arguments turned
//! into a [`GeneratedCurve`] (points, name, and a `source` that records the model, every
//! parameter and setting and the version), written through [`emit_curve`].

use super::emit::{emit_curve, CurveOutArgs, CurveWrite, PictureFormat};
use crate::commands::{paragraph, Outcome};
use clap::Args;
use neckline_core::analysis::Analysis;
use neckline_core::assess::Settings;
use neckline_core::error::{Error, Result};
use neckline_core::job::Job;
use neckline_core::limit::keeler_brazier::{self, KeelerBrazier};
use neckline_core::limit::mk::{self, MkMaterial, MkSettings, PathLimit};
use neckline_core::limit::necking::{self, RightSide};
use neckline_core::limit::writer::{GeneratedCurve, PREDICTION_HEADER, TOOL_VERSION};
use neckline_core::limit::LimitCurve;
use neckline_core::point::Context;
use neckline_core::strain::{StrainMeasure, TrueStrain};
use neckline_core::units::Lengths;
use neckline_core::units::{LengthUnit, MM_PER_INCH};
use neckline_core::CAUTION;
use neckline_render::fld::{self, FldOptions};
use std::path::{Path, PathBuf};

/// Arguments of `limit keeler-brazier`.
#[derive(Debug, Clone, Args)]
pub struct KeelerBrazierArgs {
    /// Strain-hardening exponent n (tensile test).
    #[arg(long, value_name = "N")]
    pub n: f64,
    /// Sheet thickness, in --unit.
    #[arg(long, value_name = "LENGTH")]
    pub thickness: f64,
    /// Unit of --thickness.
    #[arg(long, value_name = "mm|in", default_value = "mm")]
    pub unit: LengthUnit,
    /// n above this is clamped to it, with a warning (common practice).
    #[arg(long, value_name = "N", default_value_t = 0.21)]
    pub n_max: f64,
    /// Thickness above this (mm) is clamped to it, with a warning (common practice).
    #[arg(long, value_name = "MM", default_value_t = 3.0)]
    pub thickness_max_mm: f64,
    /// Output file and name.
    #[command(flatten)]
    pub out: CurveOutArgs,
}

/// Arguments of `limit necking`.
#[derive(Debug, Clone, Args)]
pub struct NeckingArgs {
    /// Strain-hardening exponent n (power law σ = K εⁿ).
    #[arg(long, value_name = "N")]
    pub n: f64,
    /// Model of the right side (β > 0).
    #[arg(long, value_name = "swift|storen-rice", default_value = "swift")]
    pub right: RightSide,
    /// Number of strain ratios from -0.5 to 1 (3-301; -0.5, 0 and 1 always among them).
    #[arg(long, value_name = "P", default_value_t = 31)]
    pub paths: usize,
    /// Output file and name.
    #[command(flatten)]
    pub out: CurveOutArgs,
}

/// Arguments of `limit mk`.
#[derive(Debug, Clone, Args)]
pub struct MkArgs {
    /// Strain-hardening exponent n of Swift hardening σ = K (ε0 + ε)ⁿ.
    #[arg(long, value_name = "N")]
    pub n: f64,
    /// Lankford r-value along the rolling direction.
    #[arg(long, value_name = "R")]
    pub r0: f64,
    /// Lankford r-value at 45° to the rolling direction.
    #[arg(long, value_name = "R")]
    pub r45: f64,
    /// Lankford r-value across the rolling direction.
    #[arg(long, value_name = "R")]
    pub r90: f64,
    /// Initial groove/bulk thickness ratio f0 (0.9 ..= 0.9999), in practice a fitting parameter.
    #[arg(long, value_name = "F0")]
    pub f0: f64,
    /// Swift pre-strain ε0 (0 ..= 0.1).
    #[arg(long, value_name = "E", default_value_t = 0.0)]
    pub eps0: f64,
    /// Strength coefficient K, MPa (recorded; it does not change a rate-independent limit).
    #[arg(long, value_name = "MPA", default_value_t = 500.0)]
    pub k: f64,
    /// Number of strain ratios from -0.5 to 1 (3-301; -0.5, 0 and 1 always among them).
    #[arg(long, value_name = "P", default_value_t = 31)]
    pub paths: usize,
    /// Groove effective-strain increment per step.
    #[arg(long, value_name = "H", default_value_t = MkSettings::default().step)]
    pub step: f64,
    /// Localisation: groove effective strain increment over the bulk's.
    #[arg(long, value_name = "X", default_value_t = 10.0)]
    pub ratio: f64,
    /// Coarse scan step of the initial groove angle, degrees.
    #[arg(long, value_name = "DEG", default_value_t = 5.0)]
    pub psi_coarse: f64,
    /// Fine scan step near the best angle, degrees (at most 1).
    #[arg(long, value_name = "DEG", default_value_t = 0.5)]
    pub psi_fine: f64,
    /// Output file and name.
    #[command(flatten)]
    pub out: CurveOutArgs,
}

/// The Keeler-Brazier curve of the arguments; clamp warnings go to standard error.
pub fn keeler_brazier_curve(a: &KeelerBrazierArgs) -> Result<GeneratedCurve> {
    let t_mm = a.thickness * a.unit.mm();
    let kb = KeelerBrazier {
        n_max: a.n_max,
        thickness_max_mm: a.thickness_max_mm,
        ..KeelerBrazier::new(a.n, t_mm)
    };
    kb.validate()
        .map_err(|m| Error::Usage(format!("keeler-brazier: {m}")))?;
    if !(a.n_max > 0.0 && a.n_max < 1.0 && a.thickness_max_mm > 0.0) {
        return Err(Error::Usage(format!(
            "keeler-brazier: --n-max {} must be in 0 < n < 1 and --thickness-max-mm {} positive",
            a.n_max, a.thickness_max_mm
        )));
    }
    let (n, t, warnings) = kb.clamped();
    for w in &warnings {
        eprintln!("warning: {w}");
    }
    let given = match a.unit {
        LengthUnit::Mm => format!("{} mm", a.thickness),
        LengthUnit::In => format!(
            "{} in = {t_mm:.4} mm; inch form (23.3 + 359 t) n / 0.21 gives {:.2} %",
            a.thickness,
            keeler_brazier::flc0_pct_inch(n, t / MM_PER_INCH)
        ),
    };
    let source = format!(
        "Keeler-Brazier empirical FLC for steels (Keeler & Brazier 1977, NADDRG; formula from \
         memory): FLC0 = (23.3 + 14.13 t) n / 0.21 % engineering = {:.2} %; n = {}, thickness = \
         {given}; clamps n <= {}, t <= {} mm{}; left side constant thickness strain, right side \
         e1 = FLC0 + 0.6 e2 up to e2 = 20 % (common practice); engineering strain; generated by \
         neckline {TOOL_VERSION}",
        kb.flc0(),
        a.n,
        a.n_max,
        a.thickness_max_mm,
        if warnings.is_empty() {
            String::new()
        } else {
            format!(" (applied: n = {n}, t = {t} mm)")
        }
    );
    Ok(GeneratedCurve {
        name: a
            .out
            .name
            .clone()
            .unwrap_or_else(|| format!("Keeler-Brazier n {n} t {t:.2} mm")),
        source,
        material: a.out.material.clone(),
        thickness_mm: Some(t_mm),
        measure: StrainMeasure::Engineering,
        points_pct: kb.points_pct(),
        notes: Vec::new(),
        extra: Vec::new(),
    })
}

/// The analytic necking curve of the arguments (true strain).
pub fn necking_curve(a: &NeckingArgs) -> Result<GeneratedCurve> {
    necking::validate_n(a.n).map_err(|m| Error::Usage(format!("necking: {m}")))?;
    check_paths(a.paths)?;
    let pts = necking::curve_points(a.n, a.right, &necking::strain_ratios(a.paths));
    let source = format!(
        "Analytic necking limits of a power-law material, proportional paths: Hill 1952 localized \
         neck eps1 + eps2 = n for beta <= 0 (J. Mech. Phys. Solids 1) and {} for beta > 0; n = \
         {}; {} strain ratios from -0.5 to 1; imperfection-free sheet; true strain; generated by \
         neckline {TOOL_VERSION}",
        a.right.citation(),
        a.n,
        a.paths
    );
    Ok(GeneratedCurve {
        name: a.out.name.clone().unwrap_or_else(|| {
            let right = match a.right {
                RightSide::Swift => "Swift 1952",
                RightSide::StorenRice => "Storen-Rice 1975",
            };
            format!("Hill 1952 + {right}, n {}", a.n)
        }),
        source,
        material: a.out.material.clone(),
        thickness_mm: None,
        measure: StrainMeasure::True,
        points_pct: pts.iter().map(|p| [100.0 * p[0], 100.0 * p[1]]).collect(),
        notes: Vec::new(),
        extra: Vec::new(),
    })
}

fn check_paths(paths: usize) -> Result<()> {
    if (necking::MIN_PATHS..=301).contains(&paths) {
        Ok(())
    } else {
        Err(Error::Usage(format!(
            "--paths {paths} is outside the allowed range {} ..= 301 (both ends and plane \
             strain are always among them)",
            necking::MIN_PATHS
        )))
    }
}

/// The Marciniak-Kuczynski curve of the arguments (true strain).
pub fn mk_curve(a: &MkArgs) -> Result<GeneratedCurve> {
    let mat = MkMaterial {
        n: a.n,
        k: a.k,
        eps0: a.eps0,
        r0: a.r0,
        r45: a.r45,
        r90: a.r90,
        f0: a.f0,
    };
    let s = MkSettings {
        step: a.step,
        ratio: a.ratio,
        paths: a.paths,
        psi_coarse_deg: a.psi_coarse,
        psi_fine_deg: a.psi_fine,
        ..MkSettings::default()
    };
    let usage = |e: mk::MkError| Error::Usage(format!("mk: {e}"));
    mat.validate().map_err(usage)?;
    s.validate().map_err(usage)?;
    let limits = mk::curve(&mat, &s).map_err(usage)?;
    Ok(GeneratedCurve {
        name: a
            .out
            .name
            .clone()
            .unwrap_or_else(|| format!("M-K n {} r {}/{}/{} f0 {}", a.n, a.r0, a.r45, a.r90, a.f0)),
        source: mk_source(&mat, &s),
        material: a.out.material.clone(),
        thickness_mm: None,
        measure: StrainMeasure::True,
        points_pct: limits
            .iter()
            .map(|p| [100.0 * p.minor(), 100.0 * p.major])
            .collect(),
        notes: mk_notes(&limits),
        extra: Vec::new(),
    })
}

/// The `source` line of an M-K curve: model, every parameter and setting, tool version.
pub fn mk_source(m: &MkMaterial, s: &MkSettings) -> String {
    format!(
        "Marciniak-Kuczynski prediction (Marciniak & Kuczynski 1967, Int. J. Mech. Sci. 9; \
         inclined groove as Hutchinson & Neale 1978): plane stress, Hill 1948 yield r0 = {}, r45 = \
         {}, r90 = {}; Swift hardening sigma = K (eps0 + eps)^n with K = {} MPa, eps0 = {}, n = {}; \
         groove thickness ratio f0 = {}; rate-independent flow theory; localisation when the \
         groove effective strain increment exceeds {} times the bulk's; initial groove angle \
         minimised over 0-90 deg (coarse {} deg, fine {} deg); groove effective strain step {}; \
         {} strain ratios from -0.5 to 1; true strain; generated by neckline {TOOL_VERSION}",
        m.r0,
        m.r45,
        m.r90,
        m.k,
        m.eps0,
        m.n,
        m.f0,
        s.ratio,
        s.psi_coarse_deg,
        s.psi_fine_deg,
        s.step,
        s.paths
    )
}

fn mk_notes(limits: &[PathLimit]) -> Vec<String> {
    let mut v = vec![
        "per path: beta, eps1 %, eps2 % (true), initial groove angle deg, angle at \
                      localisation deg"
            .to_string(),
    ];
    v.extend(limits.iter().map(|p| {
        format!(
            "  {:>6.3} {:>8.3} {:>8.3} {:>6.1} {:>6.1}",
            p.beta,
            100.0 * p.major,
            100.0 * p.minor(),
            p.psi0_deg,
            p.psi_deg
        )
    }));
    v
}

/// Write a model's curve (see [`emit_curve`]): `--plot` draws it alone, and the summary is
/// `summary` (the file, its plane-strain limit and the caution) after `--out`, the caution alone otherwise.
pub fn emit(curve: &GeneratedCurve, out: &CurveOutArgs) -> Result<Outcome> {
    emit_curve(
        curve,
        out,
        CurveWrite {
            header: PREDICTION_HEADER,
            inputs: &[],
            set: out.begin(&[])?,
            picture: curve_picture,
            summary: |c: &LimitCurve, written: Option<&Path>| match written {
                Some(path) => summary(c, path),
                None => paragraph(CAUTION),
            },
        },
    )
}

/// The curve alone on a forming-limit diagram (no locations), through the same drawing code as
/// `check`, so the two pictures read the same.
fn curve_picture(curve: &LimitCurve, format: PictureFormat) -> std::io::Result<Vec<u8>> {
    let job = Job {
        part: Some(format!("generated curve: {}", curve.name)),
        material: curve.material.clone(),
        ..Job::default()
    };
    let ctx = Context {
        curve: curve.clone(),
        settings: Settings::default(),
        lengths: Lengths {
            unit: Default::default(),
            d0: None,
            t0: None,
        },
        strain_input: false,
        true_input: false,
    };
    let mut a = Analysis::new(
        PathBuf::from("(generated curve)"),
        job,
        ctx,
        Default::default(),
        &[],
    );
    a.warnings.clear();
    let opts = FldOptions {
        measure: curve.measure,
        curve_only: true,
        ..FldOptions::default()
    };
    format.render(|| fld::fld_svg(&a, &opts), || fld::fld_png(&a, &opts))
}

/// A few lines for people: the file written, its plane-strain limit and the caution.
fn summary(c: &LimitCurve, path: &Path) -> String {
    let plane = c
        .limit_major_eng(TrueStrain(0.0))
        .map_or_else(|| "not covered".into(), |e| format!("{:.2} %", e.percent()));
    format!(
        "Wrote {} ({} points, {} strain): {}\n\
         Plane-strain limit (FLC0): {plane} engineering major strain\n\
         A curve from a model is a prediction, not a tested curve.\n{}",
        path.display(),
        c.points.len(),
        c.measure,
        c.name,
        paragraph(CAUTION)
    )
}
