//! Inputs that once crashed, hung or misled dgpath, and edge cases found by
//! thinking like a fuzzer, kept as files under tests/regressions/ or built
//! here. Each must give a clear error (or a correct result), never a panic.

use dgpath::analysis::{self, Direction};
use dgpath::model::units::{self, Kind};
use dgpath::model::{self, reaction};
use dgpath::scenario::State;
use std::path::PathBuf;

fn fixture(name: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/regressions")
        .join(name)
}

/// Loads text and returns every problem as one string (load, then prepare).
fn load_problems(text: &str) -> String {
    match model::load_str(text, "r.toml") {
        Err(e) => e.to_string(),
        Ok(p) => match analysis::prepare(p) {
            Err(e) => e.to_string(),
            Ok(_) => String::new(),
        },
    }
}

const SMALL: &str = "format = 1\n[pathway]\nname = \"t\"\n[conditions]\ntemperature = \"30 C\"\n[compounds]\na = { conc = \"1 mM\" }\nb = { conc = \"1 mM\" }\n[[steps]]\nid = \"s1\"\nreaction = \"a -> b\"\ndg0 = -5\n";

#[test]
fn energy_that_overflows_is_refused_not_infinite() {
    // Found by the units fuzz target: "1e308" is a finite number of kJ/mol,
    // but 1e311 J/mol is not, and parse returned Ok(inf).
    let text = std::fs::read_to_string(fixture("units-energy-overflow.txt")).unwrap();
    let e = units::parse(&text, Kind::Energy).unwrap_err().to_string();
    assert!(
        e.contains("'1e308' is too large") && e.contains("kJ/mol"),
        "{e}"
    );
    assert!(units::parse(&text, Kind::Concentration).is_ok_and(|v| v == 1e305));
    assert!(
        units::parse("1e400 mM", Kind::Concentration)
            .unwrap_err()
            .to_string()
            .contains("too large")
    );
    let file = SMALL.replace("dg0 = -5", "dg0 = \"1e308 kcal/mol\"");
    assert!(
        load_problems(&file).contains("r.toml:12: step 's1'.dg0: '1e308 kcal/mol' is too large"),
        "{}",
        load_problems(&file)
    );
}

#[test]
fn overflowing_protons_give_an_error_not_nan() {
    let prep =
        analysis::prepare(model::load_file(&fixture("overflowing-protons.toml")).unwrap()).unwrap();
    let e = analysis::analyze(&prep, &State::from_pathway(&prep.pathway)).unwrap_err();
    assert_eq!(e.line, Some(12), "the line of its [[steps]] header");
    assert!(
        e.message
            .contains("step 's1': dG' does not come out as a finite number"),
        "{e}"
    );
    // Through the binary: exit 1 with the message, no inf in sight.
    let out = crate::support::dgpath()
        .args(["report", "--format", "json"])
        .arg(fixture("overflowing-protons.toml"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(
        err.contains("overflowing-protons.toml:12: step 's1'"),
        "{err}"
    );
    assert!(out.stdout.is_empty());
}

#[test]
fn temperature_and_ph_out_of_range_are_refused() {
    let e = model::load_file(&fixture("hot.toml"))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("hot.toml:6: conditions.temperature: 1.000e308 °C is outside 0–100 °C"),
        "{e}"
    );
    let e = model::load_file(&fixture("ph-out-of-range.toml"))
        .unwrap_err()
        .to_string();
    assert!(
        e.contains("ph-out-of-range.toml:7: conditions.ph: pH") && e.contains("is outside 0–14"),
        "{e}"
    );
    let e = load_problems(&SMALL.replace(
        "temperature = \"30 C\"",
        "temperature = \"30 C\"\nreference_ph = -1",
    ));
    assert!(
        e.contains("conditions.reference_ph: pH -1 is outside 0–14"),
        "{e}"
    );
}

#[test]
fn zero_or_negative_turns_are_explained() {
    for (f, turns) in [("zero-turns.toml", "0"), ("negative-turns.toml", "-3")] {
        let p = model::load_file(&fixture(f)).unwrap();
        let e = analysis::prepare(p).unwrap_err().to_string();
        assert!(
            e.contains("cannot be balanced on the forward route"),
            "{f}: {e}"
        );
        assert!(
            e.contains(&format!(
                "step 's1' would have to make {turns} turns per pass"
            )),
            "{f}: {e}"
        );
    }
}

#[test]
fn syntax_errors_next_to_multibyte_text_keep_their_place() {
    // Error positions from the TOML parser may fall inside a multi-byte
    // character; the line and column must still come out without a panic.
    for text in [
        "é",
        "a = é",
        "format = 1\nname = \"µ\n",
        "[pathway]\nµ = ",
        "x = 'ü\u{1F600}",
        "\u{1F600} = 1",
    ] {
        let e = model::load_str(text, "r.toml").unwrap_err();
        assert!(
            e.problems.iter().all(|p| p.line.is_some_and(|l| l >= 1)),
            "{text:?}: {e}"
        );
    }
}

#[test]
fn a_very_long_number_is_read_in_one_pass_and_refused() {
    // 200 000 digits: reading every prefix as a number used to take
    // quadratic time; the value is too large for a float anyway.
    let digits = "7".repeat(200_000);
    let e = load_problems(&SMALL.replace(
        "a = { conc = \"1 mM\" }",
        &format!("a = {{ conc = \"{digits} mM\" }}"),
    ));
    assert!(
        e.contains(
            "r.toml:7: compound 'a'.conc: '7777777777777777777777777777777777777777…' is too large"
        ),
        "{}",
        &e[..e.len().min(300)]
    );
    let e = load_problems(&SMALL.replace(
        "a = { conc = \"1 mM\" }",
        &format!("a = {{ conc = \"0.{digits} mM\" }}"),
    ));
    assert!(e.is_empty(), "{}", &e[..e.len().min(300)]);
}

#[test]
fn deeply_nested_toml_is_refused() {
    let deep = format!("format = 1\nx = {}{}\n", "[".repeat(5000), "]".repeat(5000));
    let e = load_problems(&deep);
    assert!(e.contains("TOML syntax error"), "{e}");
    let deep = format!(
        "format = 1\nx = {}1{}\n",
        "{ a = ".repeat(5000),
        " }".repeat(5000)
    );
    assert!(load_problems(&deep).contains("TOML syntax error"));
}

#[test]
fn very_long_ids_and_unicode_names_load() {
    let id = format!("c{}", "x".repeat(100_000));
    let text = SMALL
        .replace(
            "a = { conc",
            &format!("{id} = {{ name = \"Glucose (α-D) 🍬\", conc"),
        )
        .replace("\"a -> b\"", &format!("\"{id} -> b\""));
    let p = model::load_str(&text, "r.toml").unwrap();
    assert_eq!(p.compounds[0].id, id);
    assert_eq!(p.compounds[0].name, "Glucose (α-D) 🍬");
    let e = load_problems(
        &text
            .replace(&format!("{id} = "), "\"ü\" = ")
            .replace(&id, "ü"),
    );
    assert!(e.contains("compound id 'ü' is not valid"), "{e}");
}

#[test]
fn repeated_terms_on_one_side_add_up() {
    // "a + a -> b" is read as "2 a -> b", not as an error or two entries.
    let eq = reaction::parse("a + a -> b").unwrap();
    assert_eq!(eq.left.len(), 2);
    let one = model::load_str(&SMALL.replace("\"a -> b\"", "\"a + a -> b\""), "r.toml").unwrap();
    let two = model::load_str(&SMALL.replace("\"a -> b\"", "\"2 a -> b\""), "r.toml").unwrap();
    assert_eq!(one.steps[0].stoich, vec![(0, -2.0), (1, 1.0)]);
    assert_eq!(one.steps[0].stoich, two.steps[0].stoich);
}

#[test]
fn one_sided_and_empty_reactions_are_refused() {
    for (r, phrase) in [
        ("a ->", "needs compounds on both sides"),
        ("-> b", "needs compounds on both sides"),
        ("->", "needs compounds on both sides"),
        ("", "has no arrow"),
        ("a -> a", "on both sides of the reaction"),
        ("a + -> b", "empty term"),
    ] {
        let e = load_problems(&SMALL.replace("\"a -> b\"", &format!("\"{r}\"")));
        assert!(e.contains(phrase), "{r:?}: {e}");
    }
}

#[test]
fn extreme_but_finite_values_analyse_without_panic() {
    // Concentrations at the ends of the float range, huge and tiny
    // coefficients and turns: either a finite analysis or a clear error.
    for (from, to) in [
        ("a = { conc = \"1 mM\" }", "a = { conc = \"1e-320 M\" }"),
        ("a = { conc = \"1 mM\" }", "a = { conc = \"1e308 M\" }"),
        ("\"a -> b\"", "\"1e-300 a -> 1e300 b\""),
        ("dg0 = -5", "keq = 1e-320"),
        ("dg0 = -5", "keq = 1e308"),
        ("dg0 = -5", "dg0 = -5\ntimes = 1e300"),
        ("dg0 = -5", "dg0 = -5\ntimes = 1e-300"),
        ("temperature = \"30 C\"", "temperature = \"1e-300 K\""),
        (
            "temperature = \"30 C\"",
            "temperature = \"30 C\"\nionic_strength = \"1e300 M\"",
        ),
    ] {
        let text = SMALL.replace(from, to);
        assert_ne!(text, SMALL);
        let Ok(p) = model::load_str(&text, "r.toml") else {
            continue;
        };
        let Ok(prep) = analysis::prepare(p) else {
            continue;
        };
        for d in [Direction::Forward, Direction::Reverse] {
            let mut st = State::from_pathway(&prep.pathway);
            st.direction = d;
            match analysis::analyze(&prep, &st) {
                Ok(a) => assert!(
                    a.steps.iter().all(|s| s.dg.is_finite()) && a.total_dg.is_finite(),
                    "{to}"
                ),
                Err(e) => assert!(e.message.contains("finite"), "{to}: {e}"),
            }
        }
    }
}

#[test]
fn deeply_dotted_keys_do_not_overflow_the_stack() {
    // Dotted keys nest tables without brackets; 20 000 levels must still
    // give an ordinary "unknown field" error.
    let keys = vec!["a"; 20_000].join(".");
    for text in [
        format!("format = 1\n{keys} = 1\n"),
        format!("format = 1\n[{keys}]\n"),
    ] {
        let e = load_problems(&text);
        assert!(
            e.contains("unknown field 'a'") || e.contains("TOML syntax error"),
            "{}",
            &e[..e.len().min(300)]
        );
    }
}

#[test]
fn a_route_of_100000_steps_is_accepted_and_reactions_keep_a_term_limit() {
    // Limits only where a resource needs one: the 50 MB file size bounds
    // everything else. The mass balance is sparse (a 5,000-step chain took
    // 4 s before and 0.14 s after in a release build, one that had been
    // refused at 2,001 steps before).
    let n = 100_000;
    let mut text = String::from(
        "format = 1\n[pathway]\nname = \"big\"\n[conditions]\ntemperature = \"30 C\"\n[compounds]\n",
    );
    for i in 0..=n {
        text.push_str(&format!("c{i} = {{ conc = \"1 mM\" }}\n"));
    }
    for i in 0..n {
        text.push_str(&format!(
            "[[steps]]\nid = \"s{i}\"\nreaction = \"c{i} -> c{}\"\ndg0 = -1\n",
            i + 1
        ));
    }
    let p = model::load_str(&text, "big.toml").expect("a 100,000-step file loads");
    assert_eq!((p.steps.len(), p.compounds.len()), (n, n + 1));
    let prep = analysis::prepare(p).expect("its mass balance solves");
    let route = prep
        .route(analysis::Direction::Forward)
        .expect("a forward route");
    assert!(route.steps.iter().all(|s| s.times == 1.0));

    let terms: Vec<String> = (1..=reaction::MAX_TERMS).map(|i| format!("c{i}")).collect();
    let e = reaction::parse(&format!("c0 -> {}", terms.join(" + ")))
        .unwrap_err()
        .to_string();
    assert!(e.contains("has 101 terms, over the limit of 100"), "{e}");
}

#[test]
fn long_unknown_ids_get_no_suggestion_but_a_message() {
    // Similarity of two long strings costs the product of their lengths.
    let long = "q".repeat(200_000);
    let text = SMALL
        .replace("a = { conc", &format!("{long}a = {{ conc"))
        .replace("\"a -> b\"", &format!("\"{long}b -> b\""));
    let e = load_problems(&text);
    assert!(
        e.contains("unknown compound 'qqqq") && e.contains("declare it under [compounds]"),
        "{}",
        &e[..300]
    );
    assert!(!e.contains("did you mean"));
    assert_eq!(model::suggest("atq", ["atp", &long]), Some("atp"));
}
