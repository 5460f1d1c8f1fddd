//! The `neckline` command: parse arguments, run the library, report errors, set the exit status.

use clap::{CommandFactory, Parser};
use neckline::cli::{Cli, Command};
use neckline::commands::{self, Outcome};
use std::process::ExitCode;

fn main() -> ExitCode {
    let cli = Cli::parse();
    neckline::interrupt::install();
    let result = match &cli.command {
        Command::Check(args) => commands::check::run(args),
        Command::Strains(args) => commands::strains::run(args),
        Command::Compare(args) => commands::compare::run(args),
        Command::Grid(args) => commands::grid::run(args),
        Command::Fit(args) => commands::fit::run(args),
        Command::Limit(args) => commands::limit::run(args),
        Command::Completions(args) => commands::completions::run(args, Cli::command()),
        Command::Manual(args) => commands::manual::run(args, Cli::command()),
    };
    match result {
        Ok(Outcome::Done) => ExitCode::SUCCESS,
        Ok(Outcome::Tripped) => ExitCode::from(1),
        Err(e) => {
            eprintln!("error: {e}");
            let mut source = std::error::Error::source(&e);
            while let Some(cause) = source {
                eprintln!("  caused by: {cause}");
                source = cause.source();
            }
            ExitCode::from(2)
        }
    }
}
