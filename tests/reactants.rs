//! The reactant model (docs/science.md, "pH and ionic strength"): check
//! values from science.md §4 with their markers and sources, water in the
//! transform, all or nothing, the 1 mM standard state and the warning above
//! I = 0.3 M.

use crate::support::{Pw, analyze, analyze_with, close, prepare_str, step};
use dgpath::thermo::{self, Reactant, transformed_formation};

const T25: f64 = 298.15;

#[test]
fn single_pka_through_a_file() {
    // science.md §4 check [C, from the formula]: A -> B, B with one pKa 6.8 (z −1, nH 0),
    // A one species (z 0, nH 0): pH 7 -> 6 at 25 °C, I = 0 shifts dG'° by −3.718 kJ/mol
    // (the old linear model gives 0 or −5.71).
    let prep = Pw::new("t")
        .compound_with("a", "1 mM", "charge = 0, hydrogens = 0")
        .compound_with("b", "1 mM", "charge = -1, hydrogens = 0, pka = [6.8]")
        .step("s1", "a -> b", "-5 kJ/mol")
        .prepare("pka.toml");
    let a = analyze_with(&prep, |s| s.conditions.ph = 6.0);
    close(a.steps[0].dg0 / 1e3, -5.0 - 3.718, 5e-4);
    assert!(a.steps[0].species);
}

#[test]
fn the_json_says_which_steps_got_the_reactant_model() {
    // succinate.toml: the carboxylation and the hydratase have data for every reactant;
    // the NADH steps do not (NAD+/NADH lack charge and hydrogens).
    let out = crate::support::run(&[
        "report",
        crate::support::path("../pathways/succinate.toml")
            .to_str()
            .unwrap(),
        "--format",
        "json",
    ]);
    assert!(out.status.success());
    let d: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let model: Vec<(String, bool)> = d["steps"]
        .as_array()
        .unwrap()
        .iter()
        .map(|s| {
            (
                s["id"].as_str().unwrap().to_string(),
                s["reactant_model"].as_bool().unwrap(),
            )
        })
        .collect();
    let want = [
        ("ppc", true),
        ("mdh", false),
        ("fum_h", true),
        ("frd", false),
    ];
    assert_eq!(model, want.map(|(i, b)| (i.to_string(), b)).to_vec());
}

/// Base species of ATP hydrolysis (science.md §4 [S via M]: pKa computed from
/// Alberty's species formation energies, BasicBiochemData3 as transcribed in public tables).
const ATP: (f64, f64, &[f64]) = (-4.0, 12.0, &[7.60, 4.68]);
const ADP: (f64, f64, &[f64]) = (-3.0, 12.0, &[7.18, 4.36]);
const PI: (f64, f64, &[f64]) = (-2.0, 1.0, &[7.22]);
const WATER: (f64, f64, &[f64]) = (0.0, 2.0, &[]);

fn f(r: (f64, f64, &[f64]), ph: f64, i: f64) -> f64 {
    let r = Reactant {
        charge: r.0,
        hydrogens: r.1,
        pka: r.2,
    };
    transformed_formation(&r, T25, ph, i)
}

#[test]
fn atp_hydrolysis_from_species_energies() {
    // Base species formation energies, kJ/mol [M, Alberty 2003, BasicBiochemData3]:
    // ATP4− −2768.10, ADP3− −1906.13, HPO4²− −1096.10, H2O −237.19.
    let base = -1906.13 - 1096.10 + 2768.10 + 237.19;
    let at = |ph: f64| {
        base + (f(ADP, ph, 0.25) + f(PI, ph, 0.25) - f(ATP, ph, 0.25) - f(WATER, ph, 0.25)) / 1e3
    };
    // science.md §4 [C]: pH 7, I = 0.25 M, 25 °C: −36.04 kJ/mol (Alberty's published −36.03 [M]);
    // pH 8, same I: −41.074 kJ/mol.
    close(at(7.0), -36.04, 5e-3);
    close(at(8.0), -41.074, 1e-3);
}

/// The reactants of ATP hydrolysis with their species data (as `ATP`, `ADP`, `PI`).
fn hydrolysis(p: Pw) -> Pw {
    p.compound_with(
        "atp",
        "1 mM",
        "charge = -4, hydrogens = 12, pka = [7.60, 4.68]",
    )
    .compound_with(
        "adp",
        "1 mM",
        "charge = -3, hydrogens = 12, pka = [7.18, 4.36]",
    )
    .compound_with("pi", "1 M", "charge = -2, hydrogens = 1, pka = [7.22]")
    .solvent("h2o")
}

#[test]
fn atp_hydrolysis_moved_to_ph_8_through_a_file() {
    // science.md §4 [C]: the species give −36.041 at pH 7, I = 0.25 M, 25 °C and −41.074 at pH 8;
    // stated at the first as the reference, the step moves to the second. Equal concentrations
    // of ATP and ADP and 1 M phosphate make dG' = dG'°. protons = 1 agrees with −Σν nH.
    let prep = hydrolysis(
        Pw::new("t")
            .condition("reference_ionic_strength = \"0.25 M\"")
            .condition("ionic_strength = \"0.25 M\"")
            .condition("ph = 8"),
    )
    .step_with(
        "hyd",
        "atp + h2o -> adp + pi",
        "-36.0409 kJ/mol",
        &["protons = 1"],
    )
    .prepare("hyd.toml");
    let a = analyze(&prep);
    close(a.steps[0].dg0 / 1e3, -41.074, 1e-3);
    close(a.steps[0].dg / 1e3, -41.074, 1e-3);
    // The linear model with protons = 1 would give −36.041 − 5.708 = −41.749.
    assert!((a.steps[0].dg0 / 1e3 + 41.749).abs() > 0.5);
}

#[test]
fn hydration_without_charge_change_has_no_ionic_strength_dependence() {
    // science.md §4 check [C]: e(z −3, nH 5) -> f(z −3, nH 3) + H2O has no dependence on I at all,
    // because water (z 0, nH 2) is in the transform.
    let prep = Pw::new("t")
        .condition("ionic_strength = \"0.25 M\"")
        .compound_with("e", "1 mM", "charge = -3, hydrogens = 5")
        .compound_with("f", "1 mM", "charge = -3, hydrogens = 3")
        .solvent("w")
        .step("s1", "e -> f + w", "3.4 kJ/mol")
        .prepare("hydration.toml");
    for i in [0.05, 0.15, 0.25] {
        let a = analyze_with(&prep, |s| s.conditions.ionic_strength = i);
        close(a.steps[0].dg0 / 1e3, 3.4, 1e-9);
    }
}

#[test]
fn fumarase_in_the_succinate_demo() {
    // mal (z −2, nH 4) -> fum (z −2, nH 2) + water at pH 7.2, I = 0.15 M, 37 °C, no dh0:
    // Σν nH = 0 and Σν (z² − nH) = 0 with water, so dG'° stays 3.400 kJ/mol [C]
    // (without water in the transform it came out as 1.919).
    let p = dgpath::model::load_file(&crate::support::path("../pathways/succinate.toml"))
        .expect("loads");
    let prep = dgpath::analysis::prepare(p).expect("prepares");
    let a = analyze(&prep);
    close(step(&prep, &a, "fum_h").dg0 / 1e3, 3.400, 1e-9);
}

#[test]
fn all_or_nothing() {
    // b lacks charge and hydrogens: the step is moved by protons for pH and gets no
    // ionic-strength correction, although a and c have data; a note names b.
    let prep = Pw::new("t")
        .condition("ionic_strength = \"0.25 M\"")
        .condition("ph = 7.5")
        .compound_with("a", "1 mM", "charge = -4, hydrogens = 12")
        .compound("b", "1 mM")
        .compound_with("c", "1 mM", "charge = -2, hydrogens = 10")
        .step_with("s1", "a + b -> c", "-5 kJ/mol", &["protons = 1"])
        .prepare("partial.toml");
    let a = analyze(&prep);
    // −protons × RT ln10 × ΔpH = −0.5 × 5.708010 [C, science.md §1].
    close(a.steps[0].dg0 / 1e3, -5.0 - 0.5 * 5.708010, 1e-6);
    assert!(!a.steps[0].species);
    assert!(
        a.notes.iter().any(|n| n.contains("s1")
            && n.contains("b lacks charge and hydrogens")
            && n.contains("no ionic-strength correction")),
        "{:?}",
        a.notes
    );
}

#[test]
fn standard_state_of_1_mm() {
    // a + b -> c stated at a 1 mM standard state: dG'° = dG'm − RT ln(1e-3) Σν, Σν = −1,
    // so dG'° = dG'm + RT ln(1e-3) = −5 − 17.124 kJ/mol at 25 °C [C, pathway-format.md].
    let text = Pw::new("t")
        .compounds(&["a", "b", "c"], "1 mM")
        .solvent("w")
        .step_with(
            "s1",
            "a + b -> c + w",
            "-5 kJ/mol",
            &["standard = \"1 mM\""],
        )
        .text();
    let prep = prepare_str(&text, "mm.toml");
    let a = analyze(&prep);
    let want = -5.0 + thermo::rt(T25) * 1e-3f64.ln() / 1e3;
    close(a.steps[0].dg0 / 1e3, want, 1e-9);
    close(want, -5.0 - 17.124, 1e-3);
    // At 1 mM of everything dG' is the stated value (the solvent stays out of Q).
    close(a.steps[0].dg / 1e3, -5.0, 1e-9);
    // The same through keq: K'm = 10 at 1 mM gives dG'm = −RT ln 10.
    let k = prepare_str(
        &text.replace("dg0 = \"-5 kJ/mol\"", "keq = 10"),
        "mm_keq.toml",
    );
    close(analyze(&k).steps[0].dg / 1e3, -5.708010, 1e-6);
}

#[test]
fn ionic_strength_above_0_3_m_is_flagged_and_low_values_are_not() {
    // science.md §4: the extended Debye–Hückel term holds up to about I = 0.3 M.
    let prep = Pw::new("t")
        .compound_with("a", "1 mM", "charge = 0, hydrogens = 0")
        .compound_with("b", "1 mM", "charge = -4, hydrogens = 12")
        .step("s1", "a -> b", "-5 kJ/mol")
        .prepare("i.toml");
    let high = analyze_with(&prep, |s| s.conditions.ionic_strength = 0.4);
    assert!(
        high.notes.iter().any(|n| n.contains("above 0.3 M")),
        "{:?}",
        high.notes
    );
    let low = analyze_with(&prep, |s| s.conditions.ionic_strength = 0.01);
    assert!(
        !low.notes.iter().any(|n| n.contains("Debye")),
        "{:?}",
        low.notes
    );
}

/// dG'° (J/mol) of one step between the given compounds (charge, hydrogens,
/// pKa), stated as `dg0` (J/mol) at the `reference` (°C, pH, M) and moved to
/// the `scenario`; with `hydration` the step is c0 + water -> c1, else the
/// first half of the compounds make the second half.
fn moved_dg0(
    species: &[(i32, i32, Vec<f64>)],
    dg0: f64,
    reference: (f64, f64, f64),
    scenario: (f64, f64, f64),
    hydration: bool,
) -> f64 {
    let pka = |p: &[f64]| {
        let list: Vec<String> = p.iter().map(|x| format!("{x:.3}")).collect();
        format!("[{}]", list.join(", "))
    };
    let mut compounds = String::new();
    for (k, (z, h, p)) in species.iter().enumerate() {
        compounds.push_str(&format!(
            "c{k} = {{ conc = \"1 mM\", charge = {z}, hydrogens = {h}, pka = {} }}\n",
            pka(p)
        ));
    }
    compounds.push_str("w = { role = \"solvent\" }\n");
    let reaction = if hydration {
        "c0 + w -> c1".to_string()
    } else {
        let n = species.len();
        let left: Vec<String> = (0..n / 2).map(|k| format!("c{k}")).collect();
        let right: Vec<String> = (n / 2..n).map(|k| format!("c{k}")).collect();
        format!("{} -> {}", left.join(" + "), right.join(" + "))
    };
    let text = format!(
        "format = 1\n[pathway]\nname = \"t\"\n[conditions]\ntemperature = \"{:.2} C\"\nph = {:.3}\nionic_strength = \"{:.3} M\"\nreference_temperature = \"{:.2} C\"\nreference_ph = {:.3}\nreference_ionic_strength = \"{:.3} M\"\n[compounds]\n{compounds}[[steps]]\nid = \"s\"\nreaction = \"{reaction}\"\ndg0 = \"{dg0:e} J/mol\"\n",
        scenario.0, scenario.1, scenario.2, reference.0, reference.1, reference.2
    );
    let prep = prepare_str(&text, "p.toml");
    analyze(&prep).steps[0].dg0
}

proptest::proptest! {
    #![proptest_config(proptest::prelude::ProptestConfig::with_cases(64))]

    /// Moving a step's dG'° from the reference pH and ionic strength to others
    /// and back (the moved value stated at the new conditions) returns the
    /// value it started from.
    #[test]
    fn moving_ph_and_ionic_strength_there_and_back_is_the_identity(
        species in proptest::collection::vec((-4i32..=1, 0i32..=20, proptest::collection::vec(2.0f64..12.0, 0..3)), 2..5),
        there in (5.0f64..9.0, 0.0f64..0.3),
    ) {
        let species: Vec<(i32, i32, Vec<f64>)> = species
            .into_iter()
            .map(|(z, h, mut p)| {
                p.sort_by(|a, b| b.total_cmp(a));
                (z, h, p)
            })
            .collect();
        let home = (25.0, 7.0, 0.0);
        let there = (25.0, there.0, there.1);
        let moved = moved_dg0(&species, -10e3, home, there, false);
        let back = moved_dg0(&species, moved, there, home, false);
        proptest::prop_assert!((back + 10e3).abs() < 1e-6, "{} vs -10000", back);
    }

    /// A hydration step a + H2O -> b whose charge does not change (b has the
    /// same charge and two more hydrogens) does not depend on ionic strength
    /// (science.md §4 check [C]).
    #[test]
    fn hydration_without_charge_change_is_independent_of_ionic_strength(
        z in -4i32..=1,
        h in 0i32..=20,
        i1 in 0.0f64..0.3,
        i2 in 0.0f64..0.3,
        ph in 5.0f64..9.0,
    ) {
        let species = vec![(z, h, vec![]), (z, h + 2, vec![])];
        let a = moved_dg0(&species, -10e3, (25.0, 7.0, 0.0), (25.0, ph, i1), true);
        let b = moved_dg0(&species, -10e3, (25.0, 7.0, 0.0), (25.0, ph, i2), true);
        proptest::prop_assert!((a - b).abs() < 1e-9, "{} vs {}", a, b);
    }
}
