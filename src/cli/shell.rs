//! Help that fits the shell: completion scripts (`clap_complete`) and the manual page
//! (`clap_mangen`), both generated from the same argument definitions as `--help`.

use std::io::{self, Write};
use std::process::ExitCode;

use clap::{Args, CommandFactory};
use clap_complete::Shell;

use super::args::Cli;

/// Arguments of `completions`.
#[derive(Debug, Args)]
pub struct CompletionsArgs {
    /// The shell to complete in (bash, zsh, fish, elvish or powershell).
    #[arg(value_enum)]
    pub shell: Shell,
}

/// Prints the completion script of `shell` for every verb and flag.
pub fn completions(args: &CompletionsArgs) -> anyhow::Result<ExitCode> {
    let mut out = io::stdout().lock();
    clap_complete::generate(args.shell, &mut Cli::command(), "kernstep", &mut out);
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}

/// Prints the manual page (roff, section 1) of the command and its verbs.
pub fn manual() -> anyhow::Result<ExitCode> {
    let mut out = io::stdout().lock();
    let command = Cli::command();
    clap_mangen::Man::new(command.clone()).render(&mut out)?;
    for verb in command.get_subcommands() {
        let title = format!("kernstep-{}", verb.get_name());
        clap_mangen::Man::new(verb.clone())
            .title(title)
            .render(&mut out)?;
    }
    out.flush()?;
    Ok(ExitCode::SUCCESS)
}
