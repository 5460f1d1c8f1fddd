//! `neckline limit`: forming-limit curves from material data (Keeler-Brazier, analytic necking
//! limits, Marciniak-Kuczynski) or from circles read on necked and split parts (`from-parts`),
//! written as the curve TOML `check` reads, and `limit compare`.

use super::Outcome;
use clap::{Args, Subcommand};
use neckline_core::analysis::{Analysis, Lengths, CAUTION};
use neckline_core::assess::Settings;
use neckline_core::digest::sha256_hex;
use neckline_core::error::{Error, Result};
use neckline_core::job::Job;
use neckline_core::limit::from_parts::{self, Band, FitSettings, PartCircle, PartsFit};
use neckline_core::limit::keeler_brazier::{self, KeelerBrazier};
use neckline_core::limit::mk::{self, MkMaterial, MkSettings, PathLimit};
use neckline_core::limit::necking::{self, RightSide};
use neckline_core::limit::writer::{
    GeneratedCurve, PREDICTION_HEADER, SHOP_CURVE_WORDS, SHOP_HEADER, TOOL_VERSION,
};
use neckline_core::limit::LimitCurve;
use neckline_core::output::input_name;
use neckline_core::output::write_atomic;
use neckline_core::strain::{EngStrain, StrainMeasure};
use neckline_core::units::{LengthUnit, MM_PER_INCH};
use neckline_render::fld::{self, FldOptions};
use neckline_render::parts;
use std::io::{Read, Write};
use std::path::{Path, PathBuf};

/// Arguments of `limit`.
#[derive(Debug, Clone, Args)]
pub struct LimitArgs {
    /// Which curve to build, or `compare`.
    #[command(subcommand)]
    pub model: LimitCommand,
}

/// The `limit` subcommands.
#[derive(Debug, Clone, Subcommand)]
pub enum LimitCommand {
    /// Empirical steel curve from n and thickness (Keeler-Brazier; steels only), engineering strain.
    KeelerBrazier(KeelerBrazierArgs),
    /// Analytic necking limits of a power-law material (Hill 1952 left; Swift 1952 or
    /// Storen-Rice 1975 right), true strain.
    Necking(NeckingArgs),
    /// Marciniak-Kuczynski prediction (Hill 1948 with r0, r45, r90; Swift hardening), true strain.
    Mk(MkArgs),
    /// Press-shop curve from circles read on necked or split parts (a `condition` column: safe,
    /// necked, split), true strain.
    FromParts(FromPartsArgs),
    /// Print two curves' engineering major strain and their difference at a set of minor strains.
    Compare(CompareArgs),
}

/// Where and under which name a generated curve goes.
#[derive(Debug, Clone, Args)]
pub struct CurveOutArgs {
    /// Write the curve to this file (atomically) instead of standard output.
    #[arg(long, value_name = "FILE.toml")]
    pub out: Option<PathBuf>,
    /// Curve name shown on outputs [default: built from the model and its parameters].
    #[arg(long, value_name = "NAME")]
    pub name: Option<String>,
    /// Material grade and lot, recorded in the file.
    #[arg(long, value_name = "TEXT")]
    pub material: Option<String>,
    /// Also draw the curve on a forming-limit diagram: FILE.svg or FILE.png.
    #[arg(long, value_name = "FILE.svg|FILE.png")]
    pub plot: Option<PathBuf>,
}

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

/// Arguments of `limit compare`.
#[derive(Debug, Clone, Args)]
pub struct CompareArgs {
    /// First curve (TOML).
    #[arg(value_name = "A.toml")]
    pub a: PathBuf,
    /// Second curve (TOML).
    #[arg(value_name = "B.toml")]
    pub b: PathBuf,
    /// Minor strains to compare at, percent engineering, comma-separated.
    #[arg(
        long,
        value_name = "PCT,...",
        value_delimiter = ',',
        allow_hyphen_values = true,
        default_value = "-40,-30,-20,-10,0,10,20,30"
    )]
    pub at: Vec<f64>,
}

/// Run `limit`.
pub fn run(args: &LimitArgs) -> Result<Outcome> {
    match &args.model {
        LimitCommand::KeelerBrazier(a) => emit(&keeler_brazier_curve(a)?, &a.out),
        LimitCommand::Necking(a) => emit(&necking_curve(a)?, &a.out),
        LimitCommand::Mk(a) => emit(&mk_curve(a)?, &a.out),
        LimitCommand::FromParts(a) => from_parts(a),
        LimitCommand::Compare(a) => compare(a),
    }
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

/// Check the curve by reading it back, then write it to `--out` (atomically) or to standard
/// output. With `--out`, a short table and the caution go to standard output.
fn emit(curve: &GeneratedCurve, out: &CurveOutArgs) -> Result<Outcome> {
    emit_with(
        curve,
        out,
        &[],
        PREDICTION_HEADER,
        plot_curve,
        |c, path| match path {
            Some(path) => summary(c, path),
            None => neckline_render::terminal::wrap(CAUTION, 80, ""),
        },
    )
}

/// [`emit`] with the file header, the plot and the summary of the caller (given the file written, or `None` when
/// the curve went to standard output: the summary then goes to standard error); `inputs` are
/// never written over.
fn emit_with(
    curve: &GeneratedCurve,
    out: &CurveOutArgs,
    inputs: &[PathBuf],
    header: &str,
    plot: impl FnOnce(&LimitCurve, &Path, bool) -> Result<()>,
    summary: impl FnOnce(&LimitCurve, Option<&Path>) -> String,
) -> Result<Outcome> {
    let plot_kind = out.plot.as_deref().map(plot_kind).transpose()?;
    for target in out.out.iter().chain(&out.plot) {
        neckline_core::output::guard_inputs(target, inputs)?;
    }
    let shown = out.out.clone().unwrap_or_else(|| PathBuf::from("<stdout>"));
    let (text, parsed) = curve.render_checked_with(&shown, header)?;
    if let (Some(path), Some(kind)) = (&out.plot, plot_kind) {
        plot(&parsed, path, kind)?;
    }
    match &out.out {
        None => {
            let mut o = std::io::stdout().lock();
            o.write_all(text.as_bytes())
                .map_err(|e| Error::io(Path::new("<stdout>"), e))?;
            eprint!("{}", summary(&parsed, None));
        }
        Some(path) => {
            write_atomic(path, inputs, |w| w.write_all(text.as_bytes()))?;
            print!("{}", summary(&parsed, Some(path)));
        }
    }
    Ok(Outcome::Done)
}

/// Whether a plot path asks for SVG (`true`) or PNG (`false`), from its extension.
fn plot_kind(path: &Path) -> Result<bool> {
    match path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase)
        .as_deref()
    {
        Some("svg") => Ok(true),
        Some("png") => Ok(false),
        _ => Err(Error::Usage(format!(
            "--plot {}: the file name must end in .svg or .png",
            path.display()
        ))),
    }
}

/// Draw the curve alone on a forming-limit diagram (no locations), through the same drawing
/// code as `check`, so the two pictures read the same.
fn plot_curve(curve: &LimitCurve, path: &Path, svg: bool) -> Result<()> {
    let job = Job {
        part: Some(format!("generated curve: {}", curve.name)),
        material: curve.material.clone(),
        ..Job::default()
    };
    let ctx = neckline_core::analysis::Context {
        curve: curve.clone(),
        settings: Settings::default(),
        lengths: Lengths {
            unit: Default::default(),
            d0: None,
            t0: None,
        },
        strain_input: false,
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
    let bytes = if svg {
        fld::fld_svg(&a, &opts).map(String::into_bytes)
    } else {
        fld::fld_png(&a, &opts)
    }
    .map_err(|e| Error::io(path, e))?;
    write_atomic(path, &[], |w| w.write_all(&bytes))?;
    eprintln!("Drew {}", path.display());
    Ok(())
}

/// A few lines for people: the file written, its plane-strain limit and the caution.
fn summary(c: &LimitCurve, path: &Path) -> String {
    let plane = c
        .limit_major_eng(neckline_core::strain::TrueStrain(0.0))
        .map_or_else(|| "not covered".into(), |e| format!("{:.2} %", e.percent()));
    format!(
        "Wrote {} ({} points, {} strain): {}\n\
         Plane-strain limit (FLC0): {plane} engineering major strain\n\
         A curve from a model is a prediction, not a tested curve.\n{}",
        path.display(),
        c.points.len(),
        c.measure,
        c.name,
        neckline_render::terminal::wrap(CAUTION, 80, "")
    )
}

/// Run `limit compare`: both curves' engineering major strain at each `--at` minor strain.
fn compare(a: &CompareArgs) -> Result<Outcome> {
    let ca = LimitCurve::load(&a.a)?;
    let cb = LimitCurve::load(&a.b)?;
    for w in ca.warnings.iter().chain(&cb.warnings) {
        eprintln!("warning: {w}");
    }
    if a.at.is_empty() {
        return Err(Error::Usage("--at needs at least one minor strain".into()));
    }
    let mut minors = Vec::with_capacity(a.at.len());
    for &m in &a.at {
        let t = EngStrain::from_percent(m)
            .to_true()
            .filter(|_| m.is_finite() && m.abs() <= 300.0)
            .ok_or_else(|| {
                Error::Usage(format!(
                    "--at {m}: a minor strain must be a percentage above -100 and at most 300"
                ))
            })?;
        minors.push((m, t));
    }
    print!("{}", compare_table(&ca, &a.a, &cb, &a.b, &minors));
    Ok(Outcome::Done)
}

/// The comparison table text.
fn compare_table(
    ca: &LimitCurve,
    pa: &Path,
    cb: &LimitCurve,
    pb: &Path,
    minors: &[(f64, neckline_core::strain::TrueStrain)],
) -> String {
    let mut s = format!(
        "A: {} ({}, {} strain)\nB: {} ({}, {} strain)\n\
         Engineering major strain (%) at each minor strain; '-' = outside the curve's range.\n\n\
         {:>10} {:>10} {:>10} {:>10}\n",
        ca.name,
        pa.display(),
        ca.measure,
        cb.name,
        pb.display(),
        cb.measure,
        "minor %",
        "A %",
        "B %",
        "B - A"
    );
    let cell = |v: Option<f64>| v.map_or_else(|| "-".to_string(), |v| format!("{v:.2}"));
    for &(m, t) in minors {
        let va = ca.limit_major_eng(t).map(|e| e.percent());
        let vb = cb.limit_major_eng(t).map(|e| e.percent());
        let diff = va.zip(vb).map(|(x, y)| y - x);
        s.push_str(&format!(
            "{:>10.2} {:>10} {:>10} {:>10}\n",
            m,
            cell(va),
            cell(vb),
            cell(diff)
        ));
    }
    s.push('\n');
    s.push_str(&neckline_render::terminal::wrap(CAUTION, 80, ""));
    s
}

/// Arguments of `limit from-parts`.
#[derive(Debug, Clone, Args)]
pub struct FromPartsArgs {
    /// Circles read on necked or split parts: a measurement CSV (id, major, minor[, d0, ...])
    /// with a `condition` column (safe, necked, split; empty = not observed); `-` = stdin.
    #[arg(value_name = "PARTS.csv")]
    pub parts: PathBuf,
    /// Lengths and job file (d0 for the strains; t0 recorded as the curve's thickness).
    #[command(flatten)]
    pub lengths: crate::args::LengthArgs,
    /// Knot spacing, percent true minor strain; also the width of a range of evidence.
    #[arg(long, value_name = "PCT", default_value_t = 5.0)]
    pub knot_spacing: f64,
    /// Weight of the smoothness penalty on the squared changes of slope at the knots.
    #[arg(long, value_name = "LAMBDA", default_value_t = 0.1)]
    pub smoothing: f64,
    /// Smallest boundary width (logistic scale) the fit may find, percent true strain.
    #[arg(long, value_name = "PCT", default_value_t = 0.5)]
    pub scatter_min: f64,
    /// Output file and name.
    #[command(flatten)]
    pub out: CurveOutArgs,
}

/// The circles of a parts file with a condition, and what was left out.
#[derive(Debug, Clone)]
pub struct PartsData {
    /// Circles with a condition, in file order.
    pub circles: Vec<PartCircle>,
    /// Rows read but with no condition marked.
    pub unmarked: usize,
    /// Rows rejected (unreadable, or no usable d0), with reasons.
    pub rejected: Vec<neckline_core::measure::RejectedRow>,
    /// Lowercase hex SHA-256 of the file's bytes as read.
    pub sha256: String,
    /// The lengths used.
    pub lengths: Lengths,
    /// The job file, if any.
    pub job: Job,
}

/// Read the parts file (`-` = stdin) once into memory, hash those bytes, and read the circles
/// from the same bytes, so that the recorded hash is that of the data the curve was fitted to.
/// Strains: d0 from the row, else `--d0`, else the job file, as `check` does.
pub fn read_parts(path: &Path, lengths: &crate::args::LengthArgs) -> Result<PartsData> {
    let job = super::load_job(lengths)?;
    let l = super::resolve_lengths(lengths, &job)?;
    let mut bytes = Vec::new();
    neckline_core::measure::open_input(path)?
        .read_to_end(&mut bytes)
        .map_err(|e| Error::io(path, e))?;
    let sha256 = sha256_hex(&bytes);
    let map = super::column_map(lengths, &job);
    let set = neckline_core::measure::read_measurements_from(&bytes[..], path, &map)?;
    let mut data = PartsData {
        circles: Vec::new(),
        unmarked: 0,
        rejected: set.rejected,
        sha256,
        lengths: l,
        job,
    };
    for m in set.points {
        match part_circle(&m, path, &l) {
            Ok(Some(c)) => data.circles.push(c),
            Ok(None) => data.unmarked += 1,
            Err(r) => data.rejected.push(r),
        }
    }
    data.rejected.sort_by_key(|r| r.location.line);
    Ok(data)
}

/// The true strains of one marked circle; `Ok(None)` when no condition is marked.
fn part_circle(
    m: &neckline_core::measure::Measurement,
    file: &Path,
    l: &Lengths,
) -> std::result::Result<Option<PartCircle>, neckline_core::measure::RejectedRow> {
    let Some(condition) = m.condition else {
        return Ok(None);
    };
    // The same strains, from axes or strain columns, with the same refusals as `check`.
    let s = neckline_core::analysis::state_of(m.clone(), file, l)?.strain;
    Ok(Some(PartCircle {
        id: m.id.clone(),
        minor: s.true_strain.minor.value(),
        major: s.true_strain.major.value(),
        condition,
    }))
}

/// Run `limit from-parts`.
fn from_parts(a: &FromPartsArgs) -> Result<Outcome> {
    let settings = FitSettings {
        knot_spacing: a.knot_spacing / 100.0,
        smoothing: a.smoothing,
        scale_min: a.scatter_min / 100.0,
    };
    settings
        .validate()
        .map_err(|m| Error::Usage(format!("from-parts: {m}")))?;
    plot_kind_of(&a.out)?;
    let data = read_parts(&a.parts, &a.lengths)?;
    require_circles(&data, &a.parts)?;
    const SHOWN: usize = 10;
    for r in data.rejected.iter().take(SHOWN) {
        eprintln!("warning: row left out: {r}");
    }
    if data.rejected.len() > SHOWN {
        eprintln!(
            "warning: ... and {} more rows left out",
            data.rejected.len() - SHOWN
        );
    }
    let fit = from_parts::fit(&data.circles, &settings)
        .map_err(|m| Error::Usage(format!("{}: {m}", input_name(&a.parts))))?;
    let curve = parts_curve(a, &data, &fit);
    let mut inputs = vec![a.parts.clone()];
    inputs.extend(a.lengths.job.clone());
    let input = a.parts.clone();
    emit_with(
        &curve,
        &a.out,
        &inputs,
        SHOP_HEADER,
        |c, path, svg| plot_parts(c, &fit, &data.circles, &input, path, svg),
        |c, path| parts_summary(c, path, &fit, &data),
    )
}

/// Refuse a file that gave no circle with a condition, saying why: no row usable (the first
/// rejection quoted), or no condition marked.
fn require_circles(data: &PartsData, path: &Path) -> Result<()> {
    if !data.circles.is_empty() {
        return Ok(());
    }
    let name = input_name(path);
    if let Some(first) = data.rejected.first() {
        return Err(Error::Usage(format!(
            "{name}: no circle with a condition could be read ({} rows left out; first: {first})",
            data.rejected.len()
        )));
    }
    Err(Error::Usage(format!(
        "{name}: none of its {} circles has a condition: the file needs a `condition` column \
         marking each circle read on a necked or split part `safe`, `necked` or `split`",
        data.unmarked
    )))
}

fn plot_kind_of(out: &CurveOutArgs) -> Result<()> {
    out.plot.as_deref().map(plot_kind).transpose().map(|_| ())
}

/// The curve file of a fit: the knots in true strain, and a `source` that records the data file
/// and its SHA-256, the counts per condition, the method and its settings, the version and the
/// words of [`SHOP_CURVE_WORDS`].
fn parts_curve(a: &FromPartsArgs, data: &PartsData, fit: &PartsFit) -> GeneratedCurve {
    let c = fit.counts;
    let s = fit.settings;
    let first = fit.knots[0];
    let last = fit.knots[fit.knots.len() - 1];
    let d0 = data.lengths.d0.map_or_else(
        || "d0 from each row".into(),
        |d| format!("d0 = {d} {} unless a row gives its own", data.lengths.unit),
    );
    let source = format!(
        "{SHOP_CURVE_WORDS}. Data: {} (SHA-256 {}); circles: {} safe, {} necked, {} split ({} \
         rows without a condition, {} rows rejected); {d0}. Method: penalised logistic \
         likelihood of the condition (necked or split = at or above the limit) in the vertical \
         true-strain distance to a piecewise-linear curve; {} knots from {:.2} to {:.2} % true \
         minor strain (ends and multiples of {} %), smoothness lambda = {} on the squared \
         changes of slope, logistic scale s fitted = {:.3} % (floor {} %, grid ratio {}); {} of \
         {} circles on the wrong side; true strain; generated by neckline {TOOL_VERSION}",
        input_name(&a.parts),
        data.sha256,
        c.safe,
        c.necked,
        c.split,
        data.unmarked,
        data.rejected.len(),
        fit.knots.len(),
        100.0 * first,
        100.0 * last,
        100.0 * s.knot_spacing,
        s.smoothing,
        100.0 * fit.scale,
        100.0 * s.scale_min,
        from_parts::SCALE_RATIO,
        fit.wrong_side(),
        c.safe + c.failed(),
    );
    let material = a.out.material.clone().or_else(|| {
        let j = &data.job;
        match (&j.material, &j.lot) {
            (Some(m), Some(l)) => Some(format!("{m}, {l}")),
            (m, l) => m.clone().or_else(|| l.clone()),
        }
    });
    let file = a.parts.file_name().map_or_else(
        || "standard input".into(),
        |n| n.to_string_lossy().into_owned(),
    );
    GeneratedCurve {
        name: a
            .out
            .name
            .clone()
            .unwrap_or_else(|| format!("Press-shop curve, {file}")),
        source,
        material,
        thickness_mm: data
            .lengths
            .t0
            .map(|t| neckline_core::units::Length::new(t, data.lengths.unit).mm()),
        measure: StrainMeasure::True,
        points_pct: fit.points_pct(),
        notes: overlap_table(fit),
    }
}

/// The overlap per knot, as text lines (true strain, percent).
pub fn overlap_table(fit: &PartsFit) -> Vec<String> {
    let mut v = vec![
        "Overlap per knot (true strain, %), from the circles nearest each knot:".to_string(),
        "wrong = safe on or above the curve, necked or split below it;".to_string(),
        "band = where safe and necked-or-split circles mix, or the gap between them.".to_string(),
        format!(
            "{:>8} {:>8} {:>5} {:>7} {:>6} {:>6}  band",
            "minor", "curve", "safe", "necked", "split", "wrong"
        ),
    ];
    for r in &fit.overlap {
        let band = match r.band {
            Band::Mix(lo, hi) => format!("mix {:.1} to {:.1}", 100.0 * lo, 100.0 * hi),
            Band::Gap(lo, hi) => format!("gap {:.1} to {:.1}", 100.0 * lo, 100.0 * hi),
            Band::OneSided => "one kind only".into(),
        };
        v.push(format!(
            "{:>8.2} {:>8.2} {:>5} {:>7} {:>6} {:>6}  {band}",
            100.0 * r.minor,
            100.0 * r.major,
            r.counts.safe,
            r.counts.necked,
            r.counts.split,
            r.wrong_side()
        ));
    }
    v
}

/// What `from-parts` tells the user after writing the curve.
fn parts_summary(c: &LimitCurve, path: Option<&Path>, fit: &PartsFit, data: &PartsData) -> String {
    let n = fit.counts;
    let plane = c
        .limit_major_eng(neckline_core::strain::TrueStrain(0.0))
        .map_or_else(
            || "not covered (no circles at plane strain)".into(),
            |e| format!("{:.2} %", e.percent()),
        );
    let mut s = String::new();
    if let Some(path) = path {
        s.push_str(&format!(
            "Wrote {} ({} knots, true strain): {}\n",
            path.display(),
            c.points.len(),
            c.name
        ));
    }
    s.push_str(&format!(
        "Circles: {} safe, {} necked, {} split; {} rows without a condition, {} rejected\n\
         Evidence (both kinds) on {} ranges of minor strain {:.1} % wide\n\
         Boundary width (logistic scale s): {:.2} % true strain{}\n\n",
        n.safe,
        n.necked,
        n.split,
        data.unmarked,
        data.rejected.len(),
        fit.evidence.len(),
        100.0 * fit.settings.knot_spacing,
        100.0 * fit.scale,
        if fit.scale_at_floor {
            ",\n  at its floor: safe and necked circles barely mix; the curve runs through the gap"
        } else {
            ""
        }
    ));
    for line in overlap_table(fit) {
        s.push_str(&line);
        s.push('\n');
    }
    s.push_str(&format!(
        "\nCircles on the wrong side of the curve: {} of {}\n\
         Plane-strain limit (FLC0): {plane} engineering major strain\n",
        fit.wrong_side(),
        n.safe + n.failed()
    ));
    let words = format!("A {SHOP_CURVE_WORDS}.");
    s.push_str(&neckline_render::terminal::wrap(&words, 80, ""));
    s.push_str(&neckline_render::terminal::wrap(CAUTION, 80, ""));
    s
}

/// Draw the press-shop curve on a diagram in true strain with the circles by condition, the
/// overlap band at each knot and the reference strain paths, in the plotting style of `check`.
fn plot_parts(
    curve: &LimitCurve,
    fit: &PartsFit,
    circles: &[PartCircle],
    input: &Path,
    path: &Path,
    svg: bool,
) -> Result<()> {
    let bytes = if svg {
        parts::parts_svg(curve, fit, circles, input).map(String::into_bytes)
    } else {
        parts::parts_png(curve, fit, circles, input)
    }
    .map_err(|e| Error::io(path, e))?;
    write_atomic(path, &[], |w| w.write_all(&bytes))?;
    eprintln!("Drew {}", path.display());
    Ok(())
}
