//! `neckline completions SHELL`: a shell completion script, made from the clap definitions.

use super::outputs::write_stdout;
use super::Outcome;
use clap::Args;
use clap_complete::Shell;
use neckline_core::error::Result;

/// Arguments of `completions`.
#[derive(Debug, Clone, Args)]
#[command(after_help = "Install, for example:\n  \
bash: neckline completions bash > ~/.local/share/bash-completion/completions/neckline\n  \
zsh:  neckline completions zsh > DIR/_neckline   (DIR one of the folders in $fpath)\n  \
fish: neckline completions fish > ~/.config/fish/completions/neckline.fish")]
pub struct CompletionsArgs {
    /// The shell to complete in.
    #[arg(value_name = "SHELL")]
    pub shell: Shell,
}

/// The completion script of `neckline` for `shell`, from the whole command line's definition
/// (`Cli::command()`).
pub fn script(shell: Shell, mut cmd: clap::Command) -> Vec<u8> {
    let mut script = Vec::new();
    clap_complete::generate(shell, &mut cmd, "neckline", &mut script);
    script
}

/// Run `completions`: the script to standard output (a closed pipe is not an error).
pub fn run(args: &CompletionsArgs, cli: clap::Command) -> Result<Outcome> {
    write_stdout(&script(args.shell, cli))?;
    Ok(Outcome::Done)
}
