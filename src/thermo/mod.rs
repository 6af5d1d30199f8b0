//! Step thermodynamics: constants, standard energies moved to the scenario's
//! temperature, pH and ionic strength, and dG' from the mass-action ratio.
//! Formulas and their sources are in docs/science.md; the reactant model
//! (pKa, pH and ionic strength) is in `species`.

pub mod constants;
pub mod species;

pub use constants::*;
pub use species::{Reactant, species_ionic_term, transformed_formation};

use crate::model::{Compound, Conditions, Standard, Step};

/// What was done to move a step's standard energy to the scenario's conditions.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Corrections {
    /// The temperature differs and no dh0 was given: the reference value was kept.
    pub kept_reference_dg0: bool,
    /// Every reactant has charge and hydrogens: pH and ionic strength were
    /// applied through the reactant model; otherwise `protons` for pH and no
    /// ionic-strength correction.
    pub species: bool,
}

/// The standard energy (J/mol) at the reference conditions and a 1 M
/// standard state, from dg0 or keq (converted from `standard` when it is not 1 M).
pub fn reference_dg0(step: &Step, compounds: &[Compound], reference: &Conditions) -> f64 {
    let g = match step.standard {
        Standard::Dg0(v) => v,
        Standard::Keq(k) => dg0_from_keq(k, reference.temperature),
    };
    if step.standard_state == 1.0 {
        return g;
    }
    // dG'° = dG'(c0) − RT ln(c0) Σν over the reactants that are not solvents.
    let sum_nu: f64 = step
        .stoich
        .iter()
        .filter(|(c, _)| !compounds[*c].is_solvent())
        .map(|(_, nu)| nu)
        .sum();
    g - rt(reference.temperature) * step.standard_state.ln() * sum_nu
}

/// dG'° (J/mol) of a step as written, at `at`: temperature first, then pH
/// and ionic strength (science.md §4), both with RT at the new temperature.
pub fn dg0_at(
    step: &Step,
    compounds: &[Compound],
    reference: &Conditions,
    at: &Conditions,
) -> (f64, Corrections) {
    let mut c = Corrections::default();
    let mut g = reference_dg0(step, compounds, reference);
    if (at.temperature - reference.temperature).abs() > 1e-9 {
        match step.dh0 {
            Some(h) => g = gibbs_helmholtz(g, h, reference.temperature, at.temperature),
            None => c.kept_reference_dg0 = true,
        }
    }
    match species::step_shift(step, compounds, reference, at) {
        Some(shift) => {
            c.species = true;
            g += shift;
        }
        None => {
            g -=
                step.protons * rt(at.temperature) * std::f64::consts::LN_10 * (at.ph - reference.ph)
        }
    }
    (g, c)
}

/// ln Q of signed stoichiometry with concentrations in mol/L (solvents left out).
pub fn ln_q(stoich: &[(usize, f64)], compounds: &[Compound], conc: &[f64]) -> f64 {
    stoich
        .iter()
        .filter(|(ci, _)| !compounds[*ci].is_solvent())
        .map(|&(ci, nu)| nu * conc[ci].ln())
        .sum()
}

/// dG' = dG'° + RT ln Q (J/mol).
pub fn dg(dg0: f64, ln_q: f64, t: f64) -> f64 {
    dg0 + rt(t) * ln_q
}

/// sd of ln c for a log-normal spread with coefficient of variation `cv`.
pub fn ln_sd_from_cv(cv: f64) -> f64 {
    (1.0 + cv * cv).ln().sqrt()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn alpha_fit_matches_its_quoted_value() {
        // science.md §4 [S, Alberty 2003]: α = 1.17582 at 298.15 K; the fit residual is < 7e-5.
        assert!((alpha(298.15) - 1.17582).abs() < 7e-5);
    }

    #[test]
    fn ionic_term_sign() {
        // A species with z² = N_H needs no correction.
        assert_eq!(species_ionic_term(-2.0, 4.0, 0.25, 298.15), 0.0);
    }
}
