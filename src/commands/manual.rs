//! `neckline manual --out DIR`: the manual pages (roff, section 1), made from the clap
//! definitions: `neckline.1` and one page per subcommand, nested ones included
//! (`neckline-check.1`, `neckline-limit-mk.1`, ...).

use super::{paragraph, Outcome};
use crate::output_set::OutputSet;
use clap::Args;
use neckline_core::error::{Error, Result};
use std::path::{Path, PathBuf};

/// Arguments of `manual`.
#[derive(Debug, Clone, Args)]
pub struct ManualArgs {
    /// Folder for the pages (created if missing); each page is written atomically, over a page
    /// of the same name.
    #[arg(long, value_name = "DIR")]
    pub out: PathBuf,
}

/// Every manual page as (file name, roff text): the top-level page first, then each
/// subcommand's after its parent's, in the order of `--help`. `cli` is the whole command
/// line's definition (`Cli::command()`), passed down so that commands do not reach up to it.
pub fn pages(cli: clap::Command) -> std::io::Result<Vec<(String, Vec<u8>)>> {
    let mut cmd = cli.disable_help_subcommand(true);
    // Built once, so that each subcommand carries its full name (`neckline-limit-mk`).
    cmd.build();
    let mut pages = Vec::new();
    add_pages(&cmd, &mut pages)?;
    Ok(pages)
}

fn add_pages(cmd: &clap::Command, pages: &mut Vec<(String, Vec<u8>)>) -> std::io::Result<()> {
    let man = clap_mangen::Man::new(cmd.clone())
        .source(format!("neckline {}", env!("CARGO_PKG_VERSION")));
    let mut text = Vec::new();
    man.render(&mut text)?;
    pages.push((man.get_filename(), text));
    for sub in cmd.get_subcommands().filter(|s| !s.is_hide_set()) {
        add_pages(sub, pages)?;
    }
    Ok(())
}

/// Run `manual`: every page made in memory first, then the folder created and each page
/// written atomically.
pub fn run(args: &ManualArgs, cli: clap::Command) -> Result<Outcome> {
    let dir = &args.out;
    let pages = pages(cli).map_err(|e| Error::io(Path::new("(manual page)"), e))?;
    if dir.exists() && !dir.is_dir() {
        return Err(Error::Usage(format!(
            "--out {}: is a file, not a folder",
            dir.display()
        )));
    }
    let paths: Vec<PathBuf> = pages.iter().map(|(name, _)| dir.join(name)).collect();
    let targets: Vec<&Path> = paths.iter().map(PathBuf::as_path).collect();
    let mut set = OutputSet::begin(&targets, None, &[])?;
    for ((_, text), path) in pages.iter().zip(&paths) {
        set.write(path, text)?;
    }
    let names: Vec<String> = set
        .commit()?
        .written
        .iter()
        .map(|p| p.display().to_string())
        .collect();
    print!("{}", paragraph(&format!("Wrote {}", names.join(", "))));
    Ok(Outcome::Done)
}
