//! `check FILE`: load and check a pathway file; print a one-line summary and
//! the same warnings `report` and `mdf` give (exit 0 with warnings, 1 with errors).

use crate::cli::args::Common;
use crate::cli::output::emit;
use crate::cli::request::{load, state_from};
use anyhow::Result;
use dgpath::report::warnings::warnings;
use std::path::Path;

/// Checks `file` and prints what it holds, then its warnings on stderr.
pub fn run(file: &Path) -> Result<()> {
    let prep = load(file)?;
    let state = state_from(&prep, &Common::default())?;
    let mut msg = format!(
        "{}: ok — {} compounds, {} steps ({} on the route)",
        file.display(),
        prep.pathway.compounds.len(),
        prep.pathway.steps.len(),
        prep.forward.steps.len()
    );
    let w = warnings(&prep, &state);
    if !w.is_empty() {
        msg.push_str(&format!(
            " with {} warning{}",
            w.len(),
            if w.len() == 1 { "" } else { "s" }
        ));
    }
    if let Err(e) = &prep.reverse {
        msg.push_str(&format!(
            "\nnote: the reverse route cannot be built: {}",
            e.message
        ));
    }
    for line in &w {
        eprintln!("warning: {line}");
    }
    emit(&(msg + "\n"))
}
