//! What the person asks of an import, and what comes back.

use super::tables;

/// Which reactions count when finding branch points.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum BranchesFrom {
    /// Every reaction except the objective, exchange/sink/demand and bypass reactions.
    #[default]
    Network,
    /// Every reaction of the model.
    All,
}

/// What the person asked for.
#[derive(Debug, Clone, Default)]
pub struct Options {
    /// Reaction ids of the route, in the order it runs (with or without `R_`).
    pub route: Vec<String>,
    /// Route steps to run against the model's written direction.
    pub flip: Vec<String>,
    /// Route steps to run as the model writes them.
    pub keep: Vec<String>,
    /// Standard energies, when a table was given.
    pub dg0: Option<tables::Dg0Table>,
    /// Concentrations, when a table was given.
    pub conc: Option<tables::ConcTable>,
    /// Temperature as written (`"30 C"`); default 25 C.
    pub temperature: Option<String>,
    /// pH; default 7.
    pub ph: Option<f64>,
    /// Which reactions make branch points.
    pub branches_from: BranchesFrom,
}

/// An imported pathway file and what the person should know about it.
#[derive(Debug, Clone, PartialEq)]
pub struct Imported {
    /// The pathway file text.
    pub text: String,
    /// Route step ids, in order.
    pub route: Vec<String>,
    /// Bypass step ids.
    pub bypasses: Vec<String>,
    /// Compounds marked as branch points.
    pub branches: Vec<String>,
    /// Steps written with `dg0 = "?"`.
    pub missing_dg0: Vec<String>,
    /// Compounds written with `conc = "?"`.
    pub missing_conc: Vec<String>,
    /// Other things worth saying (transport steps, unbalanced reactions, ...).
    pub notes: Vec<String>,
}
