//! Control verdicts: for every far-from-equilibrium route step, whether it is
//! the sensible place to control flux, by the fixed rules of cli.md, with the
//! reasons as data (worded by `present`).

use super::result::{Analysis, Class, Reason, Verdict, VerdictKind};
use super::route::Role;
use crate::model::Pathway;

/// The sentence every verdict list carries (science.md §7).
pub const CAUTION: &str = "Closeness to equilibrium alone does not decide control: control is shared among steps (summation theorem), and these verdicts are reasoned rules, not measured flux control coefficients.";

/// Applies the rules in order: last step, branch-point product, first far step, later far steps.
pub fn verdicts(p: &Pathway, a: &Analysis) -> Vec<Verdict> {
    let mut out = Vec::new();
    let n = a.steps.len();
    let mut prime: Option<usize> = None;
    let mut between: Vec<&str> = Vec::new();
    let mut scanned = 0;
    for k in 0..n {
        let s = &a.steps[k];
        if s.class != Class::Far {
            continue;
        }
        let dg = s.dg;
        let mut reasons = Vec::new();
        let branching = branching_products(p, a, k);
        let kind = if k + 1 == n {
            reasons.push(Reason::LastStep { dg });
            VerdictKind::NotHere
        } else if !branching.is_empty() {
            reasons.push(Reason::BranchProduct {
                dg,
                compounds: branching.iter().map(|c| c.to_string()).collect(),
            });
            VerdictKind::NotHere
        } else if prime.is_none() {
            prime = Some(k);
            reasons.push(Reason::FirstFar { dg });
            VerdictKind::Prime
        } else {
            let pk = prime.unwrap_or(0);
            let control_point = p.steps[a.steps[pk].step].id.clone();
            reasons.push(Reason::AfterControlPoint {
                dg,
                control_point: control_point.clone(),
            });
            // Branch points between the prime step and this one (the range only
            // grows from one candidate to the next, so it is scanned once).
            add_branch_points(p, a, scanned.max(pk)..k, &mut between);
            scanned = k;
            if !between.is_empty() {
                reasons.push(Reason::BranchBetween {
                    compounds: between.iter().map(|c| c.to_string()).collect(),
                    control_point,
                });
            }
            VerdictKind::Candidate
        };
        reasons.extend(caveats(p, a, k));
        out.push(Verdict {
            position: k,
            kind,
            reasons,
        });
    }
    out
}

/// Ids of the branch points among the products of route step `k` as it
/// runs (carriers left out).
fn branching_products<'p>(p: &'p Pathway, a: &Analysis, k: usize) -> Vec<&'p str> {
    let s = &a.steps[k];
    p.steps[s.step]
        .stoich
        .iter()
        .filter(|&&(c, nu)| nu * s.sign > 0.0 && a.roles[c] != Role::Currency)
        .map(|&(c, _)| c)
        .filter(|&c| a.branch[c])
        .map(|c| p.compounds[c].id.as_str())
        .collect()
}

/// Adds to `between` (once each) the branch points that the route steps at
/// `positions` make.
fn add_branch_points<'p>(
    p: &'p Pathway,
    a: &Analysis,
    positions: std::ops::Range<usize>,
    between: &mut Vec<&'p str>,
) {
    for m in positions {
        let sm = &a.steps[m];
        for &(c, nu) in &p.steps[sm.step].stoich {
            if nu * sm.sign > 0.0 && a.branch[c] && !between.contains(&p.compounds[c].id.as_str()) {
                between.push(&p.compounds[c].id);
            }
        }
    }
}

/// Reasons that qualify any verdict on step `k`: its class is unsure, or it
/// belongs to a coupled group.
fn caveats(p: &Pathway, a: &Analysis, k: usize) -> Vec<Reason> {
    let s = &a.steps[k];
    let mut reasons = Vec::new();
    if !s.class_sure {
        let other = if s.class_range.0 != Class::Far {
            s.class_range.0
        } else {
            s.class_range.1
        };
        reasons.push(Reason::Unsure {
            half_width: s.dg_sd.unwrap_or(0.0) * super::result::Z95,
            other,
        });
    }
    if let Some(g) = a.groups.iter().find(|g| g.members.contains(&k)) {
        reasons.push(Reason::Coupled {
            steps: g
                .members
                .iter()
                .map(|&m| p.steps[a.steps[m].step].id.clone())
                .collect(),
            group_dg: g.dg,
        });
    }
    reasons
}
