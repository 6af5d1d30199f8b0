//! Everything derived from a pathway and a scenario: per-step dG'° and dG',
//! classes, the cumulative profile, shares of the drop, coupled groups, the
//! net balance, control verdicts with reasons, uncertainty and the reverse
//! route's needs. `analyze` is pure and cheap enough to run on every keystroke.

pub mod batch;
pub mod control;
pub mod mca;
pub mod mdf;
mod notes;
mod result;
mod route;

pub use notes::MAX_IONIC_STRENGTH;
pub use result::*;
pub use route::{Direction, Prepared, Role, Route, RouteStep, build, prepare};

use crate::model::{Pathway, Problem};
use crate::scenario::State;
use crate::thermo;

/// Analyses the pathway under a scenario state.
pub fn analyze(prep: &Prepared, state: &State) -> Result<Analysis, Problem> {
    let route = prep.route(state.direction).map_err(Clone::clone)?;
    let mut a = analyze_route(&prep.pathway, route, state);
    finite(&prep.pathway, &a)?;
    if state.direction == Direction::Reverse {
        let fwd_state = State {
            direction: Direction::Forward,
            ..state.clone()
        };
        let fwd = analyze_route(&prep.pathway, &prep.forward, &fwd_state);
        let prime = fwd
            .control
            .iter()
            .find(|v| v.kind == VerdictKind::Prime)
            .map(|v| fwd.steps[v.position].step);
        a.counterpart = prime.and_then(|ps| a.steps.iter().position(|s| s.replaces == Some(ps)));
        for (k, s) in a.steps.iter().enumerate() {
            if s.sign < 0.0 && s.class == Class::Uphill {
                a.needs_bypass.push(NeedsBypass {
                    position: k,
                    lacks: s.dg,
                });
            }
        }
    }
    Ok(a)
}

/// Refuses results that overflowed (dg0, coefficients, protons or turns far
/// too large), naming the first step where it happened.
fn finite(p: &Pathway, a: &Analysis) -> Result<(), Problem> {
    let ok = |s: &StepResult| s.dg.is_finite() && s.dg0.is_finite() && s.weighted().is_finite();
    if let Some(s) = a.steps.iter().chain(&a.side).find(|s| !ok(s)) {
        let st = &p.steps[s.step];
        let message = format!(
            "step '{}': dG' does not come out as a finite number; check its dg0, coefficients, protons, times and concentrations for values far too large or too small",
            st.id
        );
        return Err(Problem {
            file: p.file.clone(),
            line: Some(st.line),
            column: None,
            message,
        });
    }
    if !(a.total_dg.is_finite() && a.total_dg0.is_finite()) {
        let message = "the route's total dG' does not come out as a finite number; check dg0, coefficients and times for values far too large".to_string();
        return Err(Problem {
            file: p.file.clone(),
            line: None,
            column: None,
            message,
        });
    }
    Ok(())
}

fn step_result(
    p: &Pathway,
    step: usize,
    sign: f64,
    times: f64,
    replaces: Option<usize>,
    state: &State,
) -> StepResult {
    let st = &p.steps[step];
    let t = state.conditions.temperature;
    let rt = thermo::rt(t);
    let (g0, corr) = thermo::dg0_at(st, &p.compounds, &p.reference, &state.conditions);
    let dg0 = sign * g0;
    let mut ln_q = 0.0;
    let mut contributions = Vec::with_capacity(st.stoich.len());
    let mut var_c = 0.0;
    let mut main: Option<(f64, Option<usize>)> = st.dg0_sd.map(|s| (s * s, None));
    let mut any_unc = st.dg0_sd.is_some();
    for &(c, nu0) in &st.stoich {
        let comp = &p.compounds[c];
        if comp.is_solvent() {
            continue;
        }
        let nu = nu0 * sign;
        let l = state.conc[c].ln();
        ln_q += nu * l;
        contributions.push(Contribution {
            compound: c,
            nu,
            energy: nu * rt * l,
        });
        if let Some(cv) = comp.cv {
            any_unc = true;
            let v = (rt * nu * thermo::ln_sd_from_cv(cv)).powi(2);
            var_c += v;
            if main.is_none_or(|(m, _)| v > m) {
                main = Some((v, Some(c)));
            }
        }
    }
    let dg = dg0 + rt * ln_q;
    let dg_sd = any_unc.then(|| (st.dg0_sd.map_or(0.0, |s| s * s) + var_c).sqrt());
    let s = &p.settings;
    let class = Class::of(dg, s.far, s.near_factor, rt);
    let class_range = match dg_sd {
        Some(sd) => (
            Class::of(dg - Z95 * sd, s.far, s.near_factor, rt),
            Class::of(dg + Z95 * sd, s.far, s.near_factor, rt),
        ),
        None => (class, class),
    };
    StepResult {
        step,
        sign,
        times,
        replaces,
        dg0,
        dg,
        dg_sd,
        sd_main: main.map(|m| m.1),
        ln_q,
        ln_k: -dg0 / rt,
        class,
        class_sure: class_range.0 == class && class_range.1 == class,
        class_range,
        cumulative: 0.0,
        cumulative_dg0: 0.0,
        share: 0.0,
        contributions,
        kept_reference_dg0: corr.kept_reference_dg0,
        species: corr.species,
        against: false,
        verdict: None,
    }
}

/// Variance of Σ w_k dG'_k over route positions, counting shared compounds.
fn weighted_sd(
    p: &Pathway,
    steps: &[StepResult],
    members: &[(usize, f64)],
    rt: f64,
) -> Option<f64> {
    let mut any = false;
    let mut var = 0.0;
    let mut per_compound: Vec<f64> = vec![0.0; p.compounds.len()];
    let mut used_by: Vec<bool> = vec![false; p.compounds.len()];
    for &(k, w) in members {
        let s = &steps[k];
        if let Some(sd0) = p.steps[s.step].dg0_sd {
            any = true;
            var += (w * sd0).powi(2);
        }
        for c in &s.contributions {
            per_compound[c.compound] += w * c.nu;
            used_by[c.compound] = true;
        }
    }
    for (c, &coef) in per_compound.iter().enumerate() {
        if let Some(cv) = p.compounds[c].cv
            && used_by[c]
        {
            any = true;
            var += (rt * coef * thermo::ln_sd_from_cv(cv)).powi(2);
        }
    }
    any.then(|| var.sqrt())
}

/// Analyses one built route under a state: per-step results, the profile,
/// groups, net balance, verdicts, notes and the control estimate.
fn analyze_route(p: &Pathway, route: &Route, state: &State) -> Analysis {
    let rt = thermo::rt(state.conditions.temperature);
    let mut steps: Vec<StepResult> = route
        .steps
        .iter()
        .map(|r| step_result(p, r.step, r.sign, r.times, r.replaces, state))
        .collect();
    for s in &mut steps {
        // science.md §10: a step carrying net forward flux must have dG' < 0.
        s.against = s.dg > 0.0;
    }
    let side: Vec<StepResult> = route
        .side
        .iter()
        .map(|&s| step_result(p, s, 1.0, 1.0, None, state))
        .collect();
    let largest = profile(&mut steps);
    let groups = groups(p, route, &steps, rt);
    let all: Vec<(usize, f64)> = steps
        .iter()
        .enumerate()
        .map(|(k, s)| (k, s.times))
        .collect();
    let total_sd = weighted_sd(p, &steps, &all, rt);
    let net = net_balance(p, route);
    let mut a = Analysis {
        direction: state.direction,
        rt,
        total_dg0: steps.iter().map(|s| s.times * s.dg0).sum(),
        total_dg: steps.iter().map(|s| s.weighted()).sum(),
        total_sd,
        steps_without_dg0_sd: route
            .steps
            .iter()
            .filter(|r| p.steps[r.step].dg0_sd.is_none())
            .count(),
        runs_forward: steps.iter().all(|s| !s.against),
        steps,
        side,
        groups,
        net,
        largest_drop: largest,
        control: Vec::new(),
        roles: route.roles.clone(),
        branch: route.branch.clone(),
        needs_bypass: Vec::new(),
        counterpart: None,
        notes: Vec::new(),
        energy_notes: Vec::new(),
        control_estimate: mca::Estimate::default(),
    };
    a.control = control::verdicts(p, &a);
    for (i, v) in a.control.iter().enumerate() {
        a.steps[v.position].verdict = Some(i);
    }
    (a.notes, a.energy_notes) = notes::notes(p, &a, state);
    a.control_estimate = mca::estimate(p, &a, &state.conc);
    a.notes.extend(a.control_estimate.notes.iter().cloned());
    a
}

/// Fills the running totals and shares of the drop; returns the position of
/// the largest drop (the first on ties).
fn profile(steps: &mut [StepResult]) -> Option<usize> {
    let (mut cum, mut cum0, mut drop) = (0.0, 0.0, 0.0);
    for s in steps.iter() {
        if s.weighted() < 0.0 {
            drop += s.weighted();
        }
    }
    let mut largest: Option<(usize, f64)> = None;
    for (k, s) in steps.iter_mut().enumerate() {
        cum += s.weighted();
        cum0 += s.times * s.dg0;
        s.cumulative = cum;
        s.cumulative_dg0 = cum0;
        s.share = if s.weighted() < 0.0 && drop < 0.0 {
            s.weighted() / drop
        } else {
            0.0
        };
        if s.weighted() < 0.0 && largest.is_none_or(|(_, w)| s.weighted() < w) {
            largest = Some((k, s.weighted()));
        }
    }
    largest.map(|l| l.0)
}

/// The route's coupled groups with their summed dG' and its sd.
fn groups(p: &Pathway, route: &Route, steps: &[StepResult], rt: f64) -> Vec<Group> {
    route
        .groups
        .iter()
        .map(|g| Group {
            members: g.clone(),
            dg: g.iter().map(|&k| steps[k].dg).sum(),
            dg_sd: weighted_sd(
                p,
                steps,
                &g.iter().map(|&k| (k, 1.0)).collect::<Vec<_>>(),
                rt,
            ),
        })
        .collect()
}

/// Net change per pass of every input, output and currency compound the
/// route uses (zero when it is recycled).
fn net_balance(p: &Pathway, route: &Route) -> Vec<(usize, f64)> {
    let mut net = Vec::new();
    for (c, role) in route.roles.iter().enumerate() {
        if matches!(role, Role::Input | Role::Output | Role::Currency) {
            let mut v = 0.0;
            let mut used = false;
            for rs in &route.steps {
                for &(cc, nu) in &p.steps[rs.step].stoich {
                    if cc == c {
                        v += nu * rs.sign * rs.times;
                        used = true;
                    }
                }
            }
            if used {
                net.push((c, if v.abs() < 1e-9 { 0.0 } else { v }));
            }
        }
    }
    net
}
