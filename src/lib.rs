//! dgpath: Gibbs energies of metabolic pathway steps at a cell's own
//! temperature, pH, ionic strength and concentrations, with the judgements a
//! practitioner makes from them (near or far from equilibrium, where the drop
//! is, where flux is controlled, whether the route can run at all).
//!
//! Module map (arrows point at what a module may use):
//! `cli -> {tui, report, plot} -> present -> analysis -> thermo -> model`;
//! `analysis -> scenario -> model` (`scenario` holds the editable state and
//! `Direction`). The front ends (`tui`, `report`, `plot`) share `present` and
//! never import each other. The binary's `cli` lives in `src/cli/`.
#![forbid(unsafe_code)]
// No unwrap or expect outside tests: every failure becomes a message.
#![deny(clippy::unwrap_used, clippy::expect_used)]

pub mod analysis;
pub mod import;
pub mod model;
#[cfg(feature = "plot")]
pub mod plot;
pub mod present;
pub mod report;
pub mod scenario;
pub mod synthetic;
pub mod thermo;
pub mod tui;

/// The bundled demo pathway (an invented fermenter scenario).
pub const DEMO: &str = include_str!("../pathways/fermenter.toml");
/// File name shown for the bundled demo.
pub const DEMO_NAME: &str = "pathways/fermenter.toml";
