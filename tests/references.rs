//! Reference checks: constants, conversions and handbook cases whose values
//! come from outside the project. Each value carries its marker and source
//! from shared/design/science.md ([S] published and checked, [M] from memory
//! of the named source, [C] computed from the formulas, [CP] common practice).

use crate::support::{
    self, Pw, analyze, analyze_with, close, net, prepare_file, prepare_str, step,
};
use dgpath::analysis::{Class, Direction, VerdictKind};
use dgpath::thermo;

/// Temperatures used throughout, K.
const T25: f64 = 298.15;
const T37: f64 = 310.15;

#[test]
fn rt_and_rt_ln10_at_25_and_37_c() {
    // [C] science.md §1 from R = 8.314462618 J/(mol K) [S, CODATA 2018, Tiesinga et al. 2021]:
    // RT = 2.478957 and 2.578731 kJ/mol; RT ln 10 = 5.708010 and 5.937747 kJ/mol.
    close(thermo::rt(T25) / 1e3, 2.478957, 1e-6);
    close(thermo::rt(T37) / 1e3, 2.578731, 1e-6);
    close(
        thermo::rt(T25) * std::f64::consts::LN_10 / 1e3,
        5.708010,
        1e-6,
    );
    close(
        thermo::rt(T37) * std::f64::consts::LN_10 / 1e3,
        5.937747,
        1e-6,
    );
    // [S, CODATA 2018] exact constants of the 2019 SI.
    assert_eq!(thermo::R, 8.314462618);
    assert_eq!(thermo::F, 96485.33212);
}

#[test]
fn one_factor_of_ten_in_keq_is_minus_5_708_kj() {
    // [C] science.md §2: dG'° = −RT ln K'; one factor of 10 is −5.708 kJ/mol at 25 °C.
    close(thermo::dg0_from_keq(10.0, T25) / 1e3, -5.708010, 1e-6);
    close(
        thermo::dg0_from_keq(1000.0, T25) / 1e3,
        -3.0 * 5.708010,
        1e-5,
    );
    // And back: K' from dG'°.
    close(thermo::keq_from_dg0(-5708.010, T25), 10.0, 1e-5);
    close(
        thermo::keq_from_dg0(thermo::dg0_from_keq(850.0, T37), T37),
        850.0,
        1e-9,
    );
}

#[test]
fn keq_in_a_file_gives_the_same_dg0() {
    // [C] science.md §2: keq = 100 at the 25 °C reference is −2 × 5.708010 kJ/mol.
    let prep = prepare_str(
        "format = 1\n[pathway]\nname = \"k\"\n[conditions]\ntemperature = \"25 C\"\n\
         [compounds]\na = { conc = \"1 mM\" }\nb = { conc = \"1 mM\" }\n\
         [[steps]]\nid = \"s1\"\nreaction = \"a -> b\"\nkeq = 100\n",
        "keq.toml",
    );
    let a = analyze(&prep);
    close(a.steps[0].dg0 / 1e3, -11.416020, 1e-6);
    close(a.steps[0].keq(), 100.0, 1e-9);
}

#[test]
fn nadh_oxidation_by_oxygen_from_potentials() {
    // science.md §2 [S for the potentials: compiled table of biochemical standard
    // reduction potentials, 25 °C, pH 7; C for the result]: E'° NAD+/NADH −0.320 V,
    // ½O2/H2O +0.816 V, n = 2 -> dG'° = −219.2 kJ/mol.
    let g = thermo::dg0_from_potentials(2.0, 0.816, -0.320);
    close(g / 1e3, -219.2, 0.05);
}

const ATP_HYDROLYSIS: &str = r#"format = 1
[pathway]
name = "ATP hydrolysis"
[conditions]
temperature = "25 C"
[compounds]
# Lehninger ch. 13 worked example [M]: ATP 2.25, ADP 0.25, Pi 1.65 mM.
atp = { conc = "2.25 mM" }
adp = { conc = "0.25 mM" }
pi  = { conc = "1.65 mM" }
h2o = { role = "solvent" }
[[steps]]
id = "hyd"
reaction = "atp + h2o -> adp + pi"
dg0 = "-30.5 kJ/mol"   # [M, Lehninger; Stryer]
"#;

#[test]
fn atp_hydrolysis_worked_example_at_25_and_37_c() {
    // science.md §8 [M inputs, Lehninger ch. 13; C]: −51.8 kJ/mol at 298 K, −52.7 at 310.15 K.
    let prep = prepare_str(ATP_HYDROLYSIS, "atp.toml");
    let a = analyze(&prep);
    close(a.steps[0].dg / 1e3, -51.8, 0.05);
    let hot = analyze_with(&prep, |s| s.conditions.temperature = T37);
    close(hot.steps[0].dg / 1e3, -52.7, 0.05);
    // No dh0: the 25 °C dG'° is kept and only RT changes (science.md §3 [CP]); the tool says so.
    close(hot.steps[0].dg0 / 1e3, -30.5, 1e-9);
    assert!(hot.steps[0].kept_reference_dg0);
    assert!(
        hot.notes
            .iter()
            .any(|n| n.contains("kept") && n.contains("hyd")),
        "{:?}",
        hot.notes
    );
    // Water is a solvent and stays out of Q: Q = 0.25 × 1.65 / 2.25 mM.
    close(a.steps[0].q(), 0.25e-3 * 1.65e-3 / 2.25e-3, 1e-15);
}

#[test]
fn gibbs_helmholtz_from_25_to_37_c() {
    // science.md §3 [M, Alberty 2003 for the formula; C for the check]:
    // dG'°(298.15) = −30.5, dH'° = −20 -> dG'°(310.15) = −30.92 kJ/mol.
    close(
        thermo::gibbs_helmholtz(-30_500.0, -20_000.0, T25, T37) / 1e3,
        -30.92,
        0.005,
    );
    // The same through a file with dh0, analysed at 37 °C.
    let text = ATP_HYDROLYSIS.replace(
        "dg0 = \"-30.5 kJ/mol\"",
        "dg0 = \"-30.5 kJ/mol\"\ndh0 = \"-20 kJ/mol\"",
    );
    let prep = prepare_str(&text, "atp_dh.toml");
    let a = analyze_with(&prep, |s| s.conditions.temperature = T37);
    close(a.steps[0].dg0 / 1e3, -30.92, 0.005);
    assert!(!a.steps[0].kept_reference_dg0);
}

#[test]
fn one_proton_released_and_half_a_ph_unit() {
    // science.md §4 [C]: one H+ released, pH 7.0 -> 7.5 at 298.15 K: 2.854 kJ/mol more negative.
    let text = ATP_HYDROLYSIS.replace(
        "dg0 = \"-30.5 kJ/mol\"",
        "dg0 = \"-30.5 kJ/mol\"\nprotons = 1",
    );
    let prep = prepare_str(&text, "atp_h.toml");
    let base = analyze(&prep);
    let up = analyze_with(&prep, |s| s.conditions.ph = 7.5);
    close((up.steps[0].dg0 - base.steps[0].dg0) / 1e3, -2.854, 5e-4);
    close((up.steps[0].dg - base.steps[0].dg) / 1e3, -2.854, 5e-4);
}

#[test]
fn atp4_ionic_strength_term_at_quarter_molar() {
    // science.md §4 [C, from Alberty 2003 eqs 3.6-1..3.6-5, S]: ATP⁴⁻ (z² − N_H = 4)
    // at I = 0.25 M, 25 °C: −3.239 kJ/mol.
    close(
        thermo::species_ionic_term(-4.0, 12.0, 0.25, T25) / 1e3,
        -3.239,
        5e-4,
    );
    // A species with z² = N_H is not corrected at all.
    assert_eq!(thermo::species_ionic_term(-2.0, 4.0, 0.25, T25), 0.0);
}

#[test]
fn ionic_strength_correction_through_a_file() {
    // A step that makes one ATP⁴⁻-like species from a neutral one shifts dG'° by
    // 1 × (−3.239) kJ/mol at I = 0.25 M, 25 °C (science.md §4 [C]).
    let prep = Pw::new("i")
        .condition("ionic_strength = \"0.25 M\"")
        .compound_with("a", "1 mM", "charge = 0, hydrogens = 0")
        .compound_with("b", "1 mM", "charge = -4, hydrogens = 12")
        .step("s1", "a -> b", "-5 kJ/mol")
        .prepare("ionic.toml");
    let a = analyze(&prep);
    close(a.steps[0].dg0 / 1e3, -5.0 - 3.239, 5e-4);
    // Above 0.3 M the correction is flagged (science.md §4).
    let high = analyze_with(&prep, |s| s.conditions.ionic_strength = 0.35);
    assert!(
        high.notes.iter().any(|n| n.contains("above 0.3 M")),
        "{:?}",
        high.notes
    );
}

#[test]
fn rt_alpha_fit_matches_alberty_table() {
    // science.md §4 [S, Alberty 2003, Table 3.1]: RTα in kJ/mol at 0, 10, 20, 25, 30, 40 °C.
    let table = [
        (0.0, 2.56494),
        (10.0, 2.70073),
        (20.0, 2.84196),
        (25.0, 2.91482),
        (30.0, 2.98934),
        (40.0, 3.14349),
    ];
    for (c, want) in table {
        let got = thermo::rt_alpha(273.15 + c) / 1e3;
        assert!(
            (got - want).abs() < 1e-3,
            "{c} °C: RTα = {got}, table {want}"
        );
    }
    // [C] at 310.15 K RTα ≈ 3.0965 kJ/mol.
    close(thermo::rt_alpha(T37) / 1e3, 3.0965, 5e-4);
}

/// A single step a -> b with equal concentrations, so dG' = dG'°, at 25 °C.
fn one_step(dg0_kj: f64) -> dgpath::analysis::Prepared {
    Pw::new("one")
        .compounds(&["a", "b"], "1 mM")
        .step("s1", "a -> b", &format!("{dg0_kj} kJ/mol"))
        .prepare("one.toml")
}

#[test]
fn flux_force_table() {
    // science.md §6 [C, 298.15 K; formulas Beard & Qian 2007 S, Noor et al. 2013 M]:
    // dG' = −1 -> 0.668 undone, 3.01× enzyme; −5.708 -> 0.100, 1.111×; −11.42 -> 0.010, 1.010×.
    for (dg, share, factor, ftol) in [
        (-1.0, 0.668, 3.01, 5e-3),
        (-5.708, 0.100, 1.111, 5e-4),
        (-11.42, 0.010, 1.010, 5e-4),
    ] {
        let prep = one_step(dg);
        let a = analyze(&prep);
        let s = &a.steps[0];
        close(s.dg / 1e3, dg, 1e-9);
        close(s.reverse_share(a.rt).unwrap(), share, 5e-4);
        close(s.enzyme_factor(a.rt).unwrap(), factor, ftol);
        // J+/J− = exp(−dG'/RT) [S, Beard & Qian 2007]; −5.708 kJ/mol is 10× (Noor et al. 2014 [S]).
        close(
            s.flux_ratio(a.rt) * s.reverse_share(a.rt).unwrap(),
            1.0,
            1e-12,
        );
    }
    close(
        analyze(&one_step(-5.708010)).steps[0].flux_ratio(thermo::rt(T25)),
        10.0,
        1e-5,
    );
    // An uphill step has no enzyme factor and no share undone: it cannot carry forward flux.
    let up = analyze(&one_step(3.0));
    assert_eq!(up.steps[0].enzyme_factor(up.rt), None);
    assert_eq!(up.steps[0].reverse_share(up.rt), None);
}

// ---- Handbook glycolysis (science.md §8) ----

fn glycolysis() -> dgpath::analysis::Prepared {
    prepare_file("data/glycolysis.toml")
}

#[test]
fn glycolysis_step_energies_match_the_recomputed_column() {
    // science.md §8 [C, recomputed at 310.15 K from the Stryer Table 16.3 dG'° values and
    // the Minakami & Yoshikawa 1965 erythrocyte concentrations, both M].
    let prep = glycolysis();
    let a = analyze(&prep);
    close(a.rt / 1e3, 2.578731, 1e-6);
    let want = [
        ("hk", -33.96),
        ("pgi", -2.89),
        ("pfk", -18.84),
        ("ald", -0.45),
        ("tpi", 2.32),
        ("pgk", 0.20),
        ("pgm", 0.83),
        ("eno", 1.16),
        ("pk", -22.65),
    ];
    for (id, dg) in want {
        let s = step(&prep, &a, id);
        assert!(
            (s.dg / 1e3 - dg).abs() <= 0.05,
            "{id}: dG' = {:.3}, recomputed {dg}",
            s.dg / 1e3
        );
    }
    // dG'° of glucose -> 2 pyruvate is −73.3 kJ/mol with these per-step values
    // [M, Berg/Tymoczko/Stryer Table 16.3; C for the sum with turns 1,1,1,1,1,2,2,2,2,2].
    close(a.total_dg0 / 1e3, -73.3, 1e-9);
}

#[test]
fn glycolysis_far_steps_are_exactly_the_three_irreversible_ones() {
    // science.md §8 [CP]: hexokinase, PFK and pyruvate kinase are far from equilibrium in cells.
    let prep = glycolysis();
    let a = analyze(&prep);
    let far: Vec<&str> = a
        .steps
        .iter()
        .filter(|s| s.class == Class::Far)
        .map(|s| prep.pathway.steps[s.step].id.as_str())
        .collect();
    assert_eq!(far, ["hk", "pfk", "pk"]);
    // None of the others is uphill at these concentrations.
    assert!(a.steps.iter().all(|s| s.class != Class::Uphill));
}

#[test]
fn glycolysis_lower_half_runs_twice_and_nets_two_atp() {
    // science.md §8 [CP]: the half after the triose split runs twice per glucose;
    // net yield 2 ATP and 2 NADH per glucose.
    let prep = glycolysis();
    let a = analyze(&prep);
    for id in ["hk", "pgi", "pfk", "ald", "tpi"] {
        close(step(&prep, &a, id).times, 1.0, 1e-12);
    }
    for id in ["gapdh", "pgk", "pgm", "eno", "pk"] {
        close(step(&prep, &a, id).times, 2.0, 1e-12);
    }
    close(net(&prep, &a, "atp"), 2.0, 1e-12);
    close(net(&prep, &a, "adp"), -2.0, 1e-12);
    close(net(&prep, &a, "nadh"), 2.0, 1e-12);
    close(net(&prep, &a, "glc"), -1.0, 1e-12);
    close(net(&prep, &a, "pyr"), 2.0, 1e-12);
    // Pyruvate kinase at 2 × −22.65 is the largest weighted drop (science.md §8 [C] values).
    assert_eq!(
        a.largest_drop
            .map(|k| prep.pathway.steps[a.steps[k].step].id.as_str()),
        Some("pk")
    );
}

#[test]
fn glycolysis_control_verdicts() {
    // science.md §8 [CP]: PFK is the committed, controlling step; hexokinase's product
    // G6P is a branch point (marked branch = true, common practice); pyruvate kinase is last.
    let prep = glycolysis();
    let a = analyze(&prep);
    let v: Vec<(&str, VerdictKind)> = a
        .control
        .iter()
        .map(|v| {
            (
                prep.pathway.steps[a.steps[v.position].step].id.as_str(),
                v.kind,
            )
        })
        .collect();
    assert_eq!(
        v,
        [
            ("hk", VerdictKind::NotHere),
            ("pfk", VerdictKind::Prime),
            ("pk", VerdictKind::NotHere)
        ]
    );
    assert!(
        words(&a.control[0])[0].contains("g6p") && words(&a.control[0])[0].contains("branch point")
    );
    assert!(words(&a.control[2])[0].contains("last step"));
}

// ---- The reverse route with bypasses ----

fn reverse_text() -> String {
    std::fs::read_to_string(support::path("data/glycolysis_reverse.toml")).unwrap()
}

/// The reverse file without its bypass steps.
fn stripped() -> String {
    let t = reverse_text();
    let cut = t
        .find("# --- bypasses")
        .expect("marker line in glycolysis_reverse.toml");
    t[..cut].to_string()
}

fn reverse(text: &str) -> (dgpath::analysis::Prepared, dgpath::analysis::Analysis) {
    let prep = prepare_str(text, "glycolysis_reverse.toml");
    let a = analyze_with(&prep, |s| s.direction = Direction::Reverse);
    (prep, a)
}

#[test]
fn reverse_without_bypasses_lists_the_three_steps() {
    // science.md §8 [CP]: the reverse route needs bypasses at hexokinase, PFK and pyruvate kinase.
    let (prep, a) = reverse(&stripped());
    let ids: Vec<&str> = a
        .needs_bypass
        .iter()
        .map(|n| prep.pathway.steps[a.steps[n.position].step].id.as_str())
        .collect();
    assert_eq!(ids, ["pk", "pfk", "hk"]);
    // What each lacks is its forward drop, reversed (the §8 recomputed values).
    for (n, want) in a.needs_bypass.iter().zip([22.65, 18.84, 33.96]) {
        close(n.lacks / 1e3, want, 0.05);
    }
    assert_eq!(a.counterpart, None);
    assert!(a.steps.iter().all(|s| s.sign < 0.0));
}

#[test]
fn reverse_with_bypasses_has_no_gaps_and_keeps_turns() {
    let (prep, a) = reverse(&reverse_text());
    assert!(a.needs_bypass.is_empty(), "{:?}", a.needs_bypass);
    let order: Vec<&str> = a
        .steps
        .iter()
        .map(|s| prep.pathway.steps[s.step].id.as_str())
        .collect();
    // pathway-format.md: reversed order; bypasses take the place of the step they replace, in file order.
    assert_eq!(
        order,
        [
            "pc", "pepck", "eno", "pgm", "pgk", "gapdh", "tpi", "ald", "fbpase", "pgi", "g6pase"
        ]
    );
    // pathway-format.md: the stand-in for the forward first step (hexokinase) keeps its 1 turn;
    // the pyruvate bypasses then make 2.
    close(step(&prep, &a, "g6pase").times, 1.0, 1e-12);
    close(step(&prep, &a, "fbpase").times, 1.0, 1e-12);
    close(step(&prep, &a, "pc").times, 2.0, 1e-12);
    close(step(&prep, &a, "pepck").times, 2.0, 1e-12);
    close(step(&prep, &a, "eno").times, 2.0, 1e-12);
    // Reversed steps run with −dG'°.
    close(step(&prep, &a, "pgk").dg0 / 1e3, 18.8, 1e-9);
}

#[test]
fn reverse_route_costs_currency_and_names_the_counterpart() {
    // science.md §8 [CP]: the reverse route costs energy. Per glucose made: 2 ATP at
    // pyruvate carboxylase, 2 at reversed PGK, 2 GTP at PEP carboxykinase.
    let (prep, a) = reverse(&reverse_text());
    close(net(&prep, &a, "atp"), -4.0, 1e-12);
    close(net(&prep, &a, "gtp"), -2.0, 1e-12);
    close(net(&prep, &a, "glc"), 1.0, 1e-12);
    close(net(&prep, &a, "pyr"), -2.0, 1e-12);
    // The bypass of PFK (the forward prime step) is the counterpart.
    let k = a.counterpart.expect("a counterpart");
    assert_eq!(prep.pathway.steps[a.steps[k].step].id, "fbpase");
    assert_eq!(a.direction, Direction::Reverse);
}

/// A verdict's reasons in words (kJ/mol).
fn words(v: &dgpath::analysis::Verdict) -> Vec<String> {
    dgpath::present::reasons(v, dgpath::present::EnergyUnit::KJ)
}
