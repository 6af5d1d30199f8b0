//! Timing of the driving-force optimisation, run by hand with
//! `cargo bench --bench mdf` (divan): the bundled demo (target ≤ 5 ms, so
//! the explorer can re-solve on every edit), a 1,000-step 1:1 chain
//! (target ≤ 200 ms) and a 100-step chain with a carrier pair, each without
//! and with concentration ranges. Longer routes: `benches/scale.rs`.

use dgpath::analysis::{Prepared, mdf, prepare};
use dgpath::model::load_str;
use dgpath::scenario::State;
use dgpath::synthetic;

fn main() {
    divan::main();
}

fn prepared(text: &str) -> (Prepared, State) {
    let prep = prepare(load_str(text, "bench.toml").expect("loads")).expect("prepares");
    let state = State::from_pathway(&prep.pathway);
    (prep, state)
}

fn case(name: &str) -> (Prepared, State) {
    match name {
        "demo" => prepared(dgpath::DEMO),
        "chain 1000" => prepared(&synthetic::chain(1000, false)),
        _ => prepared(&synthetic::chain(100, true)),
    }
}

#[divan::bench(args = ["demo", "chain 1000", "chain 100 with carrier"])]
fn solve(bencher: divan::Bencher, name: &str) {
    let (prep, state) = case(name);
    bencher.bench(|| mdf::solve(&prep, &state).expect("solves"));
}

#[divan::bench(args = ["demo", "chain 1000", "chain 100 with carrier"], sample_count = 5)]
fn solve_with_ranges(bencher: divan::Bencher, name: &str) {
    let (prep, state) = case(name);
    bencher.bench(|| mdf::solve_with_ranges(&prep, &state).expect("solves"));
}
