//! `check FILE`: load and check a pathway file; print a one-line summary.

use crate::cli::output::emit;
use crate::cli::request::load;
use anyhow::Result;
use std::path::Path;

/// Checks `file` and prints what it holds.
pub fn run(file: &Path) -> Result<()> {
    let prep = load(file)?;
    let mut msg = format!(
        "{}: ok — {} compounds, {} steps ({} on the route)",
        file.display(),
        prep.pathway.compounds.len(),
        prep.pathway.steps.len(),
        prep.forward.steps.len()
    );
    if let Err(e) = &prep.reverse {
        msg.push_str(&format!(
            "\nnote: the reverse route cannot be built: {}",
            e.message
        ));
    }
    emit(&(msg + "\n"))
}
