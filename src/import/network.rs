//! Branch points and bypasses from the rest of the network (science.md §11).
//! A bypass is a reaction outside the route whose non-carrier compounds are
//! all route compounds and that runs part of the route backward: it becomes
//! a bypass step of the route step it undoes. A branch point is a route
//! compound that another reaction makes or uses, leaving out the objective
//! (biomass) reactions, exchange/sink/demand reactions and bypasses (unless
//! every reaction is asked to count).

use super::options::BranchesFrom;
use super::roles::Kind;
use super::sbml::Model;

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

/// The route's non-carrier compounds.
struct RouteUse {
    /// Per species: used or made by the route.
    on: Vec<bool>,
    /// Those species in order of first use.
    order: Vec<usize>,
    /// Per route position, the compounds it uses (as run).
    uses: Vec<Vec<usize>>,
    /// Per route position, the compounds it makes (as run).
    makes: Vec<Vec<usize>>,
}

/// Per route position, the non-carrier compounds it uses and makes (as run).
fn route_use(model: &Model, route: &[usize], flipped: &[bool], kinds: &[Kind]) -> RouteUse {
    let mut on = vec![false; model.species.len()];
    let mut order = Vec::new();
    let mut uses: Vec<Vec<usize>> = Vec::with_capacity(route.len());
    let mut makes: Vec<Vec<usize>> = Vec::with_capacity(route.len());
    for (&r, &f) in route.iter().zip(flipped) {
        let sign = if f { -1.0 } else { 1.0 };
        let (mut u, mut m) = (Vec::new(), Vec::new());
        for &(s, v) in &model.reactions[r].stoich {
            if kinds[s] != Kind::Other {
                continue;
            }
            if !on[s] {
                on[s] = true;
                order.push(s);
            }
            if v * sign > 0.0 { m.push(s) } else { u.push(s) }
        }
        uses.push(u);
        makes.push(m);
    }
    RouteUse {
        on,
        order,
        uses,
        makes,
    }
}

/// Finds bypasses and branch points; `flipped` is per route position.
pub fn analyse(
    model: &Model,
    route: &[usize],
    flipped: &[bool],
    kinds: &[Kind],
    from: BranchesFrom,
) -> Network {
    let RouteUse {
        on,
        order,
        uses,
        makes,
    } = route_use(model, route, flipped, kinds);
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
        if core.is_empty() || core.iter().any(|&(s, _)| !on[s]) {
            continue;
        }
        let directions: &[bool] = if r.reversible {
            &[false, true]
        } else {
            &[false]
        };
        for &f in directions {
            if let Some(undoes) = backward_span(&core, f, &uses, &makes) {
                bypasses.push(Bypass {
                    reaction: ri,
                    flipped: f,
                    undoes,
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
            if on[s] && makers[s].last() != Some(&ri) {
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

/// The route steps a reaction (its non-carrier stoichiometry `core`, run
/// backward when `flipped`) undoes, if it runs part of the route backward:
/// it uses a compound that step j makes and makes one that is present at or
/// before step j (used by a step up to j, or made by a step before j). Of
/// all such spans the one whose compounds match the reaction's best wins
/// (then the shorter, then the later).
fn backward_span(
    core: &[(usize, f64)],
    flipped: bool,
    uses: &[Vec<usize>],
    makes: &[Vec<usize>],
) -> Option<Vec<usize>> {
    let sign = if flipped { -1.0 } else { 1.0 };
    let used: Vec<usize> = core
        .iter()
        .filter(|(_, v)| v * sign < 0.0)
        .map(|c| c.0)
        .collect();
    let made: Vec<usize> = core
        .iter()
        .filter(|(_, v)| v * sign > 0.0)
        .map(|c| c.0)
        .collect();
    let mut best: Option<(f64, usize, usize)> = None;
    for j in 0..makes.len() {
        if !used.iter().any(|s| makes[j].contains(s)) {
            continue;
        }
        for &p in &made {
            // The latest place at or before step j where p is present.
            let at = (0..=j).rev().find_map(|i| {
                if uses[i].contains(&p) {
                    Some(i)
                } else if i < j && makes[i].contains(&p) {
                    Some(i + 1)
                } else {
                    None
                }
            });
            let Some(lo) = at else { continue };
            let mut span: Vec<usize> = (lo..=j)
                .flat_map(|i| uses[i].iter().chain(&makes[i]))
                .copied()
                .collect();
            span.sort_unstable();
            span.dedup();
            let shared = core.iter().filter(|(s, _)| span.contains(s)).count();
            let jaccard = shared as f64 / (core.len() + span.len() - shared) as f64;
            let better = match best {
                None => true,
                Some((bj, blo, bhi)) => {
                    jaccard > bj
                        || (jaccard == bj && (j - lo) < (bhi - blo))
                        || (jaccard == bj && (j - lo) == (bhi - blo) && j > bhi)
                }
            };
            if better {
                best = Some((jaccard, lo, j));
            }
        }
    }
    best.map(|(_, lo, hi)| (lo..=hi).collect())
}
