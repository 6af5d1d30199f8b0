//! dgpath's integration tests, one binary: each module tests what a user sees
//! (the command line, references with their sources, the explorer, properties,
//! bad inputs, limits, saving).

mod bad_input;
mod cli;
mod control_estimate;
mod explorer;
mod explorer_tmux;
mod explorer_use;
mod forward;
mod import;
mod library;
mod limits;
mod mdf;
mod outputs;
#[cfg(feature = "plot")]
mod plot;
mod properties;
mod reactants;
mod references;
mod regressions;
mod samples;
mod save_crash;
mod save_links;
mod support;
mod uncertainty;
