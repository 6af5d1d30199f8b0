//! Flux control estimated from the thermodynamics (science.md §7): scaled
//! flux control coefficients of the route steps over the route's flux, from
//! reversible mass-action elasticities fixed by each step's dG' (the matrix
//! method of metabolic control analysis), and the 5–95 % range of each
//! coefficient over sampled enzyme saturation with a fixed seed.
//!
//! Route intermediates are the variables; every other compound is held.
//! Route step j carries times_j·J at the steady state. A simple chain (each
//! intermediate made by one step and used by the next) uses the closed form,
//! in O(n); any other route uses the matrix method: a dense LU with
//! conserved moieties among the intermediates removed through the link
//! matrix (N = L·N_R) up to `DENSE_MAX` intermediates, a banded LU above.

mod limits;
mod model;
mod range;
mod solve;
#[cfg(test)]
mod tests;

pub use limits::*;
pub use model::Model;
pub use range::RangeJob;

use super::{Analysis, Role, VerdictKind};
use crate::model::Pathway;

/// The flux control estimate of one analysis.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Estimate {
    /// Per route step, its scaled flux control coefficient over the route's flux at mass action; None when there is no estimate.
    pub coefficients: Option<Vec<f64>>,
    /// Per route step, the 5–95 % range over sampled saturation; None until computed or when none can be given.
    pub ranges: Option<Vec<(f64, f64)>>,
    /// Saturation draws asked for `ranges` (0 while not asked).
    pub draws: usize,
    /// Why no range is given although it was asked for.
    pub range_note: Option<String>,
    /// Why there is no estimate or no range, and where the estimate and the verdicts disagree.
    pub notes: Vec<String>,
    /// The model, kept for the range and the elasticities.
    pub model: Option<Model>,
}

impl Estimate {
    /// The coefficient of the route step at `position`.
    pub fn coefficient(&self, position: usize) -> Option<f64> {
        self.coefficients
            .as_ref()
            .and_then(|c| c.get(position).copied())
    }
    /// The 5–95 % range of the route step at `position`.
    pub fn range(&self, position: usize) -> Option<(f64, f64)> {
        self.ranges.as_ref().and_then(|c| c.get(position).copied())
    }
    /// True when an estimate exists and its range has not been asked for yet.
    pub fn range_pending(&self) -> bool {
        self.coefficients.is_some() && self.draws == 0
    }
    /// True when the range has been asked for and is not there yet.
    pub fn range_computing(&self) -> bool {
        self.coefficients.is_some()
            && self.draws > 0
            && self.ranges.is_none()
            && self.range_note.is_none()
    }
    /// Mass-action elasticities of the route step at `position` to its intermediates (compound, value).
    pub fn elasticities(&self, position: usize) -> Vec<(usize, f64)> {
        match (&self.model, &self.coefficients) {
            (Some(m), Some(_)) if position < m.len() => m.elasticities(position, (0.0, 0.0)),
            _ => Vec::new(),
        }
    }
    /// Position of the route step with the largest coefficient.
    pub fn top(&self) -> Option<usize> {
        let c = self.coefficients.as_ref()?;
        (0..c.len()).max_by(|&i, &j| c[i].total_cmp(&c[j]))
    }
}

/// The estimate for an analysed route at these concentrations (mol/L,
/// indexed like the compounds): coefficients and notes; the range is added
/// by `add_ranges`.
pub fn estimate(p: &Pathway, a: &Analysis, conc: &[f64]) -> Estimate {
    let mut est = Estimate::default();
    let up: Vec<&str> = a
        .steps
        .iter()
        .filter(|s| s.dg.is_nan() || s.dg >= 0.0)
        .map(|s| p.steps[s.step].id.as_str())
        .collect();
    if !up.is_empty() {
        let has = if up.len() == 1 { "has" } else { "have" };
        est.notes.push(format!(
            "no flux control estimate: {} {has} dG' ≥ 0 as run, so the route has no forward steady state at these concentrations to estimate control in.",
            id_list(&up)
        ));
        return est;
    }
    let mut var_of: Vec<Option<usize>> = vec![None; p.compounds.len()];
    let mut vars: Vec<usize> = Vec::new();
    let mut terms: Vec<Terms> = Vec::with_capacity(a.steps.len());
    for s in &a.steps {
        let mut t: Terms = Vec::new();
        for &(c, nu) in &p.steps[s.step].stoich {
            if a.roles[c] != Role::Intermediate || nu == 0.0 {
                continue;
            }
            let v = *var_of[c].get_or_insert_with(|| {
                vars.push(c);
                vars.len() - 1
            });
            match t.iter_mut().find(|x| x.0 == v) {
                Some(x) => x.1 += nu * s.sign,
                None => t.push((v, nu * s.sign)),
            }
        }
        t.retain(|x| x.1 != 0.0);
        terms.push(t);
    }
    let var_conc: Vec<f64> = vars.iter().map(|&c| conc[c]).collect();
    let times: Vec<f64> = a.steps.iter().map(|s| s.times).collect();
    let g: Vec<f64> = a.steps.iter().map(|s| s.dg / a.rt).collect();
    let Some(model) = Model::from_parts(vars, &var_conc, terms, times, &g) else {
        return est;
    };
    match model.coefficients(None) {
        Ok(c) => est.coefficients = Some(c),
        Err(Failure::Singular) => {
            est.notes.push("no flux control estimate: the balance of the intermediates has no unique steady state with these elasticities (a conserved total the route cannot change, or a part of the route cut off from the rest).".into());
            return est;
        }
        Err(Failure::TooWide) => {
            est.notes.push(format!(
                "no flux control estimate: the route has {} intermediates and its steps link intermediates far apart in route order, too many to solve on every change; list the steps so that each one's intermediates are near each other in the route.",
                model.vars.len()
            ));
            return est;
        }
    }
    est.model = Some(model);
    if let Some(s) = disagreement(p, a, &est) {
        est.notes.push(s);
    }
    est
}

/// Ids joined by commas, at most six and then how many more.
fn id_list(ids: &[&str]) -> String {
    if ids.len() > 6 {
        format!("{} and {} more", ids[..6].join(", "), ids.len() - 6)
    } else {
        ids.join(", ")
    }
}

/// One sentence when the verdicts and the estimate disagree: the control
/// point carries less than half of the largest coefficient, or a step with
/// no verdict carries the most.
fn disagreement(p: &Pathway, a: &Analysis, est: &Estimate) -> Option<String> {
    let top = est.top()?;
    let ct = est.coefficient(top)?;
    let id = |k: usize| p.steps[a.steps[k].step].id.as_str();
    let point = a
        .control
        .iter()
        .find(|v| v.kind == VerdictKind::Prime)
        .map(|v| v.position);
    let top_has_verdict = a.control.iter().any(|v| v.position == top);
    match point {
        Some(pp) if pp == top => None,
        Some(pp) => {
            let cp = est.coefficient(pp)?;
            if cp < ct / 2.0 {
                Some(format!(
                    "The verdict and the estimate disagree: the control point {} carries {:.3} of the flux control by the thermodynamic estimate, while {}{} carries the most ({:.3}).",
                    id(pp),
                    cp,
                    id(top),
                    if top_has_verdict {
                        ""
                    } else {
                        ", a step without a verdict,"
                    },
                    ct
                ))
            } else if !top_has_verdict {
                Some(format!(
                    "The verdict and the estimate differ: {}, a step without a verdict, carries the most flux control by the thermodynamic estimate ({:.3}; the control point {} carries {:.3}).",
                    id(top),
                    ct,
                    id(pp),
                    cp
                ))
            } else {
                None
            }
        }
        None if !top_has_verdict => Some(format!(
            "No step is the control point, and {}, a step without a verdict, carries the most flux control by the thermodynamic estimate ({:.3}).",
            id(top),
            ct
        )),
        None => None,
    }
}

/// Computes the 5–95 % range of each coefficient over `draws` saturation
/// draws (fixed seed) into the analysis' estimate; a note says when the
/// route is too large for it.
pub fn add_ranges(a: &mut Analysis, draws: usize) {
    if let Some(mut job) = start_ranges(a, draws) {
        let total = job.total;
        if let Some(m) = &a.control_estimate.model {
            job.run(m, total);
        }
        finish_ranges(a, job);
    }
}

/// Starts the range of the analysis' estimate as a job that can run in
/// parts; None when there is nothing to compute (no estimate, the range is
/// already there, or the route is too large for it: then a note says so).
pub fn start_ranges(a: &mut Analysis, draws: usize) -> Option<RangeJob> {
    let draws = draws.max(1);
    let est = &mut a.control_estimate;
    if est.coefficients.is_none() || est.draws == draws {
        return None;
    }
    let model = est.model.as_ref()?;
    est.ranges = None;
    let cap = RANGE_MAX_VALUES / model.len().max(1);
    let used = draws.min(cap);
    est.draws = used.max(1);
    let note = if !model.is_chain() && model.independent() > RANGE_DENSE_MAX {
        Some(format!(
            "no range for the flux control estimate: the route is not a simple chain and has {} independent intermediates; the range is computed for chains and for other routes up to {RANGE_DENSE_MAX}.",
            model.independent()
        ))
    } else if used < draws.min(RANGE_MIN_DRAWS) {
        Some(format!(
            "no range for the flux control estimate: the route has {} steps, and even {} draws would be more than {RANGE_MAX_VALUES} stored values.",
            model.len(),
            draws.min(RANGE_MIN_DRAWS)
        ))
    } else {
        if used < draws {
            a.notes.push(format!(
                "the range of the flux control estimate comes from {used} draws, not {draws}: {} route steps × {draws} draws would be more than {RANGE_MAX_VALUES} stored values, and with fewer draws its ends move more between seeds.",
                model.len()
            ));
        }
        None
    };
    let est = &mut a.control_estimate;
    match note {
        Some(n) => {
            est.range_note = Some(n.clone());
            a.notes.push(n);
            None
        }
        None => est
            .model
            .as_ref()
            .map(|m| RangeJob::new(m.len(), used, SEED)),
    }
}

/// Stores a finished job's range in the analysis' estimate.
pub fn finish_ranges(a: &mut Analysis, mut job: RangeJob) {
    let est = &mut a.control_estimate;
    est.ranges = job.result();
    if est.ranges.is_none() {
        let n = "no range for the flux control estimate: every saturation draw left the intermediates without a unique steady state.".to_string();
        est.range_note = Some(n.clone());
        a.notes.push(n);
    }
}

/// Lines for a step's detail: the estimate and its range, the step's
/// mass-action elasticities, and (on a chain) how its share compares with
/// the next step's, which is what the elasticities decide.
pub fn explain(p: &Pathway, a: &Analysis, position: usize) -> Vec<String> {
    let est = &a.control_estimate;
    let Some(c) = est.coefficient(position) else {
        return vec!["flux control (estimate): none (some dG' ≥ 0)".into()];
    };
    let range = match est.range(position) {
        Some((lo, hi)) => format!(", 5–95 % {lo:.3}–{hi:.3}"),
        None if est.range_pending() || est.range_computing() => ", range: computing…".into(),
        None => String::new(),
    };
    let mut out = vec![format!("flux control (estimate): {c:.3}{range}")];
    let id = |c: usize| p.compounds[c].id.as_str();
    let el = est.elasticities(position);
    if !el.is_empty() {
        let parts: Vec<String> = el
            .iter()
            .map(|&(c, e)| format!("{} {e:+.3}", id(c)))
            .collect();
        out.push(format!("elasticities (mass action): {}", parts.join(", ")));
    }
    if let Some(m) = &est.model
        && m.is_chain()
        && position + 1 < a.steps.len()
        && let (Some(&(prod, ep)), Some(&(_, es))) = (
            el.iter().find(|x| x.1 <= 0.0),
            est.elasticities(position + 1).iter().find(|x| x.1 > 0.0),
        )
        && let Some(next) = est.coefficient(position + 1)
    {
        let nid = &p.steps[a.steps[position + 1].step].id;
        let ratio = if next > 0.0 { c / next } else { f64::INFINITY };
        out.push(format!(
            "against {nid} after it: {:.3} / {:.3} = {} times its share ({nid}'s elasticity to {} over this step's, negated); a step that hardly feels its product keeps control from the steps after it",
            es,
            -ep,
            if ratio.is_finite() { format!("{ratio:.3}") } else { "infinitely many".into() },
            id(prod)
        ));
    }
    out
}
