//! Uncertainty of dG': the analytic standard deviation against a seeded
//! Monte-Carlo estimate, and correlations through shared compounds.

use dgpath::analysis::{Class, analyze, prepare};
use dgpath::model::load_str;
use dgpath::scenario::State;
use rand::{Rng, SeedableRng};

fn prepared(text: &str) -> dgpath::analysis::Prepared {
    prepare(load_str(text, "u.toml").expect("loads")).expect("prepares")
}

const TWO_STEPS: &str = r#"format = 1
[pathway]
name = "two steps (test)"
[conditions]
temperature = "25 C"
[compounds]
a = { conc = "2 mM", cv = 0.2 }
b = { conc = "50 uM", cv = 0.4 }
c = { conc = "1 mM" }
[[steps]]
id = "s1"
reaction = "a -> b"
dg0 = "-3 kJ/mol"
dg0_sd = "1.5 kJ/mol"
[[steps]]
id = "s2"
reaction = "b -> c"
dg0 = "-4 kJ/mol"
"#;

/// A standard normal draw by Box–Muller.
fn normal(rng: &mut impl Rng) -> f64 {
    let u1: f64 = rng.random::<f64>().max(1e-300);
    let u2: f64 = rng.random::<f64>();
    (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
}

#[test]
fn analytic_sd_matches_a_seeded_monte_carlo_estimate() {
    let prep = prepared(TWO_STEPS);
    let state = State::from_pathway(&prep.pathway);
    let a = analyze(&prep, &state).unwrap();
    let rt = a.rt;
    let s1 = &a.steps[0];
    let sd = s1.dg_sd.expect("uncertainty given");
    // Sample the model the sd describes: dG'° normal, ln c normal with sd sqrt(ln(1+cv²)).
    let mut rng = rand::rngs::StdRng::seed_from_u64(20261201);
    let (sa, sb) = ((1.0f64 + 0.04).ln().sqrt(), (1.0f64 + 0.16).ln().sqrt());
    let n = 200_000;
    let (mut sum, mut sum2) = (0.0, 0.0);
    let (mut tsum, mut tsum2) = (0.0, 0.0);
    for _ in 0..n {
        let g0 = -3000.0 + 1500.0 * normal(&mut rng);
        let la = (2e-3f64).ln() + sa * normal(&mut rng);
        let lb = (50e-6f64).ln() + sb * normal(&mut rng);
        let dg1 = g0 + rt * (lb - la);
        let dg2 = -4000.0 + rt * ((1e-3f64).ln() - lb);
        sum += dg1;
        sum2 += dg1 * dg1;
        tsum += dg1 + dg2;
        tsum2 += (dg1 + dg2) * (dg1 + dg2);
    }
    let nf = n as f64;
    let mc = (sum2 / nf - (sum / nf).powi(2)).sqrt();
    assert!(
        (mc - sd).abs() / sd < 0.02,
        "analytic {sd} vs Monte-Carlo {mc}"
    );
    let tmc = (tsum2 / nf - (tsum / nf).powi(2)).sqrt();
    let tsd = a.total_sd.unwrap();
    assert!(
        (tmc - tsd).abs() / tsd < 0.02,
        "total: analytic {tsd} vs Monte-Carlo {tmc}"
    );
}

#[test]
fn a_compound_shared_by_two_steps_cancels_in_the_total() {
    let prep = prepared(TWO_STEPS);
    let a = analyze(&prep, &State::from_pathway(&prep.pathway)).unwrap();
    let rt = 8.314462618e-3 * 298.15; // kJ/mol; R exact in the 2019 SI (CODATA 2018)
    let sa = (1.0f64 + 0.2 * 0.2).ln().sqrt();
    let sb = (1.0f64 + 0.4 * 0.4).ln().sqrt();
    // By hand: the total a -> c depends on ln a only (b is made by s1 and used by s2),
    // plus s1's dg0_sd: sqrt(1.5² + (RT sa)²).
    let by_hand = (1.5f64.powi(2) + (rt * sa).powi(2)).sqrt();
    let total = a.total_sd.unwrap() / 1e3;
    assert!((total - by_hand).abs() < 1e-9, "{total} vs {by_hand}");
    // Treating the steps as independent would add b's spread twice.
    let s1 = a.steps[0].dg_sd.unwrap() / 1e3;
    let s2 = a.steps[1].dg_sd.unwrap() / 1e3;
    assert!((s2 - rt * sb).abs() < 1e-9);
    let independent = (s1 * s1 + s2 * s2).sqrt();
    assert!(
        total < independent - 0.4,
        "{total} should be well below {independent}"
    );
}

#[test]
fn no_uncertainty_given_means_no_sd_and_sure_classes() {
    let text = TWO_STEPS
        .replace(", cv = 0.2", "")
        .replace(", cv = 0.4", "")
        .replace("dg0_sd = \"1.5 kJ/mol\"\n", "");
    let prep = prepared(&text);
    let a = analyze(&prep, &State::from_pathway(&prep.pathway)).unwrap();
    assert!(a.steps.iter().all(|s| s.dg_sd.is_none() && s.class_sure));
    assert!(a.total_sd.is_none());
}

#[test]
fn a_class_that_can_flip_inside_the_interval_is_not_sure() {
    // s2: dG' = -4 + RT ln(1 mM / 50 uM) = -4 + 7.43 = +3.43 kJ/mol: near; with cv 0.4 on b
    // (sd 0.955 kJ/mol) the 95 % interval reaches +5.30, inside +5.708, so it is sure.
    // s1: dG'° -3, RT ln(0.05/2) = -9.14: dG' = -12.1, sd ≈ 1.87: its upper end (-8.5) is moderate.
    let prep = prepared(TWO_STEPS);
    let a = analyze(&prep, &State::from_pathway(&prep.pathway)).unwrap();
    assert_eq!(a.steps[0].class, Class::Far);
    assert!(!a.steps[0].class_sure);
    assert_eq!(a.steps[0].class_range.1, Class::Moderate);
    assert_eq!(a.steps[1].class, Class::Near);
    assert!(a.steps[1].class_sure);
}

#[test]
fn the_notes_say_which_way_an_unsure_class_could_flip() {
    let prep = prepared(TWO_STEPS);
    let a = analyze(&prep, &State::from_pathway(&prep.pathway)).unwrap();
    let notes = dgpath::present::notes(&a, dgpath::present::EnergyUnit::KJ);
    let note = notes
        .iter()
        .find(|n| n.starts_with("s1 "))
        .expect("a note on s1");
    assert!(
        note.contains("far, but not surely") && note.contains("could be moderate"),
        "{note}"
    );
    assert!(note.contains("no verdict"), "{note}");
    assert!(
        !notes.iter().any(|n| n.starts_with("s2 ")),
        "s2 is sure: {notes:?}"
    );
}
