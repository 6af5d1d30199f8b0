//! Any bytes given as an SBML model: reading either fails with a message or
//! succeeds; a model that reads is listed, and its first reactions are
//! imported as a route (which may be refused with a message) and the written
//! file is given to the loader. Nothing on the way may panic.
#![no_main]

use dgpath::import::{self, Options, sbml};
use dgpath::model;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let text = match sbml::decode(data, "fuzz.xml") {
        Ok(t) => t,
        Err(e) => {
            assert!(!e.to_string().is_empty());
            return;
        }
    };
    let m = match sbml::parse(&text, "fuzz.xml") {
        Ok(m) => m,
        Err(e) => {
            assert!(!e.0.message.is_empty(), "a failed read must say why");
            return;
        }
    };
    let _ = import::list(&m, Some("a"));
    for n in 1..=3.min(m.reactions.len()) {
        let opts = Options {
            route: m.reactions[..n].iter().map(|r| r.id.clone()).collect(),
            ..Options::default()
        };
        match import::import(&m, "fuzz.xml", &opts) {
            Ok(out) => {
                if let Err(e) = model::load_str(&out.text, "out.toml") {
                    assert!(!e.problems.is_empty());
                }
            }
            Err(e) => assert!(!e.0.message.is_empty(), "a refused import must say why"),
        }
    }
});
