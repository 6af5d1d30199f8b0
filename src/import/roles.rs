//! What each species is for the import: H+ (becomes `protons`), water (the
//! solvent), a carrier (`role = "currency"`) or a compound that the route
//! balances. Formula first, then ids and names (docs/import.md).

use super::sbml::Species;

/// What a species is for the import.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// H+: left out of reactions, counted as `protons`.
    Proton,
    /// Water: the solvent.
    Water,
    /// A carrier (science.md §11): role = "currency".
    Currency,
    /// Anything else: mass-balanced along the route.
    Other,
}

/// Base ids (compartment suffix removed) of carriers, after science.md §11
/// (common practice): adenine, guanine, uracil and cytosine nucleotides,
/// NAD(P)(H), FAD(H2), quinones and quinols, phosphate, diphosphate, CoA.
pub const CURRENCY_IDS: &[&str] = &[
    "atp", "adp", "amp", "gtp", "gdp", "utp", "udp", "ctp", "cdp", "nad", "nadh", "nadp", "nadph",
    "fad", "fadh2", "q8", "q8h2", "q9", "q9h2", "q10", "q10h2", "mqn8", "mql8", "2dmmq8",
    "2dmmql8", "pi", "ppi", "coa",
];

/// Full names (lower case) that mark a carrier when the id does not.
const CURRENCY_NAMES: &[&str] = &[
    "nad+",
    "nadp+",
    "phosphate",
    "orthophosphate",
    "diphosphate",
    "pyrophosphate",
    "coenzyme a",
    "nicotinamide adenine dinucleotide",
    "nicotinamide adenine dinucleotide - reduced",
    "nicotinamide adenine dinucleotide phosphate",
    "nicotinamide adenine dinucleotide phosphate - reduced",
    "flavin adenine dinucleotide oxidized",
    "flavin adenine dinucleotide reduced",
    "ubiquinone-8",
    "ubiquinol-8",
    "menaquinone 8",
    "menaquinol 8",
    "menaquinone-8",
    "menaquinol-8",
];

/// The species id without its compartment suffix (`atp_c` in compartment `c`
/// -> `atp`; a suffix of one or two letters or digits comes off otherwise).
pub fn base_id(s: &Species) -> &str {
    if !s.compartment.is_empty()
        && let Some(b) = s.id.strip_suffix(s.compartment.as_str())
        && let Some(b) = b.strip_suffix('_')
        && !b.is_empty()
    {
        return b;
    }
    // Models whose compartment ids are words (`Cytosol`) still end species
    // ids with a short code (`atp_c`).
    match s.id.rsplit_once('_') {
        Some((b, code))
            if !b.is_empty()
                && (1..=2).contains(&code.len())
                && code.chars().all(|c| c.is_ascii_alphanumeric()) =>
        {
            b
        }
        _ => &s.id,
    }
}

/// Classifies a species by its formula, charge, id and name (rules in docs/import.md).
pub fn classify(s: &Species) -> Kind {
    let base = base_id(s).to_ascii_lowercase();
    let formula = s.formula.as_deref().map(str::trim);
    let proton = match formula {
        Some("H") => s.charge.is_none_or(|c| c == 1.0),
        Some(_) => false,
        None => base == "h" || s.name == "H+",
    };
    if proton {
        return Kind::Proton;
    }
    let water = match formula {
        Some(f) => f == "H2O" || f == "OH2",
        None => base == "h2o" || s.name.eq_ignore_ascii_case("water"),
    };
    if water {
        return Kind::Water;
    }
    let name = s.name.trim().to_ascii_lowercase();
    let first_word = name.split_whitespace().next().unwrap_or("");
    if CURRENCY_IDS.contains(&base.as_str())
        || CURRENCY_NAMES.contains(&name.as_str())
        || CURRENCY_IDS.contains(&first_word)
    {
        return Kind::Currency;
    }
    Kind::Other
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sp(id: &str, name: &str, formula: Option<&str>, charge: Option<f64>) -> Species {
        Species {
            id: id.into(),
            sbml_id: format!("M_{id}"),
            name: name.into(),
            compartment: "c".into(),
            formula: formula.map(str::to_string),
            charge,
            boundary: false,
        }
    }

    #[test]
    fn protons_water_and_carriers() {
        assert_eq!(
            classify(&sp("h_c", "H+", Some("H"), Some(1.0))),
            Kind::Proton
        );
        assert_eq!(classify(&sp("h_c", "", None, None)), Kind::Proton);
        // Formula H with charge 0 is not H+.
        assert_eq!(
            classify(&sp("hx_c", "hydrogen atom", Some("H"), Some(0.0))),
            Kind::Other
        );
        assert_eq!(
            classify(&sp("h2o_c", "H2O H2O", Some("H2O"), Some(0.0))),
            Kind::Water
        );
        assert_eq!(classify(&sp("wat_c", "water", None, None)), Kind::Water);
        assert_eq!(
            classify(&sp("atp_c", "ATP C10H12N5O13P3", None, None)),
            Kind::Currency
        );
        assert_eq!(
            classify(&sp(
                "m1_c",
                "Nicotinamide adenine dinucleotide - reduced",
                None,
                None
            )),
            Kind::Currency
        );
        assert_eq!(
            classify(&sp("m2_c", "Coenzyme A", None, None)),
            Kind::Currency
        );
        assert_eq!(
            classify(&sp("accoa_c", "Acetyl-CoA", None, None)),
            Kind::Other
        );
        assert_eq!(
            classify(&sp("q8h2_c", "Ubiquinol-8", None, None)),
            Kind::Currency
        );
        assert_eq!(
            classify(&sp("g6p_c", "D-Glucose 6-phosphate", None, None)),
            Kind::Other
        );
    }

    #[test]
    fn compartment_suffix_comes_off_the_id() {
        assert_eq!(base_id(&sp("atp_c", "", None, None)), "atp");
        let mut s = sp("pi_p", "", None, None);
        s.compartment = "Periplasm".into();
        assert_eq!(base_id(&s), "pi");
        s.id = "coa".into();
        assert_eq!(base_id(&s), "coa");
        s.id = "glc__D_ext".into();
        assert_eq!(base_id(&s), "glc__D_ext");
    }
}
