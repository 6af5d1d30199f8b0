//! `new FILE`: a commented starter pathway file, never over an existing one.

use crate::cli::output::emit;
use anyhow::{Context, Result, bail};
use std::io::Write;
use std::path::Path;

/// The starter file written by `dgpath new`.
pub const STARTER: &str = include_str!("../../starter.toml");

/// Writes the starter file to `path`.
pub fn new_file(path: &Path) -> Result<()> {
    if path.exists() {
        bail!(
            "{} already exists; dgpath new never overwrites a file — pick another name",
            path.display()
        );
    }
    let mut f = std::fs::OpenOptions::new()
        .write(true)
        .create_new(true)
        .open(path)
        .with_context(|| format!("{}: cannot create the file", path.display()))?;
    f.write_all(STARTER.as_bytes())
        .with_context(|| format!("{}: cannot write", path.display()))?;
    emit(&format!(
        "wrote {}; edit it, then run: dgpath check {}\n",
        path.display(),
        path.display()
    ))
}
