//! `neckline check`: the main job. Measured circles -> strains -> judgement -> files + summary.

use super::{run_analysis, Outcome};
use crate::analysis::Analysis;
use crate::cli::{JudgeArgs, LengthArgs};
use crate::error::{Error, Result};
use crate::output::fld::{self, FldOptions};
use crate::output::{guard_inputs, map, points_csv, report, summary_json, terminal, write_atomic};
use crate::strain::StrainMeasure;
use clap::{Args, ValueEnum};
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

/// The files `check` can write.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Format {
    /// points.csv: one row per location.
    Csv,
    /// summary.json: counts, worst, verdict, settings.
    Json,
    /// fld.svg and map.svg.
    Svg,
    /// fld.png and map.png.
    Png,
    /// report.html: the printable report.
    Html,
}

/// Strain measure of the diagram's axes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlotStrain {
    /// Engineering strain, percent.
    Engineering,
    /// True (log) strain, percent.
    True,
}

/// Arguments of `check`.
#[derive(Debug, Clone, Args)]
pub struct CheckArgs {
    /// Measurement file (CSV: id, major, minor[, d0, x, y, stage, thickness, note]); `-` = stdin.
    #[arg(value_name = "MEASUREMENTS.csv")]
    pub measurements: PathBuf,
    /// Folder for the output files (created if missing).
    #[arg(long, value_name = "DIR", default_value = "neckline-out")]
    pub out: PathBuf,
    /// Which outputs to write, comma-separated: csv (points.csv), json (summary.json),
    /// svg (fld.svg, map.svg), png (fld.png, map.png), html (report.html).
    #[arg(
        long,
        value_name = "LIST",
        value_delimiter = ',',
        default_value = "csv,json,svg,png,html"
    )]
    pub format: Vec<Format>,
    /// Where the points CSV goes instead of DIR/points.csv; `-` = standard output (the summary
    /// then goes to standard error).
    #[arg(long, value_name = "FILE|-")]
    pub points: Option<PathBuf>,
    /// Strain measure of the diagram's axes [default: engineering].
    #[arg(long, value_name = "MEASURE", default_value = "engineering")]
    pub plot_strain: PlotStrain,
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

/// The files one run will write, decided and checked before any work is done.
#[derive(Debug, Clone, Default)]
pub struct Plan {
    /// points.csv target; `None` = not written, `Some("-")` = stdout.
    pub points: Option<PathBuf>,
    /// summary.json target.
    pub summary: Option<PathBuf>,
    /// fld.svg and map.svg targets.
    pub svg: Option<(PathBuf, PathBuf)>,
    /// fld.png and map.png targets.
    pub png: Option<(PathBuf, PathBuf)>,
    /// report.html target.
    pub html: Option<PathBuf>,
}

impl Plan {
    /// The planned targets, from the arguments.
    pub fn of(args: &CheckArgs) -> Self {
        let has = |f: Format| args.format.contains(&f);
        let dir = |name: &str| args.out.join(name);
        Plan {
            points: (has(Format::Csv) || args.points.is_some())
                .then(|| args.points.clone().unwrap_or_else(|| dir("points.csv"))),
            summary: has(Format::Json).then(|| dir("summary.json")),
            svg: has(Format::Svg).then(|| (dir("fld.svg"), dir("map.svg"))),
            png: has(Format::Png).then(|| (dir("fld.png"), dir("map.png"))),
            html: has(Format::Html).then(|| dir("report.html")),
        }
    }

    /// Whether the points CSV goes to standard output.
    pub fn points_to_stdout(&self) -> bool {
        self.points.as_deref() == Some(Path::new("-"))
    }

    /// Every file target (standard output left out).
    pub fn files(&self) -> Vec<&Path> {
        let mut v: Vec<&Path> = Vec::new();
        v.extend(self.points.as_deref().filter(|p| *p != Path::new("-")));
        v.extend(self.summary.as_deref());
        for pair in [&self.svg, &self.png].into_iter().flatten() {
            v.extend([pair.0.as_path(), pair.1.as_path()]);
        }
        v.extend(self.html.as_deref());
        v
    }

    /// Create the folders and refuse any target that is an input: before the work starts, so
    /// that a bad path fails at once.
    pub fn prepare(&self, inputs: &[PathBuf]) -> Result<()> {
        for f in self.files() {
            if let Some(dir) = f.parent().filter(|d| !d.as_os_str().is_empty()) {
                if dir.exists() && !dir.is_dir() {
                    return Err(Error::Usage(format!(
                        "cannot write {}: {} is a file, not a folder; choose another --out",
                        f.display(),
                        dir.display()
                    )));
                }
                std::fs::create_dir_all(dir).map_err(|e| Error::io(dir, e))?;
            }
            if f.is_dir() {
                return Err(Error::Usage(format!(
                    "cannot write {}: it is a folder",
                    f.display()
                )));
            }
            guard_inputs(f, inputs)?;
        }
        Ok(())
    }
}

/// Run `check`.
pub fn run(args: &CheckArgs) -> Result<Outcome> {
    let plan = Plan::of(args);
    plan.prepare(&direct_inputs(args))?;
    let a = run_analysis(&args.measurements, &args.lengths, &args.judge, None)?;
    if args.strict && !a.rejected.is_empty() {
        return Err(Error::Usage(format!(
            "--strict: {} rows rejected, first: {}",
            a.rejected.len(),
            a.rejected[0]
        )));
    }
    let written = write_outputs(&a, args, &plan)?;
    let wrote = terminal::wrap(
        &format!(
            "Wrote {}",
            written
                .iter()
                .map(|p| p.display().to_string())
                .collect::<Vec<_>>()
                .join(", ")
        ),
        terminal::WIDTH,
        "",
    );
    let mut text = String::new();
    if map::placed(&a).is_empty() && (plan.svg.is_some() || plan.png.is_some()) {
        text.push_str("note: no location has x, y: the part map was not drawn\n");
    }
    if !written.is_empty() {
        text.push_str(&wrote);
    }
    if plan.points_to_stdout() {
        let colour = terminal::use_colour(std::io::stderr().is_terminal());
        eprint!("{}{text}", terminal::summary(&a, colour));
    } else {
        let colour = terminal::use_colour(std::io::stdout().is_terminal());
        print!("{}{text}", terminal::summary(&a, colour));
    }
    let tripped = args.judge.fail_on.is_some_and(|z| a.trips(z));
    Ok(if tripped {
        Outcome::Tripped
    } else {
        Outcome::Done
    })
}

fn direct_inputs(args: &CheckArgs) -> Vec<PathBuf> {
    let mut v = vec![args.measurements.clone()];
    v.extend(args.lengths.job.clone());
    v.extend(args.judge.limit.clone());
    v
}

fn inputs(args: &CheckArgs, a: &Analysis) -> Vec<PathBuf> {
    let mut v = direct_inputs(args);
    v.extend(a.job.limit.clone());
    v
}

fn fld_options(args: &CheckArgs) -> FldOptions {
    FldOptions {
        measure: match args.plot_strain {
            PlotStrain::Engineering => StrainMeasure::Engineering,
            PlotStrain::True => StrainMeasure::True,
        },
        ..FldOptions::default()
    }
}

fn write_outputs(a: &Analysis, args: &CheckArgs, plan: &Plan) -> Result<Vec<PathBuf>> {
    let inputs = inputs(args, a);
    plan.prepare(&inputs)?;
    let mut written = Vec::new();
    let mut put = |path: &Path, bytes: &[u8]| -> Result<()> {
        write_atomic(path, &inputs, |w| w.write_all(bytes))?;
        written.push(path.to_path_buf());
        Ok(())
    };
    let render = |p: &Path, e: std::io::Error| Error::io(p, e);
    if let Some(p) = &plan.points {
        let mut csv = Vec::new();
        points_csv::write_points(a, &mut csv).map_err(|e| render(p, e))?;
        if plan.points_to_stdout() {
            write_stdout(&csv)?;
        } else {
            put(p, &csv)?;
        }
    }
    if let Some(p) = &plan.summary {
        let mut json = Vec::new();
        summary_json::write_summary(a, &mut json).map_err(|e| render(p, e))?;
        put(p, &json)?;
    }
    let opts = fld_options(args);
    if let Some((f, m)) = &plan.svg {
        put(
            f,
            fld::fld_svg(a, &opts).map_err(|e| render(f, e))?.as_bytes(),
        )?;
        if let Some(svg) = map::map_svg(a).map_err(|e| render(m, e))? {
            put(m, svg.as_bytes())?;
        }
    }
    if let Some((f, m)) = &plan.png {
        put(f, &fld::fld_png(a, &opts).map_err(|e| render(f, e))?)?;
        if let Some(png) = map::map_png(a).map_err(|e| render(m, e))? {
            put(m, &png)?;
        }
    }
    if let Some(p) = &plan.html {
        put(
            p,
            report::report_html(a, &opts)
                .map_err(|e| render(p, e))?
                .as_bytes(),
        )?;
    }
    Ok(written)
}

/// Write to standard output; a closed pipe is not an error.
fn write_stdout(bytes: &[u8]) -> Result<()> {
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    match out.write_all(bytes).and_then(|()| out.flush()) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
            Err(Error::io(Path::new("<stdout>"), e))
        }
        _ => Ok(()),
    }
}
