mod bad_input;
mod cli;
mod control_estimate;
mod explorer;
mod explorer_tmux;
mod library;
mod limits;
mod mdf;
#[cfg(feature = "plot")]
mod plot;
mod properties;
mod references;
mod regressions;
mod samples;
mod save_crash;
mod save_links;
mod support;
mod uncertainty;
