//! One compound table: name, concentration, role, bounds, species data.

use super::super::pathway::*;
use super::super::reaction;
use super::super::units::Kind;
use super::MAX_PKA;
use super::reader::{COMPOUND, Cx, Item, Read, Span, Table, open};

impl Cx<'_> {
    /// `pka = [7.60, 4.68]`: finite numbers, highest first; only with charge and hydrogens.
    pub(super) fn pka(&mut self, t: &Table, what: &str, has_species: bool) -> Vec<f64> {
        let Some(item) = t.get("pka") else {
            return Vec::new();
        };
        let span = Self::value_span(t, "pka");
        let values: Option<Vec<f64>> = item
            .as_array()
            .and_then(|a| a.iter().map(|v| v.as_number()).collect());
        let Some(values) = values.filter(|v| v.iter().all(|x| x.is_finite())) else {
            self.err(
                span,
                format!(
                    "{what}: pka must be a list of numbers, highest first, e.g. pka = [7.60, 4.68]"
                ),
            );
            return Vec::new();
        };
        if values.len() > MAX_PKA {
            self.err(
                span,
                format!("{what}: pka lists {} values, more than the {MAX_PKA} that are read; keep those within a few units of the pH", values.len()),
            );
            return Vec::new();
        }
        if values.windows(2).any(|w| w[1] > w[0]) {
            self.err(
                span,
                format!("{what}: pka must be listed highest first (the first proton bound to the most deprotonated species), e.g. pka = [7.60, 4.68]"),
            );
            return Vec::new();
        }
        if !values.is_empty() && !has_species {
            self.err(
                span,
                format!("{what}: pka needs the charge and hydrogens of the most deprotonated species; add e.g. charge = -4, hydrogens = 12"),
            );
            return Vec::new();
        }
        values
    }

    pub(super) fn compound(&mut self, id: &str, item: &Item, kspan: Span) -> Option<Compound> {
        let line = self.line(&kspan);
        if !reaction::valid_id(id) {
            self.err(
                kspan.clone(),
                format!("compound id '{id}' is not valid; {}", reaction::ID_RULE),
            );
        }
        let Some(t) = item.as_table_like() else {
            self.err(kspan, format!("compound '{id}' must be a table, e.g. {id} = {{ name = \"...\", conc = \"1 mM\" }}"));
            return None;
        };
        let what = format!("compound '{id}'");
        self.known_keys(t, COMPOUND, &what);
        let name = self
            .string(t, "name", &what)
            .unwrap_or_else(|| id.to_string());
        let role = match t.get("role") {
            None => None,
            Some(r) => match r.as_str() {
                Some("currency") => Some(StatedRole::Currency),
                Some("solvent") => Some(StatedRole::Solvent),
                other => {
                    let got = other.unwrap_or("?");
                    let hint = suggest(got, ["currency", "solvent"])
                        .map(|s| format!("; did you mean '{s}'?"))
                        .unwrap_or_default();
                    self.err(Self::value_span(t, "role"), format!("{what}: role '{got}' is not known; write role = \"currency\" or role = \"solvent\" (other roles are inferred){hint}"));
                    None
                }
            },
        };
        let conc = if open(t, "conc") {
            self.err(Self::value_span(t, "conc"), format!("{what}: conc is still \"?\" (left open by dgpath import); write its concentration, e.g. conc = \"1 mM\""));
            None
        } else {
            self.quantity(t, "conc", Kind::Concentration, &what)
        };
        let solvent = role == Some(StatedRole::Solvent);
        match conc {
            Some(c) if c <= 0.0 && !solvent => self.err(
                Self::value_span(t, "conc"),
                format!("{what}: concentration must be above zero; write a small positive value such as \"1 nM\" for a trace compound"),
            ),
            None if !solvent && t.get("conc").is_none() => self.err(
                kspan.clone(),
                format!("{what} has no concentration; add conc = \"1 mM\" (or role = \"solvent\" for water)"),
            ),
            _ => {}
        }
        let charge = self.number(t, "charge", &what);
        let hydrogens = self.number(t, "hydrogens", &what);
        let pka = self.pka(t, &what, charge.is_some() && hydrogens.is_some());
        let cv = self.number(t, "cv", &what);
        if let Some(v) = cv
            && v < 0.0
        {
            self.err(
                Self::value_span(t, "cv"),
                format!("{what}: cv cannot be negative; write e.g. cv = 0.2 for 20 %"),
            );
        }
        Some(Compound {
            id: id.to_string(),
            name,
            conc: if solvent { None } else { conc },
            role,
            branch: self.boolean(t, "branch", &what),
            bounds: self.bounds(t, "bounds", &what),
            fixed: t
                .get("fixed")
                .is_some()
                .then(|| self.boolean(t, "fixed", &what)),
            cv,
            charge,
            hydrogens,
            pka,
            line,
        })
    }
}
