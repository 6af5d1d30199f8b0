//! Ranges of each concentration on a face of the programme (B held at a
//! value): shortest paths for systems of difference constraints, otherwise
//! one programme per compound and direction.

use super::program::{Lp, matrix, settings, solver_error, status_ok};
use super::types::{MdfError, RANGE_SLACK};
use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSolver, IPSolver, NonnegativeConeT};

/// Min and max of each ln c with B held at `b`, as (ln lo, ln hi)
/// per variable. When every step row is a difference constraint (x_p − x_s ≤ w,
/// after held compounds are moved to the right-hand side) the ranges are
/// shortest paths in the constraint graph; otherwise one programme per end.
pub(super) fn ranges(
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
pub(super) fn to_conc_ranges(
    lp: &Lp,
    x: &[f64],
    ln_ranges: &[(f64, f64)],
    conc: &[f64],
) -> Vec<(f64, f64)> {
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
pub(super) fn ranges_by_paths(lp: &Lp, b: f64, x: &[f64]) -> Option<Vec<(f64, f64)>> {
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
pub(super) fn ranges_by_lp(
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
