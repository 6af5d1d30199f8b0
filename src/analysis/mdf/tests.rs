//! Checks of the optimisation against closed forms and its own optimality conditions.

use super::ranges::{ranges_by_lp, ranges_by_paths};
use super::*;
use crate::analysis::{Direction, prepare};
use crate::model::load_str;
use proptest::prelude::*;

fn prepared(text: &str) -> Prepared {
    prepare(load_str(text, "chain.toml").expect("loads")).expect("prepares")
}

/// A 1:1 chain s0 -> s1 -> ... -> sn; dg0 in J/mol; bounds in mol/L.
fn chain(dg0: &[f64], bounds: &[(f64, f64)], temperature: &str) -> String {
    chain_with(dg0, bounds, temperature, &[])
}

/// As `chain`, with the `conc` (and anything else) of some compounds replaced.
fn chain_with(
    dg0: &[f64],
    bounds: &[(f64, f64)],
    temperature: &str,
    extra: &[(usize, &str)],
) -> String {
    let mut t = format!(
        "format = 1\n[pathway]\nname = \"chain\"\n[conditions]\ntemperature = \"{temperature}\"\n[compounds]\n"
    );
    for (i, &(lo, hi)) in bounds.iter().enumerate() {
        let mid = format!("conc = \"{:e} M\"", (lo * hi).sqrt());
        let attrs = extra
            .iter()
            .find(|e| e.0 == i)
            .map_or(mid.as_str(), |e| e.1);
        t.push_str(&format!(
            "s{i} = {{ {attrs}, bounds = [\"{lo:e} M\", \"{hi:e} M\"] }}\n"
        ));
    }
    for (i, g) in dg0.iter().enumerate() {
        t.push_str(&format!(
            "[[steps]]\nid = \"r{}\"\nreaction = \"s{i} -> s{}\"\ndg0 = \"{g:e} J/mol\"\n",
            i + 1,
            i + 1
        ));
    }
    t
}

/// science.md §5 closed form for a 1:1 chain [C]: MDF = min over runs a..b
/// of [Σ g_i + RT(u_{a−1} − l_b)] / (b − a + 1), g_i = −dG'°_i.
fn closed_form(dg0: &[f64], bounds: &[(f64, f64)], rt: f64) -> f64 {
    let mut best = f64::INFINITY;
    for a in 0..dg0.len() {
        let mut g = 0.0;
        for b in a..dg0.len() {
            g -= dg0[b];
            let v = (g + rt * (bounds[a].1.ln() - bounds[b + 1].0.ln())) / (b - a + 1) as f64;
            best = best.min(v);
        }
    }
    best
}

fn assert_optimal(prep: &Prepared, state: &State, m: &Mdf) {
    let c = certificate(prep, state, m).expect("certificate");
    assert!(c.primal < 1e-6, "primal feasibility {c:?}");
    assert!(c.dual < 1e-6, "dual feasibility {c:?}");
    assert!(c.gap < 1e-6, "strong duality {c:?}");
    assert!(c.complementary < 1e-6, "complementary slackness {c:?}");
    let sum: f64 = m.prices.iter().sum();
    assert!((sum - 1.0).abs() < 1e-6, "prices sum to {sum}");
}

const WORKED: [f64; 4] = [-5e3, 10e3, -20e3, -5e3];
const DEFAULT_BOUNDS: [(f64, f64); 5] = [(1e-6, 1e-2); 5];

#[test]
fn worked_chain_at_25_c() {
    // science.md §5 worked case [C]: dG'° = [−5, +10, −20, −5] kJ/mol, bounds
    // 1 µM–10 mM, 298.15 K: MDF = 8.9160 kJ/mol, prices 0.5, 0.5, 0, 0, S1 = 2.060 mM.
    let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "25 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve_with_ranges(&prep, &state).expect("solves");
    assert!((m.value / 1e3 - 8.9160).abs() < 5e-5, "MDF {}", m.value);
    for (p, want) in m.prices.iter().zip([0.5, 0.5, 0.0, 0.0]) {
        assert!((p - want).abs() < 1e-6, "prices {:?}", m.prices);
    }
    assert_eq!(m.bottlenecks, vec![0, 1]);
    assert!((m.conc[1] * 1e3 - 2.060).abs() < 5e-4, "S1 {}", m.conc[1]);
    // S1 is unique [C, science.md §5]: its range is a point.
    let r = m.ranges.as_ref().expect("ranges")[1];
    assert!((r.0 / r.1 - 1.0).abs() < 1e-5, "S1 range {r:?}");
    // The binding run starts at S0's upper bound and ends at S2's lower bound.
    assert_eq!(
        m.limiting.iter().map(|l| (l.0, l.1)).collect::<Vec<_>>(),
        vec![(0, Bound::Upper), (2, Bound::Lower)]
    );
    for j in 0..2 {
        assert!((m.driving_forces[j] - m.value).abs() < 1e-6);
    }
    assert!(m.driving_forces[2] > m.value && m.driving_forces[3] > m.value);
    assert_optimal(&prep, &state, &m);
    // S3 is free: the step r3 (−20 kJ/mol) leaves room, so S3's range is wider than a point.
    let r3 = m.ranges.as_ref().expect("ranges")[3];
    assert!(r3.1 / r3.0 > 10.0, "S3 range {r3:?}");
}

#[test]
fn worked_chain_at_37_c() {
    // science.md §5 worked case [C]: at 310.15 K MDF = 9.3755 kJ/mol, S1 = 1.833 mM
    // (dG'° kept at its 25 °C value).
    let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "37 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    assert!((m.value / 1e3 - 9.3755).abs() < 5e-5, "MDF {}", m.value);
    assert!((m.conc[1] * 1e3 - 1.833).abs() < 5e-4, "S1 {}", m.conc[1]);
    assert!(m.ranges.is_none());
    assert_optimal(&prep, &state, &m);
}

#[test]
fn fixed_compound_outside_bounds_is_an_error() {
    let text = chain_with(
        &WORKED,
        &DEFAULT_BOUNDS,
        "25 C",
        &[(2, "fixed = true, conc = \"50 mM\"")],
    );
    let prep = prepared(&text);
    let err = solve(&prep, &State::from_pathway(&prep.pathway)).unwrap_err();
    let msg = err.to_string();
    assert!(matches!(err, MdfError::FixedOutsideBounds { .. }), "{msg}");
    assert!(
        msg.contains("chain.toml:") && msg.contains("'s2'") && msg.contains("50 mM"),
        "{msg}"
    );
}

#[test]
fn fixed_compound_is_held() {
    // S0 fixed at 1 mM instead of free up to 10 mM: the run r1..r2 loses RT ln 10 over 2 steps.
    let text = chain_with(
        &WORKED,
        &DEFAULT_BOUNDS,
        "25 C",
        &[(0, "fixed = true, conc = \"1 mM\"")],
    );
    let prep = prepared(&text);
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    let mut b = DEFAULT_BOUNDS;
    b[0] = (1e-3, 1e-3);
    assert!((m.value - closed_form(&WORKED, &b, m.rt)).abs() < 1e-3);
    assert_eq!(m.parts[0], Part::Held);
    assert!(
        m.limiting.iter().all(|l| l.0 != 0),
        "a held compound has no bound dual"
    );
    assert_optimal(&prep, &state, &m);
}

#[test]
fn concentration_outside_bounds_warns() {
    let text = chain_with(
        &WORKED,
        &DEFAULT_BOUNDS,
        "25 C",
        &[(3, "conc = \"100 mM\"")],
    );
    let prep = prepared(&text);
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    assert_optimal(&prep, &state, &m);
    assert_eq!(m.warnings.len(), 1, "{:?}", m.warnings);
    assert!(
        m.warnings[0].contains("'s3'") && m.warnings[0].contains("0.1 M"),
        "{:?}",
        m.warnings
    );
    assert!(
        (m.value / 1e3 - 8.9160).abs() < 5e-5,
        "the bounds decide, not the scenario's value"
    );
}

#[test]
fn uphill_route_gives_negative_mdf() {
    // One step +40 kJ/mol between 1 µM and 10 mM: at best −40 + RT ln 1e4 < 0.
    let prep = prepared(&chain(&[40e3], &DEFAULT_BOUNDS[..2], "25 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    assert_optimal(&prep, &state, &m);
    let want = -40e3 + m.rt * (1e-2f64 / 1e-6).ln();
    assert!((m.value - want).abs() < 1e-3 && !m.feasible());
    assert_eq!(m.bottlenecks, vec![0]);
}

#[test]
fn reverse_route_runs_backward() {
    // Backward the worked chain is dG'° = [+5, +20, −10, +5]: closed form on the mirrored chain.
    let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "25 C"));
    let state = State {
        direction: Direction::Reverse,
        ..State::from_pathway(&prep.pathway)
    };
    let m = solve(&prep, &state).expect("solves");
    let back: Vec<f64> = WORKED.iter().rev().map(|g| -g).collect();
    assert!((m.value - closed_form(&back, &DEFAULT_BOUNDS, m.rt)).abs() < 1e-3);
    assert_optimal(&prep, &state, &m);
}

type LnRanges = Vec<(f64, f64)>;

/// Both range methods on one solved chain: (shortest paths, programmes), ln c per variable.
fn both_ranges(dg0: &[f64], bounds: &[(f64, f64)]) -> (LnRanges, LnRanges) {
    let prep = prepared(&chain(dg0, bounds, "25 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    let s = setup(&prep, &state, &Options::default()).expect("sets up");
    let x: Vec<f64> = s.lp.vars.iter().map(|&c| m.conc[c].ln()).collect();
    let b = m.value / m.rt;
    let paths =
        ranges_by_paths(&s.lp, b, &x).expect("a 1:1 chain is a system of difference constraints");
    let none = vec![None; x.len()];
    let lps = ranges_by_lp(&s.lp, b, &x, &none, "chain.toml").expect("programmes solve");
    let clamp = |r: Vec<(f64, f64)>| -> Vec<(f64, f64)> {
        r.iter()
            .enumerate()
            .map(|(v, e)| (e.0.max(s.lp.ln_lo[v]), e.1.min(s.lp.ln_hi[v])))
            .collect()
    };
    (clamp(paths), clamp(lps))
}

#[test]
fn worked_chain_ranges_agree() {
    let (paths, lps) = both_ranges(&WORKED, &DEFAULT_BOUNDS);
    for (p, l) in paths.iter().zip(&lps) {
        assert!(
            (p.0 - l.0).abs() < 1e-5 && (p.1 - l.1).abs() < 1e-5,
            "{paths:?} vs {lps:?}"
        );
    }
    // S1 is unique [C, science.md §5] and S0 sits at its upper bound.
    assert!((paths[1].1 - paths[1].0).abs() < 1e-9);
    assert!((paths[0].0 - 1e-2f64.ln()).abs() < 1e-9);
}

#[test]
fn ranges_need_programmes_for_two_substrate_steps() {
    let text = "format = 1\n[pathway]\nname = \"split\"\n[conditions]\ntemperature = \"25 C\"\n[compounds]\n\
        a = { conc = \"1 mM\" }\nb = { conc = \"1 mM\" }\nc = { conc = \"1 mM\" }\n\
        [[steps]]\nid = \"r1\"\nreaction = \"a -> b + c\"\ndg0 = \"20 kJ/mol\"\n";
    let prep = prepared(text);
    let state = State::from_pathway(&prep.pathway);
    let s = setup(&prep, &state, &Options::default()).expect("sets up");
    let m = solve_with_ranges(&prep, &state).expect("solves");
    assert_optimal(&prep, &state, &m);
    let x: Vec<f64> = s.lp.vars.iter().map(|&c| m.conc[c].ln()).collect();
    assert!(ranges_by_paths(&s.lp, m.value / m.rt, &x).is_none());
    // One step, a at its upper bound and b, c at their lower bounds: every
    // concentration is pinned, MDF = −20 + RT ln(1e-2 / 1e-12) [C].
    let want = -20e3 + m.rt * (1e-2f64 / 1e-12).ln();
    assert!((m.value - want).abs() < 1e-3, "{} vs {want}", m.value);
    for r in m.ranges.as_ref().expect("ranges").iter() {
        assert!((r.1 / r.0 - 1.0).abs() < 1e-6, "{r:?}");
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]
    #[test]
    fn chain_matches_closed_form(
        dg0 in prop::collection::vec(-40e3..40e3f64, 1..8),
        lows in prop::collection::vec(-9.0..-2.0f64, 9),
        // Upper bounds stay at or below 10 M, the most a file may state.
        widths in prop::collection::vec(0.0..2.99f64, 9),
    ) {
        let n = dg0.len();
        let bounds: Vec<(f64, f64)> = (0..=n).map(|i| (10f64.powf(lows[i]), 10f64.powf(lows[i] + 0.01 + widths[i]))).collect();
        let prep = prepared(&chain(&dg0, &bounds, "25 C"));
        let state = State::from_pathway(&prep.pathway);
        let m = solve(&prep, &state).expect("solves");
        let want = closed_form(&dg0, &bounds, m.rt);
        // 1e-6 kJ/mol = 1e-3 J/mol.
        prop_assert!((m.value - want).abs() < 1e-3, "LP {} closed form {}", m.value, want);
        let c = certificate(&prep, &state, &m).expect("certificate");
        prop_assert!(c.primal < 1e-6 && c.dual < 1e-6 && c.gap < 1e-6 && c.complementary < 1e-6, "{:?}", c);
    }

    #[test]
    fn path_ranges_match_programmes(
        dg0 in prop::collection::vec(-20e3..20e3f64, 1..6),
        lows in prop::collection::vec(-8.0..-3.0f64, 7),
        widths in prop::collection::vec(0.5..4.0f64, 7),
    ) {
        let n = dg0.len();
        let bounds: Vec<(f64, f64)> = (0..=n).map(|i| (10f64.powf(lows[i]), 10f64.powf(lows[i] + widths[i]))).collect();
        let (paths, lps) = both_ranges(&dg0, &bounds);
        for (p, l) in paths.iter().zip(&lps) {
            prop_assert!((p.0 - l.0).abs() < 1e-4 && (p.1 - l.1).abs() < 1e-4, "{:?} vs {:?}", paths, lps);
        }
    }
}

#[test]
fn feasible_ranges_of_the_worked_chain() {
    // The worked chain with B = 0 (science.md §10): every x_j ≤ x_{j−1} − dG'°_j/RT inside
    // 1 µM–10 mM is a system of difference constraints, so [C]:
    // max x_j = min over a ≤ j of (u_a − Σ_{a<i≤j} dG'°_i/RT), min x_j = max over b ≥ j of
    // (l_b + Σ_{j<i≤b} dG'°_i/RT).
    let prep = prepared(&chain(&WORKED, &DEFAULT_BOUNDS, "25 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve_with_ranges(&prep, &state).expect("solves");
    let f = m
        .feasible_ranges
        .as_ref()
        .expect("MDF > 0 gives feasible ranges");
    let rt = m.rt;
    let (l, u) = (1e-6f64.ln(), 1e-2f64.ln());
    let n = WORKED.len();
    for j in 0..=n {
        let mut hi = u;
        for a in 0..j {
            let s: f64 = WORKED[a..j].iter().sum();
            hi = hi.min(u - s / rt);
        }
        let mut lo = l;
        for b in j + 1..=n {
            let s: f64 = WORKED[j..b].iter().sum();
            lo = lo.max(l + s / rt);
        }
        assert!(
            (f[j].0.ln() - lo).abs() < 1e-5 && (f[j].1.ln() - hi).abs() < 1e-5,
            "S{j}: {:?} vs ({}, {})",
            f[j],
            lo.exp(),
            hi.exp()
        );
    }
    // S1 can run the route between 56.5 µM (S2 at 1 µM behind a +10 kJ/mol step) and 10 mM.
    assert!((f[1].0 * 1e6 - 56.5).abs() < 0.1, "{:?}", f[1]);
    // Each feasible range holds the MDF range.
    let r = m.ranges.as_ref().expect("ranges");
    for (a, b) in r.iter().zip(f) {
        assert!(
            b.0 <= a.0 * (1.0 + 1e-9) && a.1 <= b.1 * (1.0 + 1e-9),
            "{a:?} in {b:?}"
        );
    }
}

#[test]
fn negative_mdf_has_no_feasible_ranges() {
    let prep = prepared(&chain(&[40e3], &DEFAULT_BOUNDS[..2], "25 C"));
    let state = State::from_pathway(&prep.pathway);
    let m = solve_with_ranges(&prep, &state).expect("solves");
    assert!(m.value < 0.0);
    assert!(m.ranges.is_some() && m.feasible_ranges.is_none());
}

/// a + atp -> b + adp with dG'° = 0, carriers at 1 mM; `extra` goes into atp's table.
fn kinase(extra: &str) -> String {
    format!(
        "format = 1\n[pathway]\nname = \"k\"\n[conditions]\ntemperature = \"25 C\"\n[compounds]\n\
         a = {{ conc = \"1 mM\" }}\nb = {{ conc = \"1 mM\" }}\n\
         atp = {{ conc = \"1 mM\", role = \"currency\"{extra} }}\nadp = {{ conc = \"1 mM\", role = \"currency\" }}\n\
         [[steps]]\nid = \"k1\"\nreaction = \"a + atp -> b + adp\"\ndg0 = 0\n"
    )
}

#[test]
fn carriers_are_held_unless_freed() {
    // Held at 1 mM each, only a and b move within 1 µM–10 mM: MDF = RT ln(1e-2 / 1e-6) [C].
    let prep = prepared(&kinase(""));
    let state = State::from_pathway(&prep.pathway);
    let m = solve(&prep, &state).expect("solves");
    assert!((m.value - m.rt * 1e4f64.ln()).abs() < 1e-3, "{}", m.value);
    let (atp, adp) = (prep.pathway.compound("atp"), prep.pathway.compound("adp"));
    let (atp, adp) = (atp.expect("atp"), adp.expect("adp"));
    assert_eq!((m.parts[atp], m.parts[adp]), (Part::Held, Part::Held));
    assert_optimal(&prep, &state, &m);
    // --free-currencies: the carriers also move, to 10 mM ATP and 1 µM ADP: RT ln 1e8 [C].
    let free = Options {
        free_currencies: true,
        ..Options::default()
    };
    let m = solve_with(&prep, &state, &free).expect("solves");
    assert!((m.value - m.rt * 1e8f64.ln()).abs() < 1e-3, "{}", m.value);
    assert_eq!((m.parts[atp], m.parts[adp]), (Part::Free, Part::Free));
    assert_optimal(&prep, &state, &m);
    // fixed = false frees ATP alone (to 10 mM; ADP stays at 1 mM): RT ln 1e5 [C].
    let prep = prepared(&kinase(", fixed = false"));
    let m = solve(&prep, &state).expect("solves");
    assert!((m.value - m.rt * 1e5f64.ln()).abs() < 1e-3, "{}", m.value);
    assert_eq!((m.parts[atp], m.parts[adp]), (Part::Free, Part::Held));
}

#[test]
fn one_feasible_range_matches_all_of_them() {
    // A step with two products is not a difference constraint, so this takes the programmes.
    let text = "format = 1\n[pathway]\nname = \"split\"\n[conditions]\ntemperature = \"25 C\"\n[compounds]\n\
        a = { conc = \"1 mM\" }\nb = { conc = \"1 mM\" }\nc = { conc = \"1 mM\" }\nd = { conc = \"1 mM\" }\n\
        [[steps]]\nid = \"r1\"\nreaction = \"a -> b + c\"\ndg0 = \"40 kJ/mol\"\n\
        [[steps]]\nid = \"r2\"\nreaction = \"b -> d\"\ndg0 = \"-3 kJ/mol\"\n";
    let prep = prepared(text);
    let state = State::from_pathway(&prep.pathway);
    let all = solve_with_ranges(&prep, &state).expect("solves");
    assert_optimal(&prep, &state, &all);
    let f = all.feasible_ranges.as_ref().expect("MDF > 0");
    let one = solve(&prep, &state).expect("solves");
    for (c, fc) in f.iter().enumerate() {
        let r = feasible_range(&prep, &state, &one, c)
            .expect("solves")
            .expect("free");
        assert!(
            (r.0 / fc.0 - 1.0).abs() < 1e-5 && (r.1 / fc.1 - 1.0).abs() < 1e-5,
            "{c}: {r:?} vs {fc:?}"
        );
    }
    // r1 at −dG' ≥ 0 needs a / (b c) ≥ exp(40 / RT): with a ≤ 10 mM and c ≥ 1 µM,
    // b ≤ 1e-2 / 1e-6 × exp(−40 / RT); a ≥ 1 µM × 1 µM × exp(40 / RT) [C].
    let rt = one.rt;
    let e = (40e3 / rt).exp();
    assert!((f[1].1 / (1e4 / e) - 1.0).abs() < 1e-5, "{:?}", f[1]);
    assert!((f[0].0 / (1e-12 * e) - 1.0).abs() < 1e-5, "{:?}", f[0]);
}

#[test]
fn a_batch_solves_each_distinct_programme_once_and_matches_solve() {
    let prep = prepared(crate::DEMO);
    let base = State::from_pathway(&prep.pathway);
    let p = &prep.pathway;
    let glc = p.compound("glc").expect("glc");
    let atp = p.compound("atp").expect("atp");
    let mut batch = Batch::default();
    let opts = Options::default();
    // glc is free: changing it leaves the programme as it was.
    let mut states = vec![base.clone()];
    for f in [0.5, 2.0] {
        let mut s = base.clone();
        s.conc[glc] *= f;
        states.push(s);
    }
    // atp is a held carrier: a new programme.
    let mut s = base.clone();
    s.conc[atp] *= 1.5;
    states.push(s);
    for s in &states {
        let got = batch.solve(&prep, s, &opts).expect("solves");
        let want = solve(&prep, s).expect("solves");
        assert_eq!(got, want);
    }
    assert_eq!(
        batch.solves, 2,
        "one programme for the free edits, one for the held"
    );
}

#[test]
fn a_batch_keeps_at_most_batch_kept_optima_and_still_matches_solve() {
    let prep = prepared(crate::DEMO);
    let base = State::from_pathway(&prep.pathway);
    let atp = prep.pathway.compound("atp").expect("atp");
    let mut batch = Batch::default();
    let opts = Options::default();
    let held = |k: usize| {
        let mut s = base.clone();
        s.conc[atp] *= 1.0 + k as f64 * 1e-4;
        s
    };
    // One more distinct held value than are kept: the store empties once.
    for k in 0..=BATCH_KEPT {
        batch.solve(&prep, &held(k), &opts).expect("solves");
    }
    assert_eq!(batch.solves, BATCH_KEPT + 1);
    assert_eq!(
        batch.solved.len(),
        1,
        "emptied when full, then the last kept"
    );
    // The first value was forgotten: solved again, to the same optimum.
    let again = batch.solve(&prep, &held(0), &opts).expect("solves");
    assert_eq!(batch.solves, BATCH_KEPT + 2);
    assert_eq!(again, solve(&prep, &held(0)).expect("solves"));
}
