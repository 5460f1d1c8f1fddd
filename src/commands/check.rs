//! `neckline check`: the main job. Measured circles -> strains -> judgement -> files + summary.

use super::{run_analysis, Outcome};
use crate::analysis::Analysis;
use crate::cli::{JudgeArgs, LengthArgs};
use crate::error::{Error, Result};
use crate::output::{points_csv, summary_json, terminal, write_atomic};
use clap::Args;
use std::path::PathBuf;

/// Arguments of `check`.
#[derive(Debug, Clone, Args)]
pub struct CheckArgs {
    /// Measurement file (CSV: id, major, minor[, d0, x, y, stage, thickness, note]); `-` = stdin.
    #[arg(value_name = "MEASUREMENTS.csv")]
    pub measurements: PathBuf,
    /// Folder for points.csv and summary.json (created if missing).
    #[arg(long, value_name = "DIR", default_value = "neckline-out")]
    pub out: PathBuf,
    /// Refuse the whole file (exit 2, nothing written) if any row is rejected.
    #[arg(long)]
    pub strict: bool,
    /// Lengths and job file.
    #[command(flatten)]
    pub lengths: LengthArgs,
    /// Curve and settings.
    #[command(flatten)]
    pub judge: JudgeArgs,
}

/// Run `check`.
pub fn run(args: &CheckArgs) -> Result<Outcome> {
    let a = run_analysis(&args.measurements, &args.lengths, &args.judge, None)?;
    if args.strict && !a.rejected.is_empty() {
        return Err(Error::Usage(format!(
            "--strict: {} rows rejected, first: {}",
            a.rejected.len(),
            a.rejected[0]
        )));
    }
    let written = write_outputs(&a, args)?;
    print!("{}", terminal::summary_text(&a));
    println!(
        "Wrote {}",
        written
            .iter()
            .map(|p| p.display().to_string())
            .collect::<Vec<_>>()
            .join(", ")
    );
    let tripped = args.judge.fail_on.is_some_and(|z| a.trips(z));
    Ok(if tripped {
        Outcome::Tripped
    } else {
        Outcome::Done
    })
}

fn inputs(args: &CheckArgs, a: &Analysis) -> Vec<PathBuf> {
    let mut v = vec![args.measurements.clone()];
    v.extend(args.lengths.job.clone());
    v.extend(args.judge.limit.clone());
    v.extend(a.job.limit.clone());
    v
}

fn write_outputs(a: &Analysis, args: &CheckArgs) -> Result<Vec<PathBuf>> {
    std::fs::create_dir_all(&args.out).map_err(|e| Error::io(&args.out, e))?;
    let inputs = inputs(args, a);
    let points = args.out.join("points.csv");
    let summary = args.out.join("summary.json");
    for p in [&points, &summary] {
        crate::output::guard_inputs(p, &inputs)?;
    }
    write_atomic(&points, &inputs, |w| points_csv::write_points(a, w))?;
    write_atomic(&summary, &inputs, |w| summary_json::write_summary(a, w))?;
    Ok(vec![points, summary])
}
