//! Timing of the driving-force optimisation, run by hand with
//! `cargo bench --bench mdf`: a 1,000-step 1:1 chain (target ≤ 200 ms) and the
//! bundled demo (target ≤ 5 ms, so the explorer can re-solve on every edit).
//! A plain timing loop; the figures are medians over repeated runs.

use dgpath::analysis::{Prepared, mdf, prepare};
use dgpath::model::load_str;
use dgpath::scenario::State;
use std::hint::black_box;
use std::time::{Duration, Instant};

/// An invented 1:1 chain s0 -> ... -> sn with standard energies between −12 and +8 kJ/mol.
fn chain(n: usize) -> String {
    let mut t = String::from(
        "format = 1\n[pathway]\nname = \"long chain (invented)\"\n[conditions]\ntemperature = \"30 C\"\n[compounds]\n",
    );
    for i in 0..=n {
        t.push_str(&format!("s{i} = {{ conc = \"0.1 mM\" }}\n"));
    }
    for i in 0..n {
        // A fixed pseudo-random pattern, so runs are comparable.
        let g = -12.0 + ((i * 7919) % 2000) as f64 / 100.0;
        t.push_str(&format!(
            "[[steps]]\nid = \"r{i}\"\nreaction = \"s{i} -> s{}\"\ndg0 = \"{g} kJ/mol\"\n",
            i + 1
        ));
    }
    t
}

/// As `chain`, with a free carrier pair (x + s_i -> s_{i+1} + y) on every
/// second step, so the ranges need one programme per end.
fn chain_with_carrier(n: usize) -> String {
    let mut t = chain(n);
    t = t.replace("[compounds]\n", "[compounds]\nx = { conc = \"1 mM\", role = \"currency\" }\ny = { conc = \"1 mM\", role = \"currency\" }\n");
    for i in (0..n).step_by(2) {
        t = t.replace(
            &format!("reaction = \"s{i} -> s{}\"", i + 1),
            &format!("reaction = \"x + s{i} -> s{} + y\"", i + 1),
        );
    }
    t
}

fn median(mut v: Vec<Duration>) -> Duration {
    v.sort();
    v[v.len() / 2]
}

fn time(label: &str, runs: usize, prep: &Prepared, state: &State, ranges: bool) {
    let mut times = Vec::with_capacity(runs);
    for _ in 0..runs {
        let t0 = Instant::now();
        let m = if ranges {
            mdf::solve_with_ranges(prep, state)
        } else {
            mdf::solve(prep, state)
        };
        times.push(t0.elapsed());
        black_box(m.expect("solves"));
    }
    let best = *times.iter().min().expect("runs");
    println!(
        "{label:<40} median {:>9.3} ms   best {:>9.3} ms   ({runs} runs)",
        median(times).as_secs_f64() * 1e3,
        best.as_secs_f64() * 1e3
    );
}

fn main() {
    let demo = prepare(load_str(dgpath::DEMO, dgpath::DEMO_NAME).expect("demo loads"))
        .expect("demo prepares");
    let demo_state = State::from_pathway(&demo.pathway);
    time("demo: solve", 200, &demo, &demo_state, false);
    time("demo: solve with ranges", 50, &demo, &demo_state, true);

    let long = prepare(load_str(&chain(1000), "chain1000.toml").expect("chain loads"))
        .expect("chain prepares");
    let long_state = State::from_pathway(&long.pathway);
    let m = mdf::solve(&long, &long_state).expect("solves");
    println!(
        "1,000-step chain: MDF {:.4} kJ/mol, {} bottleneck steps",
        m.value / 1e3,
        m.bottlenecks.len()
    );
    time("1,000-step chain: solve", 20, &long, &long_state, false);
    time(
        "1,000-step chain: solve with ranges",
        3,
        &long,
        &long_state,
        true,
    );

    let mixed = prepare(load_str(&chain_with_carrier(100), "chain100.toml").expect("chain loads"))
        .expect("chain prepares");
    let mixed_state = State::from_pathway(&mixed.pathway);
    time(
        "100-step chain, free carrier: solve",
        20,
        &mixed,
        &mixed_state,
        false,
    );
    time(
        "100-step chain, free carrier: with ranges",
        3,
        &mixed,
        &mixed_state,
        true,
    );
}
