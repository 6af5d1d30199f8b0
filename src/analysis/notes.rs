//! Notes for the reader: how the standard energies were moved to the
//! scenario, steps that run backward or uphill, steps left out, and classes
//! that are not sure.

use super::result::{Analysis, Class, EnergyNote, StepResult, Z95};
use crate::model::{Conditions, Pathway};
use crate::scenario::State;
use crate::thermo;

/// Every note for the reader, in a fixed order: the plain ones, and those
/// that carry energies (worded by the front ends in the unit asked for).
pub(super) fn notes(p: &Pathway, a: &Analysis, state: &State) -> (Vec<String>, Vec<EnergyNote>) {
    let c = &state.conditions;
    let r = &p.reference;
    let all: Vec<&StepResult> = a.steps.iter().chain(a.side.iter()).collect();
    let mut out = temperature_notes(p, &all, c, r);
    out.extend(species_notes(p, &all, c, r));
    out.extend(against_note(p, a));
    out.extend(left_out_note(p));
    let mut energy = uphill_notes(p, a);
    energy.extend(unsure_notes(p, a));
    (out, energy)
}

/// How dG'° was moved to the scenario's temperature.
fn temperature_notes(
    p: &Pathway,
    all: &[&StepResult],
    c: &Conditions,
    r: &Conditions,
) -> Vec<String> {
    let mut out = Vec::new();
    if (c.temperature - r.temperature).abs() > 1e-9 {
        let kept: Vec<&str> = all
            .iter()
            .filter(|s| s.kept_reference_dg0)
            .map(|s| p.steps[s.step].id.as_str())
            .collect();
        if kept.is_empty() {
            out.push(format!(
                "dG'° moved from {:.2} °C to {:.2} °C with Gibbs–Helmholtz (dh0 of every step).",
                r.temperature - 273.15,
                c.temperature - 273.15
            ));
        } else {
            out.push(format!(
                "dG'° kept at its {:.2} °C value for {} (no dh0; assumes dS'° = 0); RT at {:.2} °C is used in RT ln Q.",
                r.temperature - 273.15,
                list(&kept),
                c.temperature - 273.15
            ));
        }
    }
    out
}

/// One sentence when route steps run backward (science.md §10).
fn against_note(p: &Pathway, a: &Analysis) -> Option<String> {
    let against: Vec<&str> = a
        .steps
        .iter()
        .filter(|s| s.against)
        .map(|s| p.steps[s.step].id.as_str())
        .collect();
    if against.is_empty() {
        return None;
    }
    let (verb, it) = if against.len() == 1 {
        ("runs", "its")
    } else {
        ("run", "their")
    };
    Some(format!(
        "The route cannot carry forward flux at these concentrations: {} {verb} backward ({it} dG' > 0, whatever the class or coupling).",
        list(&against)
    ))
}

/// Uphill route steps, and whether a coupled group pays for them.
fn uphill_notes(p: &Pathway, a: &Analysis) -> Vec<EnergyNote> {
    // The first group each route position belongs to (one pass, not a
    // search per step: routes may have tens of thousands of steps).
    let mut group_of: Vec<Option<usize>> = vec![None; a.steps.len()];
    for (g, grp) in a.groups.iter().enumerate() {
        for &m in &grp.members {
            if let Some(slot) = group_of.get_mut(m)
                && slot.is_none()
            {
                *slot = Some(g);
            }
        }
    }
    let mut out = Vec::new();
    for (k, s) in a.steps.iter().enumerate() {
        if s.class == Class::Uphill {
            let id = &p.steps[s.step].id;
            let grp = group_of[k].map(|g| &a.groups[g]);
            out.push(EnergyNote::Uphill {
                step: id.clone(),
                dg: s.dg,
                group_dg: grp.map(|g| g.dg).filter(|&d| d < 0.0),
            });
        }
    }
    out
}

/// Steps an explicit route leaves out that are neither side steps nor bypasses.
fn left_out_note(p: &Pathway) -> Option<String> {
    let mut on_route = vec![false; p.steps.len()];
    for &i in &p.route {
        if let Some(x) = on_route.get_mut(i) {
            *x = true;
        }
    }
    let left_out: Vec<&str> = (0..p.steps.len())
        .filter(|&i| !on_route[i] && !p.steps[i].side && p.steps[i].bypass_of.is_none())
        .map(|i| p.steps[i].id.as_str())
        .collect();
    if left_out.is_empty() {
        return None;
    }
    let (is, it) = if left_out.len() == 1 {
        ("is", "it")
    } else {
        ("are", "them")
    };
    Some(format!(
        "{} {is} not in pathway.route and not marked side = true, so not analysed; add {it} to the route or mark {it} side = true.",
        list(&left_out)
    ))
}

/// Steps whose class could differ within the 95 % interval of dG'.
fn unsure_notes(p: &Pathway, a: &Analysis) -> Vec<EnergyNote> {
    let mut out = Vec::new();
    for s in a.steps.iter().chain(a.side.iter()) {
        if s.class_sure {
            continue;
        }
        let Some(sd) = s.dg_sd else { continue };
        let (lo, hi) = (s.dg - Z95 * sd, s.dg + Z95 * sd);
        let mut others: Vec<Class> = Vec::new();
        for c in [s.class_range.0, s.class_range.1] {
            if c != s.class && !others.contains(&c) {
                others.push(c);
            }
        }
        out.push(EnergyNote::Unsure {
            step: p.steps[s.step].id.clone(),
            class: s.class,
            interval: (lo, hi),
            others,
        });
    }
    out
}

/// Notes on how pH and ionic strength were applied (science.md §4).
fn species_notes(p: &Pathway, all: &[&StepResult], c: &Conditions, r: &Conditions) -> Vec<String> {
    let mut out = Vec::new();
    let ph_moves = c.ph != r.ph;
    let i_moves = c.ionic_strength != r.ionic_strength;
    if ph_moves || i_moves {
        // In order of first appearance, each once (sets, not searches of
        // the lists: a long route may have thousands of such steps).
        let mut steps: Vec<&str> = Vec::new();
        let mut lacking: Vec<&str> = Vec::new();
        let mut seen = std::collections::HashSet::new();
        for s in all.iter().filter(|s| !s.species) {
            let st = &p.steps[s.step];
            if seen.insert(("step", st.id.as_str())) {
                steps.push(&st.id);
            }
            for id in thermo::species::lacking(st, &p.compounds) {
                if seen.insert(("compound", id)) {
                    lacking.push(id);
                }
            }
        }
        if !steps.is_empty() {
            let (verb, what) = if lacking.len() == 1 {
                ("lacks", "it")
            } else {
                ("lack", "them")
            };
            let how = if i_moves {
                "moved to the pH by `protons` only and get no ionic-strength correction"
            } else {
                "moved to the pH by `protons` only (no pKa)"
            };
            out.push(format!(
                "{} {how}: {} {verb} charge and hydrogens (give {what} charge, hydrogens and pka for the reactant model).",
                list(&steps),
                list(&lacking)
            ));
        }
    }
    if i_moves && c.ionic_strength > MAX_IONIC_STRENGTH {
        out.push(format!(
            "ionic strength {} M is above {MAX_IONIC_STRENGTH} M, beyond the range where the extended Debye–Hückel correction holds.",
            c.ionic_strength
        ));
    }
    out
}

/// Above this ionic strength (mol/L) the extended Debye–Hückel term is not
/// reliable (science.md §4).
pub const MAX_IONIC_STRENGTH: f64 = 0.3;

fn list(ids: &[&str]) -> String {
    if ids.len() > 6 {
        format!("{} and {} more", ids[..6].join(", "), ids.len() - 6)
    } else {
        ids.join(", ")
    }
}
