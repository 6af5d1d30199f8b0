//! Renderings of an `Analysis`: aligned table, JSON (a contract, see
//! shared/design/cli.md), CSV and Markdown. Nothing here computes results.
//!
//! Module map: `columns` (the per-step columns shared by the table and
//! Markdown), `table`, `json`, `csv`, `markdown` (one rendering each), `mdf`
//! (the driving-force optimisation), `samples` (many samples). Units, symbols,
//! the number formats and the table aligner come from `present`.

pub mod columns;
pub mod csv;
pub mod json;
pub mod markdown;
pub mod mdf;
pub mod mdf_flat;
pub mod mdf_samples;
pub mod samples;
pub mod table;
pub mod warnings;

pub use columns::Column;
pub use csv::csv;
pub use json::json_value;
pub use markdown::markdown;
pub use table::{TextOptions, table, table_with};
// Kept under their old paths for callers outside the front ends.
pub use crate::present::{EnergyUnit, class_symbol, clean, reaction_as_run, sci, verdict_symbol};
