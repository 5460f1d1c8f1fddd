//! `neckline check`: the main job. Measured circles -> strains -> judgement -> files + summary.

use super::outputs::{emit, OutputArgs, Plan};
use super::{run_analysis, Outcome};
use crate::analysis::Analysis;
use crate::cli::{JudgeArgs, LengthArgs};
use crate::error::{Error, Result};
use clap::Args;
use std::path::PathBuf;

/// Arguments of `check`.
#[derive(Debug, Clone, Args)]
pub struct CheckArgs {
    /// Measurement file (CSV: id, major, minor[, d0, x, y, stage, thickness, note]); `-` = stdin.
    #[arg(value_name = "MEASUREMENTS.csv")]
    pub measurements: PathBuf,
    /// Refuse the whole file (exit 2, nothing written) if any row is rejected.
    #[arg(long)]
    pub strict: bool,
    /// Outputs.
    #[command(flatten)]
    pub output: OutputArgs,
    /// Lengths and job file.
    #[command(flatten)]
    pub lengths: LengthArgs,
    /// Curve and settings.
    #[command(flatten)]
    pub judge: JudgeArgs,
}

/// Run `check`.
pub fn run(args: &CheckArgs) -> Result<Outcome> {
    let plan = Plan::of(&args.output);
    plan.prepare(&direct_inputs(args))?;
    let a = run_analysis(&args.measurements, &args.lengths, &args.judge, None)?;
    if args.strict && !a.rejected.is_empty() {
        return Err(Error::Usage(format!(
            "--strict: {} rows rejected, first: {}",
            a.rejected.len(),
            a.rejected[0]
        )));
    }
    emit(&a, &args.output, &plan, &inputs(args, &a), "")?;
    let tripped = args.judge.fail_on.is_some_and(|z| a.trips(z));
    Ok(if tripped {
        Outcome::Tripped
    } else {
        Outcome::Done
    })
}

/// The files named on the command line, known before anything is read.
fn direct_inputs(args: &CheckArgs) -> Vec<PathBuf> {
    let mut v = vec![args.measurements.clone()];
    v.extend(args.lengths.job.clone());
    v.extend(args.judge.limit.clone());
    v
}

/// Every input, including the curve named by the job file.
fn inputs(args: &CheckArgs, a: &Analysis) -> Vec<PathBuf> {
    let mut v = direct_inputs(args);
    v.extend(a.job.limit.clone());
    v
}
