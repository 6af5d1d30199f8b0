//! Structure-aware: the input bytes choose a pathway that the format allows
//! (compounds with concentrations inside the limits, reactions between
//! declared compounds, energies, optional charge and hydrogens, turns, side
//! steps, couplings, bypasses, conditions), written as a file. Unlike the
//! `load` target, almost every input gets past parsing, so the fuzzer
//! reaches the route builder, the mass balance, the analysis, the
//! optimisation and every report. A generated file must load; preparing it
//! may refuse a route that cannot balance, but only with a message; nothing
//! may panic and no result may be non-finite.
#![no_main]

use dgpath::analysis::{self, Direction, mdf};
use dgpath::model;
use dgpath::report::{self, EnergyUnit, TextOptions};
use dgpath::scenario::State;
use libfuzzer_sys::arbitrary::{Result, Unstructured};
use libfuzzer_sys::fuzz_target;
use std::fmt::Write;

/// A number in [lo, hi] from one byte.
fn span(u: &mut Unstructured, lo: f64, hi: f64) -> Result<f64> {
    Ok(lo + (hi - lo) * f64::from(u.arbitrary::<u8>()?) / 255.0)
}

fn pathway(u: &mut Unstructured) -> Result<String> {
    let mut t = String::from("format = 1\n[pathway]\nname = \"generated\"\n[conditions]\n");
    let _ = writeln!(t, "temperature = \"{:.2} C\"", span(u, 0.0, 60.0)?);
    let _ = writeln!(t, "ph = {:.3}", span(u, 5.0, 9.0)?);
    let _ = writeln!(t, "ionic_strength = \"{:.3} M\"", span(u, 0.0, 0.35)?);
    let nc = u.int_in_range(2..=9usize)?;
    t.push_str("[compounds]\n");
    // Which compounds carry species data (a solvent without any is water).
    let mut species = vec![false; nc];
    for c in 0..nc {
        let conc = 10f64.powf(span(u, -7.0, -1.0)?);
        let _ = write!(t, "c{c} = {{ conc = \"{conc:e} M\"");
        match u.int_in_range(0..=9u8)? {
            0 => t.push_str(", role = \"currency\""),
            1 if c > 0 => {
                t.push_str(", role = \"solvent\"");
                species[c] = true;
            }
            2 => t.push_str(", branch = true"),
            3 => t.push_str(", fixed = true"),
            _ => {}
        }
        if u.arbitrary::<bool>()? {
            let _ = write!(
                t,
                ", charge = {}, hydrogens = {}",
                u.int_in_range(-4..=2i8)?,
                u.int_in_range(0..=16u8)?
            );
            species[c] = true;
        }
        if u.arbitrary::<bool>()? {
            let _ = write!(t, ", cv = {:.2}", span(u, 0.0, 1.0)?);
        }
        t.push_str(" }\n");
    }
    let ns = u.int_in_range(1..=8usize)?;
    for s in 0..ns {
        // Distinct compounds on the two sides.
        let mut pool: Vec<usize> = (0..nc).collect();
        // The left side leaves at least one compound for the right.
        let side = |u: &mut Unstructured, pool: &mut Vec<usize>, keep: usize| -> Result<String> {
            let n = u.int_in_range(1..=2usize)?.min(pool.len() - keep);
            let mut terms = Vec::new();
            for _ in 0..n {
                if pool.is_empty() {
                    break;
                }
                let k = u.choose_index(pool.len())?;
                let c = pool.swap_remove(k);
                let coef = u.int_in_range(1..=3u8)?;
                terms.push(if coef == 1 {
                    format!("c{c}")
                } else {
                    format!("{coef} c{c}")
                });
            }
            Ok(terms.join(" + "))
        };
        let left = side(u, &mut pool, 1)?;
        let right = side(u, &mut pool, 0)?;
        // With species data for every reactant, protons follow from them
        // (a stated value must agree): state protons only otherwise.
        let all_species = (0..nc).all(|c| pool.contains(&c) || species[c]);
        let _ = write!(
            t,
            "[[steps]]\nid = \"s{s}\"\nreaction = \"{left} -> {right}\"\ndg0 = \"{:.2} kJ/mol\"\n",
            span(u, -60.0, 60.0)?
        );
        match u.int_in_range(0..=11u8)? {
            0 => t.push_str("side = true\n"),
            1 if s > 0 => {
                let _ = writeln!(t, "bypass_of = \"s{}\"", u.int_in_range(0..=s - 1)?);
            }
            2 if s + 1 < ns => {
                let _ = writeln!(t, "couple = \"s{}\"", s + 1);
            }
            3 => {
                let _ = writeln!(t, "times = {}", u.int_in_range(1..=3u8)?);
            }
            _ => {}
        }
        if u.arbitrary::<bool>()? {
            let _ = writeln!(t, "dg0_sd = \"{:.2} kJ/mol\"", span(u, 0.0, 10.0)?);
        }
        if u.arbitrary::<bool>()? {
            let _ = writeln!(t, "dh0 = \"{:.1} kJ/mol\"", span(u, -100.0, 100.0)?);
        }
        if u.arbitrary::<bool>()? && !all_species {
            let _ = writeln!(t, "protons = {}", u.int_in_range(-2..=2i8)?);
        }
    }
    Ok(t)
}

fuzz_target!(|data: &[u8]| {
    let mut u = Unstructured::new(data);
    let Ok(text) = pathway(&mut u) else {
        return;
    };
    let p = match model::load_str(&text, "generated.toml") {
        Ok(p) => p,
        Err(e) => {
            // Only what the generator cannot rule out by construction.
            let m = e.to_string();
            let expected = [
                "no [[steps]]",
                "main route has no steps",
                "bypass_of must name a step of the main route",
                "couples to",
                "coupled to itself",
                "both a side step and a bypass",
                "has no concentration",
            ];
            assert!(
                expected.iter().any(|x| m.contains(x)),
                "a generated file was refused: {m}\n{text}"
            );
            return;
        }
    };
    let prep = match analysis::prepare(p) {
        Ok(p) => p,
        Err(e) => {
            assert!(!e.problems.is_empty(), "a failed prepare must say why");
            return;
        }
    };
    let mut state = State::from_pathway(&prep.pathway);
    for direction in [Direction::Forward, Direction::Reverse] {
        state.direction = direction;
        if prep.route(direction).is_err() {
            continue;
        }
        let a = match analysis::analyze(&prep, &state) {
            Ok(a) => a,
            Err(e) => panic!("in-range values must analyse: {e}\n{text}"),
        };
        for s in a.steps.iter().chain(&a.side) {
            assert!(s.dg.is_finite() && s.dg0.is_finite(), "{text}");
            assert!(s.times > 0.0 && s.times.is_finite(), "{text}");
        }
        let _ = report::json_value(&prep, &state, &a, EnergyUnit::KJ).to_string();
        let _ = report::table(
            &prep,
            &state,
            &a,
            TextOptions {
                unit: EnergyUnit::Kcal,
                color: false,
                ascii: true,
            },
        );
        let _ = report::csv(&prep, &a, EnergyUnit::KJ);
        let _ = report::markdown(&prep, &state, &a, EnergyUnit::KJ);
        if let Ok(m) = mdf::solve(&prep, &state) {
            assert!(m.value.is_finite(), "{text}");
        }
    }
});
