//! One checker for every value a person gives: a field of the pathway file,
//! a command-line option (`--set`, `--temperature`, `--ph`,
//! `--ionic-strength`) and a value typed in the explorer all go through these
//! functions, so they share one set of plausibility limits and one wording.
//! The limits are written down for users in `docs/format.md`.

use super::units::{self, Kind, UnitError};

/// Why a value was refused; the message states the limit and what to write
/// instead.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CheckError {
    /// The text could not be read as a quantity.
    #[error(transparent)]
    Unit(#[from] UnitError),
    /// A temperature outside liquid water (the value as shown).
    #[error(
        "{0} is outside 0–100 °C (273.15–373.15 K), where water is liquid; write e.g. \"30 C\""
    )]
    Temperature(String),
    /// An ionic strength outside 0–1 M (the value as shown).
    #[error("{0} is outside 0–1 M; cytosol is about 0.15–0.25 M: write e.g. \"0.2 M\"")]
    IonicStrength(String),
    /// A concentration outside 1 fM–10 M (the value as shown).
    #[error(
        "{0} is outside 1 fM–10 M, the range of anything dissolved in a cell; write e.g. \"1 mM\""
    )]
    Concentration(String),
    /// An energy beyond ±3000 kJ/mol (the value as shown).
    #[error(
        "{0} is beyond ±3000 kJ/mol, more than any one step of metabolism releases; write e.g. \"-16.7 kJ/mol\""
    )]
    Energy(String),
    /// A concentration typed as zero or less (the text, shortened).
    #[error(
        "'{0}' is not above zero; write a small positive value such as \"1 nM\" for a trace compound"
    )]
    NotPositive(String),
    /// A stepped concentration that reached zero.
    #[error("a concentration must stay above zero")]
    StepToZero,
    /// A pH outside 0–14 (the value as shown).
    #[error("pH {0} is outside 0–14; write e.g. 7.0")]
    Ph(String),
    /// A pH that is not a number (the text, shortened).
    #[error("pH '{0}' is not a number; write e.g. 7.2")]
    PhNotANumber(String),
}

/// Lowest temperature accepted, in K (0 °C: liquid water).
pub const MIN_TEMPERATURE: f64 = 273.15;
/// Highest temperature accepted, in K (100 °C: liquid water at 1 atm).
pub const MAX_TEMPERATURE: f64 = 373.15;
/// Highest ionic strength accepted, in mol/L. The extended Debye–Hückel
/// form is used up to about 0.3 M (a warning above that); beyond 1 M it
/// means nothing at all.
pub const MAX_IONIC_STRENGTH: f64 = 1.0;
/// Lowest concentration accepted, in mol/L (1 fM: far below one molecule
/// in a bacterial cell).
pub const MIN_CONCENTRATION: f64 = 1e-15;
/// Highest concentration accepted, in mol/L.
pub const MAX_CONCENTRATION: f64 = 10.0;
/// Largest standard Gibbs energy (or enthalpy) of one step accepted, in
/// J/mol: the full oxidation of a hexose, about −2,900 kJ/mol (from
/// memory), is near the top of what one written step can carry.
pub const MAX_ENERGY: f64 = 3.0e6;
/// Lowest and highest pH accepted.
pub const PH_RANGE: (f64, f64) = (0.0, 14.0);

/// Checks a value already in SI units against the limits of its kind;
/// `Err` says the limit and what to write instead.
pub fn plausible(si: f64, kind: Kind) -> Result<f64, CheckError> {
    let ok = match kind {
        Kind::Temperature => (MIN_TEMPERATURE..=MAX_TEMPERATURE).contains(&si),
        Kind::IonicStrength => (0.0..=MAX_IONIC_STRENGTH).contains(&si),
        // Zero and negative concentrations have their own message (a
        // solvent may state none); only what is positive is held to range.
        Kind::Concentration => si <= 0.0 || (MIN_CONCENTRATION..=MAX_CONCENTRATION).contains(&si),
        Kind::Energy => si.abs() <= MAX_ENERGY,
    };
    if ok && si.is_finite() {
        return Ok(si);
    }
    let shown = show(si, kind);
    Err(match kind {
        Kind::Temperature => CheckError::Temperature(shown),
        Kind::IonicStrength => CheckError::IonicStrength(shown),
        Kind::Concentration => CheckError::Concentration(shown),
        Kind::Energy => CheckError::Energy(shown),
    })
}

/// Parses a quantity with its unit and checks it against its limits.
pub fn quantity(text: &str, kind: Kind) -> Result<f64, CheckError> {
    plausible(units::parse(text, kind)?, kind)
}

/// Parses a concentration that must be positive ("2.5 mM", "80 uM", "0.5").
pub fn concentration(text: &str) -> Result<f64, CheckError> {
    let c = quantity(text, Kind::Concentration)?;
    if c <= 0.0 {
        return Err(CheckError::NotPositive(super::pathway::shorten(
            text.trim(),
        )));
    }
    Ok(c)
}

/// Checks a concentration already in mol/L (a stepped value in the explorer).
pub fn concentration_si(c: f64) -> Result<f64, CheckError> {
    if c > 0.0 {
        plausible(c, Kind::Concentration)
    } else {
        Err(CheckError::StepToZero)
    }
}

/// Checks a pH value.
pub fn ph(value: f64) -> Result<f64, CheckError> {
    if value.is_finite() && (PH_RANGE.0..=PH_RANGE.1).contains(&value) {
        Ok(value)
    } else {
        let shown = if value.is_finite() && value.abs() < 1e6 {
            units::sig3(value)
        } else {
            format!("{value:.3e}")
        };
        Err(CheckError::Ph(shown))
    }
}

/// Parses and checks a pH typed as text ("7.2").
pub fn ph_text(text: &str) -> Result<f64, CheckError> {
    let t = text.trim();
    let v: f64 = t
        .parse()
        .map_err(|_| CheckError::PhNotANumber(super::pathway::shorten(t)))?;
    ph(v)
}

/// A value in the unit a person reads, scientific notation when very large
/// or small (never a 310-digit integer).
fn show(si: f64, kind: Kind) -> String {
    let (v, unit) = match kind {
        Kind::Temperature => (si - 273.15, "°C"),
        Kind::IonicStrength => (si, "M"),
        Kind::Concentration => (si, "M"),
        Kind::Energy => (si / 1e3, "kJ/mol"),
    };
    let a = v.abs();
    if v != 0.0 && !(1e-3..1e6).contains(&a) {
        format!("{v:.3e} {unit}")
    } else {
        format!("{} {unit}", units::sig3(v))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_inside_the_limits_pass_unchanged() {
        assert_eq!(quantity("30 C", Kind::Temperature), Ok(303.15));
        assert_eq!(quantity("0.2 M", Kind::IonicStrength), Ok(0.2));
        assert_eq!(concentration("2.5 mM"), Ok(2.5e-3));
        assert_eq!(quantity("-16.7", Kind::Energy), Ok(-16700.0));
        assert_eq!(ph_text("7.2"), Ok(7.2));
    }

    #[test]
    fn absurd_values_are_refused_with_the_limit_in_the_message() {
        let e = concentration("1e308 M").unwrap_err().to_string();
        assert!(e.contains("1 fM–10 M") && e.contains("1.000e308 M"), "{e}");
        let e = quantity("-1e6 kJ/mol", Kind::Energy)
            .unwrap_err()
            .to_string();
        assert!(e.contains("3000 kJ/mol") && e.contains("-1.000e6"), "{e}");
        assert!(
            concentration("1e-30 M")
                .unwrap_err()
                .to_string()
                .contains("1.000e-30 M")
        );
        assert!(
            quantity("1000 K", Kind::Temperature)
                .unwrap_err()
                .to_string()
                .contains("0–100 °C")
        );
        assert!(
            quantity("2 M", Kind::IonicStrength)
                .unwrap_err()
                .to_string()
                .contains("0–1 M")
        );
        assert!(ph_text("15").unwrap_err().to_string().contains("0–14"));
        assert!(
            ph_text("seven")
                .unwrap_err()
                .to_string()
                .contains("not a number")
        );
        assert!(
            concentration("0 mM")
                .unwrap_err()
                .to_string()
                .contains("not above zero")
        );
    }

    #[test]
    fn the_limits_themselves_are_accepted() {
        assert!(quantity("0 C", Kind::Temperature).is_ok());
        assert!(quantity("100 C", Kind::Temperature).is_ok());
        assert!(concentration("10 M").is_ok());
        assert!(concentration("1e-15 M").is_ok());
        assert!(quantity("-3000 kJ/mol", Kind::Energy).is_ok());
    }
}
