//! Any text given as a reaction equation: the parser either explains what is
//! wrong or returns terms that obey the rules (both sides filled, positive
//! finite coefficients, valid ids), and writing those terms back as text
//! parses to the same equation.
#![no_main]

use dgpath::model::reaction::{self, Equation, Term};
use libfuzzer_sys::fuzz_target;

fn side(terms: &[Term]) -> String {
    terms
        .iter()
        .map(|t| format!("{} {}", t.coef, t.id))
        .collect::<Vec<_>>()
        .join(" + ")
}

fn check(eq: &Equation) {
    assert!(!eq.left.is_empty() && !eq.right.is_empty());
    for t in eq.left.iter().chain(&eq.right) {
        assert!(t.coef.is_finite() && t.coef > 0.0, "coefficient {}", t.coef);
        assert!(reaction::valid_id(&t.id), "id {:?}", t.id);
    }
}

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    match reaction::parse(text) {
        Ok(eq) => {
            check(&eq);
            let again = format!("{} -> {}", side(&eq.left), side(&eq.right));
            assert_eq!(
                reaction::parse(&again).as_ref(),
                Ok(&eq),
                "reprinted as {again:?}"
            );
        }
        Err(m) => assert!(!m.to_string().is_empty()),
    }
});
