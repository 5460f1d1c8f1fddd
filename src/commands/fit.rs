//! `neckline fit`: ellipses fitted to outline points, written as a measurement file for `check`.

use super::Outcome;
use crate::output_set::OutputSet;
use clap::Args;
use neckline_core::error::{Error, Result};
use neckline_core::fit::outlines::{fit_outline, outlines, write_fits};
use neckline_core::table::read_table;
use std::path::{Path, PathBuf};

/// Arguments of `fit`.
#[derive(Debug, Clone, Args)]
pub struct FitArgs {
    /// Outline points (CSV: id, x, y; at least 6 points per id, in any order); `-` = stdin.
    #[arg(value_name = "OUTLINES.csv")]
    pub outlines: PathBuf,
    /// Write the measurement CSV to this file (atomically) instead of stdout.
    #[arg(long, value_name = "FILE")]
    pub out: Option<PathBuf>,
    /// How the outlines file is read.
    #[command(flatten)]
    pub input: crate::args::InputArgs,
}

/// Run `fit`: failures are listed on stderr and the others written; exit 2 if none fitted.
pub fn run(args: &FitArgs) -> Result<Outcome> {
    super::set_input_options(&args.input, &neckline_core::job::Job::default());
    let inputs = std::slice::from_ref(&args.outlines);
    let targets: Vec<&Path> = args.out.iter().map(PathBuf::as_path).collect();
    let mut set = OutputSet::begin(&targets, None, inputs)?;
    let table = read_table(&args.outlines, "id, x, y")?;
    let (list, mut failures) = outlines(&table)?;
    let mut fits = Vec::new();
    for o in &list {
        match fit_outline(o, &args.outlines) {
            Ok(f) => fits.push((o.id.clone(), f)),
            Err(e) => failures.push(e),
        }
    }
    for f in &failures {
        eprintln!("not fitted: {f}");
    }
    for (id, r) in &fits {
        if !r.discarded.is_empty() {
            eprintln!(
                "outline `{id}`: {} of {} points set aside as off the ellipse",
                r.discarded.len(),
                r.discarded.len() + r.fit.points
            );
        }
        if r.quality != neckline_core::fit::Quality::Good {
            eprintln!("outline `{id}`: {}", r.quality);
        }
    }
    if fits.is_empty() {
        return Err(Error::Usage(format!(
            "{}: no outline could be fitted ({} failures listed above)",
            args.outlines.display(),
            failures.len()
        )));
    }
    eprintln!("fitted {} of {} outlines", fits.len(), list.len());
    match &args.out {
        Some(path) => {
            let mut f = set.create(path)?;
            write_fits(&fits, &mut f).map_err(|e| Error::io(path, e))?;
            f.finish()?;
            set.commit()?;
        }
        None => {
            let stdout = std::io::stdout();
            match write_fits(&fits, &mut stdout.lock()) {
                Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => {
                    return Err(Error::io(Path::new("<stdout>"), e))
                }
                _ => {}
            }
        }
    }
    Ok(Outcome::Done)
}
