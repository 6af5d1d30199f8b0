//! Max-min driving force: the largest B such that every route step can drop
//! by at least B (−dG' ≥ B) with every concentration inside its bounds. It
//! tells a practitioner whether the whole route can run forward at all, which
//! steps hold it back (their shadow prices, which sum to 1) and which
//! concentration bounds limit it. The linear programme is in ln c
//! (science.md §5) and is solved by clarabel, an interior-point solver that
//! returns the dual values the shadow prices come from.

mod program;
mod ranges;

use crate::analysis::{Direction, Prepared};
use crate::model::{Problem, units};
use crate::scenario::State;
use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSolver, IPSolver, NonnegativeConeT};
use program::{Lp, Setup, matrix, settings, setup, solver_error, status_ok};

/// Dual values below this count as zero (shadow prices, bound duals).
pub const PRICE_TOL: f64 = 1e-7;
/// ln c within this of a bound counts as at the bound.
const AT_BOUND: f64 = 1e-7;
/// Slack (in units of RT) given to B in the range problems, so that the
/// optimal face keeps an interior for the solver.
const RANGE_SLACK: f64 = 1e-7;

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

/// Solves the driving-force optimisation for the scenario, carriers held (no
/// ranges; cheap enough to run on every edit).
pub fn solve(prep: &Prepared, state: &State) -> Result<Mdf, MdfError> {
    solve_with(prep, state, &Options::default())
}

/// Solves the optimisation, carriers held, and also the ranges of each
/// concentration (`ranges` and `feasible_ranges`).
pub fn solve_with_ranges(prep: &Prepared, state: &State) -> Result<Mdf, MdfError> {
    let opts = Options {
        ranges: true,
        ..Options::default()
    };
    solve_with(prep, state, &opts)
}

/// Solves the optimisation with the given options.
pub fn solve_with(prep: &Prepared, state: &State, opts: &Options) -> Result<Mdf, MdfError> {
    let file = &prep.pathway.file;
    let s = setup(prep, state, opts)?;
    let (b, x, z) = optimum(&s.lp, file)?;
    let mut mdf = assemble(state, opts, &s, b, &x, &z);
    if opts.ranges {
        let lp = &s.lp;
        let pinned: Vec<Option<f64>> = lp
            .vars
            .iter()
            .enumerate()
            .map(|(v, &c)| {
                if mdf.duals.lower[c] > PRICE_TOL {
                    Some(lp.ln_lo[v])
                } else if mdf.duals.upper[c] > PRICE_TOL {
                    Some(lp.ln_hi[v])
                } else {
                    None
                }
            })
            .collect();
        let ln = ranges::ranges(lp, b, &x, &pinned, file)?;
        mdf.ranges = Some(ranges::to_conc_ranges(lp, &x, &ln, &mdf.conc));
        if b >= 0.0 {
            // science.md §10 (Kümmel et al. 2006): the same programme with B = 0.
            let none = vec![None; x.len()];
            let ln = ranges::ranges(lp, 0.0, &x, &none, file)?;
            mdf.feasible_ranges = Some(ranges::to_conc_ranges(lp, &x, &ln, &mdf.conc));
        }
    }
    Ok(mdf)
}

/// The range (mol/L) within which one free compound lets every route step
/// run (−dG' ≥ 0 inside the bounds), for a result `mdf` of this scenario: two
/// programmes at most, cheap enough for a screen's detail. None when the MDF
/// is negative or the compound is not free.
pub fn feasible_range(
    prep: &Prepared,
    state: &State,
    mdf: &Mdf,
    compound: usize,
) -> Result<Option<(f64, f64)>, MdfError> {
    if mdf.value < 0.0 || mdf.parts.get(compound) != Some(&Part::Free) {
        return Ok(None);
    }
    if let Some(r) = &mdf.feasible_ranges {
        return Ok(r.get(compound).copied());
    }
    let s = setup(prep, state, &mdf.options)?;
    let Some(v) = s.lp.vars.iter().position(|&c| c == compound) else {
        return Ok(None);
    };
    let x: Vec<f64> = s.lp.vars.iter().map(|&c| mdf.conc[c].ln()).collect();
    let ln = match ranges::ranges_by_paths(&s.lp, 0.0, &x) {
        Some(r) => r,
        None => {
            // Only this compound's programmes: the others are skipped as if pinned.
            let skip: Vec<Option<f64>> = (0..x.len()).map(|w| (w != v).then_some(x[w])).collect();
            ranges::ranges_by_lp(&s.lp, 0.0, &x, &skip, &prep.pathway.file)?
        }
    };
    Ok(ranges::to_conc_ranges(&s.lp, &x, &ln, &mdf.conc)
        .get(compound)
        .copied())
}

/// Solves the programme: b (B/RT), the optimal ln c per variable (snapped to
/// a bound when within AT_BOUND of it) and the raw duals.
fn optimum(lp: &Lp, file: &str) -> Result<(f64, Vec<f64>, Vec<f64>), MdfError> {
    let n = lp.vars.len();
    let m = lp.rows.len();
    let keep = vec![true; m];
    let (a, _) = matrix(lp, true, &keep);
    let mut h = Vec::with_capacity(m + 2 * n);
    h.extend_from_slice(&lp.rhs);
    h.extend_from_slice(&lp.ln_hi);
    h.extend(lp.ln_lo.iter().map(|v| -v));
    let mut q = vec![0.0; n + 1];
    q[0] = -1.0;
    let pm = CscMatrix::<f64>::zeros((n + 1, n + 1));
    let cones = [NonnegativeConeT(m + 2 * n)];
    let mut solver =
        DefaultSolver::new(&pm, &q, &a, &h, &cones, settings()).map_err(|e| MdfError::Solver {
            file: file.to_string(),
            status: e.to_string(),
        })?;
    solver.solve();
    let sol = &solver.solution;
    if !status_ok(sol.status) {
        return Err(solver_error(file, sol.status));
    }
    let mut x: Vec<f64> = sol.x[1..].to_vec();
    for (v, xv) in x.iter_mut().enumerate() {
        if (*xv - lp.ln_lo[v]).abs() < AT_BOUND || *xv < lp.ln_lo[v] {
            *xv = lp.ln_lo[v];
        } else if (*xv - lp.ln_hi[v]).abs() < AT_BOUND || *xv > lp.ln_hi[v] {
            *xv = lp.ln_hi[v];
        }
    }
    Ok((sol.x[0], x, sol.z.clone()))
}

/// The result from the optimum: concentrations, prices, driving forces and limiting bounds.
fn assemble(state: &State, opts: &Options, s: &Setup, b: f64, x: &[f64], z: &[f64]) -> Mdf {
    let lp = &s.lp;
    let (n, m) = (lp.vars.len(), lp.rows.len());
    let mut conc = s.conc.clone();
    let nc = conc.len();
    let mut duals = Duals {
        steps: z[..m].to_vec(),
        lower: vec![0.0; nc],
        upper: vec![0.0; nc],
    };
    for (v, &c) in lp.vars.iter().enumerate() {
        conc[c] = x[v].exp();
        duals.upper[c] = z[m + v];
        duals.lower[c] = z[m + n + v];
    }
    let value = lp.rt * b;
    let prices: Vec<f64> = duals
        .steps
        .iter()
        .map(|&z| if z < PRICE_TOL { 0.0 } else { z })
        .collect();
    let bottlenecks: Vec<usize> = (0..m).filter(|&j| prices[j] > 0.0).collect();
    let driving_forces: Vec<f64> = (0..m)
        .map(|j| {
            if prices[j] > 0.0 {
                value
            } else {
                lp.rt * (lp.rhs[j] - lp.rows[j].iter().map(|&(v, nu)| nu * x[v]).sum::<f64>())
            }
        })
        .collect();
    let mut limiting = Vec::new();
    for &c in &lp.vars {
        if duals.lower[c] > PRICE_TOL {
            limiting.push((c, Bound::Lower, duals.lower[c]));
        }
        if duals.upper[c] > PRICE_TOL {
            limiting.push((c, Bound::Upper, duals.upper[c]));
        }
    }
    Mdf {
        direction: state.direction,
        options: *opts,
        rt: lp.rt,
        value,
        steps: s.steps.clone(),
        dg0: s.dg0.clone(),
        driving_forces,
        prices,
        bottlenecks,
        limiting,
        conc,
        bounds: s.bounds.clone(),
        parts: s.parts.clone(),
        ranges: None,
        feasible_ranges: None,
        duals,
        warnings: s.warnings.clone(),
    }
}

/// Largest violations of the optimality conditions of a result (all in units
/// of RT, or dimensionless for prices): zero up to solver tolerance when the
/// result is optimal.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Certificate {
    /// Largest amount by which a step's driving force falls short of B, or a concentration leaves its bounds.
    pub primal: f64,
    /// Largest residual of dual feasibility (prices sum to 1; stoichiometric balance per compound; duals ≥ 0).
    pub dual: f64,
    /// |primal objective − dual objective| (strong duality).
    pub gap: f64,
    /// Largest product of a dual value and its constraint's slack (complementary slackness).
    pub complementary: f64,
}

/// Checks a result against the optimality conditions of its programme.
pub fn certificate(prep: &Prepared, state: &State, mdf: &Mdf) -> Result<Certificate, MdfError> {
    let s = setup(prep, state, &mdf.options)?;
    let lp = &s.lp;
    let rt = lp.rt;
    let b = mdf.value / rt;
    let x: Vec<f64> = lp.vars.iter().map(|&c| mdf.conc[c].ln()).collect();
    let mut cert = Certificate::default();
    let mut dual_obj = 0.0;
    let mut sum_prices = 0.0;
    let mut balance = vec![0.0; lp.vars.len()];
    for (j, row) in lp.rows.iter().enumerate() {
        let slack = lp.rhs[j] - b - row.iter().map(|&(v, nu)| nu * x[v]).sum::<f64>();
        let y = mdf.duals.steps[j];
        cert.primal = cert.primal.max(-slack);
        cert.dual = cert.dual.max(-y);
        cert.complementary = cert.complementary.max((y * slack).abs());
        sum_prices += y;
        dual_obj += y * lp.rhs[j];
        for &(v, nu) in row {
            balance[v] += nu * y;
        }
    }
    cert.dual = cert.dual.max((sum_prices - 1.0).abs());
    for (v, &c) in lp.vars.iter().enumerate() {
        let (ylo, yhi) = (mdf.duals.lower[c], mdf.duals.upper[c]);
        let (slo, shi) = (x[v] - lp.ln_lo[v], lp.ln_hi[v] - x[v]);
        cert.primal = cert.primal.max(-slo).max(-shi);
        cert.dual = cert
            .dual
            .max(-ylo)
            .max(-yhi)
            .max((balance[v] + yhi - ylo).abs());
        cert.complementary = cert
            .complementary
            .max((ylo * slo).abs())
            .max((yhi * shi).abs());
        dual_obj += yhi * lp.ln_hi[v] - ylo * lp.ln_lo[v];
    }
    cert.gap = (b - dual_obj).abs();
    Ok(cert)
}

#[cfg(test)]
mod tests;
