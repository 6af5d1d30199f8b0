//! Resolving a file's ids: unique steps, reactions against the declared
//! compounds, couplings, bypasses and the route.

use super::super::pathway::*;
use super::super::reaction;
use super::reader::{Cx, Span};
use super::steps::RawStep;
use std::collections::HashMap;

impl Cx<'_> {
    #[allow(clippy::too_many_arguments)]
    pub(super) fn resolve(
        &mut self,
        name: Option<String>,
        description: Option<String>,
        route_ids: Option<Vec<(String, Span)>>,
        conditions: Conditions,
        reference: Conditions,
        settings: Settings,
        compounds: Vec<Compound>,
        raw: Vec<RawStep>,
    ) -> Option<Pathway> {
        let compound_ids: Vec<&str> = compounds.iter().map(|c| c.id.as_str()).collect();
        let step_ids: Vec<&str> = raw.iter().map(|s| s.id.as_str()).collect();
        // Index of the first compound and step with each id (lookups in
        // constant time, so files of 100,000 steps load in linear time).
        let mut compound_at: HashMap<&str, usize> = HashMap::with_capacity(compound_ids.len());
        for (i, id) in compound_ids.iter().enumerate() {
            compound_at.entry(id).or_insert(i);
        }
        let mut step_at: HashMap<&str, usize> = HashMap::with_capacity(step_ids.len());
        for (i, id) in step_ids.iter().enumerate() {
            step_at.entry(id).or_insert(i);
        }
        // Unique step ids.
        for (i, s) in raw.iter().enumerate() {
            if let Some(&j) = step_at.get(s.id.as_str()).filter(|&&j| j < i) {
                self.err(
                    s.span.clone(),
                    format!(
                        "step id '{}' is used twice (first at line {}); give each step its own id",
                        s.id, raw[j].line
                    ),
                );
            }
        }
        let find_step = |cx: &mut Self, id: &str, span: &Span, what: &str| -> Option<usize> {
            match step_at.get(id).copied() {
                Some(i) => Some(i),
                None => {
                    let hint = suggest(id, step_ids.iter().copied())
                        .map(|s| format!("; did you mean '{s}'?"))
                        .unwrap_or_default();
                    cx.err(
                        span.clone(),
                        format!("{what} names step '{id}', which is not declared{hint}"),
                    );
                    None
                }
            }
        };
        let mut steps = Vec::new();
        for s in &raw {
            let what = format!("step '{}'", s.id);
            let mut stoich: Vec<(usize, f64)> = Vec::new();
            if let Some((text, span)) = &s.reaction {
                match reaction::parse_with(text, &|id| compound_at.contains_key(id)) {
                    Err(m) => self.err(span.clone(), format!("{what}: {m}")),
                    Ok(eq) => {
                        let mut left_ids = Vec::new();
                        for (sign, side) in [(-1.0, &eq.left), (1.0, &eq.right)] {
                            for term in side.iter() {
                                let Some(ci) = compound_at.get(term.id.as_str()).copied() else {
                                    let hint = suggest(&term.id, compound_ids.iter().copied())
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
                    }
                }
            }
            let couple = s
                .couple
                .as_ref()
                .and_then(|(id, span)| find_step(self, id, span, &format!("{what}: couple")));
            if couple.is_some() && couple == step_at.get(s.id.as_str()).copied() {
                self.err(
                    s.couple.as_ref().and_then(|c| c.1.clone()),
                    format!("{what} is coupled to itself; couple names the following step"),
                );
            }
            let bypass_of = s
                .bypass_of
                .as_ref()
                .and_then(|(id, span)| find_step(self, id, span, &format!("{what}: bypass_of")));
            if s.side && bypass_of.is_some() {
                self.err(
                    s.span.clone(),
                    format!(
                        "{what} is both a side step and a bypass; keep one of side / bypass_of"
                    ),
                );
            }
            steps.push(Step {
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
            });
        }
        self.check_protons(&raw, &steps, &compounds);
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
        // The route.
        let mut route = Vec::new();
        match route_ids {
            Some(ids) => {
                let mut listed = vec![false; steps.len()];
                for (id, span) in &ids {
                    let Some(i) = find_step(self, id, span, "pathway.route") else {
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
            }
            None => {
                route = (0..steps.len())
                    .filter(|&i| !steps[i].side && steps[i].bypass_of.is_none())
                    .collect()
            }
        }
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
}
