//! The linear programme: variables, rows and bounds from a route and a
//! scenario, the constraint matrix, solver settings and solver errors.

use super::types::{MdfError, Options, Part, fmt_conc};
use crate::analysis::{Prepared, Role};
use crate::model::Pathway;
use crate::scenario::State;
use crate::thermo;
use clarabel::algebra::CscMatrix;
use clarabel::solver::{DefaultSettings, SolverStatus};

/// The programme in ln c, scaled by RT: maximise b subject to
/// b + Σ ν_ij x_i ≤ r_j for every route position j and ln lo_i ≤ x_i ≤ ln hi_i.
pub(super) struct Lp {
    pub(super) rt: f64,
    /// Compound index of each variable.
    pub(super) vars: Vec<usize>,
    /// Per route position: (variable, ν as run).
    pub(super) rows: Vec<Vec<(usize, f64)>>,
    /// Per route position: (−dG'°_j − RT Σ_held ν ln c) / RT.
    pub(super) rhs: Vec<f64>,
    pub(super) ln_lo: Vec<f64>,
    pub(super) ln_hi: Vec<f64>,
}

pub(super) fn settings() -> DefaultSettings<f64> {
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

pub(super) struct Setup {
    pub(super) lp: Lp,
    pub(super) steps: Vec<usize>,
    pub(super) dg0: Vec<f64>,
    pub(super) conc: Vec<f64>,
    pub(super) bounds: Vec<(f64, f64)>,
    pub(super) parts: Vec<Part>,
    pub(super) warnings: Vec<String>,
}

/// The programme for a scenario: which compounds are free, held or absent,
/// and one row per route position.
pub(super) fn setup(prep: &Prepared, state: &State, opts: &Options) -> Result<Setup, MdfError> {
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
    for rs in &route.steps {
        for &(c, _) in &p.steps[rs.step].stoich {
            if !p.compounds[c].is_solvent() {
                parts[c] = Part::Free;
            }
        }
    }
    let mut s = Setup {
        lp: Lp {
            rt,
            vars: Vec::new(),
            rows: Vec::with_capacity(route.steps.len()),
            rhs: Vec::with_capacity(route.steps.len()),
            ln_lo: Vec::new(),
            ln_hi: Vec::new(),
        },
        steps: Vec::with_capacity(route.steps.len()),
        dg0: Vec::with_capacity(route.steps.len()),
        conc: state.conc.clone(),
        bounds: (0..nc).map(|i| p.bounds_of(i)).collect(),
        parts,
        warnings: Vec::new(),
    };
    let var_of = classify(p, &route.roles, state, opts, &mut s)?;
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
            match s.parts[c] {
                Part::Free => match row.iter_mut().find(|(v, _)| *v == var_of[c]) {
                    Some(e) => e.1 += nu,
                    None => row.push((var_of[c], nu)),
                },
                Part::Held => r -= nu * s.conc[c].ln(),
                Part::Absent => {}
            }
        }
        row.sort_by_key(|e| e.0);
        s.lp.rows.push(row);
        s.lp.rhs.push(r);
        s.dg0.push(g0);
        s.steps.push(rs.step);
    }
    s.lp.ln_lo = s.lp.vars.iter().map(|&c| s.bounds[c].0.ln()).collect();
    s.lp.ln_hi = s.lp.vars.iter().map(|&c| s.bounds[c].1.ln()).collect();
    Ok(s)
}

/// Decides which route compounds are held (fixed = true; currencies unless
/// freed; equal bounds) and which are variables; returns each compound's
/// variable index (usize::MAX when it is none).
fn classify(
    p: &Pathway,
    roles: &[Role],
    state: &State,
    opts: &Options,
    s: &mut Setup,
) -> Result<Vec<usize>, MdfError> {
    let mut var_of = vec![usize::MAX; p.compounds.len()];
    for (c, comp) in p.compounds.iter().enumerate() {
        if s.parts[c] != Part::Free {
            continue;
        }
        let (lo, hi) = s.bounds[c];
        let x = state.conc[c];
        let inside = x >= lo * (1.0 - 1e-9) && x <= hi * (1.0 + 1e-9);
        let currency = roles.get(c) == Some(&Role::Currency);
        let held_currency = currency && comp.fixed.is_none() && !opts.free_currencies;
        if comp.fixed == Some(true) || held_currency {
            if !inside && comp.fixed == Some(true) {
                return Err(MdfError::FixedOutsideBounds {
                    file: p.file.clone(),
                    line: comp.line,
                    id: comp.id.clone(),
                    conc: x,
                    lo,
                    hi,
                });
            }
            if !inside {
                s.warnings.push(format!(
                    "{}:{}: '{}' is held at {} in this scenario, outside its bounds {} to {}, as a carrier held at its concentration",
                    p.file, comp.line, comp.id, fmt_conc(x), fmt_conc(lo), fmt_conc(hi)
                ));
            }
            s.parts[c] = Part::Held;
            s.bounds[c] = (x, x);
        } else if (hi - lo) <= 1e-12 * hi {
            s.parts[c] = Part::Held;
            s.conc[c] = lo;
        } else {
            if !inside {
                s.warnings.push(format!(
                    "{}:{}: '{}' is at {} in this scenario, outside its bounds {} to {}; the optimisation keeps it within the bounds",
                    p.file, comp.line, comp.id, fmt_conc(x), fmt_conc(lo), fmt_conc(hi)
                ));
            }
            var_of[c] = s.lp.vars.len();
            s.lp.vars.push(c);
        }
    }
    Ok(var_of)
}

/// Column-wise matrix of the programme. With `with_b`, column 0 is b (one in
/// every kept row); `keep` says which route positions have a row.
pub(super) fn matrix(lp: &Lp, with_b: bool, keep: &[bool]) -> (CscMatrix<f64>, usize) {
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

pub(super) fn status_ok(s: SolverStatus) -> bool {
    matches!(s, SolverStatus::Solved | SolverStatus::AlmostSolved)
}

pub(super) fn solver_error(file: &str, s: SolverStatus) -> MdfError {
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
