//! Control verdicts: for every far-from-equilibrium route step, whether it is
//! the sensible place to control flux, by the fixed rules of cli.md, with the
//! reasons in words.

use super::{Analysis, Class, Role};
use crate::model::Pathway;

/// The verdict on one far step.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum VerdictKind {
    /// The committed step: the first far step no rule argues against.
    Prime,
    /// Far, no rule against it, but not the first.
    Candidate,
    /// A rule argues against controlling here.
    NotHere,
}

impl VerdictKind {
    /// Name used in JSON and tables.
    pub fn as_str(self) -> &'static str {
        match self {
            VerdictKind::Prime => "control_point",
            VerdictKind::Candidate => "candidate",
            VerdictKind::NotHere => "not_here",
        }
    }
}

/// A verdict with its reasons.
#[derive(Debug, Clone, PartialEq)]
pub struct Verdict {
    /// Position in `Analysis::steps`.
    pub position: usize,
    /// The verdict.
    pub kind: VerdictKind,
    /// Plain-words reasons; the first says which rule decided.
    pub reasons: Vec<String>,
}

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
        let st = &p.steps[s.step];
        let dg = format!("dG' = {:.1} kJ/mol", s.dg / 1e3);
        let mut reasons = Vec::new();
        let products: Vec<usize> = st
            .stoich
            .iter()
            .filter(|&&(c, nu)| nu * s.sign > 0.0 && a.roles[c] != Role::Currency)
            .map(|&(c, _)| c)
            .collect();
        let branching: Vec<&str> = products
            .iter()
            .filter(|&&c| a.branch[c])
            .map(|&c| p.compounds[c].id.as_str())
            .collect();
        let kind = if k + 1 == n {
            reasons.push(format!(
                "last step of the route ({dg}): by the time material reaches it, every step before has already committed it, so controlling here would only pile up intermediates"
            ));
            VerdictKind::NotHere
        } else if !branching.is_empty() {
            let x = branching.join(", ");
            reasons.push(format!(
                "its product {x} is a branch point ({dg}): flux can leave or enter the route right after it, so controlling this step does not control what follows; the committed step comes after {x}"
            ));
            VerdictKind::NotHere
        } else if prime.is_none() {
            prime = Some(k);
            reasons.push(format!(
                "first step far from equilibrium ({dg}) that neither ends the route nor feeds a branch point: the committed step"
            ));
            VerdictKind::Prime
        } else {
            let pk = prime.unwrap_or(0);
            reasons.push(format!(
                "far from equilibrium ({dg}) with no rule against it, but {} before it is already the committed step",
                p.steps[a.steps[pk].step].id
            ));
            // Branch points between the prime step and this one (the range only
            // grows from one candidate to the next, so it is scanned once).
            for m in scanned.max(pk)..k {
                let sm = &a.steps[m];
                for &(c, nu) in &p.steps[sm.step].stoich {
                    if nu * sm.sign > 0.0
                        && a.branch[c]
                        && !between.contains(&p.compounds[c].id.as_str())
                    {
                        between.push(&p.compounds[c].id);
                    }
                }
            }
            scanned = k;
            if !between.is_empty() {
                reasons.push(format!(
                    "branch point {} lies between {} and this step: flux leaving or entering there is not set by {}, so this step may control what reaches the end",
                    between.join(", "),
                    p.steps[a.steps[pk].step].id,
                    p.steps[a.steps[pk].step].id
                ));
            }
            VerdictKind::Candidate
        };
        if !s.class_sure {
            let other = if s.class_range.0 != Class::Far {
                s.class_range.0
            } else {
                s.class_range.1
            };
            reasons.push(format!(
                "not sure: within the 95 % interval of dG' (± {:.1} kJ/mol) it could be {}, and then it would get no verdict",
                s.dg_sd.unwrap_or(0.0) * super::Z95 / 1e3,
                other.as_str()
            ));
        }
        if let Some(g) = a.groups.iter().find(|g| g.members.contains(&k)) {
            let ids: Vec<&str> = g
                .members
                .iter()
                .map(|&m| p.steps[a.steps[m].step].id.as_str())
                .collect();
            reasons.push(format!(
                "read together with {} (coupled, group dG' = {:.1} kJ/mol)",
                ids.join(" + "),
                g.dg / 1e3
            ));
        }
        out.push(Verdict {
            position: k,
            kind,
            reasons,
        });
    }
    out
}
