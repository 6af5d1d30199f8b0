//! Presentation shared by the front ends (report, explorer, plot): the energy
//! unit a person asked for, the class and verdict symbols, number formats and
//! the reaction as it runs. Front ends use this module, never each other.

use crate::analysis::{Analysis, Class, Prepared, StepResult, VerdictKind};
use crate::model::{Conditions, units};
use crate::scenario::Direction;

/// Energy unit for output.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum EnergyUnit {
    /// kJ/mol (the default).
    #[default]
    KJ,
    /// kcal/mol.
    Kcal,
}

impl EnergyUnit {
    /// Converts J/mol to this unit.
    pub fn of(self, j: f64) -> f64 {
        match self {
            EnergyUnit::KJ => j / 1e3,
            EnergyUnit::Kcal => j / 4184.0,
        }
    }
    /// "kJ/mol" or "kcal/mol".
    pub fn label(self) -> &'static str {
        match self {
            EnergyUnit::KJ => "kJ/mol",
            EnergyUnit::Kcal => "kcal/mol",
        }
    }
}

/// Symbol for a class, so meaning never rests on colour alone.
pub fn class_symbol(c: Class, ascii: bool) -> &'static str {
    match (c, ascii) {
        (Class::Far, false) => "▼",
        (Class::Moderate, false) => "↘",
        (Class::Near, false) => "≈",
        (Class::Uphill, false) => "▲",
        (Class::Far, true) => "v",
        (Class::Moderate, true) => "\\",
        (Class::Near, true) => "~",
        (Class::Uphill, true) => "^",
    }
}

/// Short marker for a verdict.
pub fn verdict_symbol(v: VerdictKind, ascii: bool) -> &'static str {
    match (v, ascii) {
        (VerdictKind::Prime, false) => "◆ prime",
        (VerdictKind::Candidate, false) => "◇ candidate",
        (VerdictKind::NotHere, false) => "· not here",
        (VerdictKind::Prime, true) => "* prime",
        (VerdictKind::Candidate, true) => "o candidate",
        (VerdictKind::NotHere, true) => "- not here",
    }
}

/// "; 4 of 5 steps give no dg0_sd" when the total's ± leaves some dG'° out.
pub fn sd_partial(a: &Analysis) -> String {
    match a.steps_without_dg0_sd {
        0 => String::new(),
        n => format!(
            "; {n} of {} step{} give no dg0_sd",
            a.steps.len(),
            if a.steps.len() == 1 { "" } else { "s" }
        ),
    }
}

/// Rounds away solver and float noise for printing: no -0, no 1e-12 residues.
pub fn clean(x: f64) -> f64 {
    if !x.is_finite() {
        return x;
    }
    let r = (x * 1e9).round() / 1e9;
    if r == 0.0 { 0.0 } else { r }
}

/// The reaction as it runs (reversed steps have their sides swapped).
pub fn reaction_as_run(prep: &Prepared, s: &StepResult) -> String {
    let st = &prep.pathway.steps[s.step];
    if s.sign > 0.0 {
        return st.reaction.clone();
    }
    let side = |want_pos: bool| -> String {
        st.stoich
            .iter()
            .filter(|(_, nu)| (*nu * s.sign > 0.0) == want_pos)
            .map(|&(c, nu)| {
                let id = &prep.pathway.compounds[c].id;
                if (nu.abs() - 1.0).abs() < 1e-12 {
                    id.clone()
                } else {
                    format!("{} {id}", units::sig3(nu.abs()))
                }
            })
            .collect::<Vec<_>>()
            .join(" + ")
    };
    format!("{} -> {}", side(false), side(true))
}

/// Compact number for ratios that span many decades (Q, K', J+/J−).
pub fn sci(x: f64) -> String {
    if !x.is_finite() {
        return if x > 0.0 { "inf".into() } else { "nan".into() };
    }
    if x != 0.0 && (x.abs() >= 1e4 || x.abs() < 1e-2) {
        format!("{x:.2e}")
    } else {
        format!("{x:.3}")
    }
}

/// The headline of the text renderings: name, direction and conditions
/// (with the blank line after it).
pub fn headline(name: &str, direction: Direction, c: &Conditions) -> String {
    format!(
        "{} — {} route, {:.2} °C, pH {}, I = {} M\n\n",
        name,
        direction.as_str(),
        c.temperature - 273.15,
        c.ph,
        c.ionic_strength
    )
}
