//! Resolving a file's ids: unique steps, reactions against the declared
//! compounds, couplings, bypasses and the route.

use super::super::pathway::*;
use super::super::reaction;
use super::header::Header;
use super::reader::{Cx, Span};
use super::steps::RawStep;
use std::collections::HashMap;

/// The declared ids and where each first stands (lookups in constant time,
/// so files of 100,000 steps load in linear time).
struct Ids<'a> {
    compound_ids: Vec<&'a str>,
    step_ids: Vec<&'a str>,
    compound_at: HashMap<&'a str, usize>,
    step_at: HashMap<&'a str, usize>,
}

impl<'a> Ids<'a> {
    /// Indexes the compounds and steps as declared.
    fn new(compounds: &'a [Compound], raw: &'a [RawStep]) -> Ids<'a> {
        let compound_ids: Vec<&str> = compounds.iter().map(|c| c.id.as_str()).collect();
        let step_ids: Vec<&str> = raw.iter().map(|s| s.id.as_str()).collect();
        let mut compound_at: HashMap<&str, usize> = HashMap::with_capacity(compound_ids.len());
        for (i, id) in compound_ids.iter().enumerate() {
            compound_at.entry(id).or_insert(i);
        }
        let mut step_at: HashMap<&str, usize> = HashMap::with_capacity(step_ids.len());
        for (i, id) in step_ids.iter().enumerate() {
            step_at.entry(id).or_insert(i);
        }
        Ids {
            compound_ids,
            step_ids,
            compound_at,
            step_at,
        }
    }
}

impl Cx<'_> {
    /// The checked pathway from the header, the compounds and the steps as
    /// read; None when a problem leaves no pathway to build.
    pub(super) fn resolve(
        &mut self,
        header: Header,
        compounds: Vec<Compound>,
        raw: Vec<RawStep>,
    ) -> Option<Pathway> {
        let Header {
            name,
            description,
            route_ids,
            conditions,
            reference,
            settings,
        } = header;
        let ids = Ids::new(&compounds, &raw);
        self.unique_step_ids(&raw, &ids);
        let steps: Vec<Step> = raw.iter().map(|s| self.step(s, &ids)).collect();
        self.check_protons(&raw, &steps, &compounds);
        self.check_bypasses(&raw, &steps);
        let route = self.route(route_ids, &steps, &ids);
        if route.is_empty() && !raw.is_empty() && self.problems.is_empty() {
            self.err(
                None,
                "the main route has no steps; add steps that are neither side = true nor bypass_of"
                    .into(),
            );
        }
        let name = name?;
        if !conditions.temperature.is_finite() {
            return None;
        }
        Some(Pathway {
            file: self.file.clone(),
            name,
            description,
            compounds,
            steps,
            route,
            conditions,
            reference,
            settings,
        })
    }

    /// Refuses a step id used twice.
    fn unique_step_ids(&mut self, raw: &[RawStep], ids: &Ids) {
        for (i, s) in raw.iter().enumerate() {
            if let Some(&j) = ids.step_at.get(s.id.as_str()).filter(|&&j| j < i) {
                self.err(
                    s.span.clone(),
                    format!(
                        "step id '{}' is used twice (first at line {}); give each step its own id",
                        s.id, raw[j].line
                    ),
                );
            }
        }
    }

    /// The step named `id` by `what`, or a problem with a suggestion.
    fn find_step(&mut self, ids: &Ids, id: &str, span: &Span, what: &str) -> Option<usize> {
        match ids.step_at.get(id).copied() {
            Some(i) => Some(i),
            None => {
                let hint = suggest(id, ids.step_ids.iter().copied())
                    .map(|s| format!("; did you mean '{s}'?"))
                    .unwrap_or_default();
                self.err(
                    span.clone(),
                    format!("{what} names step '{id}', which is not declared{hint}"),
                );
                None
            }
        }
    }

    /// One step with its ids resolved: stoichiometry, couple and bypass.
    fn step(&mut self, s: &RawStep, ids: &Ids) -> Step {
        let what = format!("step '{}'", s.id);
        let stoich = match &s.reaction {
            Some((text, span)) => self.stoichiometry(&what, text, span, ids),
            None => Vec::new(),
        };
        let couple = s
            .couple
            .as_ref()
            .and_then(|(id, span)| self.find_step(ids, id, span, &format!("{what}: couple")));
        if couple.is_some() && couple == ids.step_at.get(s.id.as_str()).copied() {
            self.err(
                s.couple.as_ref().and_then(|c| c.1.clone()),
                format!("{what} is coupled to itself; couple names the following step"),
            );
        }
        let bypass_of = s
            .bypass_of
            .as_ref()
            .and_then(|(id, span)| self.find_step(ids, id, span, &format!("{what}: bypass_of")));
        if s.side && bypass_of.is_some() {
            self.err(
                s.span.clone(),
                format!("{what} is both a side step and a bypass; keep one of side / bypass_of"),
            );
        }
        Step {
            id: s.id.clone(),
            enzyme: s.enzyme.clone(),
            reaction: s
                .reaction
                .as_ref()
                .map(|r| r.0.trim().to_string())
                .unwrap_or_default(),
            stoich,
            standard: s.standard.unwrap_or(Standard::Dg0(0.0)),
            dg0_sd: s.dg0_sd,
            dh0: s.dh0,
            protons: s.protons.unwrap_or(0.0),
            standard_state: s.standard_state,
            times: s.times,
            side: s.side,
            couple,
            bypass_of,
            line: s.line,
        }
    }

    /// The reaction `text` of `what` as (compound, net coefficient) pairs,
    /// with a problem for each unknown compound or one on both sides.
    fn stoichiometry(
        &mut self,
        what: &str,
        text: &str,
        span: &Span,
        ids: &Ids,
    ) -> Vec<(usize, f64)> {
        let mut stoich: Vec<(usize, f64)> = Vec::new();
        let eq = match reaction::parse_with(text, &|id| ids.compound_at.contains_key(id)) {
            Err(m) => {
                self.err(span.clone(), format!("{what}: {m}"));
                return stoich;
            }
            Ok(eq) => eq,
        };
        let mut left_ids = Vec::new();
        for (sign, side) in [(-1.0, &eq.left), (1.0, &eq.right)] {
            for term in side.iter() {
                let Some(ci) = ids.compound_at.get(term.id.as_str()).copied() else {
                    let hint = suggest(&term.id, ids.compound_ids.iter().copied())
                        .map(|c| format!("did you mean '{c}'? Or declare it"))
                        .unwrap_or_else(|| "declare it".to_string());
                    self.err(
                        span.clone(),
                        format!("{what}: unknown compound '{}' in reaction; {hint} under [compounds], e.g. {} = {{ name = \"...\", conc = \"1 mM\" }}", term.id, term.id),
                    );
                    continue;
                };
                if sign < 0.0 {
                    left_ids.push(ci);
                } else if left_ids.contains(&ci) {
                    self.err(
                        span.clone(),
                        format!("{what}: compound '{}' is on both sides of the reaction; write only its net change", term.id),
                    );
                    continue;
                }
                match stoich.iter_mut().find(|(c, _)| *c == ci) {
                    Some(e) => e.1 += sign * term.coef,
                    None => stoich.push((ci, sign * term.coef)),
                }
            }
        }
        stoich
    }

    /// Refuses a bypass of a bypass or of a side step.
    fn check_bypasses(&mut self, raw: &[RawStep], steps: &[Step]) {
        for (i, s) in raw.iter().enumerate() {
            if let Some(b) = steps[i].bypass_of
                && (steps[b].bypass_of.is_some() || steps[b].side)
            {
                self.err(
                    s.bypass_of.as_ref().and_then(|x| x.1.clone()),
                    format!(
                        "step '{}': bypass_of must name a step of the main route, not '{}'",
                        s.id, steps[b].id
                    ),
                );
            }
        }
    }

    /// The main route: as listed in `pathway.route` (each step once, no side
    /// steps or bypasses), else every step that is neither.
    fn route(
        &mut self,
        route_ids: Option<Vec<(String, Span)>>,
        steps: &[Step],
        ids: &Ids,
    ) -> Vec<usize> {
        let Some(listed_ids) = route_ids else {
            return (0..steps.len())
                .filter(|&i| !steps[i].side && steps[i].bypass_of.is_none())
                .collect();
        };
        let mut route = Vec::new();
        let mut listed = vec![false; steps.len()];
        for (id, span) in &listed_ids {
            let Some(i) = self.find_step(ids, id, span, "pathway.route") else {
                continue;
            };
            if std::mem::replace(&mut listed[i], true) {
                self.err(
                    span.clone(),
                    format!("pathway.route lists step '{id}' twice; list each step once"),
                );
            } else if steps[i].side {
                self.err(span.clone(), format!("pathway.route lists '{id}', which is marked side = true; remove it from the route or drop side"));
            } else if steps[i].bypass_of.is_some() {
                self.err(span.clone(), format!("pathway.route lists '{id}', a bypass step (bypass_of); bypasses run only in the reverse route"));
            } else {
                route.push(i);
            }
        }
        route
    }
}
