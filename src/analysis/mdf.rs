//! Max-min driving force: the largest B such that every route step can drop
//! by at least B (−dG' ≥ B) with every concentration inside its bounds. It
//! tells a practitioner whether the whole route can run forward at all, which
//! steps hold it back (their shadow prices, which sum to 1) and which
//! concentration bounds limit it. The linear programme is in ln c
//! (science.md §5) and is solved by clarabel, an interior-point solver that
//! returns the dual values the shadow prices come from.

use crate::analysis::{Direction, Prepared};
use crate::model::{Pathway, Problem, units};
use crate::scenario::State;
use crate::thermo;
use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSettings, DefaultSolver, IPSolver, NonnegativeConeT, SolverStatus};

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
    /// Held at its concentration (`fixed = true`, or equal bounds).
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

/// The programme in ln c, scaled by RT: maximise b subject to
/// b + Σ ν_ij x_i ≤ r_j for every route position j and ln lo_i ≤ x_i ≤ ln hi_i.
struct Lp {
    rt: f64,
    /// Compound index of each variable.
    vars: Vec<usize>,
    /// Per route position: (variable, ν as run).
    rows: Vec<Vec<(usize, f64)>>,
    /// Per route position: (−dG'°_j − RT Σ_held ν ln c) / RT.
    rhs: Vec<f64>,
    ln_lo: Vec<f64>,
    ln_hi: Vec<f64>,
}

fn settings() -> DefaultSettings<f64> {
    DefaultSettings {
        verbose: false,
        presolve_enable: false,
        tol_gap_abs: 1e-10,
        tol_gap_rel: 1e-10,
        tol_feas: 1e-10,
        tol_ktratio: 1e-8,
        max_iter: 200,
        ..DefaultSettings::default()
    }
}

fn fmt_conc(c: f64) -> String {
    units::format_conc(c, true)
}

struct Setup {
    lp: Lp,
    steps: Vec<usize>,
    dg0: Vec<f64>,
    conc: Vec<f64>,
    bounds: Vec<(f64, f64)>,
    parts: Vec<Part>,
    warnings: Vec<String>,
}

fn setup(prep: &Prepared, state: &State) -> Result<Setup, MdfError> {
    let p: &Pathway = &prep.pathway;
    let route = prep
        .route(state.direction)
        .map_err(|e| MdfError::Route(e.clone()))?;
    if route.steps.is_empty() {
        return Err(MdfError::NoSteps {
            file: p.file.clone(),
            direction: state.direction.as_str(),
        });
    }
    let rt = thermo::rt(state.conditions.temperature);
    let nc = p.compounds.len();
    let mut parts = vec![Part::Absent; nc];
    let mut bounds: Vec<(f64, f64)> = (0..nc).map(|i| p.bounds_of(i)).collect();
    let mut conc = state.conc.clone();
    let mut warnings = Vec::new();
    for rs in &route.steps {
        for &(c, _) in &p.steps[rs.step].stoich {
            if !p.compounds[c].is_solvent() {
                parts[c] = Part::Free;
            }
        }
    }
    let mut var_of = vec![usize::MAX; nc];
    let mut vars = Vec::new();
    for c in 0..nc {
        if parts[c] != Part::Free {
            continue;
        }
        let comp = &p.compounds[c];
        let (lo, hi) = bounds[c];
        let x = state.conc[c];
        let inside = x >= lo * (1.0 - 1e-9) && x <= hi * (1.0 + 1e-9);
        if comp.fixed {
            if !inside {
                return Err(MdfError::FixedOutsideBounds {
                    file: p.file.clone(),
                    line: comp.line,
                    id: comp.id.clone(),
                    conc: x,
                    lo,
                    hi,
                });
            }
            parts[c] = Part::Held;
            bounds[c] = (x, x);
        } else if (hi - lo) <= 1e-12 * hi {
            parts[c] = Part::Held;
            conc[c] = lo;
        } else {
            if !inside {
                warnings.push(format!(
                    "{}:{}: '{}' is at {} in this scenario, outside its bounds {} to {}; the optimisation keeps it within the bounds",
                    p.file,
                    comp.line,
                    comp.id,
                    fmt_conc(x),
                    fmt_conc(lo),
                    fmt_conc(hi)
                ));
            }
            var_of[c] = vars.len();
            vars.push(c);
        }
    }
    let mut rows = Vec::with_capacity(route.steps.len());
    let mut rhs = Vec::with_capacity(route.steps.len());
    let mut dg0 = Vec::with_capacity(route.steps.len());
    let mut steps = Vec::with_capacity(route.steps.len());
    for rs in &route.steps {
        let st = &p.steps[rs.step];
        let g0 = rs.sign * thermo::dg0_at(st, &p.compounds, &p.reference, &state.conditions).0;
        if !g0.is_finite() {
            return Err(MdfError::NotFinite {
                file: p.file.clone(),
                line: st.line,
                id: st.id.clone(),
            });
        }
        let mut r = -g0 / rt;
        let mut row: Vec<(usize, f64)> = Vec::new();
        for &(c, nu0) in &st.stoich {
            let nu = nu0 * rs.sign;
            match parts[c] {
                Part::Free => match row.iter_mut().find(|(v, _)| *v == var_of[c]) {
                    Some(e) => e.1 += nu,
                    None => row.push((var_of[c], nu)),
                },
                Part::Held => r -= nu * conc[c].ln(),
                Part::Absent => {}
            }
        }
        row.sort_by_key(|e| e.0);
        rows.push(row);
        rhs.push(r);
        dg0.push(g0);
        steps.push(rs.step);
    }
    let ln_lo = vars.iter().map(|&c| bounds[c].0.ln()).collect();
    let ln_hi = vars.iter().map(|&c| bounds[c].1.ln()).collect();
    Ok(Setup {
        lp: Lp {
            rt,
            vars,
            rows,
            rhs,
            ln_lo,
            ln_hi,
        },
        steps,
        dg0,
        conc,
        bounds,
        parts,
        warnings,
    })
}

/// Column-wise matrix of the programme. With `with_b`, column 0 is b (one in
/// every kept row); `keep` says which route positions have a row.
fn matrix(lp: &Lp, with_b: bool, keep: &[bool]) -> (CscMatrix<f64>, usize) {
    let n = lp.vars.len();
    let row_index: Vec<usize> = keep
        .iter()
        .scan(0usize, |k, &on| {
            let r = *k;
            if on {
                *k += 1;
            }
            Some(r)
        })
        .collect();
    let m = keep.iter().filter(|&&k| k).count();
    let mut per_var: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n];
    for (j, row) in lp.rows.iter().enumerate() {
        if !keep[j] {
            continue;
        }
        for &(v, nu) in row {
            if nu != 0.0 {
                per_var[v].push((row_index[j], nu));
            }
        }
    }
    let ncol = n + usize::from(with_b);
    let mut colptr = Vec::with_capacity(ncol + 1);
    let mut rowval = Vec::new();
    let mut nzval = Vec::new();
    colptr.push(0);
    if with_b {
        for r in 0..m {
            rowval.push(r);
            nzval.push(1.0);
        }
        colptr.push(rowval.len());
    }
    for (v, entries) in per_var.iter().enumerate() {
        for &(r, nu) in entries {
            rowval.push(r);
            nzval.push(nu);
        }
        rowval.push(m + v);
        nzval.push(1.0);
        rowval.push(m + n + v);
        nzval.push(-1.0);
        colptr.push(rowval.len());
    }
    (CscMatrix::new(m + 2 * n, ncol, colptr, rowval, nzval), m)
}

fn status_ok(s: SolverStatus) -> bool {
    matches!(s, SolverStatus::Solved | SolverStatus::AlmostSolved)
}

fn solver_error(file: &str, s: SolverStatus) -> MdfError {
    match s {
        SolverStatus::PrimalInfeasible | SolverStatus::AlmostPrimalInfeasible => {
            MdfError::Infeasible {
                file: file.to_string(),
                status: format!("{s:?}"),
            }
        }
        _ => MdfError::Solver {
            file: file.to_string(),
            status: format!("{s:?}"),
        },
    }
}

/// Solves the driving-force optimisation for the scenario (no ranges; cheap
/// enough to run on every edit).
pub fn solve(prep: &Prepared, state: &State) -> Result<Mdf, MdfError> {
    solve_inner(prep, state, false)
}

/// Solves the optimisation and also the range of each concentration while
/// the MDF holds (two more programmes per free compound).
pub fn solve_with_ranges(prep: &Prepared, state: &State) -> Result<Mdf, MdfError> {
    solve_inner(prep, state, true)
}

fn solve_inner(prep: &Prepared, state: &State, want_ranges: bool) -> Result<Mdf, MdfError> {
    let file = &prep.pathway.file;
    let Setup {
        lp,
        steps,
        dg0,
        mut conc,
        bounds,
        parts,
        warnings,
    } = setup(prep, state)?;
    let n = lp.vars.len();
    let m = lp.rows.len();
    let keep = vec![true; m];
    let (a, _) = matrix(&lp, true, &keep);
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
            file: file.clone(),
            status: e.to_string(),
        })?;
    solver.solve();
    let sol = &solver.solution;
    if !status_ok(sol.status) {
        return Err(solver_error(file, sol.status));
    }
    let b = sol.x[0];
    let mut x: Vec<f64> = sol.x[1..].to_vec();
    for (v, xv) in x.iter_mut().enumerate() {
        if (*xv - lp.ln_lo[v]).abs() < AT_BOUND || *xv < lp.ln_lo[v] {
            *xv = lp.ln_lo[v];
        } else if (*xv - lp.ln_hi[v]).abs() < AT_BOUND || *xv > lp.ln_hi[v] {
            *xv = lp.ln_hi[v];
        }
    }
    let nc = conc.len();
    let mut duals = Duals {
        steps: sol.z[..m].to_vec(),
        lower: vec![0.0; nc],
        upper: vec![0.0; nc],
    };
    for (v, &c) in lp.vars.iter().enumerate() {
        conc[c] = x[v].exp();
        duals.upper[c] = sol.z[m + v];
        duals.lower[c] = sol.z[m + n + v];
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
    let ranges = if want_ranges {
        let pinned: Vec<Option<f64>> = lp
            .vars
            .iter()
            .enumerate()
            .map(|(v, &c)| {
                if duals.lower[c] > PRICE_TOL {
                    Some(lp.ln_lo[v])
                } else if duals.upper[c] > PRICE_TOL {
                    Some(lp.ln_hi[v])
                } else {
                    None
                }
            })
            .collect();
        let ln = ranges(&lp, b, &x, &pinned, file)?;
        Some(to_conc_ranges(&lp, &x, &ln, &conc))
    } else {
        None
    };
    Ok(Mdf {
        direction: state.direction,
        rt: lp.rt,
        value,
        steps,
        dg0,
        driving_forces,
        prices,
        bottlenecks,
        limiting,
        conc,
        bounds,
        parts,
        ranges,
        duals,
        warnings,
    })
}

/// Min and max of each ln c with B held at its optimum, as (ln lo, ln hi)
/// per variable. When every step row is a difference constraint (x_p − x_s ≤ w,
/// after held compounds are moved to the right-hand side) the ranges are
/// shortest paths in the constraint graph; otherwise one programme per end.
fn ranges(
    lp: &Lp,
    b: f64,
    x: &[f64],
    pinned: &[Option<f64>],
    file: &str,
) -> Result<Vec<(f64, f64)>, MdfError> {
    match ranges_by_paths(lp, b, x) {
        Some(r) => Ok(r),
        None => ranges_by_lp(lp, b, x, pinned, file),
    }
}

/// Converts per-variable ln ranges to per-compound concentration ranges.
fn to_conc_ranges(lp: &Lp, x: &[f64], ln_ranges: &[(f64, f64)], conc: &[f64]) -> Vec<(f64, f64)> {
    let mut out: Vec<(f64, f64)> = conc.iter().map(|&c| (c, c)).collect();
    for (v, &c) in lp.vars.iter().enumerate() {
        let lo = ln_ranges[v].0.max(lp.ln_lo[v]).min(x[v]);
        let hi = ln_ranges[v].1.min(lp.ln_hi[v]).max(x[v]);
        let snap = |e: f64| if (e - x[v]).abs() < 1e-6 { x[v] } else { e };
        out[c] = (snap(lo).exp(), snap(hi).exp());
    }
    out
}

/// Shortest-path ranges for systems of difference constraints. Node 0 is
/// the origin (x = 0), node v + 1 is variable v; x_v − x_u ≤ w is an edge
/// u → v of weight w, so max x_v = dist(0, v) and min x_v = −dist(v, 0).
/// Dijkstra runs on weights reduced by the optimum x (w + x_u − x_v ≥ 0).
/// None when some row is not a difference constraint.
fn ranges_by_paths(lp: &Lp, b: f64, x: &[f64]) -> Option<Vec<(f64, f64)>> {
    let n = lp.vars.len();
    let pot = |node: usize| if node == 0 { 0.0 } else { x[node - 1] };
    let mut edges: Vec<(usize, usize, f64)> = Vec::with_capacity(lp.rows.len() + 2 * n);
    for (j, row) in lp.rows.iter().enumerate() {
        let w = lp.rhs[j] - b;
        let terms: Vec<&(usize, f64)> = row.iter().filter(|e| e.1 != 0.0).collect();
        let (from, to) = match terms.as_slice() {
            [] => continue,
            [(v, nu)] if *nu == 1.0 => (0, v + 1),
            [(v, nu)] if *nu == -1.0 => (v + 1, 0),
            [(v1, n1), (v2, n2)] if *n1 == 1.0 && *n2 == -1.0 => (v2 + 1, v1 + 1),
            [(v1, n1), (v2, n2)] if *n1 == -1.0 && *n2 == 1.0 => (v1 + 1, v2 + 1),
            _ => return None,
        };
        edges.push((from, to, w));
    }
    for v in 0..n {
        edges.push((0, v + 1, lp.ln_hi[v]));
        edges.push((v + 1, 0, -lp.ln_lo[v]));
    }
    let mut fwd: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n + 1];
    let mut rev: Vec<Vec<(usize, f64)>> = vec![Vec::new(); n + 1];
    for &(u, v, w) in &edges {
        // Reduced weight; the solver's optimum may miss a constraint by ~1e-10.
        let r = (w + pot(u) - pot(v)).max(0.0);
        fwd[u].push((v, r));
        rev[v].push((u, r));
    }
    let up = dijkstra(&fwd);
    let down = dijkstra(&rev);
    Some(
        (0..n)
            .map(|v| (x[v] - down[v + 1], x[v] + up[v + 1]))
            .collect(),
    )
}

/// Distances from node 0 with non-negative weights (infinite when unreachable).
fn dijkstra(adj: &[Vec<(usize, f64)>]) -> Vec<f64> {
    use std::cmp::Reverse;
    use std::collections::BinaryHeap;
    #[derive(PartialEq)]
    struct D(f64);
    impl Eq for D {}
    impl PartialOrd for D {
        fn partial_cmp(&self, o: &Self) -> Option<std::cmp::Ordering> {
            Some(self.cmp(o))
        }
    }
    impl Ord for D {
        fn cmp(&self, o: &Self) -> std::cmp::Ordering {
            self.0.total_cmp(&o.0)
        }
    }
    let mut dist = vec![f64::INFINITY; adj.len()];
    let mut heap = BinaryHeap::new();
    dist[0] = 0.0;
    heap.push(Reverse((D(0.0), 0usize)));
    while let Some(Reverse((D(d), u))) = heap.pop() {
        if d > dist[u] {
            continue;
        }
        for &(v, w) in &adj[u] {
            let nd = d + w;
            if nd < dist[v] {
                dist[v] = nd;
                heap.push(Reverse((D(nd), v)));
            }
        }
    }
    dist
}

/// Ranges by linear programmes: one programme built once, its objective
/// swapped for each variable and direction. A variable whose bound carries a
/// positive dual sits at that bound in every optimum (complementary
/// slackness), so it needs no programme.
fn ranges_by_lp(
    lp: &Lp,
    b: f64,
    x: &[f64],
    pinned: &[Option<f64>],
    file: &str,
) -> Result<Vec<(f64, f64)>, MdfError> {
    let n = lp.vars.len();
    let mut out: Vec<(f64, f64)> = x.iter().map(|&v| (v, v)).collect();
    if n == 0 {
        return Ok(out);
    }
    let keep: Vec<bool> = lp
        .rows
        .iter()
        .map(|r| r.iter().any(|e| e.1 != 0.0))
        .collect();
    let (a, m) = matrix(lp, false, &keep);
    let mut h = Vec::with_capacity(m + 2 * n);
    for (j, &k) in keep.iter().enumerate() {
        if k {
            h.push(lp.rhs[j] - b + RANGE_SLACK);
        }
    }
    h.extend_from_slice(&lp.ln_hi);
    h.extend(lp.ln_lo.iter().map(|v| -v));
    let pm = CscMatrix::<f64>::zeros((n, n));
    let mut q = vec![0.0; n];
    let cones = [NonnegativeConeT(m + 2 * n)];
    let err = |e: String| MdfError::Solver {
        file: file.to_string(),
        status: e,
    };
    let mut solver =
        DefaultSolver::new(&pm, &q, &a, &h, &cones, settings()).map_err(|e| err(e.to_string()))?;
    for v in 0..n {
        if let Some(at) = pinned[v] {
            out[v] = (at, at);
            continue;
        }
        let mut ends = [0.0; 2];
        for (k, dir) in [1.0, -1.0].into_iter().enumerate() {
            q.iter_mut().for_each(|e| *e = 0.0);
            q[v] = dir;
            solver.update_q(&q).map_err(|e| err(e.to_string()))?;
            solver.solve();
            if !status_ok(solver.solution.status) {
                return Err(solver_error(file, solver.solution.status));
            }
            ends[k] = solver.solution.x[v];
        }
        out[v] = (ends[0], ends[1]);
    }
    Ok(out)
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
    let s = setup(prep, state)?;
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
mod tests {
    use super::*;
    use crate::analysis::prepare;
    use crate::model::load_str;
    use proptest::prelude::*;

    fn prepared(text: &str) -> Prepared {
        prepare(load_str(text, "chain.toml").expect("loads")).expect("prepares")
    }

    /// A 1:1 chain s0 -> s1 -> ... -> sn; dg0 in J/mol; bounds in mol/L.
    fn chain(dg0: &[f64], bounds: &[(f64, f64)], temperature: &str) -> String {
        chain_with(dg0, bounds, temperature, &[])
    }

    /// As `chain`, with the `conc` (and anything else) of some compounds replaced.
    fn chain_with(
        dg0: &[f64],
        bounds: &[(f64, f64)],
        temperature: &str,
        extra: &[(usize, &str)],
    ) -> String {
        let mut t = format!(
            "format = 1\n[pathway]\nname = \"chain\"\n[conditions]\ntemperature = \"{temperature}\"\n[compounds]\n"
        );
        for (i, &(lo, hi)) in bounds.iter().enumerate() {
            let mid = format!("conc = \"{:e} M\"", (lo * hi).sqrt());
            let attrs = extra
                .iter()
                .find(|e| e.0 == i)
                .map_or(mid.as_str(), |e| e.1);
            t.push_str(&format!(
                "s{i} = {{ {attrs}, bounds = [\"{lo:e} M\", \"{hi:e} M\"] }}\n"
            ));
        }
        for (i, g) in dg0.iter().enumerate() {
            t.push_str(&format!(
                "[[steps]]\nid = \"r{}\"\nreaction = \"s{i} -> s{}\"\ndg0 = \"{g:e} J/mol\"\n",
                i + 1,
                i + 1
            ));
        }
        t
    }

    /// science.md §5 closed form for a 1:1 chain [C]: MDF = min over runs a..b
    /// of [Σ g_i + RT(u_{a−1} − l_b)] / (b − a + 1), g_i = −dG'°_i.
    fn closed_form(dg0: &[f64], bounds: &[(f64, f64)], rt: f64) -> f64 {
        let mut best = f64::INFINITY;
        for a in 0..dg0.len() {
            let mut g = 0.0;
            for b in a..dg0.len() {
                g -= dg0[b];
                let v = (g + rt * (bounds[a].1.ln() - bounds[b + 1].0.ln())) / (b - a + 1) as f64;
                best = best.min(v);
            }
        }
        best
    }

    fn assert_optimal(prep: &Prepared, state: &State, m: &Mdf) {
        let c = certificate(prep, state, m).expect("certificate");
        assert!(c.primal < 1e-6, "primal feasibility {c:?}");
        assert!(c.dual < 1e-6, "dual feasibility {c:?}");
        assert!(c.gap < 1e-6, "strong duality {c:?}");
        assert!(c.complementary < 1e-6, "complementary slackness {c:?}");
        let sum: f64 = m.prices.iter().sum();
        assert!((sum - 1.0).abs() < 1e-6, "prices sum to {sum}");
    }

    const WORKED: [f64; 4] = [-5e3, 10e3, -20e3, -5e3];
    const DEFAULT_BOUNDS: [(f64, f64); 5] = [(1e-6, 1e-2); 5];

    #[test]
    fn worked_chain_at_25_c() {
        // science.md §5 worked case [C]: dG'° = [−5, +10, −20, −5] kJ/mol, bounds
        // 1 µM–10 mM, 298.15 K: MDF = 8.9160 kJ/mol, prices 0.5, 0.5, 0, 0, S1 = 2.060 mM.
        let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "25 C"));
        let state = State::from_pathway(&prep.pathway);
        let m = solve_with_ranges(&prep, &state).expect("solves");
        assert!((m.value / 1e3 - 8.9160).abs() < 5e-5, "MDF {}", m.value);
        for (p, want) in m.prices.iter().zip([0.5, 0.5, 0.0, 0.0]) {
            assert!((p - want).abs() < 1e-6, "prices {:?}", m.prices);
        }
        assert_eq!(m.bottlenecks, vec![0, 1]);
        assert!((m.conc[1] * 1e3 - 2.060).abs() < 5e-4, "S1 {}", m.conc[1]);
        // S1 is unique [C, science.md §5]: its range is a point.
        let r = m.ranges.as_ref().expect("ranges")[1];
        assert!((r.0 / r.1 - 1.0).abs() < 1e-5, "S1 range {r:?}");
        // The binding run starts at S0's upper bound and ends at S2's lower bound.
        assert_eq!(
            m.limiting.iter().map(|l| (l.0, l.1)).collect::<Vec<_>>(),
            vec![(0, Bound::Upper), (2, Bound::Lower)]
        );
        for j in 0..2 {
            assert!((m.driving_forces[j] - m.value).abs() < 1e-6);
        }
        assert!(m.driving_forces[2] > m.value && m.driving_forces[3] > m.value);
        assert_optimal(&prep, &state, &m);
        // S3 is free: the step r3 (−20 kJ/mol) leaves room, so S3's range is wider than a point.
        let r3 = m.ranges.as_ref().expect("ranges")[3];
        assert!(r3.1 / r3.0 > 10.0, "S3 range {r3:?}");
    }

    #[test]
    fn worked_chain_at_37_c() {
        // science.md §5 worked case [C]: at 310.15 K MDF = 9.3755 kJ/mol, S1 = 1.833 mM
        // (dG'° kept at its 25 °C value).
        let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "37 C"));
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        assert!((m.value / 1e3 - 9.3755).abs() < 5e-5, "MDF {}", m.value);
        assert!((m.conc[1] * 1e3 - 1.833).abs() < 5e-4, "S1 {}", m.conc[1]);
        assert!(m.ranges.is_none());
        assert_optimal(&prep, &state, &m);
    }

    #[test]
    fn fixed_compound_outside_bounds_is_an_error() {
        let text = chain_with(
            &WORKED,
            &DEFAULT_BOUNDS,
            "25 C",
            &[(2, "fixed = true, conc = \"50 mM\"")],
        );
        let prep = prepared(&text);
        let err = solve(&prep, &State::from_pathway(&prep.pathway)).unwrap_err();
        let msg = err.to_string();
        assert!(matches!(err, MdfError::FixedOutsideBounds { .. }), "{msg}");
        assert!(
            msg.contains("chain.toml:") && msg.contains("'s2'") && msg.contains("50 mM"),
            "{msg}"
        );
    }

    #[test]
    fn fixed_compound_is_held() {
        // S0 fixed at 1 mM instead of free up to 10 mM: the run r1..r2 loses RT ln 10 over 2 steps.
        let text = chain_with(
            &WORKED,
            &DEFAULT_BOUNDS,
            "25 C",
            &[(0, "fixed = true, conc = \"1 mM\"")],
        );
        let prep = prepared(&text);
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        let mut b = DEFAULT_BOUNDS;
        b[0] = (1e-3, 1e-3);
        assert!((m.value - closed_form(&WORKED, &b, m.rt)).abs() < 1e-3);
        assert_eq!(m.parts[0], Part::Held);
        assert!(
            m.limiting.iter().all(|l| l.0 != 0),
            "a held compound has no bound dual"
        );
        assert_optimal(&prep, &state, &m);
    }

    #[test]
    fn concentration_outside_bounds_warns() {
        let text = chain_with(
            &WORKED,
            &DEFAULT_BOUNDS,
            "25 C",
            &[(3, "conc = \"100 mM\"")],
        );
        let prep = prepared(&text);
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        assert_optimal(&prep, &state, &m);
        assert_eq!(m.warnings.len(), 1, "{:?}", m.warnings);
        assert!(
            m.warnings[0].contains("'s3'") && m.warnings[0].contains("0.1 M"),
            "{:?}",
            m.warnings
        );
        assert!(
            (m.value / 1e3 - 8.9160).abs() < 5e-5,
            "the bounds decide, not the scenario's value"
        );
    }

    #[test]
    fn uphill_route_gives_negative_mdf() {
        // One step +40 kJ/mol between 1 µM and 10 mM: at best −40 + RT ln 1e4 < 0.
        let prep = prepared(&chain(&[40e3], &DEFAULT_BOUNDS[..2], "25 C"));
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        assert_optimal(&prep, &state, &m);
        let want = -40e3 + m.rt * (1e-2f64 / 1e-6).ln();
        assert!((m.value - want).abs() < 1e-3 && !m.feasible());
        assert_eq!(m.bottlenecks, vec![0]);
    }

    #[test]
    fn reverse_route_runs_backward() {
        // Backward the worked chain is dG'° = [+5, +20, −10, +5]: closed form on the mirrored chain.
        let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "25 C"));
        let state = State {
            direction: Direction::Reverse,
            ..State::from_pathway(&prep.pathway)
        };
        let m = solve(&prep, &state).expect("solves");
        let back: Vec<f64> = WORKED.iter().rev().map(|g| -g).collect();
        assert!((m.value - closed_form(&back, &DEFAULT_BOUNDS, m.rt)).abs() < 1e-3);
        assert_optimal(&prep, &state, &m);
    }

    type LnRanges = Vec<(f64, f64)>;

    /// Both range methods on one solved chain: (shortest paths, programmes), ln c per variable.
    fn both_ranges(dg0: &[f64], bounds: &[(f64, f64)]) -> (LnRanges, LnRanges) {
        let prep = prepared(&chain(dg0, bounds, "25 C"));
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        let s = setup(&prep, &state).expect("sets up");
        let x: Vec<f64> = s.lp.vars.iter().map(|&c| m.conc[c].ln()).collect();
        let b = m.value / m.rt;
        let paths = ranges_by_paths(&s.lp, b, &x)
            .expect("a 1:1 chain is a system of difference constraints");
        let none = vec![None; x.len()];
        let lps = ranges_by_lp(&s.lp, b, &x, &none, "chain.toml").expect("programmes solve");
        let clamp = |r: Vec<(f64, f64)>| -> Vec<(f64, f64)> {
            r.iter()
                .enumerate()
                .map(|(v, e)| (e.0.max(s.lp.ln_lo[v]), e.1.min(s.lp.ln_hi[v])))
                .collect()
        };
        (clamp(paths), clamp(lps))
    }

    #[test]
    fn worked_chain_ranges_agree() {
        let (paths, lps) = both_ranges(&WORKED, &DEFAULT_BOUNDS);
        for (p, l) in paths.iter().zip(&lps) {
            assert!(
                (p.0 - l.0).abs() < 1e-5 && (p.1 - l.1).abs() < 1e-5,
                "{paths:?} vs {lps:?}"
            );
        }
        // S1 is unique [C, science.md §5] and S0 sits at its upper bound.
        assert!((paths[1].1 - paths[1].0).abs() < 1e-9);
        assert!((paths[0].0 - 1e-2f64.ln()).abs() < 1e-9);
    }

    #[test]
    fn ranges_need_programmes_for_two_substrate_steps() {
        let text = "format = 1\n[pathway]\nname = \"split\"\n[conditions]\ntemperature = \"25 C\"\n[compounds]\n\
            a = { conc = \"1 mM\" }\nb = { conc = \"1 mM\" }\nc = { conc = \"1 mM\" }\n\
            [[steps]]\nid = \"r1\"\nreaction = \"a -> b + c\"\ndg0 = \"20 kJ/mol\"\n";
        let prep = prepared(text);
        let state = State::from_pathway(&prep.pathway);
        let s = setup(&prep, &state).expect("sets up");
        let m = solve_with_ranges(&prep, &state).expect("solves");
        assert_optimal(&prep, &state, &m);
        let x: Vec<f64> = s.lp.vars.iter().map(|&c| m.conc[c].ln()).collect();
        assert!(ranges_by_paths(&s.lp, m.value / m.rt, &x).is_none());
        // One step, a at its upper bound and b, c at their lower bounds: every
        // concentration is pinned, MDF = −20 + RT ln(1e-2 / 1e-12) [C].
        let want = -20e3 + m.rt * (1e-2f64 / 1e-12).ln();
        assert!((m.value - want).abs() < 1e-3, "{} vs {want}", m.value);
        for r in m.ranges.as_ref().expect("ranges").iter() {
            assert!((r.1 / r.0 - 1.0).abs() < 1e-6, "{r:?}");
        }
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(256))]
        #[test]
        fn chain_matches_closed_form(
            dg0 in prop::collection::vec(-40e3..40e3f64, 1..8),
            lows in prop::collection::vec(-9.0..-2.0f64, 9),
            // Upper bounds stay at or below 10 M, the most a file may state.
            widths in prop::collection::vec(0.0..2.99f64, 9),
        ) {
            let n = dg0.len();
            let bounds: Vec<(f64, f64)> = (0..=n).map(|i| (10f64.powf(lows[i]), 10f64.powf(lows[i] + 0.01 + widths[i]))).collect();
            let prep = prepared(&chain(&dg0, &bounds, "25 C"));
            let state = State::from_pathway(&prep.pathway);
            let m = solve(&prep, &state).expect("solves");
            let want = closed_form(&dg0, &bounds, m.rt);
            // 1e-6 kJ/mol = 1e-3 J/mol.
            prop_assert!((m.value - want).abs() < 1e-3, "LP {} closed form {}", m.value, want);
            let c = certificate(&prep, &state, &m).expect("certificate");
            prop_assert!(c.primal < 1e-6 && c.dual < 1e-6 && c.gap < 1e-6 && c.complementary < 1e-6, "{:?}", c);
        }

        #[test]
        fn path_ranges_match_programmes(
            dg0 in prop::collection::vec(-20e3..20e3f64, 1..6),
            lows in prop::collection::vec(-8.0..-3.0f64, 7),
            widths in prop::collection::vec(0.5..4.0f64, 7),
        ) {
            let n = dg0.len();
            let bounds: Vec<(f64, f64)> = (0..=n).map(|i| (10f64.powf(lows[i]), 10f64.powf(lows[i] + widths[i]))).collect();
            let (paths, lps) = both_ranges(&dg0, &bounds);
            for (p, l) in paths.iter().zip(&lps) {
                prop_assert!((p.0 - l.0).abs() < 1e-4 && (p.1 - l.1).abs() < 1e-4, "{:?} vs {:?}", paths, lps);
            }
        }
    }
}
