//! Any text given as a pathway file: loading either fails with at least one
//! problem that has a message, or succeeds; a loaded file is prepared, and a
//! prepared one is analysed both ways (or refused for overflow) and rendered
//! in every report format. Nothing on the way may panic.
#![no_main]

use dgpath::analysis::{self, Direction};
use dgpath::model;
use dgpath::report::{self, EnergyUnit, TextOptions};
use dgpath::scenario::State;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let pathway = match model::load_str(text, "fuzz.toml") {
        Ok(p) => p,
        Err(e) => {
            assert!(!e.problems.is_empty(), "a failed load must say why");
            assert!(e.problems.iter().all(|p| !p.message.is_empty()));
            let _ = e.to_string();
            return;
        }
    };
    let prep = match analysis::prepare(pathway) {
        Ok(p) => p,
        Err(e) => {
            assert!(!e.problems.is_empty(), "a failed prepare must say why");
            return;
        }
    };
    let mut state = State::from_pathway(&prep.pathway);
    for direction in [Direction::Forward, Direction::Reverse] {
        state.direction = direction;
        if direction == Direction::Reverse && prep.reverse.is_err() {
            assert!(analysis::analyze(&prep, &state).is_err());
            continue;
        }
        let a = match analysis::analyze(&prep, &state) {
            Ok(a) => a,
            Err(e) => {
                // Only overflow may stop a prepared route from analysing.
                assert!(e.message.contains("finite number"), "{e}");
                continue;
            }
        };
        assert!(
            a.steps.iter().chain(&a.side).all(|s| s.dg.is_finite()),
            "non-finite dG' passed the guard"
        );
        assert_eq!(
            a.steps.len(),
            prep.route(direction).map(|r| r.steps.len()).unwrap_or(0)
        );
        let _ = report::json_value(&prep, &state, &a, EnergyUnit::KJ).to_string();
        let _ = report::table(
            &prep,
            &state,
            &a,
            TextOptions {
                unit: EnergyUnit::Kcal,
                color: true,
                ascii: true,
            },
        );
        let _ = report::csv(&prep, &a, EnergyUnit::KJ);
        let _ = report::markdown(&prep, &state, &a, EnergyUnit::KJ);
    }
});
