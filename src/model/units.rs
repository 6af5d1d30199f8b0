//! Numbers with units, as people write them in pathway files and on the
//! command line: energies, concentrations, temperatures and ionic strength.
//! Everything is converted to SI (J/mol, mol/L, K) here and nowhere else.

use super::pathway::shorten;

/// A quantity kind, for messages and for choosing the default unit of a bare number.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// Energy per mole; bare numbers are kJ/mol.
    Energy,
    /// Concentration; bare numbers are mM.
    Concentration,
    /// Temperature; a unit is required.
    Temperature,
    /// Ionic strength; bare numbers are M.
    IonicStrength,
}

impl Kind {
    /// An example a person could write, used in messages.
    pub fn example(self) -> &'static str {
        match self {
            Kind::Energy => "\"-16.7 kJ/mol\"",
            Kind::Concentration => "\"80 uM\"",
            Kind::Temperature => "\"30 C\"",
            Kind::IonicStrength => "\"0.15 M\"",
        }
    }

    /// The units this kind accepts, for messages.
    pub fn units(self) -> &'static str {
        match self {
            Kind::Energy => "kJ/mol, kcal/mol or J/mol",
            Kind::Concentration => "M, mM, uM (or µM), nM or pM (mol/L, mmol/L, umol/L ... too)",
            Kind::Temperature => "C (or °C) or K",
            Kind::IonicStrength => "M or mM (mol/L, mmol/L)",
        }
    }
}

/// Length of the longest prefix of `b` that is a decimal number:
/// `[+-] digits [. digits] [(e|E) [+-] digits]` with at least one digit
/// before the exponent. One pass, so a long string costs linear time.
fn number_len(b: &[u8]) -> usize {
    let digits = |mut i: usize| {
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        i
    };
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let int_end = digits(i);
    let mut end = int_end;
    let mut any = int_end > i;
    if end < b.len() && b[end] == b'.' {
        let frac_end = digits(end + 1);
        any |= frac_end > end + 1;
        end = frac_end;
    }
    if !any {
        return 0;
    }
    if end < b.len() && (b[end] == b'e' || b[end] == b'E') {
        let mut j = end + 1;
        if j < b.len() && (b[j] == b'+' || b[j] == b'-') {
            j += 1;
        }
        let exp_end = digits(j);
        if exp_end > j {
            end = exp_end;
        }
    }
    end
}

/// Why a quantity could not be read; the message says what to write instead.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum UnitError {
    /// The number itself overflows (text shortened for the message).
    #[error("'{0}' is too large to work with")]
    NumberTooLarge(String),
    /// The text does not start with a number.
    #[error("'{0}' does not start with a number")]
    NotANumber(String),
    /// The number is fine but the value in SI overflows.
    #[error("'{text}' is too large to work with; write e.g. {example}")]
    ValueTooLarge {
        /// The text as written, shortened.
        text: String,
        /// An example of the kind.
        example: &'static str,
    },
    /// A unit this kind does not know.
    #[error("unknown unit '{unit}'; use {units}")]
    UnknownUnit {
        /// The unit as written, shortened.
        unit: String,
        /// The units the kind accepts.
        units: &'static str,
    },
    /// "1,5 mM": the number stopped at a decimal comma.
    #[error(
        "a decimal comma is not read: write the number with a decimal point (\"1.5 mM\", not \"1,5 mM\")"
    )]
    DecimalComma,
    /// A temperature without a unit; both readings are offered.
    #[error("a temperature needs a unit: write \"{celsius} C\" or \"{kelvin} K\"")]
    TemperatureWithoutUnit {
        /// The number read as °C.
        celsius: String,
        /// The number read as °C, in K.
        kelvin: String,
    },
}

/// Splits "12.5 mM" into the number and the unit text (which may be empty).
fn split(text: &str) -> Result<(f64, &str), UnitError> {
    let t = text.trim();
    // The longest prefix that is a number is the number ("inf" and "nan" are not).
    let n = number_len(t.as_bytes());
    match t[..n].parse::<f64>() {
        Ok(v) if n > 0 && v.is_finite() => Ok((v, t[n..].trim())),
        Ok(_) if n > 0 => Err(UnitError::NumberTooLarge(shorten(t))),
        _ => Err(UnitError::NotANumber(shorten(t))),
    }
}

/// Parses a quantity given as text; `Ok` holds the SI value.
pub fn parse(text: &str, kind: Kind) -> Result<f64, UnitError> {
    let (v, unit) = split(text)?;
    let unit_l = unit.replace(' ', "");
    let si = match kind {
        Kind::Energy => match unit_l.as_str() {
            "" | "kJ/mol" | "kj/mol" | "kJmol-1" | "kJ" => v * 1e3,
            "kcal/mol" | "kcal" => v * 4184.0,
            "J/mol" | "j/mol" | "J" => v,
            _ => return Err(unknown_unit(unit, kind)),
        },
        Kind::Concentration => v / conc_divisor(&unit_l).ok_or_else(|| unknown_unit(unit, kind))?,
        Kind::IonicStrength => match unit_l.as_str() {
            "" | "M" | "mol/L" | "mol/l" => v,
            "mM" | "mmol/L" | "mmol/l" => v / 1e3,
            _ => return Err(unknown_unit(unit, kind)),
        },
        Kind::Temperature => match unit_l.as_str() {
            "C" | "°C" | "degC" | "ºC" => v + 273.15,
            "K" => v,
            "" => {
                return Err(UnitError::TemperatureWithoutUnit {
                    celsius: v.to_string(),
                    kelvin: fmt_num(v + 273.15),
                });
            }
            _ => return Err(unknown_unit(unit, kind)),
        },
    };
    if !si.is_finite() {
        return Err(UnitError::ValueTooLarge {
            text: shorten(text.trim()),
            example: kind.example(),
        });
    }
    Ok(si)
}

/// How many of a concentration unit make 1 mol/L (the empty unit is mM).
/// Dividing by an exact power of ten keeps "80 uM" exactly 8e-5.
pub fn conc_divisor(unit: &str) -> Option<f64> {
    Some(match unit {
        "M" | "mol/L" | "mol/l" => 1.0,
        "" | "mM" | "mmol/L" | "mmol/l" => 1e3,
        "uM" | "µM" | "μM" | "umol/L" | "µmol/L" | "μmol/L" | "umol/l" | "µmol/l" | "μmol/l" => {
            1e6
        }
        "nM" | "nmol/L" | "nmol/l" => 1e9,
        "pM" | "pmol/L" | "pmol/l" => 1e12,
        _ => return None,
    })
}

/// Parses a bare number (from a TOML integer or float) in the kind's default unit.
pub fn from_number(v: f64, kind: Kind) -> Result<f64, UnitError> {
    match kind {
        Kind::Energy => Ok(v * 1e3),
        Kind::Concentration => Ok(v / 1e3),
        Kind::IonicStrength => Ok(v),
        Kind::Temperature => Err(UnitError::TemperatureWithoutUnit {
            celsius: fmt_num(v),
            kelvin: fmt_num(v + 273.15),
        }),
    }
}

fn unknown_unit(unit: &str, kind: Kind) -> UnitError {
    // "1,5 mM": the number stopped at the comma.
    if let Some(rest) = unit.strip_prefix(',')
        && rest.starts_with(|c: char| c.is_ascii_digit())
    {
        return UnitError::DecimalComma;
    }
    UnitError::UnknownUnit {
        unit: shorten(unit),
        units: kind.units(),
    }
}

fn fmt_num(v: f64) -> String {
    let s = format!("{v:.4}");
    let s = s.trim_end_matches('0').trim_end_matches('.');
    s.to_string()
}

/// Formats a concentration in the unit a person would write (83 µM, 1.8 mM, 12 nM).
pub fn format_conc(m: f64, ascii: bool) -> String {
    let micro = if ascii { "uM" } else { "µM" };
    let (v, u) = if m >= 0.1 {
        (m, "M")
    } else if m >= 1e-4 {
        (m * 1e3, "mM")
    } else if m >= 1e-7 {
        (m * 1e6, micro)
    } else if m >= 1e-10 {
        (m * 1e9, "nM")
    } else {
        (m * 1e12, "pM")
    };
    format!("{} {u}", sig3(v))
}

/// Three significant figures without trailing zeros: 83, 1.8, 0.125, 2500.
pub fn sig3(v: f64) -> String {
    if v == 0.0 || !v.is_finite() {
        return format!("{v}");
    }
    let mag = v.abs().log10().floor() as i32;
    let decimals = (2 - mag).max(0) as usize;
    let s = format!("{v:.decimals$}");
    if s.contains('.') {
        s.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn per_litre_units_read_as_molar_ones() {
        for (text, m) in [
            ("2 mol/L", 2.0),
            ("1.5 mmol/L", 1.5e-3),
            ("80 umol/L", 8e-5),
            ("80 µmol/L", 8e-5),
            ("12 nmol/L", 1.2e-8),
            ("3 pmol/l", 3e-12),
        ] {
            assert_eq!(parse(text, Kind::Concentration).unwrap(), m, "{text}");
        }
        assert_eq!(parse("150 mmol/L", Kind::IonicStrength).unwrap(), 0.15);
    }

    #[test]
    fn a_decimal_comma_gets_a_message_that_says_so() {
        let e = parse("1,5 mM", Kind::Concentration)
            .unwrap_err()
            .to_string();
        assert!(e.contains("decimal point") && e.contains("1.5 mM"), "{e}");
    }

    #[test]
    fn energies_default_to_kj_per_mol() {
        assert_eq!(parse("-16.7", Kind::Energy).unwrap(), -16700.0);
        assert_eq!(parse("-16.7 kJ/mol", Kind::Energy).unwrap(), -16700.0);
        assert_eq!(parse("-4kcal/mol", Kind::Energy).unwrap(), -16736.0);
        assert_eq!(parse("250 J/mol", Kind::Energy).unwrap(), 250.0);
        assert_eq!(from_number(2.5, Kind::Energy).unwrap(), 2500.0);
    }

    #[test]
    fn concentrations_in_every_unit() {
        let close = |a: f64, b: f64| (a - b).abs() <= 1e-15 * b.abs().max(1e-30);
        assert!(close(parse("80 uM", Kind::Concentration).unwrap(), 80e-6));
        assert!(close(parse("80 µM", Kind::Concentration).unwrap(), 80e-6));
        assert!(close(parse("1.8mM", Kind::Concentration).unwrap(), 1.8e-3));
        assert!(close(parse("2e-3 M", Kind::Concentration).unwrap(), 2e-3));
        assert!(close(parse("5 nM", Kind::Concentration).unwrap(), 5e-9));
        assert!(close(parse("7 pM", Kind::Concentration).unwrap(), 7e-12));
        assert!(close(parse("3", Kind::Concentration).unwrap(), 3e-3));
    }

    #[test]
    fn temperature_needs_a_unit() {
        assert!((parse("30 C", Kind::Temperature).unwrap() - 303.15).abs() < 1e-12);
        assert!((parse("37°C", Kind::Temperature).unwrap() - 310.15).abs() < 1e-12);
        assert_eq!(parse("303.15 K", Kind::Temperature).unwrap(), 303.15);
        let e = parse("30", Kind::Temperature).unwrap_err().to_string();
        assert!(e.contains("\"30 C\""), "{e}");
        assert!(from_number(30.0, Kind::Temperature).is_err());
    }

    #[test]
    fn bad_units_and_numbers_are_explained() {
        let e = parse("5 mmol", Kind::Concentration)
            .unwrap_err()
            .to_string();
        assert!(e.contains("unknown unit 'mmol'") && e.contains("uM"), "{e}");
        let e = parse("lots", Kind::Concentration).unwrap_err().to_string();
        assert!(e.contains("does not start with a number"), "{e}");
        assert!(parse("inf mM", Kind::Concentration).is_err());
    }

    #[test]
    fn ionic_strength_in_m_or_mm() {
        assert_eq!(parse("0.15 M", Kind::IonicStrength).unwrap(), 0.15);
        assert!((parse("150 mM", Kind::IonicStrength).unwrap() - 0.15).abs() < 1e-15);
    }

    #[test]
    fn concentrations_print_in_a_human_unit() {
        assert_eq!(format_conc(83e-6, false), "83 µM");
        assert_eq!(format_conc(1.8e-3, true), "1.8 mM");
        assert_eq!(format_conc(0.5, true), "0.5 M");
        assert_eq!(format_conc(12e-9, true), "12 nM");
        assert_eq!(format_conc(1.25e-4, true), "0.125 mM");
    }
}
