//! The route's types: roles, the steps as they run, the route and the
//! prepared pathway with both routes; and the two small helpers the
//! building and the balance share.

use crate::model::{Pathway, Problem};
pub use crate::scenario::Direction;

/// A compound's role on one route.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    /// Consumed on the route, never produced.
    Input,
    /// Produced on the route, never consumed.
    Output,
    /// Both produced and consumed: mass-balanced.
    Intermediate,
    /// Stated carrier (ATP, NADH, ...).
    Currency,
    /// Stated solvent (water).
    Solvent,
    /// Not used by any route step (only by side steps, or by none).
    OffRoute,
}

impl Role {
    /// Lower-case name for reports.
    pub fn as_str(self) -> &'static str {
        match self {
            Role::Input => "input",
            Role::Output => "output",
            Role::Intermediate => "intermediate",
            Role::Currency => "currency",
            Role::Solvent => "solvent",
            Role::OffRoute => "off-route",
        }
    }
}

/// One step's place on a route.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RouteStep {
    /// Index into `Pathway::steps`.
    pub step: usize,
    /// +1 when it runs as written, −1 when reversed.
    pub sign: f64,
    /// Turns per pass.
    pub times: f64,
    /// For a bypass in the reverse route: the forward step it replaces.
    pub replaces: Option<usize>,
}

/// A route in one direction.
#[derive(Debug, Clone, PartialEq)]
pub struct Route {
    /// Direction it runs.
    pub direction: Direction,
    /// Steps in order.
    pub steps: Vec<RouteStep>,
    /// Role of each compound (indexed like `Pathway::compounds`).
    pub roles: Vec<Role>,
    /// Branch point flag of each compound.
    pub branch: Vec<bool>,
    /// Coupled groups as positions in `steps`, in route order.
    pub groups: Vec<Vec<usize>>,
    /// Side steps (indices into `Pathway::steps`).
    pub side: Vec<usize>,
    /// Reversed steps that have no bypass (reverse route only).
    pub unbypassed: Vec<usize>,
}

impl Route {
    /// Position of a pathway step on this route.
    pub fn position(&self, step: usize) -> Option<usize> {
        self.steps.iter().position(|r| r.step == step)
    }
}

/// A pathway with both of its routes built.
#[derive(Debug, Clone)]
pub struct Prepared {
    /// The checked file.
    pub pathway: Pathway,
    /// The route as written.
    pub forward: Route,
    /// The reverse route, or why it cannot be built.
    pub reverse: Result<Route, Problem>,
}

impl Prepared {
    /// The route for a direction.
    pub fn route(&self, d: Direction) -> Result<&Route, &Problem> {
        match d {
            Direction::Forward => Ok(&self.forward),
            Direction::Reverse => self.reverse.as_ref(),
        }
    }
}

/// A problem in the pathway file `p`, at `line` when known.
pub(super) fn problem(p: &Pathway, line: Option<usize>, message: String) -> Problem {
    Problem {
        file: p.file.clone(),
        line,
        column: None,
        message,
    }
}

/// Turns as written in a message: up to three decimals, no trailing zeros.
pub(super) fn fmt_t(t: f64) -> String {
    let s = format!("{t:.3}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}
