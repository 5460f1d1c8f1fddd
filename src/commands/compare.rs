//! `neckline compare`: one tryout against the next, location by location, and the review pack.

use super::{paragraph, Outcome};
use crate::output_set::{Committed, OutputSet, Own};
use clap::{Args, ValueEnum};
use neckline_core::compare::record::Record;
use neckline_core::compare::{self, json_out, Comparison, Matching};
use neckline_core::error::{Error, Result};
use neckline_render::compare::{fld, map, page, terminal};
use std::path::{Path, PathBuf};

/// How locations are paired between tryouts.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum MatchBy {
    /// By location id.
    Id,
    /// By nearest x, y within --within (ids may differ).
    Xy,
}

/// What makes `compare` exit with status 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Gate {
    /// A location failed in the last tryout that was not failed in the one before.
    NewFailed,
    /// A location failed or marginal in the last tryout that was in a better zone before.
    NewMarginal,
}

/// Arguments of `compare`.
#[derive(Debug, Clone, Args)]
#[command(
    after_help = "Exit status: 0 done; 1 a --fail-on gate tripped; 2 usage or input \
error, or two neighbouring tryouts share no location.\nA location measured only in the last \
tryout counts for --fail-on when it is failed (or marginal) there."
)]
pub struct CompareArgs {
    /// points.csv files written by `check`, earliest tryout first (two or more). The lists
    /// compare the last two; compare.csv and the pictures follow every tryout.
    #[arg(value_name = "POINTS.csv", num_args = 2.., required = true)]
    pub inputs: Vec<PathBuf>,
    /// Folder for the review pack (created if missing): compare.csv, compare.json,
    /// compare-fld.svg/.png, compare-map.svg/.png (when x, y exist), compare.html,
    /// compare-review.html [default: terminal only].
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Smallest change of margin that counts as improved or worsened, percentage points (of
    /// major strain where a margin is missing).
    #[arg(long, value_name = "PCT", default_value_t = 1.0)]
    pub tolerance: f64,
    /// Pair locations by id, or by nearest x, y (needs --within).
    #[arg(long = "match", value_name = "id|xy", default_value = "id")]
    pub match_by: MatchBy,
    /// Largest distance of a pair with --match xy, in the files' length unit.
    #[arg(long, value_name = "LENGTH")]
    pub within: Option<f64>,
    /// Exit with status 1 when a location is newly failed (new-failed), or newly failed or
    /// marginal (new-marginal), in the last tryout [default: never].
    #[arg(long, value_name = "new-failed|new-marginal")]
    pub fail_on: Option<Gate>,
    /// How many locations to list under each heading in the terminal.
    #[arg(long, value_name = "N", default_value_t = 8)]
    pub show: usize,
    /// Write compare.csv with `;` between fields and a decimal comma, for a spreadsheet set to
    /// a decimal comma.
    #[arg(long)]
    pub decimal_comma: bool,
    /// Job file (TOML) of the review: `report_id`, `revision` and the sign-off names
    /// (`prepared_by`, `checked_by`, `approved_by`) for compare.html [default: a report number
    /// made from the inputs' SHA-256, blank names].
    #[arg(long, value_name = "FILE")]
    pub job: Option<PathBuf>,
}

/// The files of the review pack, in the order they are written.
pub const PACK_NAMES: [&str; 8] = [
    "compare.csv",
    "compare.json",
    "compare-fld.svg",
    "compare-fld.png",
    "compare-map.svg",
    "compare-map.png",
    "compare.html",
    "compare-review.html",
];

fn matching(args: &CompareArgs) -> Result<Matching> {
    match (args.match_by, args.within) {
        (MatchBy::Xy, Some(w)) if w.is_finite() && w > 0.0 => Ok(Matching::Xy { within: w }),
        (MatchBy::Xy, Some(w)) => Err(Error::Usage(format!(
            "--within must be a positive length, found {w}"
        ))),
        (MatchBy::Xy, None) => Err(Error::Usage(
            "--match xy needs --within LENGTH: the largest distance of a pair, in the files' \
             length unit (e.g. --within 5 for 5 mm)"
                .into(),
        )),
        (MatchBy::Id, Some(_)) => Err(Error::Usage(
            "--within applies to --match xy only (pairing by id needs no distance)".into(),
        )),
        (MatchBy::Id, None) => Ok(Matching::Id),
    }
}

/// Refuse an output folder that cannot be one, before any work is done.
fn check_out(out: &Path) -> Result<()> {
    if out.is_file() {
        return Err(Error::Usage(format!(
            "--out {} is a file: --out takes a folder, into which compare.csv and the rest \
             of the review pack are written",
            out.display()
        )));
    }
    let ext = out.extension().map(|e| e.to_string_lossy().to_lowercase());
    if !out.exists()
        && matches!(
            ext.as_deref(),
            Some("csv" | "json" | "html" | "svg" | "png")
        )
    {
        return Err(Error::Usage(format!(
            "--out {} looks like a file name: --out takes a folder (compare.csv is written \
             inside it), e.g. --out {}",
            out.display(),
            out.with_extension("").display()
        )));
    }
    Ok(())
}

/// Run `compare`.
pub fn run(args: &CompareArgs) -> Result<Outcome> {
    if !(args.tolerance.is_finite() && args.tolerance >= 0.0) {
        return Err(Error::Usage(format!(
            "--tolerance must be zero or a positive number of percentage points, found {}",
            args.tolerance
        )));
    }
    let how = matching(args)?;
    let set = match &args.out {
        Some(out) => {
            check_out(out)?;
            let targets: Vec<PathBuf> = PACK_NAMES.iter().map(|n| out.join(n)).collect();
            let targets: Vec<&Path> = targets.iter().map(PathBuf::as_path).collect();
            let own = Own {
                dir: out,
                names: &PACK_NAMES,
            };
            // The job file is read too: no output may be written over it.
            let read: Vec<PathBuf> = args.inputs.iter().chain(&args.job).cloned().collect();
            Some(OutputSet::begin(&targets, Some(own), &read)?)
        }
        None => None,
    };
    // Each input's SHA-256 is taken as the comparison reads it (once), and checked against
    // the one its summary records, if any. A pair refused for its SHA-256 is reported before
    // any error of the comparison: the inputs are then hashed on their own.
    let recorded: Vec<Option<String>> = args
        .inputs
        .iter()
        .map(|p| super::outputs::recorded_sha256(p))
        .collect();
    let compared = compare_all(args, how, set);
    let digests = match &compared {
        Ok((_, _, _, found)) => args
            .inputs
            .iter()
            .zip(&recorded)
            .zip(found)
            .map(|((p, r), f)| match r {
                Some(_) if p.as_os_str() == "-" => super::outputs::check_recorded_points(p),
                Some(r) => super::outputs::check_sha256(p, r, f.clone()).map(Some),
                None => Ok(None),
            })
            .collect::<Result<Vec<Option<String>>>>(),
        Err(_) => args
            .inputs
            .iter()
            .map(|p| super::outputs::check_recorded_points(p))
            .collect(),
    };
    let digests = digests?;
    let (job, c, set, _) = compared?;
    for w in &c.warnings {
        eprint!("{}", paragraph(&format!("warning: {w}")));
    }
    let Committed { written, removed } = match (set, &args.out) {
        (Some(set), Some(out)) => {
            let labels: Vec<String> = c.tryouts.iter().map(|t| t.label.clone()).collect();
            let rec = Record::with_digests(
                &args.inputs,
                &digests,
                &labels,
                job.as_ref().map(|(j, p)| (j, p.as_path())),
            )
            .map_err(|e| Error::io(&args.inputs[0], e))?;
            write_pack(&c, &rec, set, out)?
        }
        _ => Committed::default(),
    };
    print!("{}", terminal::summary(&c, args.show));
    if args.out.is_some() {
        print!("{}", super::outputs::removed_note(&removed));
        if !map::has_places(&c) {
            println!("note: no location has x, y: the map of margin change was not drawn");
        }
        let names: Vec<String> = written.iter().map(|p| p.display().to_string()).collect();
        print!("{}", paragraph(&format!("Wrote {}", names.join(", "))));
    }
    Ok(gate(&c, args.fail_on))
}

/// The review's job file (when given), the comparison, compare.csv staged in `set`, and the
/// SHA-256 of each input as read.
type Compared = (
    Option<(neckline_core::job::Job, PathBuf)>,
    Comparison,
    Option<OutputSet>,
    Vec<String>,
);

fn compare_all(args: &CompareArgs, how: Matching, set: Option<OutputSet>) -> Result<Compared> {
    let job = args
        .job
        .as_ref()
        .map(|p| neckline_core::job::Job::load(p).map(|j| (j, p.clone())))
        .transpose()?;
    match (set, &args.out) {
        (Some(mut set), Some(out)) => {
            let (c, digests) = compare_into(args, how, &mut set, &out.join("compare.csv"))?;
            Ok((job, c, Some(set), digests))
        }
        _ => {
            let (c, digests) =
                compare::compare_files_digested(&args.inputs, how, args.tolerance, None)?;
            Ok((job, c, None, digests))
        }
    }
}

/// Compare the inputs, compare.csv streamed into its staged file in `set` (through an
/// anonymous temporary file when it is converted to a decimal comma).
fn compare_into(
    args: &CompareArgs,
    how: Matching,
    set: &mut OutputSet,
    target: &Path,
) -> Result<(Comparison, Vec<String>)> {
    let mut staged = set.create(target)?;
    let c = if args.decimal_comma {
        use std::io::Seek;
        let temp = compare::runs::temp()?;
        let mut w = std::io::BufWriter::with_capacity(1 << 16, temp);
        let c = compare::compare_files_digested(&args.inputs, how, args.tolerance, Some(&mut w))?;
        let mut temp = w
            .into_inner()
            .map_err(|e| Error::io(target, e.into_error()))?;
        temp.rewind().map_err(|e| Error::io(target, e))?;
        let r = std::io::BufReader::with_capacity(1 << 16, temp);
        neckline_core::output::decimal_comma::to_decimal_comma(r, &mut staged)
            .map_err(|e| Error::io(target, e))?;
        c
    } else {
        compare::compare_files_digested(&args.inputs, how, args.tolerance, Some(&mut staged))?
    };
    staged.finish()?;
    Ok(c)
}

/// Render every other file of the pack in memory (on every core at once), stage each in `set`,
/// then move them in together with compare.csv (a failure leaves the folder as it was).
fn write_pack(c: &Comparison, rec: &Record, mut set: OutputSet, out: &Path) -> Result<Committed> {
    let target = |name: &str| out.join(name);
    let render = |name: &str, e: std::io::Error| Error::io(&target(name), e);
    let json = || -> Result<Vec<u8>> {
        let mut json = Vec::new();
        json_out::write_json(c, &mut json).map_err(|e| render("compare.json", e))?;
        Ok(json)
    };
    let fld_svg = || fld::fld_svg(c).map_err(|e| render("compare-fld.svg", e));
    let fld_png = || fld::fld_png(c).map_err(|e| render("compare-fld.png", e));
    let map_svg = || map::map_svg(c).map_err(|e| render("compare-map.svg", e));
    let map_png = || map::map_png(c).map_err(|e| render("compare-map.png", e));
    let html = || page::page_html_with(c, Some(rec)).map_err(|e| render("compare.html", e));
    let review = || neckline_render::review::compare_review_html(c);
    let ((json, (fld_svg, fld_png)), ((map_svg, map_png), (html, review))) = rayon::join(
        || rayon::join(json, || rayon::join(fld_svg, fld_png)),
        || {
            rayon::join(
                || rayon::join(map_svg, map_png),
                || rayon::join(html, review),
            )
        },
    );
    let mut files: Vec<(PathBuf, Vec<u8>)> = vec![
        (target("compare.json"), json?),
        (target("compare-fld.svg"), fld_svg?.into_bytes()),
        (target("compare-fld.png"), fld_png?),
    ];
    if let Some(svg) = map_svg? {
        files.push((target("compare-map.svg"), svg.into_bytes()));
    }
    if let Some(png) = map_png? {
        files.push((target("compare-map.png"), png));
    }
    files.push((target("compare.html"), html?.into_bytes()));
    files.push((target("compare-review.html"), review.into_bytes()));
    for (p, bytes) in files {
        set.write(&p, &bytes)?;
    }
    set.commit()
}

/// The `--fail-on` gate: newly failed (or marginal) locations in the last tryout, and those
/// measured only there and failed (or marginal) there.
fn gate(c: &Comparison, fail_on: Option<Gate>) -> Outcome {
    let Some(g) = fail_on else {
        return Outcome::Done;
    };
    let marginal = g == Gate::NewMarginal;
    let mut hits = if marginal {
        c.newly_at_risk()
    } else {
        c.newly_failed()
    };
    let total = hits.len().max(if marginal {
        c.counts.newly_at_risk
    } else {
        c.counts.newly_failed
    }) + c.at_risk_only_after_count(marginal);
    hits.extend(c.at_risk_only_after(marginal));
    let name = if marginal {
        "new-marginal"
    } else {
        "new-failed"
    };
    if hits.is_empty() {
        println!("--fail-on {name}: passed (no location newly at risk)");
        return Outcome::Done;
    }
    let ids: Vec<String> = hits.iter().take(12).map(|t| t.name()).collect();
    let more = if total > 12 { ", ..." } else { "" };
    print!(
        "{}",
        paragraph(&format!(
            "--fail-on {name}: tripped by {} ({}{more}): exit status 1",
            compare::count(total, "location"),
            ids.join(", ")
        ))
    );
    Outcome::Tripped
}
