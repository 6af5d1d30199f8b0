//! `completions SHELL` and `manual`: both generated from the clap definitions,
//! so they list exactly the commands and options the binary accepts.

use crate::cli::Cli;
use crate::cli::output::emit;
use anyhow::{Context, Result};
use clap::CommandFactory;

/// Prints the completion script for `shell`.
pub fn completions(shell: clap_complete::Shell) -> Result<()> {
    let mut cmd = Cli::command();
    let mut buf = Vec::new();
    clap_complete::generate(shell, &mut cmd, "dgpath", &mut buf);
    emit(&String::from_utf8_lossy(&buf))
}

/// Prints the manual page (roff): the main page followed by one section per command.
pub fn manual() -> Result<()> {
    let cmd = Cli::command();
    let mut buf = Vec::new();
    clap_mangen::Man::new(cmd.clone())
        .render(&mut buf)
        .context("rendering the manual page")?;
    for sub in cmd.get_subcommands() {
        if sub.get_name() == "help" {
            continue;
        }
        let name = format!("dgpath-{}", sub.get_name());
        let sub = sub.clone().display_name(name.clone()).bin_name(name);
        clap_mangen::Man::new(sub)
            .render(&mut buf)
            .context("rendering the manual page")?;
    }
    emit(&String::from_utf8_lossy(&buf))
}
