//! The route as it runs in one direction: which steps, in what order, how
//! many turns each makes per pass (from the mass balance of intermediates),
//! each compound's role, branch points and coupled groups. None of this
//! depends on concentrations, so it is built once per file.

use crate::model::{LoadError, Pathway, Problem};
/// Which way a route runs (it belongs to the scenario; re-exported here).
pub use crate::scenario::Direction;
use std::collections::HashMap;

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

/// Builds both routes; errors only for the forward route.
pub fn prepare(pathway: Pathway) -> Result<Prepared, LoadError> {
    let forward =
        build(&pathway, Direction::Forward).map_err(|p| LoadError { problems: vec![p] })?;
    let reverse = build(&pathway, Direction::Reverse);
    Ok(Prepared {
        pathway,
        forward,
        reverse,
    })
}

fn problem(p: &Pathway, line: Option<usize>, message: String) -> Problem {
    Problem {
        file: p.file.clone(),
        line,
        column: None,
        message,
    }
}

/// Builds the route in one direction.
pub fn build(p: &Pathway, direction: Direction) -> Result<Route, Problem> {
    if p.route.is_empty() {
        return Err(problem(
            p,
            None,
            "the main route has no steps; add steps that are neither side = true nor bypass_of"
                .into(),
        ));
    }
    let (mut steps, unbypassed) = match direction {
        Direction::Forward => (forward_steps(p), Vec::new()),
        Direction::Reverse => reverse_steps(p),
    };
    let roles = infer_roles(p, &steps);
    let side: Vec<usize> = (0..p.steps.len()).filter(|&s| p.steps[s].side).collect();
    let branch = branch_points(p, &side);
    balance(p, &mut steps, &roles, direction)?;
    if direction == Direction::Reverse {
        scale_reverse_turns(p, &mut steps)?;
    }
    let groups = coupled_groups(p, &steps, direction)?;
    if direction == Direction::Forward {
        check_couples_name_later_steps(p)?;
    }
    Ok(Route {
        direction,
        steps,
        roles,
        branch,
        groups,
        side,
        unbypassed,
    })
}

/// The main route's steps as written, one turn each.
fn forward_steps(p: &Pathway) -> Vec<RouteStep> {
    p.route
        .iter()
        .map(|&s| RouteStep {
            step: s,
            sign: 1.0,
            times: 1.0,
            replaces: None,
        })
        .collect()
}

/// The reverse route: the main route backward, each step replaced by its
/// bypasses (in file order) or else run reversed; also the reversed steps
/// that have no bypass.
fn reverse_steps(p: &Pathway) -> (Vec<RouteStep>, Vec<usize>) {
    let mut steps = Vec::new();
    let mut unbypassed = Vec::new();
    // Bypasses of each step, in file order.
    let mut bypasses_of: Vec<Vec<usize>> = vec![Vec::new(); p.steps.len()];
    for (b, st) in p.steps.iter().enumerate() {
        if let Some(f) = st.bypass_of {
            bypasses_of[f].push(b);
        }
    }
    for &f in p.route.iter().rev() {
        let bypasses = std::mem::take(&mut bypasses_of[f]);
        if bypasses.is_empty() {
            steps.push(RouteStep {
                step: f,
                sign: -1.0,
                times: 1.0,
                replaces: None,
            });
            unbypassed.push(f);
        } else {
            for b in bypasses {
                steps.push(RouteStep {
                    step: b,
                    sign: 1.0,
                    times: 1.0,
                    replaces: Some(f),
                });
            }
        }
    }
    (steps, unbypassed)
}

/// Each compound's role on these steps: stated (solvent, currency) or from
/// whether the route makes it, uses it, both or neither.
fn infer_roles(p: &Pathway, steps: &[RouteStep]) -> Vec<Role> {
    let nc = p.compounds.len();
    let mut produced = vec![false; nc];
    let mut consumed = vec![false; nc];
    for rs in steps {
        for &(c, nu) in &p.steps[rs.step].stoich {
            if nu * rs.sign > 0.0 {
                produced[c] = true;
            } else if nu * rs.sign < 0.0 {
                consumed[c] = true;
            }
        }
    }
    (0..nc)
        .map(|c| {
            let comp = &p.compounds[c];
            if comp.is_solvent() {
                Role::Solvent
            } else if comp.is_currency() {
                Role::Currency
            } else {
                match (consumed[c], produced[c]) {
                    (true, true) => Role::Intermediate,
                    (true, false) => Role::Input,
                    (false, true) => Role::Output,
                    (false, false) => Role::OffRoute,
                }
            }
        })
        .collect()
}

/// Branch points: compounds marked `branch = true` and every non-currency
/// compound a side step uses.
fn branch_points(p: &Pathway, side: &[usize]) -> Vec<bool> {
    let mut branch: Vec<bool> = p.compounds.iter().map(|c| c.branch).collect();
    for &s in side {
        for &(c, _) in &p.steps[s].stoich {
            let comp = &p.compounds[c];
            if !comp.is_currency() {
                branch[c] = true;
            }
        }
    }
    branch
}

/// Scales the reverse route's turns so the step standing in for the forward
/// route's first step keeps that step's turns (unless a step states `times`).
fn scale_reverse_turns(p: &Pathway, steps: &mut [RouteStep]) -> Result<(), Problem> {
    let first = p.route[0];
    let stand_in = steps
        .iter()
        .position(|r| r.replaces == Some(first))
        .or_else(|| steps.iter().position(|r| r.step == first));
    let any_explicit = steps.iter().any(|r| p.steps[r.step].times.is_some());
    let fwd_first = build_forward_first_times(p)?;
    if let (Some(k), false) = (stand_in, any_explicit) {
        let f = fwd_first / steps[k].times;
        for r in steps.iter_mut() {
            r.times *= f;
        }
    }
    Ok(())
}

/// Coupled groups (positions on the route, each of two steps or more); an
/// error when a group's steps make different turns.
fn coupled_groups(
    p: &Pathway,
    steps: &[RouteStep],
    direction: Direction,
) -> Result<Vec<Vec<usize>>, Problem> {
    let links = CoupleLinks::new(p, steps);
    let mut groups: Vec<Vec<usize>> = Vec::new();
    let mut in_group = vec![false; steps.len()];
    for k in 0..steps.len() {
        if in_group[k] {
            continue;
        }
        let mut chain = vec![k];
        let mut cur = k;
        while let Some(m) = links.next(p, steps, direction, cur)
            && !in_group[m]
        {
            chain.push(m);
            cur = m;
        }
        if chain.len() > 1 {
            for &m in &chain {
                in_group[m] = true;
            }
            equal_turns(p, steps, &chain)?;
            groups.push(chain);
        }
    }
    Ok(groups)
}

/// Positions of each step on the route, and of the steps that couple to
/// each step, so that each link is found without a scan.
struct CoupleLinks {
    positions: HashMap<usize, Vec<usize>>,
    coupled_to: HashMap<usize, Vec<usize>>,
}

impl CoupleLinks {
    /// The positions of `steps`.
    fn new(p: &Pathway, steps: &[RouteStep]) -> CoupleLinks {
        let mut positions: HashMap<usize, Vec<usize>> = Default::default();
        let mut coupled_to: HashMap<usize, Vec<usize>> = Default::default();
        for (m, rs) in steps.iter().enumerate() {
            positions.entry(rs.step).or_default().push(m);
            if let Some(c) = p.steps[rs.step].couple {
                coupled_to.entry(c).or_default().push(m);
            }
        }
        CoupleLinks {
            positions,
            coupled_to,
        }
    }

    /// The position after `cur` that `cur` is coupled with. Forward: cur
    /// couples to the next; reverse: the next couples to cur.
    fn next(
        &self,
        p: &Pathway,
        steps: &[RouteStep],
        direction: Direction,
        cur: usize,
    ) -> Option<usize> {
        match direction {
            Direction::Forward => p.steps[steps[cur].step]
                .couple
                .and_then(|c| self.positions.get(&c))
                .and_then(|v| v.iter().copied().find(|&m| m > cur)),
            Direction::Reverse => self
                .coupled_to
                .get(&steps[cur].step)
                .and_then(|v| v.iter().copied().find(|&m| m > cur)),
        }
    }
}

/// Refuses a coupled group whose steps make different turns.
fn equal_turns(p: &Pathway, steps: &[RouteStep], chain: &[usize]) -> Result<(), Problem> {
    let t0 = steps[chain[0]].times;
    if let Some(&bad) = chain
        .iter()
        .find(|&&m| (steps[m].times - t0).abs() > 1e-9 * t0.abs().max(1.0))
    {
        let a = &p.steps[steps[chain[0]].step];
        let b = &p.steps[steps[bad].step];
        return Err(problem(
            p,
            Some(a.line),
            format!(
                "coupled steps '{}' and '{}' make different turns per pass ({} and {}); couple only steps with equal turns",
                a.id,
                b.id,
                fmt_t(t0),
                fmt_t(steps[bad].times)
            ),
        ));
    }
    Ok(())
}

/// Refuses a `couple` that does not name a later step of the main route.
fn check_couples_name_later_steps(p: &Pathway) -> Result<(), Problem> {
    let mut route_pos: HashMap<usize, usize> = Default::default();
    for (i, &x) in p.route.iter().enumerate() {
        route_pos.entry(x).or_insert(i);
    }
    for &s in &p.route {
        if let Some(c) = p.steps[s].couple {
            let (ps, pc) = (route_pos.get(&s).copied(), route_pos.get(&c).copied());
            if !matches!((ps, pc), (Some(a), Some(b)) if b > a) {
                return Err(problem(
                    p,
                    Some(p.steps[s].line),
                    format!(
                        "step '{}' couples to '{}', which is not a later step of the main route; couple names a following step",
                        p.steps[s].id, p.steps[c].id
                    ),
                ));
            }
        }
    }
    Ok(())
}

fn build_forward_first_times(p: &Pathway) -> Result<f64, Problem> {
    let mut steps = forward_steps(p);
    let roles = build_roles_quick(p, &steps);
    balance(p, &mut steps, &roles, Direction::Forward)?;
    Ok(steps[0].times)
}

fn build_roles_quick(p: &Pathway, steps: &[RouteStep]) -> Vec<Role> {
    let nc = p.compounds.len();
    let mut prod = vec![false; nc];
    let mut cons = vec![false; nc];
    for rs in steps {
        for &(c, nu) in &p.steps[rs.step].stoich {
            if nu * rs.sign > 0.0 {
                prod[c] = true
            } else {
                cons[c] = true
            }
        }
    }
    (0..nc)
        .map(|c| {
            let comp = &p.compounds[c];
            if comp.is_solvent() || comp.is_currency() || !(prod[c] && cons[c]) {
                Role::OffRoute
            } else {
                Role::Intermediate
            }
        })
        .collect()
}

fn fmt_t(t: f64) -> String {
    let s = format!("{t:.3}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// Solves the mass balance of intermediates for the turns of each route step.
/// Stated `times` are held; the earliest undetermined step of each connected
/// part makes one turn.
fn balance(
    p: &Pathway,
    steps: &mut [RouteStep],
    roles: &[Role],
    direction: Direction,
) -> Result<(), Problem> {
    let n = steps.len();
    let inter: Vec<usize> = (0..roles.len())
        .filter(|&c| roles[c] == Role::Intermediate)
        .collect();
    // Unknown columns, latest step first, so that pivots fall on later steps
    // and the free (anchor) columns are the earliest ones.
    let unknown: Vec<usize> = (0..n)
        .rev()
        .filter(|&k| p.steps[steps[k].step].times.is_none())
        .collect();
    let col_of: Vec<Option<usize>> = {
        let mut v = vec![None; n];
        for (j, &k) in unknown.iter().enumerate() {
            v[k] = Some(j);
        }
        v
    };
    let cidx: HashMap<usize, usize> = inter.iter().enumerate().map(|(i, &c)| (c, i)).collect();
    let mut sys = balance_system(p, steps, &cidx, &col_of, unknown.len());
    let x = sys.solve();
    for k in 0..n {
        steps[k].times = match col_of[k] {
            Some(j) => x[j],
            None => p.steps[steps[k].step].times.unwrap_or(1.0),
        };
    }
    check_balanced(p, steps, &inter, &cidx, direction)?;
    check_turns_positive(p, steps, roles, direction)
}

/// The balance as a sparse system: one row per intermediate (`cidx` gives
/// its row), one column per step of unknown turns (`col_of`); stated turns
/// go to the right-hand side.
fn balance_system(
    p: &Pathway,
    steps: &[RouteStep],
    cidx: &HashMap<usize, usize>,
    col_of: &[Option<usize>],
    unknowns: usize,
) -> Sparse {
    let mut sys = Sparse::new(cidx.len(), unknowns);
    for (k, rs) in steps.iter().enumerate() {
        let st = &p.steps[rs.step];
        for &(c, nu) in &st.stoich {
            if let Some(&r) = cidx.get(&c) {
                let a = nu * rs.sign;
                match (col_of[k], st.times) {
                    (Some(j), _) => sys.add(r, j, a),
                    (None, Some(t)) => sys.rhs[r] -= a * t,
                    (None, None) => {}
                }
            }
        }
    }
    sys
}

/// The problem for a compound the route cannot balance, with `why`.
fn unbalanced(p: &Pathway, direction: Direction, c: usize, why: String) -> Problem {
    let comp = &p.compounds[c];
    problem(
        p,
        Some(comp.line),
        format!(
            "compound '{}' cannot be balanced on the {} route: {why}; if it is a carrier (ATP, NADH, CoA ...), mark it role = \"currency\", otherwise check the reactions or the stated times",
            comp.id,
            direction.as_str()
        ),
    )
}

/// Checks every intermediate balances with the solved turns (catches
/// inconsistent systems), in one pass over the route's stoichiometry.
fn check_balanced(
    p: &Pathway,
    steps: &[RouteStep],
    inter: &[usize],
    cidx: &HashMap<usize, usize>,
    direction: Direction,
) -> Result<(), Problem> {
    let mut sum = vec![0.0; inter.len()];
    let mut scale = vec![0.0f64; inter.len()];
    for rs in steps.iter() {
        for &(c, nu) in &p.steps[rs.step].stoich {
            if let Some(&r) = cidx.get(&c) {
                sum[r] += nu * rs.sign * rs.times;
                scale[r] = scale[r].max((nu * rs.times).abs());
            }
        }
    }
    for (r, &c) in inter.iter().enumerate() {
        if sum[r].abs() > 1e-7 * scale[r].max(1.0) {
            return Err(unbalanced(
                p,
                direction,
                c,
                format!(
                    "what the route makes and uses of it differs by {} per pass",
                    fmt_t(sum[r])
                ),
            ));
        }
    }
    Ok(())
}

/// Refuses a step that would need zero, negative or no finite turns, naming
/// an intermediate it touches (or its first compound).
fn check_turns_positive(
    p: &Pathway,
    steps: &[RouteStep],
    roles: &[Role],
    direction: Direction,
) -> Result<(), Problem> {
    for rs in steps.iter() {
        if rs.times.is_nan() || rs.times <= 1e-9 || rs.times.is_infinite() {
            let st = &p.steps[rs.step];
            let c = st
                .stoich
                .iter()
                .map(|&(c, _)| c)
                .find(|c| roles[*c] == Role::Intermediate);
            let why = format!(
                "step '{}' would have to make {} turns per pass",
                st.id,
                fmt_t(rs.times)
            );
            let Some(c) = c.or(st.stoich.first().map(|x| x.0)) else {
                return Err(problem(p, Some(st.line), why));
            };
            return Err(unbalanced(p, direction, c, why));
        }
    }
    Ok(())
}

/// A sparse linear system (rows: intermediates, columns: steps whose turns
/// are unknown) brought to row echelon form. Only non-zero entries
/// are stored, and each column knows its rows, so a chain or a tree of n
/// steps reduces in O(n) time and memory.
struct Sparse {
    rows: Vec<std::collections::BTreeMap<usize, f64>>,
    rhs: Vec<f64>,
    /// Rows with a non-zero entry in each column.
    col_rows: Vec<std::collections::BTreeSet<usize>>,
}

impl Sparse {
    fn new(rows: usize, cols: usize) -> Self {
        Sparse {
            rows: vec![Default::default(); rows],
            rhs: vec![0.0; rows],
            col_rows: vec![Default::default(); cols],
        }
    }

    /// Reduces the system and solves it: free columns make one turn each,
    /// and back substitution gives the pivot columns (a pivot row holds its
    /// own column, later pivot columns, solved first, and free columns).
    fn solve(&mut self) -> Vec<f64> {
        let m = self.col_rows.len();
        let pivots = self.reduce();
        let mut free = vec![true; m];
        for &(_, j) in &pivots {
            free[j] = false;
        }
        let mut x: Vec<f64> = free.iter().map(|&f| if f { 1.0 } else { 0.0 }).collect();
        for &(r, j) in pivots.iter().rev() {
            let mut v = self.rhs[r];
            for (&q, &a) in &self.rows[r] {
                if q != j && a != 0.0 {
                    v -= a * x[q];
                }
            }
            x[j] = v;
        }
        x
    }

    fn add(&mut self, r: usize, j: usize, a: f64) {
        let e = self.rows[r].entry(j).or_insert(0.0);
        *e += a;
        if *e == 0.0 {
            self.rows[r].remove(&j);
            self.col_rows[j].remove(&r);
        } else {
            self.col_rows[j].insert(r);
        }
    }

    /// Gaussian elimination to row echelon form with partial pivoting,
    /// columns in order; returns the (row, column) pivots. Rows are ranked as a dense
    /// elimination that swaps rows would rank them, so ties between equal
    /// pivots fall the same way.
    fn reduce(&mut self) -> Vec<(usize, usize)> {
        const EPS: f64 = 1e-9;
        let n = self.rows.len();
        // pos[r]: where row r stands; at[p]: the row standing at p.
        let mut pos: Vec<usize> = (0..n).collect();
        let mut at: Vec<usize> = (0..n).collect();
        let mut pivots = Vec::new();
        let mut r0 = 0;
        for j in 0..self.col_rows.len() {
            if r0 >= n {
                break;
            }
            // The largest entry at or below position r0; the first such on ties.
            let mut best: Option<(usize, f64)> = None;
            for &r in &self.col_rows[j] {
                if pos[r] < r0 {
                    continue;
                }
                let v = self.rows[r][&j].abs();
                best = match best {
                    Some((b, bv)) if bv > v || (bv == v && pos[b] < pos[r]) => Some((b, bv)),
                    _ => Some((r, v)),
                };
            }
            let Some((prow, _)) = best.filter(|&(_, bv)| bv >= EPS) else {
                continue;
            };
            // Swap positions r0 and pos[prow].
            let (pa, other) = (pos[prow], at[r0]);
            at.swap(r0, pa);
            pos[prow] = r0;
            pos[other] = pa;
            let piv = self.rows[prow][&j];
            for (&q, v) in self.rows[prow].iter_mut() {
                if q >= j {
                    *v /= piv;
                }
            }
            self.rhs[prow] /= piv;
            let pentries: Vec<(usize, f64)> =
                self.rows[prow].range(j..).map(|(&q, &v)| (q, v)).collect();
            let prhs = self.rhs[prow];
            // Only the rows below are cleared (row echelon form; the solve
            // substitutes backwards): clearing the rows above too would make
            // every pivot row of a chain carry the newest column, O(n²).
            let targets: Vec<usize> = self.col_rows[j]
                .iter()
                .copied()
                .filter(|&r| pos[r] > r0)
                .collect();
            for r in targets {
                let f = self.rows[r][&j];
                for &(q, v) in &pentries {
                    let e = self.rows[r].entry(q).or_insert(0.0);
                    *e -= f * v;
                    if e.abs() < 1e-13 {
                        self.rows[r].remove(&q);
                        self.col_rows[q].remove(&r);
                    } else {
                        self.col_rows[q].insert(r);
                    }
                }
                self.rhs[r] -= f * prhs;
            }
            pivots.push((prow, j));
            r0 += 1;
        }
        pivots
    }
}
