//! `neckline limit compare`: two curves' engineering major strain side by side at a set of minor
//! strains, and their difference. (Not the `compare` command, which compares tryouts.)

use crate::commands::{paragraph, Outcome};
use clap::Args;
use neckline_core::error::{Error, Result};
use neckline_core::limit::LimitCurve;
use neckline_core::strain::{EngStrain, TrueStrain};
use neckline_core::CAUTION;
use std::path::{Path, PathBuf};

/// Arguments of `limit compare`.
#[derive(Debug, Clone, Args)]
pub struct CurvesCompareArgs {
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

/// Run `limit compare`: both curves' engineering major strain at each `--at` minor strain.
pub fn run(a: &CurvesCompareArgs) -> Result<Outcome> {
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
    minors: &[(f64, TrueStrain)],
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
    s.push_str(&paragraph(CAUTION));
    s
}
