//! One `[[steps]]` table, read as written (ids not yet resolved), and the
//! check of stated protons against the species data.

use super::super::pathway::*;
use super::super::reaction;
use super::super::units::Kind;
use super::fmt_count;
use super::reader::{Cx, Item, Read, STEP, Span, Table, open};

/// A step as written, before its ids are looked up.
pub(super) struct RawStep {
    pub(super) id: String,
    pub(super) line: usize,
    pub(super) span: Span,
    pub(super) enzyme: Option<String>,
    pub(super) reaction: Option<(String, Span)>,
    pub(super) standard: Option<Standard>,
    pub(super) dg0_sd: Option<f64>,
    pub(super) dh0: Option<f64>,
    pub(super) protons: Option<f64>,
    pub(super) standard_state: f64,
    pub(super) times: Option<f64>,
    pub(super) side: bool,
    pub(super) couple: Option<(String, Span)>,
    pub(super) bypass_of: Option<(String, Span)>,
}

impl Cx<'_> {
    /// `standard = "1 mM"`: the standard state of dg0/keq, mol/L (1 when absent).
    pub(super) fn standard_state(&mut self, t: &Table, what: &str) -> f64 {
        match self.quantity(t, "standard", Kind::Concentration, what) {
            Some(c) if c > 0.0 => c,
            Some(_) => {
                self.err(
                    Self::value_span(t, "standard"),
                    format!("{what}: standard must be a positive concentration; write standard = \"1 mM\" (or leave it out for 1 M)"),
                );
                1.0
            }
            None => 1.0,
        }
    }

    /// A stated `protons` must match the base species' hydrogens when every
    /// reactant has charge and hydrogens (science.md §4).
    pub(super) fn check_protons(
        &mut self,
        raw: &[RawStep],
        steps: &[Step],
        compounds: &[Compound],
    ) {
        for (r, s) in raw.iter().zip(steps) {
            let (Some(stated), Some(counted)) = (r.protons, s.base_protons(compounds)) else {
                continue;
            };
            if (stated - counted).abs() > 1e-9 {
                self.err(
                    r.span.clone(),
                    format!(
                        "step '{}' states protons = {} but its reactants' charge and hydrogens give {} (−Σ ν nH of the most deprotonated species, water nH 2); correct protons to {} or leave it out",
                        s.id,
                        fmt_count(stated),
                        fmt_count(counted),
                        fmt_count(counted)
                    ),
                );
            }
        }
    }

    /// One `[[steps]]` table as written, its values checked but its ids not
    /// yet resolved; None without an id.
    pub(super) fn raw_step(&mut self, item: &Item) -> Option<RawStep> {
        let span = item.at();
        let t = item.as_table_like()?;
        let line = self.line(&span);
        let id = self.step_id(t, &span)?;
        let what = format!("step '{id}'");
        self.known_keys(t, STEP, &what);
        let reaction = match self.string(t, "reaction", &what) {
            Some(r) => Some((r, Self::value_span(t, "reaction"))),
            None => {
                if t.get("reaction").is_none() {
                    self.err(
                        span.clone(),
                        format!("{what} has no reaction; add reaction = \"a + b -> c\""),
                    );
                }
                None
            }
        };
        let standard = self.standard(t, &span, &what);
        let dg0_sd = self.quantity(t, "dg0_sd", Kind::Energy, &what);
        if let Some(sd) = dg0_sd
            && sd < 0.0
        {
            self.err(
                Self::value_span(t, "dg0_sd"),
                format!("{what}: dg0_sd cannot be negative; write e.g. dg0_sd = \"1.5 kJ/mol\""),
            );
        }
        let times = self.number(t, "times", &what);
        if let Some(x) = times
            && x <= 0.0
        {
            self.err(
                Self::value_span(t, "times"),
                format!("{what}: times must be a positive number of turns, e.g. times = 2"),
            );
        }
        let link =
            |cx: &mut Self, k: &str| cx.string(t, k, &what).map(|s| (s, Self::value_span(t, k)));
        Some(RawStep {
            line,
            span,
            enzyme: self.string(t, "enzyme", &what),
            reaction,
            standard,
            dg0_sd,
            dh0: self.quantity(t, "dh0", Kind::Energy, &what),
            protons: self.number(t, "protons", &what),
            standard_state: self.standard_state(t, &what),
            times,
            side: self.boolean(t, "side", &what),
            couple: link(self, "couple"),
            bypass_of: link(self, "bypass_of"),
            id,
        })
    }

    /// The step's id (a problem when it is missing or not a valid id).
    fn step_id(&mut self, t: &Table, span: &Span) -> Option<String> {
        let Some(id) = self.string(t, "id", "step") else {
            if t.get("id").is_none() {
                self.err(
                    span.clone(),
                    "a [[steps]] entry has no id; add id = \"s1\"".into(),
                );
            }
            return None;
        };
        if !reaction::valid_id(&id) {
            self.err(
                Self::value_span(t, "id"),
                format!("step id '{id}' is not valid; {}", reaction::ID_RULE),
            );
        }
        Some(id)
    }

    /// The standard energy as given: exactly one of `dg0` and `keq`, `dg0`
    /// not left open, `keq` above zero.
    fn standard(&mut self, t: &Table, span: &Span, what: &str) -> Option<Standard> {
        let dg0 = if open(t, "dg0") {
            self.err(Self::value_span(t, "dg0"), format!("{what}: dg0 is still \"?\" (left open by dgpath import); write the step's standard energy as it runs here, e.g. dg0 = \"-16.7 kJ/mol\""));
            None
        } else {
            self.quantity(t, "dg0", Kind::Energy, what)
        };
        let keq = self.number(t, "keq", what);
        match (t.get("dg0").is_some(), t.get("keq").is_some()) {
            (true, true) => {
                self.err(
                    Self::key_span(t, "keq"),
                    format!("{what} gives both dg0 and keq; keep exactly one of them"),
                );
                None
            }
            (false, false) => {
                self.err(
                    span.clone(),
                    format!(
                        "{what} has neither dg0 nor keq; add dg0 = \"-16.7 kJ/mol\" (or keq = 850)"
                    ),
                );
                None
            }
            (true, false) => dg0.map(Standard::Dg0),
            (false, true) => match keq {
                Some(k) if k > 0.0 => Some(Standard::Keq(k)),
                Some(_) => {
                    self.err(
                        Self::value_span(t, "keq"),
                        format!("{what}: keq must be above zero; write e.g. keq = 850"),
                    );
                    None
                }
                None => None,
            },
        }
    }
}
