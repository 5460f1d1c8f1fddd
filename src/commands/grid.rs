//! `neckline grid`: strains from grid nodes (flat blank and formed part), judged like `check`.

use super::outputs::{emit, OutputArgs, Plan, Summary};
use super::{limit_path, load_job, resolve_lengths, resolve_settings, Outcome};
use crate::args::{JudgeArgs, LengthArgs};
use clap::Args;
use neckline_core::analysis::Analysis;
use neckline_core::error::{Error, Result};
use neckline_core::grid::read::read_mesh;
use neckline_core::limit::LimitCurve;
use neckline_core::output::points_csv::{self, Layout};
use neckline_core::point::elements::evaluate;
use neckline_core::point::{Context, PointResult};
use neckline_core::summary::MapPlane;
use neckline_core::units::LengthUnit;
use std::path::PathBuf;

/// Arguments of `grid`.
#[derive(Debug, Clone, Args)]
pub struct GridArgs {
    /// Nodes file (CSV: row, col (or id), X, Y, x, y[, z]): X, Y in the flat blank, x, y[, z] on
    /// the formed part; `-` = stdin.
    #[arg(value_name = "NODES.csv")]
    pub nodes: PathBuf,
    /// Elements file for an irregular mesh (CSV: id, n1, n2, n3[, n4], node ids in order around
    /// each element) [default: the cells of the row, col grid].
    #[arg(long, value_name = "ELEMENTS.csv")]
    pub elements: Option<PathBuf>,
    /// Refuse the whole run (exit 2, nothing written) if any node row or element is rejected.
    #[arg(long)]
    pub strict: bool,
    /// Job file (TOML): part, tryout, material, t0, unit, limit and settings (its d0 is not
    /// used: each element's own size is). Flags given here override it.
    #[arg(long, value_name = "JOB.toml")]
    pub job: Option<PathBuf>,
    /// Initial sheet thickness, in --unit (for thickness; thinning needs no t0).
    #[arg(long, value_name = "LENGTH")]
    pub t0: Option<f64>,
    /// Length unit of the node positions and --t0 [default: mm, or the job file's].
    #[arg(long, value_name = "mm|in")]
    pub unit: Option<LengthUnit>,
    /// How the inputs are read.
    #[command(flatten)]
    pub input: crate::args::InputArgs,
    /// Outputs.
    #[command(flatten)]
    pub output: OutputArgs,
    /// Curve and settings.
    #[command(flatten)]
    pub judge: JudgeArgs,
}

fn length_args(args: &GridArgs) -> LengthArgs {
    LengthArgs {
        job: args.job.clone(),
        d0: None,
        t0: args.t0,
        unit: args.unit,
        columns: Vec::new(),
        input: args.input.clone(),
        header_row: None,
    }
}

/// Read the mesh, compute every element's strains and judge them; also every judged element
/// (for points.csv) and the count of what was rejected, in words ([`rejected_counts`]).
pub fn grid_analysis(args: &GridArgs) -> Result<(Analysis, Vec<PointResult>, String)> {
    let job = load_job(&length_args(args))?;
    let mut lengths = resolve_lengths(&length_args(args), &job)?;
    lengths.d0 = None;
    let settings = resolve_settings(&args.judge, &job, lengths.unit)?;
    let curve = LimitCurve::load(&limit_path(&args.judge, &job)?)?;
    let outline = super::job_outline(&job)?;
    let read = read_mesh(&args.nodes, args.elements.as_deref())?;
    let source = args.elements.clone().unwrap_or_else(|| args.nodes.clone());
    let (states, bad) = evaluate(&read.mesh, &source, args.elements.is_none());
    let counts = rejected_counts(read.node_rows.len(), read.elements.len() + bad.len());
    let mut rejected = read.node_rows;
    rejected.extend(read.elements);
    rejected.extend(bad);
    rejected.sort_by(|a, b| {
        (&a.location.file, a.location.line).cmp(&(&b.location.file, b.location.line))
    });
    let job_d0 = job.d0.is_some();
    let ctx = Context {
        curve,
        settings,
        lengths,
        strain_input: false,
        true_input: false,
    };
    let notes: Vec<String> = if read.ignored.is_empty() {
        Vec::new()
    } else {
        vec![format!("ignored columns: {}", read.ignored.join(", "))]
    };
    let (mut a, all) = Analysis::of_states(
        args.nodes.clone(),
        job,
        ctx,
        args.output.view(),
        states,
        rejected,
        &notes,
    );
    if let Some(o) = outline.filter(|_| a.summary.view.plane == MapPlane::Xy) {
        a.outline = Some(o);
    }
    if job_d0 {
        a.warnings.push(
            "d0 in the job file is not used by grid: each element's blank area gives its own"
                .into(),
        );
    }
    if a.total() == 0 {
        let first = a
            .rejected()
            .first()
            .map(|r| format!("; first: {r}"))
            .unwrap_or_default();
        return Err(Error::Usage(format!(
            "{}: no element could be evaluated ({counts}{first})",
            args.nodes.display()
        )));
    }
    Ok((a, all, counts))
}

/// "2 node rows and 3 elements rejected", each count in its own words (a grid cell is an
/// element, not a row).
pub fn rejected_counts(node_rows: usize, elements: usize) -> String {
    let plural =
        |n: usize, one: &str, many: &str| format!("{n} {}", if n == 1 { one } else { many });
    match (node_rows, elements) {
        (0, e) => format!("{} rejected", plural(e, "element", "elements")),
        (n, 0) => format!("{} rejected", plural(n, "node row", "node rows")),
        (n, e) => format!(
            "{} and {} rejected",
            plural(n, "node row", "node rows"),
            plural(e, "element", "elements")
        ),
    }
}

/// Run `grid`.
pub fn run(args: &GridArgs) -> Result<Outcome> {
    let mut inputs = vec![args.nodes.clone()];
    inputs.extend(args.elements.clone());
    inputs.extend(args.job.clone());
    inputs.extend(args.judge.limit.clone());
    let plan = Plan::of(&args.output);
    let mut set = plan.prepare(&args.output.out, &inputs)?;
    let (a, all, counts) = grid_analysis(args)?;
    if args.strict && a.rejected_total() > 0 {
        return Err(Error::Usage(format!(
            "--strict: {counts}, first: {}",
            a.rejected()[0]
        )));
    }
    inputs.extend(a.job.limit.clone());
    let three_d = a.summary.grid.1;
    let preface = format!(
        "Grid: {} elements evaluated from node positions ({}), quads at their centre\n",
        a.total(),
        if three_d { "3-D formed part" } else { "2-D" }
    );
    let layout = Layout {
        grid: true,
        reading: a.settings.reading_error.is_some(),
        unit: a.lengths.unit,
        ..Layout::default()
    };
    let text = points_csv::table(&layout, &all);
    drop(all);
    let points = super::outputs::points_out(&plan, &mut set, text.as_bytes())?;
    emit(
        &a,
        &args.output,
        &plan,
        set,
        &inputs,
        points,
        Summary::PrintAfter(&preface),
    )?;
    let tripped = args
        .judge
        .fail_on
        .or(a.job.fail_on)
        .is_some_and(|z| a.trips(z));
    Ok(if tripped {
        Outcome::Tripped
    } else {
        Outcome::Done
    })
}
