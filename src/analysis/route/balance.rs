//! The mass balance of intermediates: the turns each route step makes per
//! pass, by sparse elimination, and the checks that every intermediate
//! balances and every step turns forward.

use super::types::{Direction, Role, RouteStep, fmt_t, problem};
use crate::model::{Pathway, Problem};
use std::collections::HashMap;

/// Solves the mass balance of intermediates for the turns of each route step.
/// Stated `times` are held; the earliest undetermined step of each connected
/// part makes one turn.
pub(super) fn balance(
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
