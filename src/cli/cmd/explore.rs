//! `explore FILE`: the terminal explorer.

use crate::cli::args::Common;
use crate::cli::request::explorer_samples;
use anyhow::Result;
use dgpath::analysis::Prepared;
use dgpath::scenario::State;
use dgpath::tui::{self, Source};

/// Opens the explorer on a prepared pathway.
pub fn explore(
    prep: Prepared,
    state: State,
    source: Source,
    c: &Common,
    ascii: bool,
) -> Result<()> {
    let samples = explorer_samples(&prep, &state, c)?;
    let opts = tui::Options {
        ascii,
        color: std::env::var_os("NO_COLOR").is_none_or(|v| v.is_empty()),
        unit: c.unit(),
    };
    let app = tui::App::new(prep, state, source, opts)
        .and_then(|a| a.with_samples(samples))
        .map(|a| a.with_draws(c.draws()))?;
    Ok(tui::run(app)?)
}
