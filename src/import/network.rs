//! Branch points and bypasses from the rest of the network (science.md §11).
//! A bypass is a reaction outside the route whose non-carrier compounds are
//! all route compounds and that runs part of the route backward: it becomes
//! a bypass step of the route step it undoes. A branch point is a route
//! compound that another reaction makes or uses, leaving out the objective
//! (biomass) reactions, exchange/sink/demand reactions and bypasses (unless
//! every reaction is asked to count).

use super::sbml::Model;
use super::{BranchesFrom, Kind};

/// A reaction outside the route that runs part of it backward.
#[derive(Debug, Clone, PartialEq)]
pub struct Bypass {
    /// Reaction index.
    pub reaction: usize,
    /// True when it is written against the model's direction.
    pub flipped: bool,
    /// Route positions (indices into the route) of the steps it undoes, in order.
    pub undoes: Vec<usize>,
}

/// What the rest of the network says about a route.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Network {
    /// Bypasses, in model order.
    pub bypasses: Vec<Bypass>,
    /// Route compounds that are branch points, with the reactions that make
    /// them one (in model order), in the order the compounds appear on the route.
    pub branches: Vec<(usize, Vec<usize>)>,
}

/// True for exchange, sink and demand reactions: one side empty, or a boundary species.
pub fn is_exchange(model: &Model, r: usize) -> bool {
    let st = &model.reactions[r].stoich;
    st.iter().all(|(_, v)| *v > 0.0)
        || st.iter().all(|(_, v)| *v < 0.0)
        || st.iter().any(|&(s, _)| model.species[s].boundary)
}

/// Finds bypasses and branch points; `flipped` is per route position.
pub fn analyse(
    model: &Model,
    route: &[usize],
    flipped: &[bool],
    kinds: &[Kind],
    from: BranchesFrom,
) -> Network {
    // rank: 0 for route inputs, 1 + the position of the first step that makes it.
    let mut rank: Vec<Option<usize>> = vec![None; model.species.len()];
    let mut order = Vec::new();
    for (pos, (&r, &f)) in route.iter().zip(flipped).enumerate() {
        let sign = if f { -1.0 } else { 1.0 };
        for &(s, v) in &model.reactions[r].stoich {
            if kinds[s] != Kind::Other {
                continue;
            }
            if rank[s].is_none() {
                order.push(s);
                rank[s] = Some(0);
            }
            if v * sign > 0.0 && rank[s] == Some(0) {
                rank[s] = Some(pos + 1);
            }
        }
    }
    let on_route = |r: usize| route.contains(&r);
    let mut bypasses = Vec::new();
    for (ri, r) in model.reactions.iter().enumerate() {
        if on_route(ri) || r.objective || is_exchange(model, ri) {
            continue;
        }
        let core: Vec<(usize, f64)> = r
            .stoich
            .iter()
            .copied()
            .filter(|&(s, _)| kinds[s] == Kind::Other)
            .collect();
        if core.is_empty() || core.iter().any(|&(s, _)| rank[s].is_none()) {
            continue;
        }
        let directions: &[bool] = if r.reversible {
            &[false, true]
        } else {
            &[false]
        };
        for &f in directions {
            let sign = if f { -1.0 } else { 1.0 };
            let used = core.iter().filter(|(_, v)| v * sign < 0.0);
            let made: Vec<usize> = core
                .iter()
                .filter(|(_, v)| v * sign > 0.0)
                .filter_map(|&(s, _)| rank[s])
                .collect();
            // Largest backward span: from the latest compound used to the earliest made.
            let hi = used.filter_map(|&(s, _)| rank[s]).max();
            let lo = made.iter().copied().min();
            if let (Some(hi), Some(lo)) = (hi, lo)
                && lo < hi
            {
                bypasses.push(Bypass {
                    reaction: ri,
                    flipped: f,
                    undoes: (lo..hi).collect(),
                });
                break;
            }
        }
    }
    let is_bypass = |ri: usize| bypasses.iter().any(|b| b.reaction == ri);
    let mut makers: Vec<Vec<usize>> = vec![Vec::new(); model.species.len()];
    for (ri, r) in model.reactions.iter().enumerate() {
        if on_route(ri) {
            continue;
        }
        if from == BranchesFrom::Network && (r.objective || is_exchange(model, ri) || is_bypass(ri))
        {
            continue;
        }
        for &(s, _) in &r.stoich {
            if rank[s].is_some() && makers[s].last() != Some(&ri) {
                makers[s].push(ri);
            }
        }
    }
    let branches = order
        .into_iter()
        .map(|s| (s, std::mem::take(&mut makers[s])))
        .filter(|(_, m)| !m.is_empty())
        .collect();
    Network { bypasses, branches }
}
