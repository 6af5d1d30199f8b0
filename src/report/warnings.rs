//! Warnings about a pathway file that every command shows alike (`check`,
//! `report`, `mdf`): steps left out of the route, compounds no step uses
//! (a declared solvent may stay unused),
//! concentrations outside their bounds.

use crate::analysis::{self, Prepared};
use crate::scenario::State;

fn listed(ids: &[&str]) -> String {
    match ids {
        [one] => format!("'{one}'"),
        _ => ids
            .iter()
            .map(|i| format!("'{i}'"))
            .collect::<Vec<_>>()
            .join(", "),
    }
}

/// Every warning for this file and scenario, one line each (file and line where known).
pub fn warnings(prep: &Prepared, state: &State) -> Vec<String> {
    let mut out = file_warnings(prep);
    match analysis::mdf::warnings(prep, state) {
        Ok(w) => out.extend(w),
        Err(e) => out.push(format!("the driving-force optimisation cannot run: {e}")),
    }
    out
}

/// The warnings about the file alone: steps left out of the route, unused compounds.
pub fn file_warnings(prep: &Prepared) -> Vec<String> {
    let p = &prep.pathway;
    let mut out = Vec::new();
    let mut on_route = vec![false; p.steps.len()];
    for &i in &p.route {
        on_route[i] = true;
    }
    let left_out: Vec<&str> = (0..p.steps.len())
        .filter(|&i| !on_route[i] && !p.steps[i].side && p.steps[i].bypass_of.is_none())
        .map(|i| p.steps[i].id.as_str())
        .collect();
    if !left_out.is_empty() {
        out.push(format!(
            "{}: step {} not in pathway.route and not marked side = true, so not analysed (the route may split there); add it to the route or mark it side = true",
            p.file,
            listed(&left_out)
        ));
    }
    let mut used = vec![false; p.compounds.len()];
    for s in &p.steps {
        for &(c, _) in &s.stoich {
            used[c] = true;
        }
    }
    for (c, comp) in p.compounds.iter().enumerate() {
        if !used[c] && !comp.is_solvent() {
            out.push(format!(
                "{}:{}: compound '{}' is used by no step; remove it or add the step that uses it",
                p.file, comp.line, comp.id
            ));
        }
    }
    out
}
