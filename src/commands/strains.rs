//! `neckline strains`: the strain columns alone, as CSV on stdout.

use super::Outcome;
use crate::analysis::{analyse, Lengths};
use crate::assess::Settings;
use crate::cli::LengthArgs;
use crate::error::{Error, Result};
use crate::limit::LimitCurve;
use crate::measure::read_measurements;
use crate::output::points_csv;
use clap::Args;
use std::path::PathBuf;

/// Arguments of `strains`.
#[derive(Debug, Clone, Args)]
pub struct StrainsArgs {
    /// Measurement file (CSV: id, major, minor[, d0, ...]); `-` = stdin.
    #[arg(value_name = "MEASUREMENTS.csv")]
    pub measurements: PathBuf,
    /// Lengths and job file.
    #[command(flatten)]
    pub lengths: LengthArgs,
}

/// A curve that covers every minor strain, so that no row is left out for want of a limit; its
/// judgement is not written by `strains`.
fn unbounded_curve() -> LimitCurve {
    LimitCurve {
        name: "none".into(),
        source: "strains only".into(),
        material: None,
        thickness_mm: None,
        measure: crate::strain::StrainMeasure::True,
        points: vec![[-1e6, 1e6], [1e6, 1e6]],
        warnings: Vec::new(),
        true_path: Default::default(),
    }
}

/// Run `strains`.
pub fn run(args: &StrainsArgs) -> Result<Outcome> {
    let job = super::load_job(&args.lengths)?;
    let lengths: Lengths = super::resolve_lengths(&args.lengths, &job)?;
    let set = read_measurements(&args.measurements)?;
    let a = analyse(set, job, lengths, unbounded_curve(), Settings::default());
    for r in &a.rejected {
        eprintln!("rejected: {r}");
    }
    if a.points.is_empty() {
        return Err(Error::Usage(format!(
            "{}: no location could be computed ({} rows rejected, listed above)",
            args.measurements.display(),
            a.rejected.len()
        )));
    }
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    match points_csv::write_strains(&a, &mut out) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(Outcome::Done),
        Err(e) => Err(Error::io(std::path::Path::new("<stdout>"), e)),
        Ok(()) => Ok(Outcome::Done),
    }
}
