//! The flux control estimate, run by hand (`cargo bench --bench control`;
//! divan): the estimate and one 5–95 % range (at several numbers of draws)
//! on the demo at its optimum and on a bundled file, and the estimate and
//! its range on long chains and on a route with splits. Before the timings
//! it prints how much a range end moves between 20 seeds at each number of
//! draws (the default must keep it under 0.01): a statistic, not a time.

use dgpath::analysis::{self, mca};
use dgpath::model;
use dgpath::scenario::State;

/// The demo at its driving-force optimum (every step runs forward there) and a bundled file as written.
fn cases() -> Vec<(String, mca::Model)> {
    let mut out = Vec::new();
    let demo = analysis::prepare(model::load_str(dgpath::DEMO, dgpath::DEMO_NAME).expect("demo"))
        .expect("prepares");
    let mut st = State::from_pathway(&demo.pathway);
    let opt = analysis::mdf::solve(&demo, &st).expect("optimum");
    st.conc = opt.conc;
    let a = analysis::analyze(&demo, &st).expect("analyses");
    out.push((
        "demo at its optimum".to_string(),
        a.control_estimate.model.expect("an estimate"),
    ));
    let text = std::fs::read_to_string(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/pathways/succinate.toml"
    ))
    .expect("succinate");
    let p = analysis::prepare(model::load_str(&text, "succinate.toml").expect("loads"))
        .expect("prepares");
    let a = analysis::analyze(&p, &State::from_pathway(&p.pathway)).expect("analyses");
    out.push((
        "succinate".to_string(),
        a.control_estimate.model.expect("an estimate"),
    ));
    out
}

/// A chain of n steps with invented dG'/RT between −0.1 and −8.
fn chain(n: usize) -> mca::Model {
    let terms: Vec<Vec<(usize, f64)>> = (0..n)
        .map(|k| {
            let mut t = Vec::new();
            if k > 0 {
                t.push((k - 1, -1.0));
            }
            if k + 1 < n {
                t.push((k, if k % 9 == 0 { 2.0 } else { 1.0 }));
            }
            t
        })
        .collect();
    let g: Vec<f64> = (0..n).map(|k| -0.1 - (k * 37 % 80) as f64 / 10.0).collect();
    mca::Model::from_parts(
        (0..n - 1).collect(),
        &vec![1e-3; n - 1],
        terms,
        vec![1.0; n],
        &g,
    )
    .expect("model")
}

/// k blocks c -> e + f, e -> f, 2 f -> c' (a split and an isomerase), invented dG'/RT.
fn split_route(k: usize) -> mca::Model {
    let mut terms: Vec<Vec<(usize, f64)>> = Vec::new();
    let (c, e, f) = (|i: usize| 3 * i - 1, |i: usize| 3 * i, |i: usize| 3 * i + 1);
    for i in 0..k {
        let mut split = vec![(e(i), 1.0), (f(i), 1.0)];
        if i > 0 {
            split.push((c(i), -1.0));
        }
        terms.push(split);
        terms.push(vec![(e(i), -1.0), (f(i), 1.0)]);
        let mut join = vec![(f(i), -2.0)];
        if i + 1 < k {
            join.push((c(i + 1), 1.0));
        }
        terms.push(join);
    }
    let nv = 3 * k - 1;
    let n = terms.len();
    let g: Vec<f64> = (0..n).map(|j| -0.1 - (j * 37 % 60) as f64 / 10.0).collect();
    mca::Model::from_parts((0..nv).collect(), &vec![1e-3; nv], terms, vec![1.0; n], &g)
        .expect("model")
}

fn main() {
    seed_spread();
    divan::main();
}

/// The largest spread of a range end over 20 seeds, per number of draws.
fn seed_spread() {
    for (name, m) in cases() {
        println!("{name}: {} steps, chain: {}", m.len(), m.is_chain());
        for draws in DRAWS {
            let seeds = 20u64;
            let runs: Vec<Vec<(f64, f64)>> = (0..seeds)
                .map(|s| m.ranges(draws, 1000 + s).expect("range"))
                .collect();
            let mut worst: f64 = 0.0;
            for k in 0..m.len() {
                for end in 0..2 {
                    let v: Vec<f64> = runs
                        .iter()
                        .map(|r| if end == 0 { r[k].0 } else { r[k].1 })
                        .collect();
                    let spread = v.iter().cloned().fold(f64::MIN, f64::max)
                        - v.iter().cloned().fold(f64::MAX, f64::min);
                    worst = worst.max(spread);
                }
            }
            println!(
                "  {draws:>5} draws: largest spread of a range end over {seeds} seeds {worst:.4}"
            );
        }
    }
}

const DRAWS: [usize; 3] = [1000, 4000, 24000];

fn case(name: &str) -> mca::Model {
    cases()
        .into_iter()
        .find(|(n, _)| n == name)
        .map(|(_, m)| m)
        .expect("a case")
}

#[divan::bench(args = ["demo at its optimum", "succinate"])]
fn estimate(bencher: divan::Bencher, name: &str) {
    let m = case(name);
    bencher.bench_local(|| m.coefficients(None).ok());
}

#[divan::bench(consts = DRAWS, args = ["demo at its optimum", "succinate"], sample_count = 10)]
fn range<const D: usize>(bencher: divan::Bencher, name: &str) {
    let m = case(name);
    bencher.bench_local(|| m.ranges(D, mca::SEED));
}

#[divan::bench(args = [100, 2_000, 13_000], sample_count = 5)]
fn estimate_route_with_splits(bencher: divan::Bencher, splits: usize) {
    let m = split_route(splits);
    bencher.bench_local(|| m.coefficients(None).ok());
}

#[divan::bench(args = [2_000, 40_000], sample_count = 10)]
fn estimate_chain(bencher: divan::Bencher, n: usize) {
    let m = chain(n);
    bencher.bench_local(|| m.coefficients(None).ok());
}

#[divan::bench(args = [2_000, 40_000], sample_count = 5)]
fn range_chain(bencher: divan::Bencher, n: usize) {
    let m = chain(n);
    let draws = mca::DEFAULT_DRAWS.min(mca::RANGE_MAX_VALUES / n);
    bencher.bench_local(|| m.ranges(draws, mca::SEED));
}
