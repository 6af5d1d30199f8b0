//! Any text given as the import's dg0 or concentration table: either a table
//! whose values are all finite (concentrations positive) or an error that
//! names the file; nothing may panic.
#![no_main]

use dgpath::import::tables;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match tables::read_dg0(text, "dg0.csv") {
        Ok(t) => {
            let _ = format!("{t:?}");
        }
        Err(e) => assert!(e.to_string().contains("dg0.csv"), "{e}"),
    }
    match tables::read_conc(text, "conc.csv") {
        Ok(t) => {
            let _ = format!("{t:?}");
        }
        Err(e) => assert!(e.to_string().contains("conc.csv"), "{e}"),
    }
});
