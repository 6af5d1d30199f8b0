//! Command-line definitions and dispatch. Thin: it turns arguments into a
//! prepared pathway, a scenario state and options, then calls the library.
//!
//! Module map: `args` (what clap parses), `request` (arguments → prepared
//! pathway and scenario state), `output` (stdout), `cmd/*` (one file per
//! command), and here the dispatch.

pub mod args;
pub mod cmd;
pub mod output;
pub mod request;

pub use args::Cli;

use anyhow::Result;
use args::{Command, Common, Format, View};
use dgpath::tui::{self, Source};
use request::{load, load_demo, load_source, state_from};

/// Entry point after parsing.
pub fn run(cli: Cli) -> Result<()> {
    match cli.command {
        None => {
            let prep = load_demo()?;
            if tui::is_terminal() {
                let state = state_from(&prep, &Common::default())?;
                cmd::explore::explore(prep, state, Source::demo(), &Common::default(), false)
            } else {
                cmd::report::run_report(&prep, &Common::default(), Format::Table, &View::default())
            }
        }
        Some(Command::Completions { shell }) => cmd::shell::completions(shell),
        Some(Command::Manual) => cmd::shell::manual(),
        Some(Command::New { file }) => cmd::new::new_file(&file),
        Some(Command::Import(args)) => cmd::import::run(&args),
        Some(Command::Check { file }) => cmd::check::run(&file),
        Some(Command::Report {
            file,
            common,
            format,
            view,
        }) => {
            let prep = load(&file)?;
            match &common.samples {
                Some(path) => cmd::report::run_samples_report(&prep, &common, path, format),
                None => cmd::report::run_report(&prep, &common, format, &view),
            }
        }
        Some(Command::Mdf {
            file,
            common,
            format,
            free_currencies,
        }) => {
            let prep = load(&file)?;
            cmd::mdf::run_mdf(&prep, &common, format, free_currencies)
        }
        Some(Command::Plot {
            file,
            common,
            output,
        }) => cmd::plot::run_plot(&load(&file)?, &common, &output),
        Some(Command::Explore {
            file,
            common,
            ascii,
        }) => {
            let (prep, source) = load_source(&file)?;
            let state = state_from(&prep, &common)?;
            cmd::explore::explore(prep, state, source, &common, ascii)
        }
        Some(Command::Screenshot {
            file,
            common,
            output,
            size,
            keys,
            ascii,
        }) => cmd::screenshot::screenshot(&file, &common, &output, &size, &keys, ascii),
    }
}
