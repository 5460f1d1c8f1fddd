//! `neckline strains`: the strain columns alone, as CSV on stdout, streamed.

use super::Outcome;
use crate::args::LengthArgs;
use clap::Args;
use neckline_core::analysis::Analysis;
use neckline_core::assess::Settings;
use neckline_core::error::{Error, Result};
use neckline_core::limit::LimitCurve;
use neckline_core::measure::{open_input, Header, RowRules};
use neckline_core::output::points_csv::Layout;
use neckline_core::point::Context;
use neckline_core::stream::Pass;
use neckline_core::units::Lengths;
use std::io::Write;
use std::path::PathBuf;

/// Arguments of `strains`.
#[derive(Debug, Clone, Args)]
pub struct StrainsArgs {
    /// Measurement file (CSV: id, major, minor[, d0, ...], or strain columns); `-` = stdin.
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
        measure: neckline_core::strain::StrainMeasure::True,
        points: vec![[-1e6, 1e6], [1e6, 1e6]],
        warnings: Vec::new(),
        supported: None,
        scatter: None,
        true_path: Default::default(),
    }
}

/// Run `strains`.
pub fn run(args: &StrainsArgs) -> Result<Outcome> {
    let job = super::load_job(&args.lengths)?;
    let lengths: Lengths = super::resolve_lengths(&args.lengths, &job)?;
    let map = super::column_map(&args.lengths, &job);
    let path = &args.measurements;
    let mut input = open_input(path)?;
    let header = Header::read(&mut input, path, &map)?.with_rules(RowRules {
        unit: lengths.unit,
        ..RowRules::default()
    });
    header.check_units()?;
    let ctx = Context {
        curve: unbounded_curve(),
        settings: Settings::default(),
        lengths,
        strain_input: header.columns.gives_strains(),
        true_input: header.columns.gives_true_strains(),
    };
    let layout = Layout {
        strains_only: true,
        unit: lengths.unit,
        ..Layout::default()
    };
    let mut out = std::io::BufWriter::with_capacity(1 << 20, std::io::stdout());
    let pass = Pass {
        header: &header,
        ctx: &ctx,
        layout: &layout,
        view: Default::default(),
        write: true,
        size_hint: std::fs::metadata(path).ok().map(|m| m.len()),
    };
    let broken = |e: &std::io::Error| e.kind() == std::io::ErrorKind::BrokenPipe;
    let stdout_err = |e| Error::io(std::path::Path::new("<stdout>"), e);
    match out.write_all(layout.header_line().as_bytes()) {
        Err(e) if broken(&e) => return Ok(Outcome::Done),
        r => r.map_err(stdout_err)?,
    }
    let summary = match pass.run(input, Some(&mut out), &mut |_| {}) {
        Err(Error::Io { reason, .. }) if broken(&reason) => return Ok(Outcome::Done),
        r => r?,
    };
    match out.flush() {
        Err(e) if broken(&e) => return Ok(Outcome::Done),
        r => r.map_err(stdout_err)?,
    }
    for r in &summary.rejected.items {
        eprintln!("rejected: {r}");
    }
    if summary.rejected.total > summary.rejected.items.len() {
        eprintln!(
            "rejected: ... and {} more",
            summary.rejected.total - summary.rejected.items.len()
        );
    }
    let mut a = Analysis::new(path.clone(), job, ctx, Default::default(), &header.notes);
    a.summary = summary;
    if let Some(line) = neckline_core::output::not_measured_line(&a) {
        eprintln!("note: {line}");
    }
    if a.total() == 0 {
        return Err(Error::Usage(format!(
            "{}: no location could be computed ({} rows rejected, listed above)",
            path.display(),
            a.rejected_total()
        )));
    }
    Ok(Outcome::Done)
}
