//! Scale, run by hand (`cargo bench --bench scale`; divan): the whole
//! `report` path (read, check, balance, analyse, JSON) on invented routes of
//! 5,000 and 40,000 steps, and the driving-force optimisation with ranges on
//! 1,000- and 10,000-step chains with a carrier pair. Time should grow
//! linearly with length (40,000 within 12× of 5,000).

use dgpath::analysis::{self, mdf};
use dgpath::report::{self, EnergyUnit};
use dgpath::scenario::State;
use dgpath::{model, synthetic};

fn main() {
    divan::main();
}

#[divan::bench(args = [5_000, 40_000], sample_count = 5)]
fn report_json(bencher: divan::Bencher, n: usize) {
    let text = synthetic::route(n);
    bencher.bench(|| {
        let p = model::load_str(&text, "route.toml").expect("loads");
        let prep = analysis::prepare(p).expect("prepares");
        let st = State::from_pathway(&prep.pathway);
        let a = analysis::analyze(&prep, &st).expect("analyses");
        report::json_value(&prep, &st, &a, EnergyUnit::KJ).to_string()
    });
}

#[divan::bench(args = [1_000, 10_000], sample_count = 3)]
fn mdf_with_ranges(bencher: divan::Bencher, n: usize) {
    let text = synthetic::chain(n, true);
    let prep =
        analysis::prepare(model::load_str(&text, "chain.toml").expect("loads")).expect("prepares");
    let st = State::from_pathway(&prep.pathway);
    bencher.bench(|| mdf::solve_with_ranges(&prep, &st).expect("solves"));
}
