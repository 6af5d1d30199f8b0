//! What the optimisation returns (the optimum, its duals, its ranges), its
//! errors and options, and the tolerances it reads its numbers with.

use crate::model::{Problem, units};
use crate::scenario::Direction;

/// Dual values below this count as zero (shadow prices, bound duals).
pub const PRICE_TOL: f64 = 1e-7;
/// ln c within this of a bound counts as at the bound.
pub(super) const AT_BOUND: f64 = 1e-7;
/// Slack (in units of RT) given to B in the range problems, so that the
/// optimal face keeps an interior for the solver.
pub(super) const RANGE_SLACK: f64 = 1e-7;

/// Which side of a compound's bounds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Bound {
    /// The lower bound.
    Lower,
    /// The upper bound.
    Upper,
}

impl Bound {
    /// "lower" or "upper".
    pub fn as_str(self) -> &'static str {
        match self {
            Bound::Lower => "lower",
            Bound::Upper => "upper",
        }
    }
}

/// How a compound takes part in the optimisation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Part {
    /// Free between its bounds (a variable of the programme).
    Free,
    /// Held at its concentration (`fixed = true`, a currency not freed, or equal bounds).
    Held,
    /// Not in any route step's Q (solvents, off-route compounds).
    Absent,
}

/// The raw dual values of the programme, for checks of optimality.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Duals {
    /// One per route position (the step constraints).
    pub steps: Vec<f64>,
    /// One per compound: dual of its lower bound (0 unless `Part::Free`).
    pub lower: Vec<f64>,
    /// One per compound: dual of its upper bound (0 unless `Part::Free`).
    pub upper: Vec<f64>,
}

/// Result of the driving-force optimisation.
#[derive(Debug, Clone, PartialEq)]
pub struct Mdf {
    /// Direction optimised.
    pub direction: Direction,
    /// The options it was solved with.
    pub options: Options,
    /// RT at the scenario temperature, J/mol.
    pub rt: f64,
    /// The max-min driving force B*, J/mol; negative: the route cannot run forward within the bounds.
    pub value: f64,
    /// Pathway step index of each route position.
    pub steps: Vec<usize>,
    /// dG'° at the scenario's conditions as run, per route position, J/mol.
    pub dg0: Vec<f64>,
    /// −dG' per turn at the optimum, per route position, J/mol.
    pub driving_forces: Vec<f64>,
    /// Shadow price of each route position's constraint (tiny values set to 0; they sum to 1).
    pub prices: Vec<f64>,
    /// Route positions whose constraint carries a positive shadow price.
    pub bottlenecks: Vec<usize>,
    /// Bounds that limit the MDF: (compound, which bound, dual). The dual is
    /// dB*/d ln(bound) in units of RT, sign taken so that widening the bound helps.
    pub limiting: Vec<(usize, Bound, f64)>,
    /// Optimal concentration of each compound, mol/L (the scenario's for `Part::Absent`).
    pub conc: Vec<f64>,
    /// Bounds used for each compound, mol/L (lo = hi for held compounds).
    pub bounds: Vec<(f64, f64)>,
    /// How each compound takes part.
    pub parts: Vec<Part>,
    /// Range (mol/L) each compound can take while the MDF holds; None unless asked for.
    pub ranges: Option<Vec<(f64, f64)>>,
    /// Range (mol/L) each compound can take with every route step at −dG' ≥ 0
    /// (held compounds: their value); None unless asked for or when the MDF is negative.
    pub feasible_ranges: Option<Vec<(f64, f64)>>,
    /// The raw dual values.
    pub duals: Duals,
    /// Warnings for the reader (concentrations outside their bounds), one line each.
    pub warnings: Vec<String>,
}

impl Mdf {
    /// True when every route step can run forward within the bounds (B* > 0).
    pub fn feasible(&self) -> bool {
        self.value > 0.0
    }
}

/// Why the optimisation could not be run.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum MdfError {
    /// The route for the requested direction cannot be built.
    #[error("{0}")]
    Route(Problem),
    /// A held compound lies outside its own bounds.
    #[error(
        "{file}:{line}: compound '{id}' is fixed at {}, outside its bounds {} to {}; change its conc (or --set {id}=...) to a value inside the bounds, widen its bounds, or remove fixed = true",
        fmt_conc(*.conc),
        fmt_conc(*.lo),
        fmt_conc(*.hi)
    )]
    FixedOutsideBounds {
        /// File name.
        file: String,
        /// Line of the compound's declaration.
        line: usize,
        /// Compound id.
        id: String,
        /// The concentration it is held at, mol/L.
        conc: f64,
        /// Lower bound, mol/L.
        lo: f64,
        /// Upper bound, mol/L.
        hi: f64,
    },
    /// A standard energy is not a finite number at the scenario's conditions.
    #[error(
        "{file}:{line}: step '{id}' has no finite dG'° at these conditions; check its dg0 or keq"
    )]
    NotFinite {
        /// File name.
        file: String,
        /// Line of the step.
        line: usize,
        /// Step id.
        id: String,
    },
    /// The route has no steps.
    #[error("{file}: the {direction} route has no steps to optimise")]
    NoSteps {
        /// File name.
        file: String,
        /// "forward" or "reverse".
        direction: &'static str,
    },
    /// No concentrations satisfy the bounds and held values.
    #[error(
        "{file}: no concentrations satisfy the bounds and the fixed values together (the solver reports {status}); check the bounds and fixed compounds"
    )]
    Infeasible {
        /// File name.
        file: String,
        /// Solver status.
        status: String,
    },
    /// The solver stopped without an answer.
    #[error(
        "{file}: the driving-force optimisation did not finish (the solver reports {status}); check for extreme dg0 values or bounds many decades wide"
    )]
    Solver {
        /// File name.
        file: String,
        /// Solver status.
        status: String,
    },
}

/// A concentration as written in messages.
pub(super) fn fmt_conc(c: f64) -> String {
    units::format_conc(c, true)
}

/// Choices for the optimisation.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Options {
    /// Free every currency compound the file does not fix (`--free-currencies`);
    /// by default carriers are held at their concentrations (science.md §10).
    pub free_currencies: bool,
    /// Also each concentration's range at the optimum and where the route can
    /// run at all (two more programmes per free compound and range, unless the
    /// rows are difference constraints).
    pub ranges: bool,
}
