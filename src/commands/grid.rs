//! `neckline grid`: strains from grid nodes (flat blank and formed part), judged like `check`.

use super::outputs::{emit, OutputArgs, Plan, Summary};
use super::{limit_path, load_job, resolve_lengths, resolve_settings, Outcome};
use crate::args::{JudgeArgs, LengthArgs};
use clap::Args;
use neckline_core::analysis::Analysis;
use neckline_core::error::{Error, Result};
use neckline_core::grid::mesh::{Element, Nodes};
use neckline_core::grid::read::{
    needs_elements, read_nodes, Cells, ElementReader, UniqueIds, ELEMENTS_WHAT,
};
use neckline_core::grid::rows::{grid_rows, rows_in_order};
use neckline_core::limit::LimitCurve;
use neckline_core::output::points_csv::Layout;
use neckline_core::point::Context;
use neckline_core::stream::elements::{judge_elements, ElementJudge};
use neckline_core::summary::MapPlane;
use neckline_core::table::stream_table;
use neckline_core::units::LengthUnit;
use std::io::Write;
use std::path::{Path, PathBuf};

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

/// Read the nodes, then compute, judge and write (to `sink`, points.csv's rows with its header)
/// the elements a batch at a time on every core, as `check` streams rows: nothing holds every
/// element. Also the count of what was rejected, in words ([`rejected_counts`]).
pub fn grid_analysis(
    args: &GridArgs,
    mut sink: Option<&mut (dyn Write + Send)>,
) -> Result<(Analysis, String)> {
    let job = load_job(&length_args(args))?;
    let mut lengths = resolve_lengths(&length_args(args), &job)?;
    lengths.d0 = None;
    let settings = resolve_settings(&args.judge, &job, lengths.unit)?;
    let curve = LimitCurve::load(&limit_path(&args.judge, &job)?)?;
    let outline = super::job_outline(&job)?;
    // A regular grid whose rows come in order is read a few grid rows at a time; any other
    // nodes file is held whole.
    let by_rows = match args.elements.is_none() && rows_in_order(&args.nodes) {
        true => Some(grid_rows(&args.nodes)?),
        false => None,
    };
    let mut set = match &by_rows {
        Some(rows) => rows.head().clone(),
        None => read_nodes(&args.nodes)?,
    };
    if args.elements.is_none() && !set.has_grid {
        return Err(needs_elements(&set));
    }
    let source = args.elements.clone().unwrap_or_else(|| args.nodes.clone());
    let job_d0 = job.d0.is_some();
    let ctx = Context {
        curve,
        settings,
        lengths,
        strain_input: false,
        true_input: false,
    };
    let notes: Vec<String> = if set.ignored_columns.is_empty() {
        Vec::new()
    } else {
        vec![format!(
            "ignored columns: {}",
            set.ignored_columns.join(", ")
        )]
    };
    let mut a = Analysis::new(
        args.nodes.clone(),
        job,
        ctx.clone(),
        args.output.view(),
        &notes,
    );
    let layout = Layout {
        grid: true,
        reading: ctx.settings.reading_error.is_some(),
        unit: ctx.lengths.unit,
        ..Layout::default()
    };
    let points_err = |e| Error::io(Path::new("points.csv"), e);
    if let Some(w) = sink.as_mut() {
        w.write_all(layout.header_line().as_bytes())
            .map_err(points_err)?;
    }
    let (three_d, write) = (set.three_d, sink.is_some());
    // Elements rejected as read (a missing corner, a bad row), and as evaluated.
    let (mut read_bad, mut eval_bad) = (Vec::new(), Vec::new());
    let mut take = |nodes: &Nodes, elements: &[Element], a: &mut Analysis| -> Result<()> {
        let judge = ElementJudge {
            nodes,
            three_d,
            source: &source,
            regular_grid: args.elements.is_none(),
            ctx: &ctx,
            layout: &layout,
            write,
        };
        let template = a.summary.template();
        for piece in judge_elements(&judge, elements, &template) {
            if let Some(w) = sink.as_mut() {
                w.write_all(&piece.text).map_err(points_err)?;
            }
            a.summary.merge(piece.summary);
            eval_bad.extend(piece.rejected);
        }
        Ok(())
    };
    match (&args.elements, by_rows) {
        (_, Some(rows)) => {
            let head = rows.for_each_cells(BATCH, |held, elements, bad| {
                read_bad.extend(bad);
                take(&held.nodes, elements, &mut a)
            })?;
            set.rejected = head.rejected;
        }
        (Some(path), None) => {
            let stream = stream_table(path, ELEMENTS_WHAT)?;
            let reader = ElementReader::new(&stream.table, &set)?;
            let mut ids = UniqueIds::default();
            stream.for_each_batch(
                |t, line, r| reader.parse(t, line, r),
                |t, rows| {
                    let mut elements = Vec::with_capacity(rows.len());
                    for row in rows {
                        match row.and_then(|e| ids.check(t, reader.id_column(), e)) {
                            Ok(e) => elements.push(e),
                            Err(r) => read_bad.push(r),
                        }
                    }
                    take(&set.nodes, &elements, &mut a)
                },
            )?;
        }
        (None, None) => {
            let mut cells = Cells::new(&set);
            while let Some((elements, bad)) = cells.next_cells(BATCH) {
                read_bad.extend(bad);
                take(&set.nodes, &elements, &mut a)?;
            }
        }
    }
    let counts = rejected_counts(set.rejected.len(), read_bad.len() + eval_bad.len());
    let mut rejected = set.rejected;
    rejected.extend(read_bad);
    rejected.extend(eval_bad);
    rejected.sort_by(|a, b| {
        (&a.location.file, a.location.line).cmp(&(&b.location.file, b.location.line))
    });
    for r in rejected {
        a.summary.rejected.push(r);
    }
    // The job's outline before `finish`, which traces one only when none is set.
    if let Some(o) = outline.filter(|_| a.summary.view.plane == MapPlane::Xy) {
        a.outline = Some(o);
    }
    a.finish();
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
    Ok((a, counts))
}

/// Elements judged between two writes of points.csv: a few MB of rows.
const BATCH: usize = 32_768;

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
    // points.csv is staged as it is written (moved in with the other outputs, or not at all);
    // to standard output it is kept until the run has succeeded.
    let mut file = match &plan.points {
        Some(p) if !plan.points_to_stdout() => Some(set.create(p)?),
        _ => None,
    };
    let mut held = Vec::new();
    let sink: Option<&mut (dyn Write + Send)> = match (&mut file, plan.points_to_stdout()) {
        (Some(f), _) => Some(f),
        (None, true) => Some(&mut held),
        (None, false) => None,
    };
    let (a, counts) = grid_analysis(args, sink)?;
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
    let points = match file {
        Some(f) => Some(f),
        None => super::outputs::points_out(&plan, &mut set, &held)?,
    };
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
