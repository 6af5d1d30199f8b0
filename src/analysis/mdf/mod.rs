//! Max-min driving force: the largest B such that every route step can drop
//! by at least B (−dG' ≥ B) with every concentration inside its bounds. It
//! tells a practitioner whether the whole route can run forward at all, which
//! steps hold it back (their shadow prices, which sum to 1) and which
//! concentration bounds limit it. The linear programme is in ln c
//! (science.md §5) and is solved by clarabel, an interior-point solver that
//! returns the dual values the shadow prices come from.

mod program;
mod ranges;
mod types;

pub use types::*;

use crate::analysis::Prepared;
use crate::scenario::State;
use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSolver, IPSolver, NonnegativeConeT};
use program::{Lp, Setup, matrix, settings, setup, solver_error, status_ok};
use types::AT_BOUND;

/// The warnings the optimisation gives for the scenario (concentrations
/// outside their bounds) without solving it: cheap enough for every command.
pub fn warnings(prep: &Prepared, state: &State) -> Result<Vec<String>, MdfError> {
    Ok(setup(prep, state, &Options::default())?.warnings)
}

/// Most distinct optima a `Batch` keeps.
pub const BATCH_KEPT: usize = 1024;

/// Solves many scenarios of one pathway (the samples of a table) without
/// ranges, solving each distinct programme once: between samples usually
/// only the free compounds' concentrations change, and they do not enter the
/// programme, so most samples reuse an optimum found before (each still gets
/// its own warnings and concentrations around that optimum).
#[derive(Debug, Default)]
pub struct Batch {
    /// Optima by the exact bits of the programme's right-hand sides and bounds.
    solved: std::collections::HashMap<Vec<u64>, (f64, Vec<f64>, Vec<f64>)>,
    /// Programmes solved (the rest were found in `solved`).
    pub solves: usize,
}

impl Batch {
    /// The optimum for `state`, as `solve_with` without ranges would give it.
    pub fn solve(
        &mut self,
        prep: &Prepared,
        state: &State,
        opts: &Options,
    ) -> Result<Mdf, MdfError> {
        let opts = Options {
            ranges: false,
            ..*opts
        };
        let s = setup(prep, state, &opts)?;
        let lp = &s.lp;
        let key: Vec<u64> = [state.direction as u8 as f64, lp.rt]
            .into_iter()
            .chain(lp.vars.iter().map(|&c| c as f64))
            .chain(lp.rhs.iter().copied())
            .chain(lp.ln_lo.iter().copied())
            .chain(lp.ln_hi.iter().copied())
            .map(f64::to_bits)
            .collect();
        if !self.solved.contains_key(&key) {
            let found = optimum(lp, &prep.pathway.file)?;
            self.solves += 1;
            // Bounded, so that a long table of all-different samples keeps
            // memory flat: the optima kept are forgotten all at once when
            // full (tables usually repeat a few held values, which come back
            // at the cost of one solve each).
            if self.solved.len() >= BATCH_KEPT {
                self.solved.clear();
            }
            self.solved.insert(key.clone(), found);
        }
        let (b, x, z) = &self.solved[&key];
        Ok(assemble(state, &opts, &s, *b, x, z))
    }
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
