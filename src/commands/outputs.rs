//! Output selection shared by the commands that judge locations (`check`, `grid`): which files,
//! where, checked before the work starts, and the summary printed after.

use super::paragraph;
use crate::args::{MapPlaneArg, MapValueArg};
use clap::{Args, ValueEnum};
use neckline_core::analysis::Analysis;
use neckline_core::error::{Error, Result};
use neckline_core::output::AtomicFile;
use neckline_core::output::{guard_inputs, summary_json, write_atomic};
use neckline_core::strain::StrainMeasure;
use neckline_core::summary::{MapPlane, View};
use neckline_render::fld::{self, FldOptions};
use neckline_render::{map, report, terminal};
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
    /// points.xlsx: points.csv as a workbook (numbers as numbers, zones in colour), with a
    /// summary sheet.
    Xlsx,
    /// review.html: the interactive review page (diagram and map linked; opens from disk).
    Review,
}

/// Strain measure of the diagram's axes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum PlotStrain {
    /// Engineering strain, percent.
    Engineering,
    /// True (log) strain, percent.
    True,
}

/// Which outputs to write and where: shared by every command that judges locations.
#[derive(Debug, Clone, Args)]
pub struct OutputArgs {
    /// Folder for the output files (created if missing).
    #[arg(long, value_name = "DIR", default_value = "neckline-out")]
    pub out: PathBuf,
    /// Which outputs to write, comma-separated: csv (points.csv), json (summary.json),
    /// svg (fld.svg, map.svg), png (fld.png, map.png), html (report.html), xlsx (points.xlsx,
    /// made from points.csv, which is then written too), review (review.html: the interactive
    /// review page).
    #[arg(
        long,
        value_name = "LIST",
        value_delimiter = ',',
        default_value = "csv,json,svg,png,html,review"
    )]
    pub format: Vec<Format>,
    /// Where the points CSV goes instead of DIR/points.csv; `-` = standard output (the summary
    /// then goes to standard error).
    #[arg(long, value_name = "FILE|-")]
    pub points: Option<PathBuf>,
    /// Write points.csv with `;` between fields and a decimal comma, for a spreadsheet set to
    /// a decimal comma.
    #[arg(long)]
    pub decimal_comma: bool,
    /// Strain measure of the diagram's axes.
    #[arg(long, value_name = "MEASURE", default_value = "engineering")]
    pub plot_strain: PlotStrain,
    /// What the part map shows: the margin to the curve (pp), the thinning (%) or the major
    /// strain (engineering %).
    #[arg(long, value_name = "VALUE", default_value = "margin")]
    pub map_value: MapValueArg,
    /// The plane the part map is drawn in (for parts whose main face is not in x-y; z comes
    /// from a `z` column or the grid).
    #[arg(long, value_name = "PLANE", default_value = "xy")]
    pub map_plane: MapPlaneArg,
}

impl OutputArgs {
    /// How the pictures will show the locations.
    pub fn view(&self) -> View {
        View {
            measure: match self.plot_strain {
                PlotStrain::Engineering => StrainMeasure::Engineering,
                PlotStrain::True => StrainMeasure::True,
            },
            plane: self.map_plane.into(),
        }
    }
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
    /// points.xlsx target.
    pub xlsx: Option<PathBuf>,
    /// review.html target.
    pub review: Option<PathBuf>,
    /// Whether points.csv is written with `;` and decimal commas.
    pub decimal_comma: bool,
}

impl Plan {
    /// The planned targets, from the arguments.
    pub fn of(args: &OutputArgs) -> Self {
        let has = |f: Format| args.format.contains(&f);
        let dir = |name: &str| args.out.join(name);
        Plan {
            points: (has(Format::Csv) || has(Format::Xlsx) || args.points.is_some())
                .then(|| args.points.clone().unwrap_or_else(|| dir("points.csv"))),
            summary: has(Format::Json).then(|| dir("summary.json")),
            svg: has(Format::Svg).then(|| (dir("fld.svg"), dir("map.svg"))),
            png: has(Format::Png).then(|| (dir("fld.png"), dir("map.png"))),
            html: has(Format::Html).then(|| dir("report.html")),
            xlsx: has(Format::Xlsx).then(|| dir("points.xlsx")),
            review: has(Format::Review).then(|| dir("review.html")),
            decimal_comma: args.decimal_comma,
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
        v.extend(self.xlsx.as_deref());
        v.extend(self.review.as_deref());
        v
    }

    /// Create the folders and refuse any target that is an input: before the work starts, so
    /// that a bad path fails at once.
    pub fn prepare(&self, inputs: &[PathBuf]) -> Result<()> {
        if self.points_to_stdout() && (self.xlsx.is_some() || self.decimal_comma) {
            return Err(Error::Usage(
                "--points - sends the points to standard output: points.xlsx and \
                 --decimal-comma need points.csv in a file"
                    .into(),
            ));
        }
        for f in self.files() {
            if let Some(dir) = f.parent().filter(|d| !d.as_os_str().is_empty()) {
                if dir.exists() && !dir.is_dir() {
                    return Err(Error::Usage(format!(
                        "cannot write {}: {} is a file, not a folder; choose another output path",
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

/// Whether [`emit`] prints the summary for people, and what goes before it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Summary<'a> {
    /// Print the summary.
    Print,
    /// Print these lines, then the summary.
    PrintAfter(&'a str),
    /// Print nothing (one of several files: the run reports them together).
    Silent,
}

/// Write the planned outputs of `a`, then print the summary for people as `summary` says, on
/// standard output, or on standard error when the points CSV goes to standard output.
/// `inputs` are never written over.
pub fn emit(
    a: &Analysis,
    args: &OutputArgs,
    plan: &Plan,
    inputs: &[PathBuf],
    points: Option<AtomicFile>,
    summary: Summary<'_>,
) -> Result<()> {
    let written = write_outputs(a, args, plan, inputs, points)?;
    let preface = match summary {
        Summary::Silent => return Ok(()),
        Summary::Print => "",
        Summary::PrintAfter(lines) => lines,
    };
    let mut text = String::new();
    if a.summary.placed == 0 && (plan.svg.is_some() || plan.png.is_some()) {
        let (u, v) = MapPlane::from(args.map_plane).axes();
        text.push_str(&format!(
            "note: no location has {u}, {v}: the part map was not drawn\n"
        ));
    }
    for stale in stale_outputs(&args.out, &written) {
        text.push_str(&paragraph(&format!(
            "note: {} is from an earlier run and was not written by this one",
            stale.display()
        )));
    }
    if !written.is_empty() {
        let names: Vec<String> = written.iter().map(|p| p.display().to_string()).collect();
        text.push_str(&paragraph(&format!("Wrote {}", names.join(", "))));
    }
    if plan.points_to_stdout() {
        let colour = terminal::use_colour(std::io::stderr().is_terminal());
        eprint!("{preface}{}{text}", terminal::summary(a, colour));
    } else {
        let colour = terminal::use_colour(std::io::stdout().is_terminal());
        print!("{preface}{}{text}", terminal::summary(a, colour));
    }
    Ok(())
}

fn fld_options(args: &OutputArgs) -> FldOptions {
    FldOptions {
        measure: args.view().measure,
        ..FldOptions::default()
    }
}

/// Every file name `check` and `grid` may write into the output folder.
pub const OUTPUT_NAMES: [&str; 11] = [
    "points.csv",
    "points.xlsx",
    "summary.json",
    "fld.svg",
    "map.svg",
    "fld.png",
    "map.png",
    "report.html",
    "review.html",
    "peps.svg",
    "peps.png",
];

/// Render every planned output in memory first (so a failure leaves the folder as it was),
/// then write each file atomically.
fn write_outputs(
    a: &Analysis,
    args: &OutputArgs,
    plan: &Plan,
    inputs: &[PathBuf],
    points: Option<AtomicFile>,
) -> Result<Vec<PathBuf>> {
    plan.prepare(inputs)?;
    let render = |p: &Path, e: std::io::Error| Error::io(p, e);
    let mut files: Vec<(PathBuf, Vec<u8>)> = Vec::new();
    if let Some(p) = &plan.summary {
        let mut json = Vec::new();
        summary_json::write_summary(a, &mut json).map_err(|e| render(p, e))?;
        files.push((p.clone(), json));
    }
    let opts = fld_options(args);
    if let Some((f, m)) = &plan.svg {
        let svg = fld::fld_svg(a, &opts).map_err(|e| render(f, e))?;
        files.push((f.clone(), svg.into_bytes()));
        if let Some(svg) = map::map_svg(a, args.map_value.into()).map_err(|e| render(m, e))? {
            files.push((m.clone(), svg.into_bytes()));
        }
        let p = f.with_file_name("peps.svg");
        if let Some(svg) = neckline_render::peps::peps_svg(a).map_err(|e| render(&p, e))? {
            files.push((p, svg.into_bytes()));
        }
    }
    if let Some((f, m)) = &plan.png {
        files.push((f.clone(), fld::fld_png(a, &opts).map_err(|e| render(f, e))?));
        if let Some(png) = map::map_png(a, args.map_value.into()).map_err(|e| render(m, e))? {
            files.push((m.clone(), png));
        }
        let p = f.with_file_name("peps.png");
        if let Some(png) = neckline_render::peps::peps_png(a).map_err(|e| render(&p, e))? {
            files.push((p, png));
        }
    }
    if let Some(p) = &plan.html {
        let html =
            report::report_html(a, &opts, args.map_value.into()).map_err(|e| render(p, e))?;
        files.push((p.clone(), html.into_bytes()));
    }
    if let Some(p) = &plan.review {
        let html = neckline_render::review::review_html(a, opts.measure);
        files.push((p.clone(), html.into_bytes()));
    }
    let mut written = Vec::with_capacity(files.len() + 1);
    if let Some(f) = points {
        let p = f.path().to_path_buf();
        f.commit()?;
        if let Some(x) = &plan.xlsx {
            // Saved beside the target, then renamed: a failed save leaves no half workbook.
            let part = x.with_file_name(".points.xlsx.part");
            neckline_render::workbook::write_points_xlsx(&p, &part, a).map_err(|e| {
                let _ = std::fs::remove_file(&part);
                Error::io(x, e)
            })?;
            std::fs::rename(&part, x).map_err(|e| Error::io(x, e))?;
        }
        if plan.decimal_comma {
            let text = std::fs::File::open(&p).map_err(|e| Error::io(&p, e))?;
            write_atomic(&p, inputs, |w| {
                neckline_core::output::decimal_comma::to_decimal_comma(
                    std::io::BufReader::new(&text),
                    w,
                )
            })?;
        }
        written.push(p);
        written.extend(plan.xlsx.clone());
    }
    for (path, bytes) in files {
        write_atomic(&path, inputs, |w| w.write_all(&bytes))?;
        written.push(path);
    }
    Ok(written)
}

/// Output files in `dir` left by an earlier run and not written by this one: they may no longer
/// agree with the files that were.
fn stale_outputs(dir: &Path, written: &[PathBuf]) -> Vec<PathBuf> {
    OUTPUT_NAMES
        .iter()
        .map(|n| dir.join(n))
        .filter(|p| p.is_file() && !written.contains(p))
        .collect()
}

/// A points table made in memory, to its planned place: standard output at once, or a
/// temporary file returned for [`emit`] to commit with the other outputs.
pub fn points_out(plan: &Plan, inputs: &[PathBuf], text: &[u8]) -> Result<Option<AtomicFile>> {
    match &plan.points {
        Some(_) if plan.points_to_stdout() => {
            write_stdout(text)?;
            Ok(None)
        }
        Some(p) => {
            let mut f = AtomicFile::create(p, inputs)?;
            f.write_all(text).map_err(|e| Error::io(p, e))?;
            Ok(Some(f))
        }
        None => Ok(None),
    }
}

/// Write to standard output; a closed pipe is not an error.
pub fn write_stdout(bytes: &[u8]) -> Result<()> {
    let stdout = std::io::stdout();
    let mut out = stdout.lock();
    match out.write_all(bytes).and_then(|()| out.flush()) {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
            Err(Error::io(Path::new("<stdout>"), e))
        }
        _ => Ok(()),
    }
}
