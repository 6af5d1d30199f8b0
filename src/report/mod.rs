//! Renderings of an `Analysis`: aligned table, JSON (a contract, see
//! shared/design/cli.md), CSV and Markdown. Nothing here computes results.
//!
//! Module map: `table`, `json`, `csv`, `markdown` (one rendering each),
//! `mdf` (the driving-force optimisation), `samples` (many samples). Units,
//! symbols and number formats come from `present`.

pub mod csv;
pub mod json;
pub mod markdown;
pub mod mdf;
pub mod samples;
pub mod table;

pub use csv::csv;
pub use json::json_value;
pub use markdown::markdown;
pub use table::{TextOptions, table};
// Kept under their old paths for callers outside the front ends.
pub use crate::present::{EnergyUnit, class_symbol, clean, reaction_as_run, sci, verdict_symbol};
