//! Any text given as a quantity, for every kind: the parser either explains
//! what is wrong or returns a finite value; a concentration printed in a
//! human unit parses back to within the three significant figures printed.
#![no_main]

use dgpath::model::units::{self, Kind};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    for kind in [
        Kind::Energy,
        Kind::Concentration,
        Kind::Temperature,
        Kind::IonicStrength,
    ] {
        match units::parse(text, kind) {
            Ok(v) => {
                assert!(v.is_finite(), "{text:?} as {kind:?} gave {v}");
                if kind == Kind::Concentration && v >= 1e-300 {
                    for ascii in [true, false] {
                        let shown = units::format_conc(v, ascii);
                        let back =
                            units::parse(&shown, kind).expect("printed concentrations parse");
                        assert!(
                            (back - v).abs() <= 5e-3 * v,
                            "{v} printed as {shown:?} read back as {back}"
                        );
                    }
                }
            }
            Err(m) => assert!(!m.to_string().is_empty()),
        }
    }
});
