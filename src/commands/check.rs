//! `neckline check`: the main job. Measured circles (or strains) -> judgement -> files + summary.
//! One file streams through [`neckline_core::stream`]; several files are judged side by side, each into
//! its own folder, with an index.

use super::outputs::{emit, OutputArgs, Plan, Summary};
use super::progress::{Bar, Progress};
use super::{require_points, Outcome, Prepared};
use crate::args::{JudgeArgs, LengthArgs};
use crate::output_set::{OutputSet, StagedFile};
use clap::Args;
use neckline_core::analysis::Analysis;
use neckline_core::digest::FileDigest;
use neckline_core::error::{Error, Result};
use neckline_core::measure::{Header, RowRules};
use neckline_core::output::points_csv::Layout;
use neckline_core::output::push_fixed;
use neckline_core::point::Context;
use neckline_core::stream::staged_runs;
use neckline_core::stream::Pass;
use rayon::prelude::*;
use std::io::{Read, Seek, Write};
use std::path::{Path, PathBuf};

/// Arguments of `check`.
#[derive(Debug, Clone, Args)]
pub struct CheckArgs {
    /// Measurement files (CSV: id, major, minor[, d0, x, y, z, stage, thickness, note], or
    /// strain columns in percent instead of axes); `-` = stdin. Several files are judged each
    /// into `DIR/<file name>/`, with `DIR/index.csv`.
    #[arg(value_name = "MEASUREMENTS.csv", required = true, num_args = 1..)]
    pub measurements: Vec<PathBuf>,
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
    if args.measurements.iter().any(|p| p.is_dir()) {
        let mut many = args.clone();
        many.measurements = expand_folders(&args.measurements)?;
        return run_many(&many);
    }
    if let [one] = args.measurements.as_slice() {
        let plan = Plan::of(&args.output);
        let set = plan.prepare(&args.output.out, &direct_inputs(args, one))?;
        let prep = Prepared::resolve(&args.lengths, &args.judge)?;
        let a = check_one(one, args, &args.output, &plan, set, &prep, Batch::Alone)?;
        return Ok(outcome(args, &a));
    }
    run_many(args)
}

fn outcome(args: &CheckArgs, a: &Analysis) -> Outcome {
    if args
        .judge
        .fail_on
        .or(a.job.fail_on)
        .is_some_and(|z| a.trips(z))
    {
        Outcome::Tripped
    } else {
        Outcome::Done
    }
}

/// The files named on the command line for one measurement file.
fn direct_inputs(args: &CheckArgs, measurements: &Path) -> Vec<PathBuf> {
    let mut v = vec![measurements.to_path_buf()];
    v.extend(args.lengths.job.clone());
    v.extend(args.judge.limit.clone());
    v
}

/// Whether a file is the only one of its run or one of several judged side by side.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Batch {
    /// The only file: a progress bar when slow, the summary printed in full.
    Alone,
    /// One of several: no bar, no summary (the run prints one line per file).
    OneOfSeveral,
}

/// Judge one file and write its outputs, reported as `batch` says.
fn check_one(
    path: &Path,
    args: &CheckArgs,
    output: &OutputArgs,
    plan: &Plan,
    mut set: OutputSet,
    prep: &Prepared,
    batch: Batch,
) -> Result<Analysis> {
    let (bar, summary) = match batch {
        Batch::Alone => (Bar::WhenSlow, Summary::Print),
        Batch::OneOfSeveral => (Bar::Hidden, Summary::Silent),
    };
    let mut inputs = direct_inputs(args, path);
    inputs.extend(prep.job.limit.clone());
    set.add_inputs(&inputs)?;
    let (a, points) = judge_file(path, prep, output, plan, &mut set, bar)?;
    if args.strict && a.rejected_total() > 0 {
        return Err(Error::Usage(format!(
            "--strict: {} rows rejected, first: {}",
            a.rejected_total(),
            a.rejected()[0]
        )));
    }
    emit(&a, output, plan, set, &inputs, points, summary)?;
    Ok(a)
}

/// Read, judge and summarise one measurement file in one streaming pass, writing points.csv
/// (staged in `set`, returned for the caller to commit with the other outputs) as it goes.
pub fn judge_file(
    path: &Path,
    prep: &Prepared,
    output: &OutputArgs,
    plan: &Plan,
    set: &mut OutputSet,
    bar: Bar,
) -> Result<(Analysis, Option<StagedFile>)> {
    // The measurement file is hashed as it streams past (standard input too), never held;
    // its first rows are screened for a file that cannot be meant as it reads.
    let (mut hashed, digest) = neckline_core::text::open(path)?;
    let rules = RowRules::new(&prep.lengths, prep.settings.reading_error);
    let header = Header::read(&mut hashed, path, &prep.map)?.with_rules(rules);
    header.check_units()?;
    let input = neckline_core::measure::screen(hashed, &header)?;
    let strain_input = header.columns.gives_strains();
    let mut notes = header.notes.clone();
    if strain_input && prep.lengths.d0.is_some() {
        notes.push("d0 is not used: the file gives strains, not axes".into());
    }
    let ctx = Context {
        curve: prep.curve.clone(),
        settings: prep.settings,
        lengths: prep.lengths,
        strain_input,
        true_input: header.columns.gives_true_strains(),
    };
    let mut layout = Layout {
        strains_only: false,
        z: header.columns.has("z"),
        thinning: header.columns.has("thinning_pct"),
        reading: prep.settings.reading_error.is_some(),
        grid: false,
        path: false,
        unit: prep.lengths.unit,
    };
    let mut file = match &plan.points {
        Some(p) if !plan.points_to_stdout() => Some(set.create(p)?),
        _ => None,
    };
    let mut out = std::io::BufWriter::with_capacity(1 << 20, std::io::stdout());
    let mut sink: Option<&mut (dyn Write + Send)> = match (&mut file, plan.points_to_stdout()) {
        (Some(f), _) => Some(f),
        (None, true) => Some(&mut out),
        (None, false) => None,
    };
    let io_err = |e| Error::io(plan.points.as_deref().unwrap_or(Path::new("-")), e);
    let staged = header.columns.has("stage");
    // Standard input, a named pipe or a device: read once.
    let regular = std::fs::metadata(path).ok().filter(|m| m.is_file());
    let once = path.as_os_str() == "-" || regular.is_none();
    // A file of one stage is judged as one without stages (the same outputs, one pass); one
    // with several (or a job file's stage order) is grouped through run files. An input read
    // once has a staged file's rows kept in an anonymous temporary file (hashed as they
    // pass), so that they can be read again.
    let no_order = prep.job.stages.is_none();
    let (mut input, size, one_stage): (Box<dyn Read + Send>, Option<u64>, bool) = if staged && once
    {
        let (mut spooled, len) = staged_runs::spool(input, path)?;
        let one = no_order && staged_runs::one_stage_body(&spooled, &header);
        spooled
            .rewind()
            .map_err(|e| Error::io(&std::env::temp_dir(), e))?;
        (Box::new(spooled), Some(len), one)
    } else {
        let size = regular.map(|m| m.len());
        let one = staged && no_order && staged_runs::one_stage(path, &header);
        (Box::new(input), size, one)
    };
    if staged && !one_stage {
        // Several stages per location: grouped through run files, in bounded memory.
        let order = prep.job.stages.as_deref();
        let run = staged_runs::judge_staged_runs(
            &mut input,
            size,
            &header,
            &ctx,
            order,
            &mut layout,
            output.view(),
            sink,
        )?;
        match out.flush() {
            Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => return Err(io_err(e)),
            _ => {}
        }
        let mut a = Analysis::new(
            path.to_path_buf(),
            prep.job.clone(),
            ctx,
            output.view(),
            &notes,
        );
        if layout.path {
            a.stages = run.stages;
        }
        a.summary = run.summary;
        a.files = input_digests(path, digest.hex(), prep);
        prep.place_outline(&mut a);
        a.finish();
        let a = require_points(a, path, "no location could be judged", "rows")?;
        return Ok((a, file));
    }
    if let Some(w) = sink.as_mut() {
        w.write_all(layout.header_line().as_bytes())
            .map_err(io_err)?;
    }
    let mut progress = Progress::new(&path.display().to_string(), size, bar);
    let pass = Pass {
        header: &header,
        ctx: &ctx,
        layout: &layout,
        view: output.view(),
        write: sink.is_some(),
        size_hint: size,
    };
    let summary = pass.run(&mut input, sink, &mut |b| progress.set(b));
    progress.finish();
    let mut summary = summary?;
    if one_stage {
        // As the staged path gives them: no note of swapped or disagreeing strains.
        summary.disagree = Default::default();
    } else {
        notes.extend(header.swap_note());
    }
    match out.flush() {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => return Err(io_err(e)),
        _ => {}
    }
    let mut a = Analysis::new(
        path.to_path_buf(),
        prep.job.clone(),
        ctx,
        output.view(),
        &notes,
    );
    a.summary = summary;
    a.files = input_digests(path, digest.hex(), prep);
    prep.place_outline(&mut a);
    a.finish();
    let a = require_points(a, path, "no location could be judged", "rows")?;
    Ok((a, file))
}

/// The measurement file's digest (taken as it streamed), then the curve's and the job's.
fn input_digests(path: &Path, measurements: String, prep: &Prepared) -> Vec<FileDigest> {
    let mut v = vec![FileDigest {
        role: "measurements",
        path: path.to_path_buf(),
        sha256: measurements,
    }];
    v.extend(neckline_core::digest::of_file("curve", &prep.curve_path).ok());
    if let Some(j) = &prep.job_path {
        v.extend(neckline_core::digest::of_file("job", j).ok());
    }
    if let Some(o) = &prep.job.outline {
        v.extend(neckline_core::digest::of_file("outline", o).ok());
    }
    v
}

/// Several files: each judged into `DIR/<file stem>/`, one thread each, then `DIR/index.csv`
/// and one line per file. The exit status is the worst of them.
fn run_many(args: &CheckArgs) -> Result<Outcome> {
    let dirs = folders(&args.measurements, &args.output.out)?;
    if args.output.points.is_some() {
        return Err(Error::Usage(
            "--points names one file: with several measurement files each gets DIR/<name>/points.csv"
                .into(),
        ));
    }
    let prep = Prepared::resolve(&args.lengths, &args.judge)?;
    let results: Vec<Result<Analysis>> = args
        .measurements
        .par_iter()
        .zip(&dirs)
        .map(|(path, dir)| {
            let mut output = args.output.clone();
            output.out = dir.clone();
            let plan = Plan::of(&output);
            let set = plan.prepare(&output.out, &direct_inputs(args, path))?;
            check_one(path, args, &output, &plan, set, &prep, Batch::OneOfSeveral)
        })
        .collect();
    let mut text = String::new();
    let mut worst = Outcome::Done;
    let mut failed = 0;
    for ((path, dir), r) in args.measurements.iter().zip(&dirs).zip(&results) {
        match r {
            Ok(a) => {
                if outcome(args, a) == Outcome::Tripped {
                    worst = Outcome::Tripped;
                }
                text.push_str(&format!(
                    "{:<10} {} ({} judged, {} failed, {} marginal) -> {}\n",
                    a.verdict().name().to_uppercase(),
                    path.display(),
                    a.total(),
                    a.count(neckline_core::assess::Zone::Failed),
                    a.count(neckline_core::assess::Zone::Marginal),
                    dir.display()
                ));
            }
            Err(e) => {
                failed += 1;
                text.push_str(&format!("{:<10} {}: {e}\n", "ERROR", path.display()));
            }
        }
    }
    let index = args.output.out.join("index.csv");
    let inputs: Vec<PathBuf> = args.measurements.clone();
    let mut set = OutputSet::begin(&[&index], None, &inputs)?;
    set.write(&index, index_csv(&args.measurements, &results).as_bytes())?;
    set.commit()?;
    print!("{text}");
    println!("Wrote {}", index.display());
    println!("{}", neckline_core::CAUTION);
    if failed > 0 {
        return Err(Error::Usage(format!(
            "{failed} of {} files could not be judged (see above)",
            args.measurements.len()
        )));
    }
    Ok(worst)
}

/// One output folder per file, named by its stem; two files with one stem are refused.
fn folders(files: &[PathBuf], out: &Path) -> Result<Vec<PathBuf>> {
    let mut seen = std::collections::HashMap::new();
    let mut dirs = Vec::new();
    for f in files {
        if f.as_os_str() == "-" {
            return Err(Error::Usage(
                "standard input (-) can only be judged alone".into(),
            ));
        }
        let stem = f
            .file_stem()
            .map_or_else(|| "input".into(), |s| s.to_string_lossy().into_owned());
        if let Some(other) = seen.insert(stem.clone(), f.clone()) {
            return Err(Error::Usage(format!(
                "{} and {} would both write into {}: rename one, or judge them separately",
                other.display(),
                f.display(),
                out.join(&stem).display()
            )));
        }
        dirs.push(out.join(stem));
    }
    Ok(dirs)
}

/// The file names neckline writes itself, left out of a folder judged whole.
const OWN_OUTPUTS: [&str; 3] = ["points.csv", "compare.csv", "index.csv"];

/// Whether `path` is named as a measurement file: `.csv`, `.txt`, `.tsv` or a workbook, and
/// not one of neckline's own outputs.
fn is_measurement_file(path: &Path) -> bool {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    if OWN_OUTPUTS.contains(&name.as_str()) || name.starts_with('.') {
        return false;
    }
    let text = path.extension().and_then(|e| e.to_str()).is_some_and(|e| {
        ["csv", "txt", "tsv"]
            .iter()
            .any(|t| e.eq_ignore_ascii_case(t))
    });
    text || neckline_core::workbook::is_workbook(path)
}

/// The inputs with each folder replaced by the measurement files in it (not in its
/// subfolders), in name order.
fn expand_folders(inputs: &[PathBuf]) -> Result<Vec<PathBuf>> {
    let mut files = Vec::new();
    for p in inputs {
        if !p.is_dir() {
            files.push(p.clone());
            continue;
        }
        let mut found: Vec<PathBuf> = std::fs::read_dir(p)
            .map_err(|e| Error::io(p, e))?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|f| f.is_file() && is_measurement_file(f))
            .collect();
        if found.is_empty() {
            return Err(Error::Usage(format!(
                "{}: no measurement file in the folder (.csv, .txt, .tsv, .xlsx, .xlsm, .xls,                  .xlsb, .ods; points.csv, compare.csv and index.csv are left out)",
                p.display()
            )));
        }
        found.sort();
        files.extend(found);
    }
    Ok(files)
}

/// `index.csv`: one row per file.
fn index_csv(files: &[PathBuf], results: &[Result<Analysis>]) -> String {
    let mut s = String::from("file,points,rejected");
    for z in neckline_core::assess::Zone::ALL {
        s.push(',');
        s.push_str(z.name());
    }
    s.push_str(",worst_id,worst_margin_pct,verdict\n");
    for (f, r) in files.iter().zip(results) {
        let name = f.display().to_string().replace('"', "\"\"");
        s.push_str(&format!("\"{name}\","));
        match r {
            Ok(a) => {
                s.push_str(&format!("{},{}", a.total(), a.rejected_total()));
                for (_, n) in a.counts() {
                    s.push_str(&format!(",{n}"));
                }
                let w = a.worst(1);
                let (id, m) = w.first().map_or((String::new(), None), |p| {
                    (p.input.id.clone(), p.judgement.margin_pct)
                });
                s.push_str(&format!(",\"{}\",", id.replace('"', "\"\"")));
                if let Some(m) = m {
                    push_fixed(&mut s, m, 3);
                }
                s.push_str(&format!(",{}\n", a.verdict().name()));
            }
            Err(_) => {
                s.push_str(&",".repeat(10));
                s.push_str("error\n");
            }
        }
    }
    s
}
