//! The flux control estimate, run by hand (`cargo bench --bench control`):
//! how much the 5–95 % range moves between seeds at several numbers of
//! draws (the default must keep it under 0.01), the time of one range, and
//! the time of the estimate on long chains and on a route with splits.

use dgpath::analysis::{self, mca};
use dgpath::model;
use dgpath::scenario::State;
use std::time::Instant;

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
    let text = std::fs::read_to_string("pathways/succinate.toml").expect("succinate");
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
    for (name, m) in cases() {
        println!("{name}: {} steps, chain: {}", m.len(), m.is_chain());
        for draws in [1000, 4000, 24000] {
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
            let t0 = Instant::now();
            for _ in 0..5 {
                std::hint::black_box(m.ranges(draws, mca::SEED));
            }
            println!(
                "  {draws:>5} draws: largest spread of a range end over {seeds} seeds {worst:.4}; one range {:.2} ms",
                t0.elapsed().as_secs_f64() * 1e3 / 5.0
            );
        }
        let t0 = Instant::now();
        for _ in 0..1000 {
            std::hint::black_box(m.coefficients(None).ok());
        }
        println!(
            "  estimate alone: {:.2} µs",
            t0.elapsed().as_secs_f64() * 1e3
        );
    }
    for k in [100, 2_000, 13_000] {
        let m = split_route(k);
        let t0 = Instant::now();
        let ok = m.coefficients(None).is_ok();
        println!(
            "{}-step route with {} splits (banded above {} intermediates): estimate {:.3} ms (solved: {ok})",
            m.len(),
            k,
            mca::DENSE_MAX,
            t0.elapsed().as_secs_f64() * 1e3
        );
    }
    for n in [2_000, 40_000] {
        let m = chain(n);
        let t0 = Instant::now();
        for _ in 0..10 {
            std::hint::black_box(m.coefficients(None).ok());
        }
        println!(
            "{n}-step chain: estimate {:.3} ms",
            t0.elapsed().as_secs_f64() * 1e2
        );
        let t0 = Instant::now();
        std::hint::black_box(
            m.ranges(mca::DEFAULT_DRAWS.min(mca::RANGE_MAX_VALUES / n), mca::SEED),
        );
        println!(
            "  range with {} draws: {:.1} ms",
            mca::DEFAULT_DRAWS.min(mca::RANGE_MAX_VALUES / n),
            t0.elapsed().as_secs_f64() * 1e3
        );
    }
}
