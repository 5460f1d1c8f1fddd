//! Output selection shared by the commands that judge locations (`check`, `grid`): which files,
//! where, checked before the work starts, and the summary printed after.

use super::paragraph;
use crate::args::{MapPlaneArg, MapValueArg};
use crate::output_set::{Committed, OutputSet, Own, StagedFile};
use clap::{Args, ValueEnum};
use neckline_core::analysis::Analysis;
use neckline_core::error::{Error, Result};
use neckline_core::output::summary_json::{self, PointsFile};
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

    /// Every file target (standard output left out), with the path diagrams drawn beside the
    /// forming-limit diagram for a multi-stage file.
    pub fn files(&self) -> Vec<PathBuf> {
        let mut v: Vec<PathBuf> = Vec::new();
        v.extend(self.points.clone().filter(|p| p != Path::new("-")));
        v.extend(self.summary.clone());
        for (pair, peps) in [(&self.svg, "peps.svg"), (&self.png, "peps.png")] {
            if let Some((f, m)) = pair {
                v.extend([f.clone(), m.clone(), f.with_file_name(peps)]);
            }
        }
        v.extend(self.html.clone());
        v.extend(self.xlsx.clone());
        v.extend(self.review.clone());
        v
    }

    /// Before the work starts: create the folders, refuse any target that is a folder or an
    /// input, lock the folders and check that each can be written, so that a bad path fails
    /// at once and nothing is written. The returned set stages the outputs for [`emit`].
    pub fn prepare(&self, out: &Path, inputs: &[PathBuf]) -> Result<OutputSet> {
        if self.points_to_stdout() && (self.xlsx.is_some() || self.decimal_comma) {
            return Err(Error::Usage(
                "--points - sends the points to standard output: points.xlsx and \
                 --decimal-comma need points.csv in a file"
                    .into(),
            ));
        }
        let files = self.files();
        let targets: Vec<&Path> = files.iter().map(PathBuf::as_path).collect();
        let own = Own {
            dir: out,
            names: &OUTPUT_NAMES,
        };
        OutputSet::begin(&targets, Some(own), inputs)
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

/// Write the planned outputs of `a` through `set` (all moved in together), then print the
/// summary for people as `summary` says, on standard output, or on standard error when the
/// points CSV goes to standard output. `inputs` are never written over nor removed.
pub fn emit(
    a: &Analysis,
    args: &OutputArgs,
    plan: &Plan,
    set: OutputSet,
    inputs: &[PathBuf],
    points: Option<StagedFile>,
    summary: Summary<'_>,
) -> Result<()> {
    let Committed { written, removed } = write_outputs(a, args, plan, set, inputs, points)?;
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
    text.push_str(&removed_note(&removed));
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

/// The note on older outputs a commit removed (empty when none).
pub fn removed_note(removed: &[PathBuf]) -> String {
    if removed.is_empty() {
        return String::new();
    }
    let names: Vec<String> = removed.iter().map(|p| p.display().to_string()).collect();
    paragraph(&format!(
        "note: removed {} from an earlier run (not written by this one), so that the folder \
         holds one run's files",
        names.join(", ")
    ))
}

/// Stage every planned output in `set` (points.csv first, already written by the pass; then
/// points.xlsx, summary.json with the points table's SHA-256, the pictures and the report),
/// then commit the set: every file moved in, or none.
fn write_outputs(
    a: &Analysis,
    args: &OutputArgs,
    plan: &Plan,
    mut set: OutputSet,
    inputs: &[PathBuf],
    points: Option<StagedFile>,
) -> Result<Committed> {
    set.add_inputs(inputs)?;
    let render = |p: &Path, e: std::io::Error| Error::io(p, e);
    let mut recorded = None;
    if let Some(f) = points {
        let target = f.target().to_path_buf();
        let mut sha256 = f.finish()?;
        if let Some(x) = &plan.xlsx {
            let from = set.staged(&target)?;
            let to = set.staged(x)?;
            neckline_render::workbook::write_points_xlsx(&from, &to, a)
                .map_err(|e| Error::io(x, e))?;
        }
        if plan.decimal_comma {
            sha256 = restage_decimal_comma(&mut set, &target)?;
        }
        let name = target.file_name().unwrap_or(target.as_os_str());
        recorded = Some(PointsFile {
            name: name.to_string_lossy().into_owned(),
            sha256,
        });
    }
    let mut files: Vec<(PathBuf, Vec<u8>)> = Vec::new();
    if let Some(p) = &plan.summary {
        let mut json = Vec::new();
        summary_json::write_summary_with(a, recorded.as_ref(), &mut json)
            .map_err(|e| render(p, e))?;
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
    for (path, bytes) in files {
        set.write(&path, &bytes)?;
    }
    set.commit()
}

/// Rewrite the staged points table with `;` and decimal commas; its new SHA-256.
fn restage_decimal_comma(set: &mut OutputSet, target: &Path) -> Result<String> {
    let staged = set.staged(target)?;
    let plain = staged.with_extension("plain");
    std::fs::rename(&staged, &plain).map_err(|e| Error::io(target, e))?;
    let text = std::fs::File::open(&plain).map_err(|e| Error::io(target, e))?;
    let mut f = set.create(target)?;
    neckline_core::output::decimal_comma::to_decimal_comma(std::io::BufReader::new(&text), &mut f)
        .map_err(|e| Error::io(target, e))?;
    let _ = std::fs::remove_file(&plain);
    f.finish()
}

/// A points table made in memory, to its planned place: standard output at once, or a
/// staged file returned for [`emit`] to commit with the other outputs.
pub fn points_out(plan: &Plan, set: &mut OutputSet, text: &[u8]) -> Result<Option<StagedFile>> {
    match &plan.points {
        Some(_) if plan.points_to_stdout() => {
            write_stdout(text)?;
            Ok(None)
        }
        Some(p) => {
            let mut f = set.create(p)?;
            f.write_all(text).map_err(|e| Error::io(p, e))?;
            Ok(Some(f))
        }
        None => Ok(None),
    }
}

/// Refuse a points table whose summary.json (beside it) records another table: the two are
/// then of different runs. A summary that records no table (an earlier version's) or records
/// another file name is not checked. Gives the table's SHA-256 when it was computed.
pub fn check_recorded_points(points: &Path) -> Result<Option<String>> {
    let Some(recorded) = recorded_sha256(points) else {
        return Ok(None);
    };
    let found = crate::output_set::sha256_of(points).map_err(|e| Error::io(points, e))?;
    check_sha256(points, &recorded, found).map(Some)
}

/// The SHA-256 that the summary.json beside `points` records for it (when it records one for
/// a file of that name).
pub fn recorded_sha256(points: &Path) -> Option<String> {
    let beside = points.with_file_name("summary.json");
    let text = std::fs::read_to_string(&beside).ok()?;
    let recorded = summary_json::recorded_points(&text)?;
    (points.file_name() == Some(std::ffi::OsStr::new(&recorded.name))).then_some(recorded.sha256)
}

/// `found`, the SHA-256 of `points`, against the one its summary records: refused when they
/// differ.
pub fn check_sha256(points: &Path, recorded: &str, found: String) -> Result<String> {
    if found != recorded {
        let name = points.file_name().unwrap_or_default().to_string_lossy();
        return Err(Error::Usage(format!(
            "{} does not belong with {}: the summary records SHA-256 {} for {}, the file has {}; \
             the two are from different runs. Run check again to make a matching pair",
            points.display(),
            points.with_file_name("summary.json").display(),
            recorded,
            name,
            found
        )));
    }
    Ok(found)
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
