//! `screenshot FILE -o OUT`: the explorer rendered to OUT.txt and OUT.svg.

use crate::cli::args::Common;
use crate::cli::output::emit;
use crate::cli::request::{explorer_samples, load_source, state_from};
use anyhow::{Context, Result};
use dgpath::tui;
use std::path::{Path, PathBuf};

/// Replays the keys and writes the two pictures.
pub fn screenshot(
    file: &Path,
    c: &Common,
    output: &Path,
    size: &str,
    keys: &str,
    ascii: bool,
) -> Result<()> {
    let (w, h) = tui::export::parse_size(size).with_context(|| format!("--size '{size}'"))?;
    let (prep, source) = load_source(file)?;
    let state = state_from(&prep, c)?;
    let samples = explorer_samples(&prep, &state, c)?;
    // Pictures are always in colour: they are files, not a terminal.
    let opts = tui::Options {
        ascii,
        color: true,
        unit: c.unit(),
    };
    let mut app = tui::App::new(prep, state, source, opts)
        .and_then(|a| a.with_samples(samples))
        .map(|a| a.with_draws(c.draws()))?;
    let (txt, svg) = tui::export::screenshot(&mut app, keys, w, h).context("--keys")?;
    let with = |ext: &str| {
        let mut p = output.as_os_str().to_owned();
        p.push(ext);
        PathBuf::from(p)
    };
    for (path, text) in [(with(".txt"), txt), (with(".svg"), svg)] {
        std::fs::write(&path, text).with_context(|| format!("{}: cannot write", path.display()))?;
    }
    emit(&format!(
        "wrote {} and {}\n",
        with(".txt").display(),
        with(".svg").display()
    ))
}
