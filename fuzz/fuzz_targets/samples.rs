//! Any bytes given as a samples table for the bundled demo: every row is
//! either a sample whose concentrations are all positive and finite, or an
//! error with a message that names the place; nothing may panic.
#![no_main]

use dgpath::model::{self, samples::SampleReader};
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(p) = model::load_str(dgpath::DEMO, "demo.toml") else {
        return;
    };
    let base: Vec<f64> = p
        .compounds
        .iter()
        .map(|c| c.conc.unwrap_or(1.0))
        .collect();
    let reader = match SampleReader::new(data, "fuzz.csv", &p, &base) {
        Ok(r) => r,
        Err(e) => {
            assert!(!e.to_string().is_empty());
            return;
        }
    };
    for row in reader.take(1000) {
        match row {
            Ok(s) => assert!(
                s.conc.iter().all(|c| c.is_finite() && *c > 0.0),
                "a sample with a concentration that is not positive and finite"
            ),
            Err(e) => assert!(e.to_string().contains("fuzz.csv")),
        }
    }
});
