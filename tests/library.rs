//! Unit-level checks through the library: roles, branch points, turns,
//! groups, shares, the cumulative profile, the largest drop, class
//! thresholds, verdict rules and units in files. Expected values are worked
//! out by hand in the comments (RT = 2.478957 kJ/mol at 25 °C, science.md §1 [C]).

use crate::support::{Pw, analyze, analyze_with, close, prepare_file, prepare_str, step};
use dgpath::analysis::{Class, Direction, Role, VerdictKind};
use dgpath::thermo;

const RT25: f64 = 8.314462618 * 298.15; // J/mol

#[test]
fn roles_on_the_glycolysis_routes() {
    let prep = prepare_file("data/glycolysis_reverse.toml");
    let role =
        |a: &dgpath::analysis::Analysis, id: &str| a.roles[prep.pathway.compound(id).unwrap()];
    let f = analyze(&prep);
    assert_eq!(role(&f, "glc"), Role::Input);
    assert_eq!(role(&f, "pyr"), Role::Output);
    assert_eq!(role(&f, "g6p"), Role::Intermediate);
    assert_eq!(role(&f, "atp"), Role::Currency);
    assert_eq!(role(&f, "h2o"), Role::Solvent);
    assert_eq!(role(&f, "oaa"), Role::OffRoute, "used only by bypasses");
    let r = analyze_with(&prep, |s| s.direction = Direction::Reverse);
    assert_eq!(role(&r, "glc"), Role::Output);
    assert_eq!(role(&r, "pyr"), Role::Input);
    assert_eq!(role(&r, "oaa"), Role::Intermediate);
    assert_eq!(
        role(&r, "co2"),
        Role::Intermediate,
        "made by PEP carboxykinase, used by pyruvate carboxylase"
    );
}

#[test]
fn side_steps_make_branch_points_and_stay_out_of_the_totals() {
    // s3 closes nothing: it is on the route (file order).
    let prep = Pw::new("t")
        .compounds(&["a", "b", "c", "d"], "1 mM")
        .currency("atp", "1 mM")
        .currency("adp", "1 mM")
        .step("s1", "a -> b", "-20 kJ/mol")
        .step("s2", "b -> c", "-20 kJ/mol")
        .step("s3", "c -> d", "-1 kJ/mol")
        .side("side1", "b + atp -> d + adp", "-3 kJ/mol")
        .prepare("side.toml");
    let a = analyze(&prep);
    let br = |id: &str| a.branch[prep.pathway.compound(id).unwrap()];
    assert!(
        br("b") && br("d"),
        "compounds of a side step are branch points"
    );
    assert!(
        !br("atp") && !br("adp") && !br("a") && !br("c"),
        "currencies and untouched compounds are not"
    );
    assert_eq!(a.steps.len(), 3);
    assert_eq!(a.side.len(), 1);
    close(a.side[0].dg / 1e3, -3.0, 1e-9);
    // Totals are the route's: −20 − 20 − 1 (all concentrations 1 mM, so Q = 1).
    close(a.total_dg / 1e3, -41.0, 1e-9);
    // s1 makes b, a branch point: not_here; s2 is then the prime step; s3 is last but not far.
    let kinds: Vec<VerdictKind> = a.control.iter().map(|v| v.kind).collect();
    assert_eq!(kinds, [VerdictKind::NotHere, VerdictKind::Prime]);
    assert!(words(&a.control[0])[0].contains("branch point"));
}

#[test]
fn shares_sum_to_one_over_downhill_steps() {
    for prep in [
        prepare_file("data/glycolysis.toml"),
        prepare_file("data/chain.toml"),
    ] {
        let a = analyze(&prep);
        let sum: f64 = a.steps.iter().map(|s| s.share).sum();
        close(sum, 1.0, 1e-12);
        let drop: f64 = a
            .steps
            .iter()
            .map(|s| s.weighted())
            .filter(|w| *w < 0.0)
            .sum();
        for s in &a.steps {
            if s.weighted() < 0.0 {
                close(s.share, s.weighted() / drop, 1e-12);
            } else {
                assert_eq!(s.share, 0.0);
            }
        }
    }
}

#[test]
fn cumulative_is_the_running_sum_of_weighted_dg() {
    let prep = prepare_file("data/glycolysis_reverse.toml");
    for dir in [Direction::Forward, Direction::Reverse] {
        let a = analyze_with(&prep, |s| s.direction = dir);
        let (mut run, mut run0) = (0.0, 0.0);
        for s in &a.steps {
            run += s.times * s.dg;
            run0 += s.times * s.dg0;
            close(s.cumulative, run, 1e-9);
            close(s.cumulative_dg0, run0, 1e-9);
        }
        close(a.total_dg, run, 1e-9);
        close(a.total_dg0, run0, 1e-9);
        // The largest drop is the most negative times × dG'.
        let k = a.largest_drop.unwrap();
        assert!(
            a.steps
                .iter()
                .all(|s| s.weighted() >= a.steps[k].weighted())
        );
    }
}

#[test]
fn turns_follow_the_mass_balance_and_stated_times() {
    // a -> 2 b, b -> c: the second step turns twice per pass.
    let abc = Pw::new("t").compounds(&["a", "b", "c"], "1 mM");
    let prep = abc
        .clone()
        .step("s1", "a -> 2 b", "-1")
        .step("s2", "b -> c", "-1")
        .prepare("t.toml");
    let a = analyze(&prep);
    assert_eq!(
        a.steps.iter().map(|s| s.times).collect::<Vec<_>>(),
        [1.0, 2.0]
    );
    // Weighted total: 1 × (−1 + RT ln(1e-3^2 / 1e-3)) + 2 × (−1), in kJ/mol:
    // ln(1e-3) = −6.907755, RT × that = −17.124029 kJ/mol.
    close(a.total_dg / 1e3, -3.0 - 17.124029, 1e-5);
    // Stating times = 4 on s2 makes s1 turn twice.
    let prep = abc
        .step("s1", "a -> 2 b", "-1")
        .step_with("s2", "b -> c", "-1", &["times = 4"])
        .prepare("t.toml");
    let a = analyze(&prep);
    assert_eq!(
        a.steps.iter().map(|s| s.times).collect::<Vec<_>>(),
        [2.0, 4.0]
    );
}

#[test]
fn reverse_turns_keep_the_first_steps_turns() {
    // Forward a -> 2 b (1 turn), b -> c (2 turns). Reverse: c -> b (2 turns), 2 b -> a (1 turn):
    // the reversed first step keeps its 1 turn (pathway-format.md, reverse route).
    let two = Pw::new("t")
        .compounds(&["a", "b", "c"], "1 mM")
        .step("s1", "a -> 2 b", "-1")
        .step("s2", "b -> c", "-1");
    let prep = two.prepare("t.toml");
    let a = analyze_with(&prep, |s| s.direction = Direction::Reverse);
    let got: Vec<(&str, f64)> = a
        .steps
        .iter()
        .map(|s| (prep.pathway.steps[s.step].id.as_str(), s.times))
        .collect();
    assert_eq!(got, [("s2", 2.0), ("s1", 1.0)]);
    // A bypass of s1 stands in for it and keeps s1's 1 turn.
    let prep = two
        .currency("atp", "1 mM")
        .currency("adp", "1 mM")
        .step_with(
            "back1",
            "2 b + atp -> a + adp",
            "-9",
            &["bypass_of = \"s1\""],
        )
        .prepare("t.toml");
    let a = analyze_with(&prep, |s| s.direction = Direction::Reverse);
    let got: Vec<(&str, f64, f64)> = a
        .steps
        .iter()
        .map(|s| (prep.pathway.steps[s.step].id.as_str(), s.times, s.sign))
        .collect();
    assert_eq!(got, [("s2", 2.0, -1.0), ("back1", 1.0, 1.0)]);
    assert_eq!(a.steps[1].replaces, prep.pathway.step("s1"));
    close(
        a.net
            .iter()
            .find(|x| x.0 == prep.pathway.compound("atp").unwrap())
            .unwrap()
            .1,
        -1.0,
        1e-12,
    );
}

#[test]
fn coupled_groups_sum_per_turn_dg() {
    // s2 uphill alone (+8 + RT ln(1/10) = +2.291990 kJ/mol), coupled to s3 (−12): group −9.708010.
    let prep = Pw::new("t")
        .compound("a", "1 mM")
        .compound("b", "10 mM")
        .compounds(&["c", "d"], "1 mM")
        .step("s1", "a -> b", "-20")
        .step_with("s2", "b -> c", "8", &["couple = \"s3\""])
        .step("s3", "c -> d", "-12")
        .prepare("t.toml");
    let a = analyze(&prep);
    assert_eq!(a.groups.len(), 1);
    assert_eq!(a.groups[0].members, [1, 2]);
    close(a.steps[1].dg / 1e3, 8.0 - 5.708010, 1e-6);
    assert_eq!(a.steps[1].class, Class::Near);
    close(a.groups[0].dg / 1e3, 8.0 - 5.708010 - 12.0, 1e-6);
    // b = 0.5 mM makes s2 uphill (8 + RT ln 2 = +9.718 kJ/mol) while s2 + s3 is
    // 9.718 − 12 = −2.282: the note says its group runs downhill.
    let a = analyze_with(&prep, |s| s.conc[1] = 0.5e-3);
    assert_eq!(a.steps[1].class, Class::Uphill);
    close(
        a.groups[0].dg / 1e3,
        8.0 + RT25 * 2f64.ln() / 1e3 - 12.0,
        1e-9,
    );
    let notes = dgpath::present::notes(&a, dgpath::present::EnergyUnit::KJ);
    assert!(
        notes
            .iter()
            .any(|n| n.contains("s2 is uphill") && n.contains("coupled group runs downhill")),
        "{notes:?}"
    );
    // The verdict on far s3 mentions the group.
    let v = a.control.iter().find(|v| v.position == 2).unwrap();
    assert!(
        words(v).iter().any(|r| r.contains("s2 + s3")),
        "{:?}",
        words(v)
    );
}

#[test]
fn class_boundaries() {
    let (far, nf) = (-10_000.0, 10.0);
    let near = RT25 * 10f64.ln();
    assert_eq!(
        Class::of(-10_000.0, far, nf, RT25),
        Class::Far,
        "at the threshold counts as far"
    );
    assert_eq!(Class::of(-9_999.0, far, nf, RT25), Class::Moderate);
    assert_eq!(Class::of(-near, far, nf, RT25), Class::Near);
    assert_eq!(Class::of(near, far, nf, RT25), Class::Near);
    assert_eq!(Class::of(near + 1.0, far, nf, RT25), Class::Uphill);
    assert_eq!(Class::of(-near - 1.0, far, nf, RT25), Class::Moderate);
    // Thresholds from [analysis]: far −15 kJ/mol, near within a factor of 100 (11.416020 kJ/mol).
    let prep = Pw::new("t")
        .analysis("far = \"-15 kJ/mol\"")
        .analysis("near_factor = 100")
        .compounds(&["a", "b"], "1 mM")
        .step("s1", "a -> b", "-11")
        .prepare("t.toml");
    assert_eq!(analyze(&prep).steps[0].class, Class::Near);
    let a = analyze_with(&prep, |s| s.conc[1] = 0.1e-3); // −11 − 5.708 = −16.708: far
    assert_eq!(a.steps[0].class, Class::Far);
}

#[test]
fn later_far_step_is_a_candidate_and_names_the_branch_point_between() {
    let prep = Pw::new("t")
        .compounds(&["a", "b"], "1 mM")
        .compound_with("c", "1 mM", "branch = true")
        .compounds(&["d", "e"], "1 mM")
        .step("s1", "a -> b", "-20")
        .step("s2", "b -> c", "-1")
        .step("s3", "c -> d", "-20")
        .step("s4", "d -> e", "-20")
        .prepare("t.toml");
    let a = analyze(&prep);
    let got: Vec<(&str, VerdictKind)> = a
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
        got,
        [
            ("s1", VerdictKind::Prime),
            ("s3", VerdictKind::Candidate),
            ("s4", VerdictKind::NotHere)
        ]
    );
    let s3 = &words(&a.control[1]);
    assert!(
        s3[0].contains("s1")
            && s3
                .iter()
                .any(|r| r.contains("branch point c lies between s1")),
        "{s3:?}"
    );
    assert_eq!(a.steps[a.control[0].position].verdict, Some(0));
    assert_eq!(a.steps[1].verdict, None, "near steps get no verdict");
}

#[test]
fn units_in_a_file() {
    // 1 kcal = 4.184 kJ (thermochemical calorie, by definition); scientific notation; µ and u.
    let text = Pw::new("t")
        .compound("a", "5e3uM")
        .compound("b", "0.005 M")
        .compound("c", "5000000 nM")
        .compound_line("d = { conc = 5 }")
        .step("s1", "a -> b", "-4 kcal/mol")
        .step("s2", "b => c", "-4000J/mol")
        .step("s3", "c <-> d", "-4")
        .text();
    let prep = prepare_str(&text, "u.toml");
    for c in &prep.pathway.compounds {
        close(c.conc.unwrap(), 5e-3, 1e-15);
    }
    let a = analyze(&prep);
    close(a.steps[0].dg0, -16_736.0, 1e-9);
    close(a.steps[1].dg0, -4_000.0, 1e-9);
    close(a.steps[2].dg0, -4_000.0, 1e-9);
    let t = prepare_str(&text.replace("\"25 C\"", "\"310 K\""), "u.toml");
    close(t.pathway.conditions.temperature, 310.0, 0.0);
    let t = prepare_str(&text.replace("\"25 C\"", "\"25 °C\""), "u.toml");
    close(t.pathway.conditions.temperature, 298.15, 1e-12);
}

#[test]
fn a_coupling_back_to_an_earlier_step_is_refused() {
    let text = Pw::new("t")
        .compounds(&["a", "b", "c"], "1 mM")
        .step("s1", "a -> b", "-1")
        .step_with("s2", "b -> c", "-1", &["couple = \"s1\""])
        .text();
    let p = dgpath::model::load_str(&text, "t.toml").unwrap();
    let e = dgpath::analysis::prepare(p).unwrap_err();
    let m = e.to_string();
    assert!(
        m.starts_with("t.toml:") && m.contains("couple names a following step"),
        "{m}"
    );
}

#[test]
fn state_from_pathway_uses_the_files_values() {
    let prep = prepare_file("data/glycolysis.toml");
    let s = dgpath::scenario::State::from_pathway(&prep.pathway);
    close(s.conc[prep.pathway.compound("glc").unwrap()], 5e-3, 1e-15);
    close(s.conc[prep.pathway.compound("bpg").unwrap()], 1e-6, 1e-18);
    assert_eq!(
        s.conc[prep.pathway.compound("h2o").unwrap()],
        1.0,
        "solvent activity 1"
    );
    close(s.conditions.temperature, 310.15, 1e-12);
    assert_eq!(s.direction, Direction::Forward);
    // Reverse is available and changes only the direction.
    let a = analyze_with(&prep, |s| s.direction = Direction::Reverse);
    let f = analyze(&prep);
    close(a.total_dg0, -f.total_dg0, 1e-9);
    close(thermo::rt(s.conditions.temperature), a.rt, 0.0);
    close(step(&prep, &a, "pgi").dg, -step(&prep, &f, "pgi").dg, 1e-9);
}

/// pathway-format.md: branch points are every non-currency compound a side
/// step uses — read literally, that includes a solvent; cli.md rule 2 then
/// applies to a far step whose product it is.
#[test]
fn a_solvent_used_by_a_side_step_is_a_branch_point_as_the_format_says() {
    let prep = Pw::new("water branch (test)")
        .compound("a", "10 mM")
        .compounds(&["b", "c", "d"], "1 uM")
        .solvent("w")
        .step("s1", "a -> b + w", "-20 kJ/mol")
        .step("s2", "b -> c", "-20 kJ/mol")
        .step("s3", "c -> d", "-20 kJ/mol")
        .side("leak", "d + w -> a", "-5 kJ/mol")
        .prepare("w.toml");
    let a = analyze(&prep);
    let w = prep.pathway.compound("w").unwrap();
    assert!(a.branch[w], "water is used by the side step");
    let kinds: Vec<&str> = a.control.iter().map(|v| v.kind.as_str()).collect();
    // s1 makes water (a branch point): not_here; s2 is the first left: prime; s3 is last.
    assert_eq!(kinds, ["not_here", "control_point", "not_here"]);
    assert!(
        words(&a.control[0])[0].contains("w is a branch point"),
        "{:?}",
        words(&a.control[0])
    );
}

#[test]
fn a_step_left_out_of_an_explicit_route_is_named_in_the_notes() {
    let prep = Pw::new("route subset (test)")
        .route(&["s1"])
        .compounds(&["a", "b", "c"], "1 mM")
        .step("s1", "a -> b", "-3")
        .step("s2", "b -> c", "-3")
        .prepare("r.toml");
    let a = analyze(&prep);
    assert_eq!(a.steps.len(), 1);
    assert!(
        a.notes
            .iter()
            .any(|n| n.starts_with("s2 is not in pathway.route")
                && n.contains("mark it side = true")),
        "{:?}",
        a.notes
    );
}

/// A verdict's reasons in words (kJ/mol).
fn words(v: &dgpath::analysis::Verdict) -> Vec<String> {
    dgpath::present::reasons(v, dgpath::present::EnergyUnit::KJ)
}
