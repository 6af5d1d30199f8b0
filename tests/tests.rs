mod bad_input;
mod cli;
mod explorer;
mod explorer_tmux;
mod library;
mod limits;
mod mdf;
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
