//! The route as it runs in one direction: which steps, in what order, how
//! many turns each makes per pass (from the mass balance of intermediates),
//! each compound's role, branch points and coupled groups. None of this
//! depends on concentrations, so it is built once per file.

mod balance;
mod types;

use crate::model::{LoadError, Pathway, Problem};
use balance::balance;
use std::collections::HashMap;
/// Which way a route runs (it belongs to the scenario; re-exported here).
pub use types::Direction;
pub use types::{Prepared, Role, Route, RouteStep};
use types::{fmt_t, problem};

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
