//! The reactant model (docs/science.md, "pH and ionic strength"): a compound
//! as written in a reaction is a set of species that differ by bound protons.
//! Its transformed formation energy, relative to its most deprotonated (base)
//! species, comes from the binding polynomial; a step's dG'° moves between
//! two pH and ionic-strength settings by Σ ν [f(scenario) − f(reference)].

use super::constants::{DEBYE_B, rt, rt_alpha};
use crate::model::{Compound, Conditions, Step};
use std::f64::consts::LN_10;

/// What the transform needs of one reactant: its base species and its pKa.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Reactant<'a> {
    /// Charge of the most deprotonated species.
    pub charge: f64,
    /// Hydrogen atoms of the most deprotonated species.
    pub hydrogens: f64,
    /// Acid dissociation constants at 25 °C and I = 0, highest first.
    pub pka: &'a [f64],
}

impl<'a> Reactant<'a> {
    /// The reactant data of a compound; None when it lacks charge and hydrogens
    /// (a solvent that states neither is water, z 0, nH 2).
    pub fn of(c: &'a Compound) -> Option<Self> {
        c.base_species().map(|(charge, hydrogens)| Reactant {
            charge,
            hydrogens,
            pka: &c.pka,
        })
    }
}

/// The ionic-strength term of one species' formation energy (J/mol):
/// −RTα (z² − N_H) √I / (1 + B √I).
pub fn species_ionic_term(charge: f64, hydrogens: f64, i: f64, t: f64) -> f64 {
    let s = i.max(0.0).sqrt();
    -rt_alpha(t) * (charge * charge - hydrogens) * s / (1.0 + DEBYE_B * s)
}

/// Transformed formation energy (J/mol) of a reactant at temperature `t`,
/// `ph` and ionic strength `i`, relative to its base species:
/// f = −RT ln Σ_k exp(−g_k/RT) with
/// g_k = −RT ln10 (pK1 + … + pKk) + nH_k RT ln10 pH − RTα (z_k² − nH_k) √I/(1 + 1.6 √I).
pub fn transformed_formation(r: &Reactant, t: f64, ph: f64, i: f64) -> f64 {
    let rt = rt(t);
    let mut pk_sum = 0.0;
    // −g_k/RT for every species, then a log-sum-exp that cannot overflow.
    let terms: Vec<f64> = std::iter::once(0.0)
        .chain(r.pka.iter().copied())
        .enumerate()
        .map(|(k, pk)| {
            pk_sum += pk;
            let z = r.charge + k as f64;
            let h = r.hydrogens + k as f64;
            let g = -rt * LN_10 * pk_sum + h * rt * LN_10 * ph + species_ionic_term(z, h, i, t);
            -g / rt
        })
        .collect();
    let top = terms.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let sum: f64 = terms.iter().map(|v| (v - top).exp()).sum();
    -rt * (top + sum.ln())
}

/// The shift (J/mol) of a step's dG'° from the reference pH and ionic
/// strength to those of `at`, both at `at`'s temperature:
/// Σ ν [f(T, pH, I) − f(T, pH_ref, I_ref)]. None when some reactant lacks
/// charge and hydrogens (the step then falls back to `protons` for pH).
pub fn step_shift(
    step: &Step,
    compounds: &[Compound],
    reference: &Conditions,
    at: &Conditions,
) -> Option<f64> {
    let reactants: Vec<(Reactant, f64)> = step
        .stoich
        .iter()
        .map(|&(c, nu)| Reactant::of(&compounds[c]).map(|r| (r, nu)))
        .collect::<Option<_>>()?;
    if at.ph == reference.ph && at.ionic_strength == reference.ionic_strength {
        return Some(0.0);
    }
    let t = at.temperature;
    Some(
        reactants
            .iter()
            .map(|(r, nu)| {
                nu * (transformed_formation(r, t, at.ph, at.ionic_strength)
                    - transformed_formation(r, t, reference.ph, reference.ionic_strength))
            })
            .sum(),
    )
}

/// Ids of the reactants of a step that lack charge and hydrogens.
pub fn lacking<'a>(step: &Step, compounds: &'a [Compound]) -> Vec<&'a str> {
    step.stoich
        .iter()
        .map(|&(c, _)| &compounds[c])
        .filter(|c| c.base_species().is_none())
        .map(|c| c.id.as_str())
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    const T25: f64 = 298.15;

    fn one(charge: f64, hydrogens: f64, pka: &[f64]) -> Reactant<'_> {
        Reactant {
            charge,
            hydrogens,
            pka,
        }
    }

    #[test]
    fn single_pka_shift() {
        // science.md §4 check [C, from the formula]: B with one pKa 6.8 (z −1, nH 0),
        // A one species (z 0, nH 0): pH 7 -> 6 at 25 °C, I = 0 moves A -> B by −3.718 kJ/mol.
        let pk = [6.8];
        let b = one(-1.0, 0.0, &pk);
        let a = one(0.0, 0.0, &[]);
        let shift = (transformed_formation(&b, T25, 6.0, 0.0)
            - transformed_formation(&b, T25, 7.0, 0.0))
            - (transformed_formation(&a, T25, 6.0, 0.0) - transformed_formation(&a, T25, 7.0, 0.0));
        assert!((shift / 1e3 + 3.718).abs() < 5e-4, "{shift}");
    }

    #[test]
    fn one_species_is_the_linear_model() {
        // No pKa: f = nH RT ln10 pH + the extended Debye–Hückel term.
        let r = one(-3.0, 5.0, &[]);
        let f = transformed_formation(&r, 310.15, 7.3, 0.2);
        let want = 5.0 * rt(310.15) * LN_10 * 7.3 + species_ionic_term(-3.0, 5.0, 0.2, 310.15);
        assert!((f - want).abs() < 1e-6, "{f} vs {want}");
    }

    proptest::proptest! {
        /// With no pKa the reactant model is the earlier linear model:
        /// −protons RT ln10 ΔpH with protons = −Σ ν nH, plus the extended
        /// Debye–Hückel term of each base species.
        #[test]
        fn no_pka_is_the_linear_model(
            species in proptest::collection::vec((-4i32..=1, 0i32..=30, -3i32..=3), 1..6),
            ph in 5.0..9.0f64, ph_ref in 5.0..9.0f64,
            i in 0.0..0.3f64, i_ref in 0.0..0.3f64,
            t in 273.15..323.15f64,
        ) {
            let mut shift = 0.0;
            let mut protons = 0.0;
            let mut ionic = 0.0;
            for &(z, h, nu) in &species {
                let (z, h, nu) = (z as f64, h as f64, nu as f64);
                let r = one(z, h, &[]);
                shift += nu * (transformed_formation(&r, t, ph, i) - transformed_formation(&r, t, ph_ref, i_ref));
                protons -= nu * h;
                ionic += nu * (species_ionic_term(z, h, i, t) - species_ionic_term(z, h, i_ref, t));
            }
            let linear = -protons * rt(t) * LN_10 * (ph - ph_ref) + ionic;
            proptest::prop_assert!((shift - linear).abs() < 1e-6 * (1.0 + linear.abs()), "{} vs {}", shift, linear);
        }
    }

    #[test]
    fn far_pka_does_not_overflow() {
        let pk = [14.0, 13.0, 12.0, 11.0];
        let r = one(-4.0, 0.0, &pk);
        assert!(transformed_formation(&r, T25, 0.0, 0.3).is_finite());
    }
}
