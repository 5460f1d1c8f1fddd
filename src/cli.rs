//! Command-line arguments (clap only; the work is done in [`crate::commands`]).

use clap::{Parser, Subcommand};

/// Sheet-metal forming-limit analysis from circle grids.
#[derive(Debug, Parser)]
#[command(name = "neckline", version, about, long_about = None, after_help = AFTER_HELP)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

const AFTER_HELP: &str =
    "Exit status: 0 done, 1 a --fail-on zone was reached, 2 usage or input error.\n\
Caution: an aid to judgement; your own limit data, local codes and licensed practice govern.";

/// The subcommands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Judge measured circles against a forming-limit curve; write points.csv, summary.json,
    /// the forming-limit diagram, the part map and report.html.
    Check(crate::commands::check::CheckArgs),
    /// Compute the strains of measured circles and write them to stdout as CSV.
    Strains(crate::commands::strains::StrainsArgs),
    /// Compare tryouts location by location (points.csv files written by `check`); with --out,
    /// write the review pack (compare.csv, .json, diagram, map, compare.html).
    Compare(crate::commands::compare::CompareArgs),
    /// Strains from grid node positions (flat blank and formed part), judged like `check`.
    Grid(crate::commands::grid::GridArgs),
    /// Fit ellipses to outline points; write a measurement CSV that `check` reads.
    Fit(crate::commands::fit::FitArgs),
    /// Build a forming-limit curve as curve TOML from material data (Keeler-Brazier, analytic
    /// necking, Marciniak-Kuczynski) or from circles read on necked and split parts, or
    /// compare two curves.
    Limit(crate::commands::limit::LimitArgs),
    /// Print a shell completion script to standard output (bash, zsh, fish, powershell,
    /// elvish).
    Completions(crate::commands::completions::CompletionsArgs),
    /// Write the manual pages (roff): neckline.1 and one per subcommand, e.g. neckline-check.1.
    Manual(crate::commands::manual::ManualArgs),
}
