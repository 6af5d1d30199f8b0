//! One file per command.

pub mod check;
pub mod explore;
pub mod import;
pub mod mdf;
pub mod new;
pub mod plot;
pub mod report;
pub mod screenshot;
pub mod shell;
